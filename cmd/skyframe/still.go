package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"path/filepath"
	"slices"
	"strings"
	"time"

	"github.com/spf13/pflag"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/catalog"
	framefiles "github.com/skyframe/skyframe/frame"
	"github.com/skyframe/skyframe/frameopt"
	"github.com/skyframe/skyframe/render"
	"github.com/skyframe/skyframe/sky"
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
nominal camera tilt of 15°). Outside the circle the frame is black. The
overlays stay inside the circle, and the heads-up display sits in the
convention's front safe area (±50° azimuth from the front, 10–60° altitude),
its text level along the dome; a display with no room there is refused.

Directions mean the same here and in flight plans: RA,DEC is the apparent
direction, where the audience sees it from the moving ship (ICRS axes,
degrees); catalogue:RA,DEC is a direction in the catalogue (rest) frame,
shown where it appears after aberration; a star id or name is where the
star's light appears; ahead and behind follow the motion. --toward takes
either spelling with one result (aberration keeps the axis of motion).
Every frame option below is also a plan key of the same name ([camera] or
[overlays], with _ for -), with the same default and checks.

Examples:
  skyframe still
  skyframe still --speed 0.99 --projection fisheye --size 2048x2048 -o dome.png
  skyframe still --gamma 1000 --projection equirect --size 4096x2048 -o pano.png
  skyframe still --catalog ../shared/catalogs/bsc5.dat --speed 0.5 --toward 88.79,7.41 --look behind
  skyframe still --speed 0.3 --look Sollow --fov 40 --fits sollow.fits --tone linear

Options:
`

// stillFlags are the options of still that are not frame options (those
// are frameopt.Options, shared with flight plans): the files written and
// the memory budget.
type stillFlags struct {
	frame                 frameopt.Options
	output, fits, sidecar string
	exr                   string
	overlayLayer          string
	noSidecar             bool
	memory                string
}

func (f *stillFlags) register(fs *pflag.FlagSet) {
	frameopt.Register(fs, &f.frame)
	fs.StringVarP(&f.output, "output", "o", "sky.png", "PNG file to write")
	fs.StringVar(&f.fits, "fits", "", "also write the linear buffer as 32-bit float FITS with WCS to this file")
	fs.StringVar(&f.exr, "exr", "", "also write the linear frame as OpenEXR (scanline; the combined RGB plus the layers of --exr-layers) to this file")
	fs.StringVar(&f.sidecar, "sidecar", "", "JSON sidecar file (default: the PNG name with .json)")
	fs.StringVar(&f.overlayLayer, "overlay-layer", "", "write the overlays alone to this file as an RGBA PNG with a transparent background (sRGB, straight alpha), for a compositor; the --output PNG then holds the sky without them")
	fs.BoolVar(&f.noSidecar, "no-sidecar", false, "do not write the JSON sidecar")
	fs.StringVar(&f.memory, "memory", "1GiB", "memory budget for the render; a cache-file catalogue (skyframe catalog pack) with more stars than one chunk this budget allows is read from disk chunk by chunk instead of loaded whole, with the same result")
}

// frameSpec is everything about a still frame that is not the physics
// (framefiles.Spec), with the completeness of its catalogue.
type frameSpec struct {
	framefiles.Spec
	depthRep *sky.Report // completeness of the catalogue for the frame; nil: not known
}

// checkFrameFlags checks every frame option given on the command line
// with the definitions' own checks, naming the flag.
func checkFrameFlags(fs *pflag.FlagSet, o *frameopt.Options) error {
	if errs := frameopt.Check(o, fs.Changed); len(errs) > 0 {
		e := errs[0]
		return usagef("--%s: %s", e.Def.Name, e.Msg)
	}
	return nil
}

// starFinder looks stars up in the scene's catalogue through its names
// index (proper names, designations, catalogue numbers).
func (sc *scene) starFinder() frameopt.StarFinder {
	return func(name string) (r3.Vec, float64, bool) {
		i, err := sc.index.Find(name)
		if err != nil {
			return r3.Vec{}, 0, false
		}
		st := sc.stars.At(i)
		return r3.Vec{X: st.Dir[0], Y: st.Dir[1], Z: st.Dir[2]}, st.Dist, true
	}
}

// build turns the frame options into the frame's projection and render
// options for scene sc (the options were checked by checkFrameFlags).
func (f *stillFlags) build(sc *scene) (*frameSpec, error) {
	o := &f.frame
	spec := &frameSpec{}
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
		if up, err = d.Resolve(sc.observer, sc.heading, nil); err != nil {
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
		return nil, usageError{err}
	}
	spec.Tone, spec.Depth = fr.Tone, fr.Depth
	spec.Opt = render.Options{
		Projection: spec.Proj, Observer: sc.observer, Beaming: fr.Beaming,
		FWHM: fr.FWHM, Exposure: fr.Exposure, Limit: fr.Limit,
		Color: spectrum.ColorOptions{White: fr.White},
	}
	return spec, nil
}

// starError explains why option flag's star reference q found no star
// (names.Index.Find's message: candidates or close matches), saying what
// else the option takes.
func (sc *scene) starError(flag, other, q string) error {
	if _, err := findStar(sc.index, flag, other, q); err != nil {
		return err
	}
	return usagef("--%s %q: want %s in %s", flag, q, other, sc.stars.Source)
}

// lookDirection resolves --look into an apparent (ship-frame) direction and
// its description.
func lookDirection(sc *scene, s string) (r3.Vec, string, error) {
	if s == "" {
		s = "ahead"
	}
	d, err := frameopt.ParseDirection(s, frameopt.AnyDir)
	if err != nil {
		return r3.Vec{}, "", usagef("--look: %v", err)
	}
	n, err := d.Resolve(sc.observer, sc.heading, sc.starFinder())
	switch {
	case errors.Is(err, frameopt.ErrUnknownStar):
		return r3.Vec{}, "", sc.starError("look", frameopt.AnyDir.Spellings(), d.Star)
	case err != nil:
		return r3.Vec{}, "", usagef("--look: %v", err)
	}
	desc := strings.ToLower(strings.TrimSpace(s))
	if d.Kind == frameopt.Star {
		if i, err := sc.index.Find(d.Star); err == nil {
			desc = sc.index.Label(i)
		}
	} else if d.Kind == frameopt.Apparent || d.Kind == frameopt.Catalogue {
		desc = strings.TrimSpace(s)
	}
	return n, desc, nil
}

func runStill(e *env, args []string) error {
	fs := pflag.NewFlagSet("still", pflag.ContinueOnError)
	fs.SetOutput(e.stderr)
	var f stillFlags
	f.register(fs)
	var p physicsFlags
	p.register(fs, 0.9)
	fs.Usage = func() {
		fmt.Fprint(e.stdout, stillHelp)
		fs.SetOutput(e.stdout)
		fs.PrintDefaults()
		fmt.Fprint(e.stdout, exitStatusHelp)
	}
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if err := checkFrameFlags(fs, &f.frame); err != nil {
		return err
	}
	outputs := outputPaths{png: f.output, fits: f.fits, sidecar: f.sidecar, exr: f.exr, overlay: f.overlayLayer}
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
	fr := f.frame.Frame()
	kind, w, h := fr.Kind, fr.Width, fr.Height
	frameOnly := render.Options{Projection: camera.Projection{Kind: kind, Width: w, Height: h}}
	fixed := render.EstimateMemory(frameOnly, fr.Depth, 0, false, budget)
	if err := checkMemory(fixed, budget, "reduce --size"); err != nil {
		return err
	}
	// What the image and its encoder take is not available to the
	// streaming renderer's chunks.
	renderBudget := budget - fixed.Image - fixed.Encode
	if p.stream, err = openStream(&p, kind, w, h, renderBudget); err != nil {
		return err
	}
	if p.stream != nil {
		defer p.stream.Close()
		p.refs = append([]string{f.frame.Look, p.toward, p.position, f.frame.MarkDestination}, labelStars(f.frame.Label)...)
	}
	sc, err := p.resolve(e, fs)
	if err != nil {
		return err
	}
	spec, err := f.build(sc)
	if err != nil {
		return err
	}
	if err := frameDepth(e.stderr, "still", sc, spec, p.skyDepth.v, p.stream != nil); err != nil {
		return err
	}
	if spec.Layers, err = frameLayers(&f.frame, sc, &spec.Opt); err != nil {
		return err
	}
	if outputs.exr != "" {
		if spec.EXR, err = f.frame.EXR(); err != nil {
			return usageError{err}
		}
		spec.Opt.Doppler = spec.EXR.Layers == nil || slices.Contains(spec.EXR.Layers, framefiles.EXRDoppler)
	}
	if outputs.overlay != "" && !spec.Layers.Options.Any() {
		return usagef("--overlay-layer %s: no overlay is selected (add --grid, --labels, --hud, …)", outputs.overlay)
	}
	rows := sc.stars.Len()
	if p.stream != nil {
		rows = p.stream.Len()
	}
	need := render.EstimateMemory(spec.Opt, spec.Depth, rows, p.stream != nil, renderBudget)
	need.Overlays = overlayBytes(spec.Layers.Options, w, h)
	if err := checkMemory(need, budget, "reduce --size, --grid-step or --lattice"); err != nil {
		return err
	}
	spec.Credit = namesCredit(sc.index, labelsShown(spec.Layers.Labels))
	if spec.Layers.HUD != nil {
		if err := checkHUDFit(spec.Layers, spec.Proj, *spec.Layers.HUD, "--hud"); err != nil {
			return err
		}
	}
	start := time.Now()
	var frame *render.Frame
	if p.stream != nil {
		frame, err = render.RenderChunks(e.ctx, p.stream, spec.Opt)
	} else {
		frame, err = render.Render(sc.stars, spec.Opt)
	}
	if err != nil {
		return err
	}
	var kept []render.Contribution
	if outputs.exr != "" {
		kept, err = spec.Layers.AddLinearKept(frame)
	} else {
		err = spec.Layers.AddLinear(frame)
	}
	if err != nil {
		return err
	}
	took := time.Since(start)
	if err := e.ctx.Err(); err != nil {
		return context.Cause(e.ctx)
	}
	if err := writeFrame(e.ctx, frame, kept, sc, spec, outputs); err != nil {
		return err
	}
	total := time.Since(start)
	printSummary(e.stdout, frame, sc, spec, outputs, took, total)
	if p.stream != nil {
		fmt.Fprintf(e.stdout, "catalogue: %d of %d stars read from disk in chunks of up to %d (--memory %s)%s\n",
			p.stream.Rows(), frame.Stats.Total, render.ChunkRows(render.Options{Projection: spec.Proj, Doppler: true}, renderBudget), f.memory, sortedNote(p.stream))
	}
	return nil
}

// outputPaths are the files one frame writes; empty means not written.
// With overlay set, the overlays go there alone and png holds the sky
// without them.
type outputPaths struct{ png, fits, sidecar, exr, overlay string }

// writeFrame writes the frame's files as one set (framefiles.Spec.Write).
// A layer --exr-layers asks for that the frame does not have is a usage
// error.
func writeFrame(ctx context.Context, frame *render.Frame, kept []render.Contribution, sc *scene, spec *frameSpec, out outputPaths) error {
	spec.Version, spec.Stars, spec.Heading, spec.Beaming = version, sc.stars, sc.heading, sc.beaming
	if d := spec.depthRep; d != nil {
		spec.DepthV, spec.NeededV = finitePtr(d.Have), finitePtr(d.Threshold())
	}
	err := spec.Write(ctx, frame, kept, framefiles.Paths{PNG: out.png, FITS: out.fits, Sidecar: out.sidecar, EXR: out.exr, Overlay: out.overlay})
	if errors.Is(err, framefiles.ErrEXRLayer) {
		return usagef("--exr-layers: %v", err)
	}
	return err
}

func (o outputPaths) check() error {
	if o.png == "" {
		return usagef("--output: a PNG file name is required")
	}
	seen := map[string]string{}
	for _, c := range []struct{ flag, path string }{{"output", o.png}, {"fits", o.fits}, {"exr", o.exr}, {"sidecar", o.sidecar}, {"overlay-layer", o.overlay}} {
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

func printSummary(w io.Writer, frame *render.Frame, sc *scene, spec *frameSpec, out outputPaths, took, total time.Duration) {
	b := sc.observer.Boost
	ra, dec := camera.RADec(sc.heading)
	fmt.Fprintf(w, "skyframe %s: %s, β = %.6g, γ = %.6g toward RA %.3f° Dec %+.3f°, looking %s\n",
		version, sc.stars.Source, b.Beta(), b.Gamma(), ra, dec, spec.Look)
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
	for _, f := range []string{out.overlay, out.fits, out.exr, out.sidecar} {
		if f != "" {
			files += ", " + f
		}
	}
	fmt.Fprintf(w, "wrote %s in %v (render %v)\n", files, total.Round(time.Millisecond), took.Round(time.Millisecond))
}
