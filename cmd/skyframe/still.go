package main

import (
	"errors"
	"fmt"
	"image/draw"
	"io"
	"math"
	"path/filepath"
	"strings"
	"time"

	"github.com/spf13/pflag"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/overlay"
	"github.com/skyframe/skyframe/render"
	"github.com/skyframe/skyframe/spectrum"
)

const stillHelp = `Usage: skyframe still [options]

Render one frame of the sky seen from the ship: every star's apparent
direction (exact Lorentz aberration), colour (its blackbody at D·T integrated
over the CIE 1931 colour-matching functions) and brightness (beaming), into a
linear float buffer written as sRGB PNG, optionally as 32-bit float FITS with
WCS, plus a JSON sidecar with the full physical state.

With no options it renders the built-in sky at 0.9 c toward the galactic
centre, looking ahead, 1920x1080, to sky.png (and sky.json).

Fulldome (--projection fisheye): the frame is a domemaster as the fulldome
show-file convention describes it (Dome Master Show File Format 1.0, sec. II,
fulldome.org standards group): an equidistant fisheye (radius proportional to
the angle from the centre) in a circle touching the frame's edges, its centre
the dome's zenith, the circle's edge the spring line at the default 180°
field; the BOTTOM of the frame is the FRONT of the dome, and left and right
are the left and right of a viewer at the dome's centre facing the front.
Give square sizes; the convention's standard ones include 2048x2048,
4096x4096 and 8192x8192. The view direction (--look) is at the centre;
--tilt DEG turns the dome's axis from it toward --up, so the view direction
appears DEG below the centre, toward the front (the convention suggests a
nominal camera tilt of 15°).

Examples:
  skyframe still
  skyframe still --speed 0.99 --projection fisheye --size 2048x2048 -o dome.png
  skyframe still --gamma 1000 --projection equirect --size 4096x2048 -o pano.png
  skyframe still --catalog ../shared/catalogs/bsc5.dat --speed 0.5 --toward 88.79,7.41 --look behind
  skyframe still --speed 0.3 --look Sollow --fov 40 --fits sollow.fits --tone linear

Options:
`

type stillFlags struct {
	look, up              string
	roll                  float64
	projection            string
	fov, tilt             float64
	size                  string
	exposure, limit       float64
	preset                string
	tone, white           string
	fwhm                  float64
	depth                 int
	output, fits, sidecar string
	noSidecar             bool
	memory                string
}

func (f *stillFlags) register(fs *pflag.FlagSet) {
	fs.StringVar(&f.look, "look", "ahead", "view direction: ahead (direction of motion), behind, an apparent RA,DEC in ICRS degrees, or a star id or name (its apparent position)")
	fs.StringVar(&f.up, "up", "", "camera up direction as RA,DEC (default: the north celestial pole)")
	fs.Float64Var(&f.roll, "roll", 0, "camera roll in degrees about the view direction (positive banks right)")
	fs.StringVar(&f.projection, "projection", "pinhole", "projection: pinhole, equirect, fisheye (fulldome domemaster) or cube (6x1 strip)")
	fs.Float64Var(&f.fov, "fov", 0, "field of view in degrees: pinhole horizontal (default 60), fisheye circle (default 180)")
	fs.Float64Var(&f.tilt, "tilt", 0, "fisheye only: turn the dome axis (frame centre) from the view direction toward --up by DEG, so the view direction appears DEG below the centre, toward the dome's front (the bottom of the frame)")
	fs.StringVar(&f.size, "size", "", "image size WIDTHxHEIGHT (default 1920x1080; fisheye 2048x2048, equirect 4096x2048, cube 3072x512)")
	fs.Float64Var(&f.exposure, "exposure", math.Round(render.NakedEyeExposure()*1000)/1000, "exposure in V magnitudes: a white star this bright just reaches full scale; fixed for every frame (default: the naked-eye preset)")
	fs.StringVar(&f.preset, "preset", "naked-eye", "exposure preset when --exposure is not given: naked-eye (V = 6.5 just visible)")
	fs.Float64Var(&f.limit, "limit", 0, "skip stars whose observed V is fainter than this (default exposure + 10)")
	fs.StringVar(&f.tone, "tone", "shoulder", "tone curve: shoulder (smooth roll-off that keeps hue, for outreach) or linear (clip, for science)")
	fs.StringVar(&f.white, "white", "d65", "white point the viewer is adapted to: "+whiteNames())
	fs.Float64Var(&f.fwhm, "fwhm", render.DefaultFWHM, "star image FWHM in pixels (Gaussian, energy-conserving)")
	fs.IntVar(&f.depth, "depth", 8, "PNG bits per channel: 8 or 16")
	fs.StringVarP(&f.output, "output", "o", "sky.png", "PNG file to write")
	fs.StringVar(&f.fits, "fits", "", "also write the linear buffer as 32-bit float FITS with WCS to this file")
	fs.StringVar(&f.sidecar, "sidecar", "", "JSON sidecar file (default: the PNG name with .json)")
	fs.BoolVar(&f.noSidecar, "no-sidecar", false, "do not write the JSON sidecar")
	fs.StringVar(&f.memory, "memory", "1GiB", "memory budget for the render; a cache-file catalogue (skyframe catalog pack) with more stars than one chunk this budget allows is read from disk chunk by chunk instead of loaded whole, with the same result")
}

func whiteNames() string {
	var names []string
	for w := spectrum.WhiteD65; ; w++ {
		s := w.String()
		if _, err := spectrum.ParseWhitePoint(s); err != nil {
			break
		}
		names = append(names, strings.ToLower(s))
		if len(names) > 16 {
			break
		}
	}
	return strings.Join(names, ", ")
}

// defaultSize is the frame size per projection when --size is not given.
func defaultSize(k camera.Kind) (int, int) {
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

// frameSpec is everything about a frame that is not the physics.
type frameSpec struct {
	proj     camera.Projection
	opt      render.Options
	tone     render.ToneMode
	depth    int
	lookDesc string
	source   string // command recorded in the PNG "Source" chunk; empty: "skyframe still"
	layers   layerSet
}

// frame reads --projection and --size.
func (f *stillFlags) frame() (kind camera.Kind, w, h int, err error) {
	kind, err = camera.ParseKind(f.projection)
	if err != nil {
		return kind, 0, 0, usagef("--projection %q: want pinhole, equirect, fisheye or cube", f.projection)
	}
	w, h = defaultSize(kind)
	if f.size != "" {
		if w, h, err = parseSize("size", f.size); err != nil {
			return kind, 0, 0, err
		}
	}
	return kind, w, h, nil
}

func (f *stillFlags) build(fs *pflag.FlagSet, sc *scene) (*frameSpec, error) {
	spec := &frameSpec{}
	kind, w, h, err := f.frame()
	if err != nil {
		return nil, err
	}
	for name, v := range map[string]float64{"fov": f.fov, "tilt": f.tilt, "roll": f.roll, "fwhm": f.fwhm, "limit": f.limit} {
		if err := checkFinite(name, v); err != nil {
			return nil, err
		}
	}
	forward, desc, err := lookDirection(sc, f.look)
	if err != nil {
		return nil, err
	}
	spec.lookDesc = desc
	var up r3.Vec
	if f.up != "" {
		ra, dec, err := parseRADec("up", f.up)
		if err != nil {
			return nil, err
		}
		up = camera.FromRADec(ra, dec)
	} else {
		up = r3.Vec{Z: 1}
	}
	orient, err := camera.LookAt(forward, up, f.roll)
	if err != nil {
		return nil, usagef("--look/--up: %v", err)
	}
	spec.proj = camera.Projection{Kind: kind, Width: w, Height: h, FOV: f.fov, Tilt: f.tilt, Orient: orient}
	if err := spec.proj.Validate(); err != nil {
		return nil, usagef("%s", projectionFlagError(err, kind))
	}
	if err := spec.proj.Prepare(); err != nil {
		return nil, usageError{err}
	}
	exposure := f.exposure
	if fs.Changed("exposure") {
		if !(exposure >= render.MinExposure && exposure <= render.MaxExposure) {
			return nil, usagef("--exposure %v: want a finite V magnitude from %g to %g", exposure, render.MinExposure, render.MaxExposure)
		}
	} else {
		switch f.preset {
		case "naked-eye":
			exposure = render.NakedEyeExposure()
		default:
			return nil, usagef("--preset %q: want naked-eye", f.preset)
		}
	}
	white, err := spectrum.ParseWhitePoint(f.white)
	if err != nil {
		return nil, usagef("--white %q: want %s", f.white, whiteNames())
	}
	if spec.tone, err = render.ParseTone(f.tone); err != nil {
		return nil, usagef("--tone %q: want shoulder or linear", f.tone)
	}
	if f.depth != 8 && f.depth != 16 {
		return nil, usagef("--depth %d: want 8 or 16", f.depth)
	}
	if !(f.fwhm > 0 && f.fwhm <= render.MaxFWHM) {
		return nil, usagef("--fwhm %g: want 0 < FWHM ≤ %g pixels", f.fwhm, float64(render.MaxFWHM))
	}
	spec.depth = f.depth
	spec.opt = render.Options{
		Projection: spec.proj, Observer: sc.observer, Beaming: sc.beaming,
		FWHM: f.fwhm, Exposure: exposure, Limit: f.limit,
		Color: spectrum.ColorOptions{White: white},
	}
	return spec, nil
}

// projectionFlagError rewords a camera validation error with the flag names.
func projectionFlagError(err error, k camera.Kind) string {
	msg := err.Error()
	switch {
	case strings.Contains(msg, "FOV"):
		return "--fov: " + msg
	case strings.Contains(msg, "Tilt"):
		return "--tilt: " + msg
	case strings.Contains(msg, "Width") || strings.Contains(msg, "Height") || strings.Contains(msg, "size"):
		return "--size: " + msg
	}
	return "--projection " + k.String() + ": " + msg
}

// lookDirection resolves --look into an apparent (ship-frame) direction.
func lookDirection(sc *scene, s string) (r3.Vec, string, error) {
	heading := sc.heading
	switch strings.ToLower(s) {
	case "ahead", "":
		return heading, "ahead", nil
	case "behind":
		return r3.Scale(-1, heading), "behind", nil
	}
	if ra, dec, err := parseRADec("look", s); err == nil {
		return camera.FromRADec(ra, dec), s, nil
	} else if _, ferr := parseFloats("look", s, 2); ferr == nil {
		return r3.Vec{}, "", err
	}
	i, ok := sc.stars.Find(s)
	if !ok {
		return r3.Vec{}, "", usagef("--look %q: want ahead, behind, RA,DEC in degrees or a star id or name in %s", s, sc.stars.Source)
	}
	st := sc.stars.At(i)
	n, _, _, r := sc.observer.See(r3.Vec{X: st.Dir[0], Y: st.Dir[1], Z: st.Dir[2]}, st.Dist)
	if r == 0 {
		return r3.Vec{}, "", usagef("--look %q: the ship is at that star", s)
	}
	return n, starLabel(sc.stars, i), nil
}

func starLabel(s *catalog.Stars, i int) string {
	st := s.At(i)
	if st.Name != "" {
		return st.Name
	}
	return catalog.DisplayID(st.ID)
}

func runStill(e *env, args []string) error {
	fs := pflag.NewFlagSet("still", pflag.ContinueOnError)
	fs.SetOutput(e.stderr)
	var p physicsFlags
	p.register(fs, 0.9)
	var f stillFlags
	f.register(fs)
	var lf layerFlags
	lf.register(fs)
	fs.Usage = func() {
		fmt.Fprint(e.stdout, stillHelp)
		fs.SetOutput(e.stdout)
		fs.PrintDefaults()
		fmt.Fprint(e.stdout, exitStatusHelp)
	}
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	outputs := outputPaths{png: f.output, fits: f.fits, sidecar: f.sidecar}
	if !f.noSidecar && outputs.sidecar == "" {
		outputs.sidecar = strings.TrimSuffix(f.output, filepath.Ext(f.output)) + ".json"
	}
	if f.noSidecar {
		outputs.sidecar = ""
	}
	if err := outputs.check(); err != nil {
		return err
	}
	budget, err := parseMemory(f.memory)
	if err != nil {
		return err
	}
	kind, w, h, err := f.frame()
	if err != nil {
		return err
	}
	if p.stream, err = openStream(&p, kind, w, h, budget); err != nil {
		return err
	}
	if p.stream != nil {
		defer p.stream.Close()
		p.refs = append([]string{f.look, p.toward, p.position, lf.markDest}, lf.labelIDs...)
	}
	sc, err := p.resolve(fs)
	if err != nil {
		return err
	}
	spec, err := f.build(fs, sc)
	if err != nil {
		return err
	}
	if spec.layers, err = lf.layers(sc, &spec.opt); err != nil {
		return err
	}
	start := time.Now()
	var frame *render.Frame
	if p.stream != nil {
		frame, err = render.RenderStream(p.stream.Next, spec.opt)
	} else {
		frame, err = render.Render(sc.stars, spec.opt)
	}
	if err != nil {
		return err
	}
	if err := spec.layers.AddLinear(frame); err != nil {
		return err
	}
	took := time.Since(start)
	if err := writeFrame(frame, sc, spec, outputs); err != nil {
		return err
	}
	total := time.Since(start)
	printSummary(e.stdout, frame, sc, spec, outputs, took, total)
	if p.stream != nil {
		fmt.Fprintf(e.stdout, "catalogue: %d stars rendered from disk in chunks of up to %d (--memory %s)\n",
			frame.Stats.Total, render.ChunkRows(render.Options{Projection: spec.proj, Doppler: true}, budget), f.memory)
	}
	return nil
}

// outputPaths are the files one frame writes; empty means not written.
type outputPaths struct{ png, fits, sidecar string }

func (o outputPaths) check() error {
	if o.png == "" {
		return usagef("--output: a PNG file name is required")
	}
	seen := map[string]string{}
	for _, c := range []struct{ flag, path string }{{"output", o.png}, {"fits", o.fits}, {"sidecar", o.sidecar}} {
		if c.path == "" {
			continue
		}
		if prev, dup := seen[filepath.Clean(c.path)]; dup {
			return usagef("--%s %s: the same file as --%s", c.flag, c.path, prev)
		}
		seen[filepath.Clean(c.path)] = c.flag
		if err := checkWritable(c.flag, c.path); err != nil {
			return err
		}
	}
	return nil
}

// writeFrame writes the PNG, FITS and sidecar of a frame as one set: each
// to a temporary file, and all renamed into place only when every one was
// written, so a failure never leaves a new image beside an old sidecar.
func writeFrame(frame *render.Frame, sc *scene, spec *frameSpec, out outputPaths) error {
	side := frame.Sidecar("skyframe", version, sc.stars, spec.tone)
	meta := pngMeta(side, spec)
	var img draw.Image
	if spec.depth == 16 {
		img = frame.ToNRGBA64(spec.tone)
	} else {
		img = frame.ToNRGBA(spec.tone)
	}
	if err := overlay.Draw(img, frame, sc.stars, spec.layers.Options); err != nil {
		return err
	}
	var set render.FileSet
	defer set.Abort()
	err := set.Add(out.png, func(w io.Writer) error {
		return render.WritePNG(w, img, meta)
	})
	if err != nil {
		return err
	}
	if out.fits != "" {
		cards, err := fitsCards(frame, sc, spec)
		if err != nil {
			return err
		}
		if err := set.Add(out.fits, func(w io.Writer) error {
			return render.WriteFITS(w, frame.W, frame.H, frame.Pix, cards)
		}); err != nil {
			return err
		}
	}
	if out.sidecar != "" {
		if err := set.Add(out.sidecar, func(w io.Writer) error {
			return render.WriteSidecar(w, side)
		}); err != nil {
			return err
		}
	}
	return set.Commit()
}

func fitsCards(frame *render.Frame, sc *scene, spec *frameSpec) ([]render.Card, error) {
	b := sc.observer.Boost
	ra, dec := camera.RADec(sc.heading)
	pos := sc.observer.Position
	limit := frame.Options.Limit
	if math.IsInf(limit, 0) {
		limit = 0
	}
	meta := render.FITSMeta{
		Object: spec.lookDesc, Creator: "skyframe " + version,
		Beta: b.Beta(), Gamma: b.Gamma(), MotionRA: ra, MotionDec: dec,
		Position: [3]float64{pos.X, pos.Y, pos.Z}, Exposure: frame.Options.Exposure, Limit: limit,
		FWHM: frame.Options.FWHM, Beaming: sc.beaming.String(), Projection: spec.proj.Kind.String(),
		FOV: spec.proj.FieldOfView(), Tilt: spec.proj.Tilt, Catalog: sc.stars.Source, Stars: frame.Stats.Drawn,
	}
	cards, err := meta.Cards()
	if err != nil {
		return nil, err
	}
	wcs, err := render.WCSCards(spec.proj)
	if errors.Is(err, render.ErrNoWCS) {
		return cards, nil
	}
	if err != nil {
		return nil, err
	}
	return append(cards, wcs...), nil
}

func printSummary(w io.Writer, frame *render.Frame, sc *scene, spec *frameSpec, out outputPaths, took, total time.Duration) {
	b := sc.observer.Boost
	ra, dec := camera.RADec(sc.heading)
	fmt.Fprintf(w, "skyframe %s: %s, β = %.6g, γ = %.6g toward RA %.3f° Dec %+.3f°, looking %s\n",
		version, sc.stars.Source, b.Beta(), b.Gamma(), ra, dec, spec.lookDesc)
	st := frame.Stats
	fmt.Fprintf(w, "stars: %d drawn, %d fainter than V %.2f, %d off frame (of %d)\n",
		st.Drawn, st.Culled, frame.Options.Limit, st.OffFrame, st.Total)
	if len(st.Brightest) > 0 {
		s := st.Brightest[0]
		name := s.Name
		if name == "" {
			name = catalog.DisplayID(s.ID)
		}
		fmt.Fprintf(w, "brightest: %s at V′ = %.2f (D = %.4g, T′ = %.0f K, apparent RA %.3f° Dec %+.3f°)\n", name, s.V, s.D, s.T, s.RA, s.Dec)
	}
	files := out.png
	for _, f := range []string{out.fits, out.sidecar} {
		if f != "" {
			files += ", " + f
		}
	}
	fmt.Fprintf(w, "wrote %s in %v (render %v)\n", files, total.Round(time.Millisecond), took.Round(time.Millisecond))
}

// pngMeta records the frame's parameters as PNG text chunks.
func pngMeta(s render.Sidecar, spec *frameSpec) []render.KV {
	source := spec.source
	if source == "" {
		source = "skyframe still"
	}
	m := map[string]string{
		"Software":    "skyframe " + version,
		"Source":      source,
		"Comment":     "Simulated sky: blackbody stars, no extinction; see the JSON sidecar for the full state.",
		"beta":        fmtFloat(s.Beta),
		"gamma":       fmtFloat(s.Gamma),
		"rapidity":    fmtFloat(s.Rapidity),
		"position_pc": fmt.Sprintf("%g,%g,%g", s.PositionPC[0], s.PositionPC[1], s.PositionPC[2]),
		"projection":  spec.proj.Kind.String(),
		"fov_deg":     fmtFloat(spec.proj.FieldOfView()),
		"exposure_v":  fmtFloat(s.ExposureV),
		"tone":        s.Tone,
		"beaming":     s.Beaming,
		"catalog":     s.Catalog.Source,
		"look":        spec.lookDesc,
		"stars_drawn": fmt.Sprint(s.Counts.Drawn),
	}
	if s.Heading != nil {
		m["heading"] = fmt.Sprintf("%+v", *s.Heading)
	}
	return render.SortedKV(m)
}
