package main

import (
	"context"
	"fmt"
	"io"
	"path/filepath"
	"runtime"
	"strings"
	"time"

	"github.com/spf13/pflag"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/frameopt"
	"github.com/skyframe/skyframe/render"
	"github.com/skyframe/skyframe/scene"
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
	workers               int
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
	fs.IntVar(&f.workers, "workers", 0, "CPUs the still uses: at most N goroutines running at once, for the sky, the render, the layers and the encoders (0: all CPUs; output does not depend on it)")
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
	if f.workers < 0 || f.workers > maxWorkers {
		return usagef("--workers %d: want 0 ≤ N ≤ %d", f.workers, maxWorkers)
	}
	if f.workers > 0 {
		// Everything a still runs in parallel sizes itself by GOMAXPROCS,
		// as a flight's does (flight --workers).
		defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(f.workers))
	}
	outputs := scene.OutputPaths{PNG: f.output, FITS: f.fits, Sidecar: f.sidecar, EXR: f.exr, Overlay: f.overlayLayer}
	if !f.noSidecar && outputs.Sidecar == "" {
		outputs.Sidecar = strings.TrimSuffix(f.output, filepath.Ext(f.output)) + ".json"
	}
	if f.noSidecar {
		outputs.Sidecar = ""
	}
	if err := outputs.Check(); err != nil {
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
	if p.Stream, err = scene.OpenStream(p.Catalog, p.CatalogFormat, kind, w, h, renderBudget); err != nil {
		return err
	}
	if p.Stream != nil {
		defer p.Stream.Close()
		p.Refs = append([]string{f.frame.Look, p.Toward, p.Position, f.frame.MarkDestination}, scene.LabelStars(f.frame.Label)...)
	}
	sc, err := p.resolve(e, fs)
	if err != nil {
		return err
	}
	spec, err := scene.Build(&f.frame, sc)
	if err != nil {
		return err
	}
	warn, err := scene.FrameDepth("still", sc, spec, p.skyDepth.v, p.Stream != nil)
	if err != nil {
		return err
	}
	if warn != "" {
		fmt.Fprintln(e.stderr, warn)
	}
	if err := scene.AddLayers(&f.frame, sc, spec, outputs); err != nil {
		return err
	}
	rows := sc.Stars.Len()
	if p.Stream != nil {
		rows = p.Stream.Len()
	}
	need := render.EstimateMemory(spec.Opt, spec.Depth, rows, p.Stream != nil, renderBudget)
	need.Overlays = spec.Layers.Options.MemoryBytes(w, h)
	if err := checkMemory(need, budget, "reduce --size, --grid-step or --lattice"); err != nil {
		return err
	}
	spec.Credit = scene.NamesCredit(sc.Index, scene.LabelsShown(spec.Layers.Labels))
	if spec.Layers.HUD != nil {
		if err := scene.CheckHUDFit(spec.Layers, spec.Proj, *spec.Layers.HUD, "--hud"); err != nil {
			return err
		}
	}
	start := time.Now()
	frame, kept, err := scene.Render(e.ctx, sc, spec, p.Stream, outputs.EXR != "")
	if err != nil {
		return err
	}
	took := time.Since(start)
	if err := e.ctx.Err(); err != nil {
		return context.Cause(e.ctx)
	}
	if err := scene.WriteFrame(e.ctx, frame, kept, sc, spec, outputs, version); err != nil {
		return err
	}
	total := time.Since(start)
	printSummary(e.stdout, frame, sc, spec, outputs, took, total)
	if p.Stream != nil {
		fmt.Fprintf(e.stdout, "catalogue: %d of %d stars read from disk in chunks of up to %d (--memory %s)%s\n",
			p.Stream.Rows(), frame.Stats.Total, render.ChunkRows(render.Options{Projection: spec.Proj, Doppler: true}, renderBudget), f.memory, scene.SortedNote(p.Stream))
	}
	return nil
}

func printSummary(w io.Writer, frame *render.Frame, sc *scene.Scene, spec *scene.Spec, out scene.OutputPaths, took, total time.Duration) {
	b := sc.Observer.Boost
	ra, dec := camera.RADec(sc.Heading)
	fmt.Fprintf(w, "skyframe %s: %s, β = %.6g, γ = %.6g toward RA %.3f° Dec %+.3f°, looking %s\n",
		version, sc.Stars.Source, b.Beta(), b.Gamma(), ra, dec, spec.Look)
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
	files := out.PNG
	for _, f := range []string{out.Overlay, out.FITS, out.EXR, out.Sidecar} {
		if f != "" {
			files += ", " + f
		}
	}
	fmt.Fprintf(w, "wrote %s in %v (render %v)\n", files, total.Round(time.Millisecond), took.Round(time.Millisecond))
}
