package scene

import (
	"context"
	"errors"
	"path/filepath"
	"slices"
	"strings"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/frame"
	"github.com/skyframe/skyframe/frameopt"
	"github.com/skyframe/skyframe/render"
	"github.com/skyframe/skyframe/sky"
	"github.com/skyframe/skyframe/spectrum"
	"gonum.org/v1/gonum/spatial/r3"
)

// Spec is everything about a single frame (a still) that is not the
// physics (frame.Spec), with the completeness of its catalogue.
type Spec struct {
	frame.Spec
	DepthRep *sky.Report // completeness of the catalogue for the frame; nil: not known
}

// starFinder looks stars up in the scene's catalogue through its names
// index (proper names, designations, catalogue numbers).
func (sc *Scene) starFinder() frameopt.StarFinder {
	return func(name string) (r3.Vec, float64, bool) {
		i, err := sc.Index.Find(name)
		if err != nil {
			return r3.Vec{}, 0, false
		}
		st := sc.Stars.At(i)
		return r3.Vec{X: st.Dir[0], Y: st.Dir[1], Z: st.Dir[2]}, st.Dist, true
	}
}

// Build turns the frame options into the frame's projection and render
// options for scene sc (the options given were checked by frameopt.Check).
func Build(o *frameopt.Options, sc *Scene) (*Spec, error) {
	spec := &Spec{}
	fr := o.Frame()
	forward, desc, err := lookDirection(sc, o.Look)
	if err != nil {
		return nil, err
	}
	spec.Look = desc
	up := r3.Vec{Z: 1}
	if o.Up != "" {
		d, err := frameopt.ParseDirection(o.Up, frameopt.SkyDir)
		if err != nil {
			return nil, usagef("--up: %v", err)
		}
		if up, err = d.Resolve(sc.Observer, sc.Heading, nil); err != nil {
			return nil, usagef("--up: %v", err)
		}
	}
	orient, err := camera.LookAt(forward, up, fr.Roll)
	if err != nil {
		return nil, usagef("--look/--up: %v", err)
	}
	spec.Proj = camera.Projection{Kind: fr.Kind, Width: fr.Width, Height: fr.Height, FOV: fr.FOV, Tilt: fr.Tilt, Orient: orient}
	if err := spec.Proj.Validate(); err != nil {
		return nil, usagef("--projection %s: %v", fr.Kind, err)
	}
	if err := spec.Proj.Prepare(); err != nil {
		return nil, &InputError{err}
	}
	spec.Tone, spec.Depth = fr.Tone, fr.Depth
	spec.Opt = render.Options{
		Projection: spec.Proj, Observer: sc.Observer, Beaming: fr.Beaming,
		FWHM: fr.FWHM, Exposure: fr.Exposure, Limit: fr.Limit,
		Color: spectrum.ColorOptions{White: fr.White},
	}
	return spec, nil
}

// starError explains why option flag's star reference q found no star
// (names.Index.Find's message: candidates or close matches), saying what
// else the option takes.
func (sc *Scene) starError(flag, other, q string) error {
	if _, err := findStar(sc.Index, flag, other, q); err != nil {
		return err
	}
	return usagef("--%s %q: want %s in %s", flag, q, other, sc.Stars.Source)
}

// lookDirection resolves --look into an apparent (ship-frame) direction and
// its description.
func lookDirection(sc *Scene, s string) (r3.Vec, string, error) {
	if s == "" {
		s = "ahead"
	}
	d, err := frameopt.ParseDirection(s, frameopt.AnyDir)
	if err != nil {
		return r3.Vec{}, "", usagef("--look: %v", err)
	}
	n, err := d.Resolve(sc.Observer, sc.Heading, sc.starFinder())
	switch {
	case errors.Is(err, frameopt.ErrUnknownStar):
		return r3.Vec{}, "", sc.starError("look", frameopt.AnyDir.Spellings(), d.Star)
	case err != nil:
		return r3.Vec{}, "", usagef("--look: %v", err)
	}
	desc := strings.ToLower(strings.TrimSpace(s))
	if d.Kind == frameopt.Star {
		if i, err := sc.Index.Find(d.Star); err == nil {
			desc = sc.Index.Label(i)
		}
	} else if d.Kind == frameopt.Apparent || d.Kind == frameopt.Catalogue {
		desc = strings.TrimSpace(s)
	}
	return n, desc, nil
}

// OutputPaths are the files one frame writes (by flag: --output, --fits,
// --sidecar, --exr, --overlay-layer); empty means not written. With
// Overlay set, the overlays go there alone and PNG holds the sky without
// them.
type OutputPaths struct{ PNG, FITS, Sidecar, EXR, Overlay string }

// WriteFrame writes the frame's files as one set (frame.Spec.Write).
// A layer --exr-layers asks for that the frame does not have is a usage
// error.
func WriteFrame(ctx context.Context, f *render.Frame, kept []render.Contribution, sc *Scene, spec *Spec, out OutputPaths, version string) error {
	spec.Version, spec.Stars, spec.Heading, spec.Beaming = version, sc.Stars, sc.Heading, sc.Beaming
	if d := spec.DepthRep; d != nil {
		spec.DepthV, spec.NeededV = finitePtr(d.Have), finitePtr(d.Threshold())
	}
	err := spec.Write(ctx, f, kept, frame.Paths(out))
	if errors.Is(err, frame.ErrEXRLayer) {
		return usagef("--exr-layers: %v", err)
	}
	return err
}

// Check refuses a set of paths without a PNG, naming one file twice or
// naming a file that cannot be written, naming the flag.
func (o OutputPaths) Check() error {
	if o.PNG == "" {
		return usagef("--output: a PNG file name is required")
	}
	seen := map[string]string{}
	for _, c := range []struct{ flag, path string }{{"output", o.PNG}, {"fits", o.FITS}, {"exr", o.EXR}, {"sidecar", o.Sidecar}, {"overlay-layer", o.Overlay}} {
		if c.path == "" {
			continue
		}
		if prev, dup := seen[filepath.Clean(c.path)]; dup {
			return usagef("--%s %s: the same file as --%s", c.flag, c.path, prev)
		}
		seen[filepath.Clean(c.path)] = c.flag
		if err := CheckWritable(c.flag, c.path); err != nil {
			return err
		}
	}
	return nil
}

// AddLayers completes spec for scene sc from the frame options o: the
// linear layers and overlays (FrameLayers), the OpenEXR content when out
// has an EXR file (a Doppler channel when its layers want one); an overlay
// layer file with no overlay selected is refused.
func AddLayers(o *frameopt.Options, sc *Scene, spec *Spec, out OutputPaths) error {
	var err error
	if spec.Layers, err = FrameLayers(o, sc, &spec.Opt); err != nil {
		return err
	}
	spec.Layers.ForEightBit(out.FITS == "" && out.EXR == "" && spec.Depth != 16)
	if out.EXR != "" {
		if spec.EXR, err = o.EXR(); err != nil {
			return &InputError{err}
		}
		spec.Opt.Doppler = spec.EXR.Layers == nil || slices.Contains(spec.EXR.Layers, frame.EXRDoppler)
	}
	if out.Overlay != "" && !spec.Layers.Options.Any() {
		return usagef("--overlay-layer %s: no overlay is selected (add --grid, --labels, --hud, …)", out.Overlay)
	}
	return nil
}

// Render draws the frame of spec for scene sc: its stars (from stream
// chunk by chunk when it is set, else sc.Stars), then its linear layers,
// keeping each layer's contribution when keep (for the EXR layers).
func Render(ctx context.Context, sc *Scene, spec *Spec, stream *catalog.ChunkReader, keep bool) (*render.Frame, []render.Contribution, error) {
	var f *render.Frame
	var err error
	if stream != nil {
		f, err = render.RenderChunks(ctx, stream, spec.Opt)
	} else {
		f, err = render.Render(sc.Stars, spec.Opt)
	}
	if err != nil {
		return nil, nil, err
	}
	var kept []render.Contribution
	if keep {
		kept, err = spec.Layers.AddLinearKept(f)
	} else {
		err = spec.Layers.AddLinear(f)
	}
	if err != nil {
		return nil, nil, err
	}
	return f, kept, nil
}
