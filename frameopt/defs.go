package frameopt

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/exr"
	"github.com/skyframe/skyframe/frame"
	"github.com/skyframe/skyframe/overlay"
	"github.com/skyframe/skyframe/render"
	"github.com/skyframe/skyframe/spectrum"
)

// Plan tables of the options.
const (
	CameraTable   = "camera"
	OverlaysTable = "overlays"
)

// DefaultShutter is the shutter angle in degrees when none is given: half
// the frame interval, the film convention (common practice).
const DefaultShutter = 180.0

// Defs is the table of every frame option, in help order.
var Defs = []Def{
	{Name: "look", Table: CameraTable, Type: Text, Arg: "DIR", Default: "ahead", Dirs: AnyDir, Keyed: true,
		Help:  "view direction: " + AnyDir.Spellings(),
		Check: dirCheck(func(o *Options) string { return o.Look }, AnyDir),
		ptr:   func(o *Options) any { return &o.Look }},
	{Name: "up", Table: CameraTable, Type: Text, Arg: "DIR", Default: "north celestial pole", Dirs: SkyDir, Keyed: true,
		Help:  "camera up direction: " + SkyDir.Spellings(),
		Check: dirCheck(func(o *Options) string { return o.Up }, SkyDir),
		ptr:   func(o *Options) any { return &o.Up }},
	{Name: "roll", Table: CameraTable, Type: Number, Arg: "DEG", Default: "0", Keyed: true,
		Help:  "camera roll in degrees about the view direction (positive banks right)",
		Check: rangeCheck(func(o *Options) float64 { return o.Roll }, -360, 360),
		ptr:   func(o *Options) any { return &o.Roll }},
	{Name: "projection", Table: CameraTable, Type: Text, Arg: "KIND", Default: "pinhole",
		Help: "projection: pinhole, equirect, fisheye (fulldome domemaster) or cube (6x1 strip)",
		Check: func(o *Options) error {
			_, err := kind(o)
			return err
		},
		ptr: func(o *Options) any { return &o.Projection }},
	{Name: "fov", Table: CameraTable, Type: Number, Arg: "DEG", Default: "60 pinhole, 180 fisheye", Keyed: true,
		Help:  "field of view in degrees: pinhole horizontal, fisheye circle",
		Check: checkFOV,
		ptr:   func(o *Options) any { return &o.FOV }},
	{Name: "tilt", Table: CameraTable, Type: Number, Arg: "DEG", Default: "0", Keyed: true,
		Help:  "fisheye only: turn the dome axis (frame centre) from the view direction toward up by DEG, so the view direction appears DEG below the centre, toward the dome's front (the bottom of the frame)",
		Check: rangeCheck(func(o *Options) float64 { return o.Tilt }, -180, 180),
		ptr:   func(o *Options) any { return &o.Tilt }},
	{Name: "size", Table: CameraTable, Type: Text, Arg: "WxH", Default: "1920x1080; fisheye 2048x2048, equirect 4096x2048, cube 3072x512",
		Help: "image size WIDTHxHEIGHT in pixels, each side at most " + strconv.Itoa(camera.MaxSize),
		Check: func(o *Options) error {
			_, _, err := o.FrameSize()
			return err
		},
		ptr: func(o *Options) any { return &o.Size }},
	{Name: "exposure", Table: CameraTable, Type: Magnitude, Arg: "MAG", Default: fmt.Sprintf("the naked-eye preset, %.3g", render.NakedEyeExposure()), Keyed: true,
		Help: "exposure in V magnitudes: a white star this bright just reaches full scale; fixed, never adjusted to the frame",
		Check: func(o *Options) error {
			if o.Exposure == nil {
				return nil
			}
			if v := *o.Exposure; !(v >= render.MinExposure && v <= render.MaxExposure) {
				return fmt.Errorf("%g: want a V magnitude from %g to %g", v, render.MinExposure, render.MaxExposure)
			}
			return nil
		},
		ptr: func(o *Options) any { return &o.Exposure }},
	{Name: "preset", Table: CameraTable, Type: Text, Arg: "NAME", Default: "naked-eye",
		Help: "exposure preset when no exposure is given: naked-eye (V = 6.5 just visible)",
		Check: func(o *Options) error {
			_, err := presetExposure(o.Preset)
			return err
		},
		ptr: func(o *Options) any { return &o.Preset }},
	{Name: "limit", Table: CameraTable, Type: Number, Arg: "MAG", Default: "exposure + 10",
		Help: "skip stars whose observed V is fainter than this",
		ptr:  func(o *Options) any { return &o.Limit }},
	{Name: "tone", Table: CameraTable, Type: Text, Arg: "CURVE", Default: "shoulder",
		Help: "tone curve: shoulder (smooth roll-off that keeps hue, for outreach) or linear (clip, for science)",
		Check: func(o *Options) error {
			if _, err := render.ParseTone(o.Tone); err != nil || o.Tone == "" {
				return fmt.Errorf("%q: want shoulder or linear", o.Tone)
			}
			return nil
		},
		ptr: func(o *Options) any { return &o.Tone }},
	{Name: "white", Table: CameraTable, Type: Text, Arg: "POINT", Default: "d65",
		Help: "white point the viewer is adapted to: " + WhiteNames(),
		Check: func(o *Options) error {
			if _, err := spectrum.ParseWhitePoint(o.White); err != nil || o.White == "" {
				return fmt.Errorf("%q: want %s", o.White, WhiteNames())
			}
			return nil
		},
		ptr: func(o *Options) any { return &o.White }},
	{Name: "fwhm", Table: CameraTable, Type: Number, Arg: "PX", Default: strconv.FormatFloat(render.DefaultFWHM, 'g', -1, 64),
		Help: "star image FWHM in pixels (Gaussian, energy-conserving)",
		Check: func(o *Options) error {
			if !(o.FWHM > 0 && o.FWHM <= render.MaxFWHM) {
				return fmt.Errorf("%g: want 0 < FWHM ≤ %g pixels", o.FWHM, float64(render.MaxFWHM))
			}
			return nil
		},
		ptr: func(o *Options) any { return &o.FWHM }},
	{Name: "depth", Table: CameraTable, Type: Integer, Arg: "BITS", Default: "8",
		Help: "PNG bits per channel: 8 or 16",
		Check: func(o *Options) error {
			if o.Depth != 8 && o.Depth != 16 {
				return fmt.Errorf("%d: want 8 or 16", o.Depth)
			}
			return nil
		},
		ptr: func(o *Options) any { return &o.Depth }},
	{Name: "exr-type", Table: CameraTable, Type: Text, Arg: "TYPE", Default: "half",
		Help: "OpenEXR sample type: half (16-bit float) or float (32-bit; the doppler channel is always float)",
		Check: func(o *Options) error {
			if _, err := exr.ParsePixelType(o.EXRType); err != nil {
				return fmt.Errorf("%q: want half or float", o.EXRType)
			}
			return nil
		},
		ptr: func(o *Options) any { return &o.EXRType }},
	{Name: "exr-compression", Table: CameraTable, Type: Text, Arg: "KIND", Default: "zip",
		Help: "OpenEXR compression: zip (lossless, blocks of 16 lines) or none",
		Check: func(o *Options) error {
			if _, err := exr.ParseCompression(o.EXRCompression); err != nil {
				return fmt.Errorf("%q: want zip or none", o.EXRCompression)
			}
			return nil
		},
		ptr: func(o *Options) any { return &o.EXRCompression }},
	{Name: "exr-layers", Table: CameraTable, Type: Text, Arg: "LIST", Default: "all",
		Help: "OpenEXR layers beside the combined RGB: all (every layer the frame has), none, or a comma-separated list of " + strings.Join(frame.EXRLayerNames, ", "),
		Check: func(o *Options) error {
			_, err := frame.ParseEXRLayers(o.EXRLayers)
			return err
		},
		ptr: func(o *Options) any { return &o.EXRLayers }},
	{Name: "beaming", Table: CameraTable, Type: Text, Arg: "RULE", Default: "exact",
		Help: "point-source beaming convention: exact (flux ∝ D²), d3, d4 (moving-source conventions of published figures)",
		Check: func(o *Options) error {
			if _, err := spectrum.ParseBeaming(o.Beaming); err != nil || o.Beaming == "" {
				return fmt.Errorf("%q: want exact, d3 or d4", o.Beaming)
			}
			return nil
		},
		ptr: func(o *Options) any { return &o.Beaming }},

	{Name: "shutter", Table: CameraTable, Type: Magnitude, Arg: "DEG", Default: strconv.FormatFloat(DefaultShutter, 'g', -1, 64),
		Help: "shutter angle in degrees of the frame interval (0 off, 360 the whole interval): a flight frame integrates the sky over that part of the interval around its time, so moving stars streak (motion blur); a still is one instant and does not move",
		Check: func(o *Options) error {
			if o.Shutter == nil {
				return nil
			}
			return inRange(*o.Shutter, 0, 360)
		},
		ptr: func(o *Options) any { return &o.Shutter }},
	{Name: "cmb", Table: OverlaysTable, Type: Switch, Default: "false",
		Help: "add the cosmic microwave background at its true surface brightness (in the PNG and the FITS)",
		ptr:  func(o *Options) any { return &o.CMB }},
	{Name: "unresolved", Table: OverlaysTable, Type: Text, Arg: "MODE", Default: "auto",
		Help: "the light of the stars too faint to draw, from the built-in sky's galaxy model, as a diffuse layer (in the PNG and the FITS): auto (on for the built-in sky, off for a catalogue file), on or off",
		Check: func(o *Options) error {
			switch strings.ToLower(strings.TrimSpace(o.Unresolved)) {
			case "auto", "on", "off":
				return nil
			}
			return fmt.Errorf("%q: want auto, on or off", o.Unresolved)
		},
		ptr: func(o *Options) any { return &o.Unresolved }},
	{Name: "unresolved-depth", Table: OverlaysTable, Type: Magnitude, Arg: "MAG", Default: "the built-in sky's depth",
		Help: "V magnitude where the catalogue stops resolving stars: the unresolved layer holds the model's light of the fainter ones (needed for a catalogue file; giving it turns the layer on unless unresolved is off)",
		Check: func(o *Options) error {
			if o.UnresolvedDepth == nil {
				return nil
			}
			if v := *o.UnresolvedDepth; !(v >= catalog.MinUnresolvedDepth && v <= catalog.MaxUnresolvedDepth) {
				return fmt.Errorf("%g: want a V magnitude from %g to %g", v, catalog.MinUnresolvedDepth, catalog.MaxUnresolvedDepth)
			}
			return nil
		},
		ptr: func(o *Options) any { return &o.UnresolvedDepth }},
	{Name: "grid", Table: OverlaysTable, Type: Text, Arg: "FRAME", Default: "none",
		Help: "overlay a coordinate grid, aberrated like the stars: none, radec or galactic",
		Check: func(o *Options) error {
			if _, err := overlay.ParseGraticuleFrame(o.Grid); err != nil || o.Grid == "" {
				return fmt.Errorf("%q: want none, radec or galactic", o.Grid)
			}
			return nil
		},
		ptr: func(o *Options) any { return &o.Grid }},
	{Name: "grid-step", Table: OverlaysTable, Type: Number, Arg: "DEG", Default: strconv.FormatFloat(overlay.DefaultGraticuleStep, 'g', -1, 64),
		Help: "grid line spacing in degrees (0 < step ≤ 90)",
		Check: func(o *Options) error {
			if !(o.GridStep > 0 && o.GridStep <= 90) {
				return fmt.Errorf("%g: want degrees with 0 < step ≤ 90", o.GridStep)
			}
			return nil
		},
		ptr: func(o *Options) any { return &o.GridStep }},
	{Name: "unity-circle", Table: OverlaysTable, Type: Switch, Default: "false",
		Help: "overlay the circle where the Doppler factor is 1 (blueshift inside, redshift outside)",
		ptr:  func(o *Options) any { return &o.UnityCircle }},
	{Name: "mark-motion", Table: OverlaysTable, Type: Switch, Default: "false",
		Help: "mark the direction of motion",
		ptr:  func(o *Options) any { return &o.MarkMotion }},
	{Name: "mark-destination", Table: OverlaysTable, Type: Text, Arg: "DIR", Dirs: PointDir,
		Help:  "mark a destination: " + PointDir.Spellings() + "; a flight marks its trajectory's end when this is not given",
		Check: dirCheck(func(o *Options) string { return o.MarkDestination }, PointDir),
		ptr:   func(o *Options) any { return &o.MarkDestination }},
	{Name: "lattice", Table: OverlaysTable, Type: Integer, Arg: "N", Default: "0",
		Help: "overlay a cubic lattice of N×N×N beacons at rest around the ship's position",
		Check: func(o *Options) error {
			if o.Lattice < 0 {
				return fmt.Errorf("%d: want a count per side ≥ 0", o.Lattice)
			}
			lo := overlay.LatticeOptions{PerSide: o.Lattice, Confirm: o.LatticeConfirm}
			if n, err := lo.Count(); err != nil {
				if n > overlay.MaxBeacons {
					return fmt.Errorf("%d: %d beacons is more than %d; add lattice-confirm to draw them", o.Lattice, n, overlay.MaxBeacons)
				}
				return fmt.Errorf("%d: %v", o.Lattice, err)
			}
			return nil
		},
		ptr: func(o *Options) any { return &o.Lattice }},
	{Name: "lattice-step", Table: OverlaysTable, Type: Number, Arg: "PC", Default: strconv.FormatFloat(overlay.DefaultLatticeSpacing, 'g', -1, 64),
		Help: "lattice beacon spacing in parsecs",
		Check: func(o *Options) error {
			if !(o.LatticeStep > 0) || math.IsInf(o.LatticeStep, 0) {
				return fmt.Errorf("%g: want a finite spacing > 0 parsecs", o.LatticeStep)
			}
			return nil
		},
		ptr: func(o *Options) any { return &o.LatticeStep }},
	{Name: "lattice-confirm", Table: OverlaysTable, Type: Switch, Default: "false",
		Help: "allow a lattice of more than 1,000,000 beacons",
		ptr:  func(o *Options) any { return &o.LatticeConfirm }},
	{Name: "labels", Table: OverlaysTable, Type: Integer, Arg: "N", Default: "0",
		Help: "label the N brightest stars in the frame",
		Check: func(o *Options) error {
			if o.Labels < 0 {
				return fmt.Errorf("%d: want a count ≥ 0", o.Labels)
			}
			return nil
		},
		ptr: func(o *Options) any { return &o.Labels }},
	{Name: "label", Table: OverlaysTable, Type: List, Arg: "STAR",
		Help: "label this star: a name, designation or id (Betelgeuse, α Ori, HR 2061); STAR=TEXT labels it with TEXT (repeatable, a list in a plan)",
		Check: func(o *Options) error {
			for _, s := range o.Label {
				if strings.TrimSpace(s) == "" {
					return fmt.Errorf("an empty star name")
				}
			}
			return nil
		},
		ptr: func(o *Options) any { return &o.Label }},
	{Name: "hud", Table: OverlaysTable, Type: Text, Arg: "CORNER",
		Help: "show a heads-up display in a corner: top-left, top-right, bottom-left, bottom-right (or tl, tr, bl, br); in a fisheye frame it sits in the dome's front safe area (bottom: low, top: high, left/right: turned toward that side)",
		Check: func(o *Options) error {
			if o.HUD == "" {
				return nil
			}
			if _, err := overlay.ParseCorner(o.HUD); err != nil {
				return fmt.Errorf("%q: want top-left, top-right, bottom-left or bottom-right", o.HUD)
			}
			return nil
		},
		ptr: func(o *Options) any { return &o.HUD }},
	{Name: "hud-title", Table: OverlaysTable, Type: Text, Arg: "TEXT",
		Help: "title line of the heads-up display (a flight's default: the plan's title)",
		Check: func(o *Options) error {
			if o.HUD == "" {
				return fmt.Errorf("needs hud CORNER")
			}
			return nil
		},
		ptr: func(o *Options) any { return &o.HUDTitle }},
	{Name: "text-size", Table: OverlaysTable, Type: Number, Arg: "PT", Default: strconv.FormatFloat(overlay.DefaultTextSize, 'g', -1, 64),
		Help: "size of label and heads-up display text in points (a point is a pixel up to a 720-pixel short side, proportionally more above)",
		Check: func(o *Options) error {
			if !(o.TextSize > 0 && o.TextSize <= overlay.MaxTextSize) {
				return fmt.Errorf("%g: want points with 0 < size ≤ %g", o.TextSize, overlay.MaxTextSize)
			}
			return nil
		},
		ptr: func(o *Options) any { return &o.TextSize }},
}

func dirCheck(get func(*Options) string, allow DirSet) func(*Options) error {
	return func(o *Options) error {
		_, err := ParseDirection(get(o), allow)
		return err
	}
}

func rangeCheck(get func(*Options) float64, lo, hi float64) func(*Options) error {
	return func(o *Options) error { return inRange(get(o), lo, hi) }
}

func inRange(v, lo, hi float64) error {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return fmt.Errorf("%v: want a finite number", v)
	}
	if v < lo || v > hi {
		return fmt.Errorf("%g: want %g to %g", v, lo, hi)
	}
	return nil
}

func kind(o *Options) (camera.Kind, error) {
	if o.Projection == "" {
		return camera.Pinhole, nil
	}
	k, err := camera.ParseKind(o.Projection)
	if err != nil {
		return k, fmt.Errorf("%q: want pinhole, equirect, fisheye or cube", o.Projection)
	}
	return k, nil
}

func checkFOV(o *Options) error {
	k, err := kind(o)
	if err != nil {
		return nil // reported for projection
	}
	v := o.FOV
	switch k {
	case camera.Pinhole:
		if !(v == 0 || v >= camera.MinFOV && v <= camera.MaxPinholeFOV) {
			return fmt.Errorf("%g: want %g to %g degrees for pinhole (0 for %g)", v, camera.MinFOV, camera.MaxPinholeFOV, camera.DefaultPinholeFOV)
		}
	case camera.Fisheye:
		if !(v == 0 || v >= camera.MinFOV && v <= camera.MaxFisheyeFOV) {
			return fmt.Errorf("%g: want %g to %g degrees for fisheye (0 for %g)", v, camera.MinFOV, camera.MaxFisheyeFOV, camera.DefaultFisheyeFOV)
		}
	default:
		if !(v >= 0 && v <= 360) {
			return fmt.Errorf("%g: want 0 to 360 degrees", v)
		}
	}
	return nil
}

// WhiteNames lists the white point names.
func WhiteNames() string {
	var names []string
	for w := spectrum.WhiteD65; len(names) < 16; w++ {
		s := w.String()
		if _, err := spectrum.ParseWhitePoint(s); err != nil {
			break
		}
		names = append(names, strings.ToLower(s))
	}
	return strings.Join(names, ", ")
}

func presetExposure(name string) (float64, error) {
	switch name {
	case "", "naked-eye":
		return render.NakedEyeExposure(), nil
	}
	return 0, fmt.Errorf("%q: want naked-eye", name)
}

// DefaultSize is the frame size of projection k when no size is given.
func DefaultSize(k camera.Kind) (int, int) {
	switch k {
	case camera.Fisheye:
		return 2048, 2048
	case camera.Equirect:
		return 4096, 2048
	case camera.Cube:
		return 3072, 512
	}
	return 1920, 1080
}

// FrameSize returns the frame's width and height: Size, or the
// projection's default.
func (o *Options) FrameSize() (w, h int, err error) {
	k, err := kind(o)
	if err != nil {
		k = camera.Pinhole
	}
	if o.Size == "" {
		w, h = DefaultSize(k)
		return w, h, nil
	}
	a, b, ok := strings.Cut(strings.ToLower(o.Size), "x")
	if !ok {
		return 0, 0, fmt.Errorf("%q: want WIDTHxHEIGHT, e.g. 1920x1080", o.Size)
	}
	w, err1 := strconv.Atoi(strings.TrimSpace(a))
	h, err2 := strconv.Atoi(strings.TrimSpace(b))
	if err1 != nil || err2 != nil {
		return 0, 0, fmt.Errorf("%q: want WIDTHxHEIGHT in whole pixels", o.Size)
	}
	if w < 1 || h < 1 || w > camera.MaxSize || h > camera.MaxSize {
		return 0, 0, fmt.Errorf("%q: each side must be between 1 and %d pixels", o.Size, camera.MaxSize)
	}
	if k == camera.Cube && w != 6*h {
		return 0, 0, fmt.Errorf("%q: a cube strip is 6 faces wide (width = 6 × height)", o.Size)
	}
	return w, h, nil
}
