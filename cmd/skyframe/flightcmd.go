package main

import (
	"os"

	"context"
	"fmt"
	"io"
	"path/filepath"
	"slices"
	"strings"
	"time"

	"github.com/dustin/go-humanize"

	"github.com/spf13/pflag"

	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/flight"
	framefiles "github.com/skyframe/skyframe/frame"
	"github.com/skyframe/skyframe/imgfile"
	flightjob "github.com/skyframe/skyframe/job"
	"github.com/skyframe/skyframe/names"
	"github.com/skyframe/skyframe/render"
	"github.com/skyframe/skyframe/scene"
	"github.com/skyframe/skyframe/sky"
)

const flightHelp = `Usage: skyframe flight PLAN.toml [options]

Render the frames of a flight plan: the ship's state at each frame follows
the plan's legs in closed form, the camera follows its look keys, and every
frame is written as PNG (and FITS, when the plan asks) with a JSON sidecar,
each file atomically (a temporary file renamed into place).

Paths in the plan (catalogue.path, output.dir) are relative to the plan
file's directory; --out replaces output.dir and is relative to the current
directory. Every option of still is a plan key of the same name (with _ for
-) in [camera] or [overlays], with the same meaning, default and checks.
Directions mean the same as in still: RA,DEC is apparent (where the
audience sees it from the ship), catalogue:RA,DEC a catalogue-frame
direction shown where it appears, a star where its light appears.

A frame depends only on the plan and its index, so a render can be split
and resumed:
  --shard K/N       render the K-th (0-based) of N equal contiguous blocks;
                    --shard auto takes it from a Kubernetes Indexed Job
                    (JOB_COMPLETION_INDEX with SKYFRAME_SHARDS=N) or a Slurm
                    job array (SLURM_ARRAY_TASK_ID, SLURM_ARRAY_TASK_COUNT);
                    without it, SKYFRAME_SHARD=K/N or =auto, else the whole
                    job (the log says which shard and why).
  --resume          skip frames whose sidecar is intact (its sidecar_sha256
                    seal checks), records the same inputs (plan text, tool
                    version, catalogue and names file contents) and whose
                    image files match the SHA-256 recorded there.
  --verify          render nothing: check that the output holds every
                    selected frame intact (as for --resume); list missing
                    and corrupt frames and why (e.g. "catalogue changed");
                    exit status 1 if any, 0 if all are intact. It also runs
                    the flash check over the whole sequence.
A rendering run holds a lock file (.skyframe-PID.lock: host, pid, frames) in
the output directory; a run whose frames overlap those of a running one is
refused, shards with other frames share the directory, and a lock left by a
process of this host that has ended is removed.

Before rendering, the plan is checked (legs connect, accelerations are
positive, destinations are known, speed caps are below c) and the output
size (frames × PNG, FITS and sidecar estimates) is compared with the free
space on the output file system; any problem exits with status 2.

Photosensitivity: each sidecar records the frame's mean relative luminance
(the linear luminance of the encoded 8-bit image). After rendering, the
frames this run rendered or found done are checked against the WCAG 2.3.1 /
ITU-R BT.1702 general flash threshold and a warning is printed when they
fail. A sharded run checks only its own block: run --verify over the
finished directory to check the whole sequence.

On SIGINT or SIGTERM the frame being written is finished (never left
partial) and the command exits with status 1 ("interrupted after frame N");
--resume continues from there.

Examples:
  skyframe flight samples/plan.toml --dry-run
  skyframe flight samples/plan.toml --frames 0-29 --out /tmp/preview
  skyframe flight samples/plan.toml --shard 2/8 --resume
  skyframe flight samples/plan.toml --verify
  skyframe flight samples/plan.toml --preview 0.25 --every 10   # into samples/out-preview/

Options:
`

type flightFlags struct {
	frames  string
	dryRun  bool
	resume  bool
	shard   string
	verify  bool
	out     string
	workers int
	preview float64
	every   int
	memory  string
}

func (f *flightFlags) register(fs *pflag.FlagSet) {
	fs.StringVar(&f.frames, "frames", "", "frame range A-B (0-based, inclusive), A- (to the end) or A (one frame); default all")
	fs.BoolVar(&f.dryRun, "dry-run", false, "print the per-frame state as CSV ("+strings.Join(flight.DryRunColumns, ", ")+") and render nothing")
	fs.BoolVar(&f.resume, "resume", false, "skip frames already rendered intact for this plan")
	fs.StringVar(&f.shard, "shard", "", "render shard K/N (0-based K), or auto: from a scheduler's variables (Kubernetes Indexed Job, Slurm array); default SKYFRAME_SHARD, else the whole job")
	fs.BoolVar(&f.verify, "verify", false, "check the output directory for missing or corrupt frames instead of rendering (exit 1 if any)")
	fs.StringVar(&f.out, "out", "", "output directory, replacing the plan's output.dir")
	fs.IntVar(&f.workers, "workers", 0, "goroutines per frame for rendering and PNG compression (0: all CPUs; output does not depend on it)")
	fs.Float64Var(&f.preview, "preview", 1, "render a preview at this scale of the frame size (0 < SCALE ≤ 1) into OUTPUT-preview (or --out), never touching the real frames")
	fs.StringVar(&f.memory, "memory", "1GiB", "memory budget for the whole run: the catalogue, its prepared values and the largest frame's buffers, images and encoders are estimated before anything renders, and a plan over the budget is refused (exit 2) with the figures")
	fs.IntVar(&f.every, "every", 1, "render every Nth frame only (N ≥ 1; frames keep their numbers); with N > 1 the output goes to OUTPUT-preview (or --out)")
}

func runFlight(e *env, args []string) error {
	fs := pflag.NewFlagSet("flight", pflag.ContinueOnError)
	fs.SetOutput(e.stderr)
	var f flightFlags
	f.register(fs)
	fs.Usage = func() {
		fmt.Fprint(e.stdout, flightHelp)
		fs.SetOutput(e.stdout)
		fs.PrintDefaults()
		fmt.Fprint(e.stdout, exitStatusHelp)
	}
	if err := fs.Parse(args); err != nil {
		if err == pflag.ErrHelp {
			return errHelp
		}
		return usageError{err}
	}
	if fs.NArg() != 1 {
		return usagef("flight: want exactly one PLAN.toml (see --help)")
	}
	if f.workers < 0 {
		return usagef("--workers %d: want N ≥ 0", f.workers)
	}
	if f.dryRun && f.verify {
		return usagef("give only one of --dry-run and --verify")
	}
	if !(f.preview > 0 && f.preview <= 1) {
		return usagef("--preview %v: want a scale 0 < SCALE ≤ 1", f.preview)
	}
	if f.every < 1 {
		return usagef("--every %d: want N ≥ 1", f.every)
	}
	budget, err := parseMemory(f.memory)
	if err != nil {
		return err
	}
	job, err := loadFlightJob(e, fs.Arg(0), &f)
	if err != nil {
		return err
	}
	switch {
	case f.dryRun:
		r := flight.Range{First: 1, Last: 0}
		if len(job.Frames) > 0 {
			r = flight.Range{First: job.Frames[0], Last: job.Frames[len(job.Frames)-1]}
		}
		if err := flight.WriteDryRunCSV(e.stdout, job.Plan, r); err != nil {
			return err
		}
		if err := comfortWarning(e.stderr, job, r); err != nil {
			return err
		}
		return estimate(e, job)
	case f.verify:
		return verifyFlight(e, job)
	}
	need := job.MemoryNeed()
	need.Overlays = overlayBytes(job.Layers.Options, job.Frame.Width, job.Frame.Height)
	if err := checkMemory(need, budget, "reduce camera.width and camera.height (or render a --preview)"); err != nil {
		return err
	}
	return renderFlight(e, job, f.resume)
}

// loadFlightJob reads, binds and validates the plan, before any rendering.
func loadFlightJob(e *env, planPath string, f *flightFlags) (*flightjob.Job, error) {
	data, err := readPlanFile(e.ctx, planPath)
	if err != nil {
		return nil, err
	}
	plan, err := flight.ParsePlan(data, planPath)
	if err != nil {
		return nil, err
	}
	base := filepath.Dir(planPath)
	loaded, err := planStars(e.ctx, e.stderr, plan, base)
	if err != nil {
		return nil, err
	}
	// Every frame's catalogue starts with the loaded one and the Sun; the
	// built-in sky is drawn deeper per frame.
	src := sky.NewSource(loaded, cataloguePath(plan, base) == "")
	stars := src.Base()
	index, err := planNames(plan, base, stars)
	if err != nil {
		return nil, err
	}
	find := func(q string) (int, bool) {
		i, err := index.Find(q)
		return i, err == nil
	}
	plan.StandOff = flight.StarsStandOff(stars, find)
	if err := plan.Bind(flight.StarsResolver(stars, find)); err != nil {
		return nil, err
	}
	inputs, err := flightjob.InputsOf(e.ctx, plan, cataloguePath(plan, base), index, version)
	if err != nil {
		return nil, err
	}
	job := &flightjob.Job{Plan: plan, Hash: inputs.Hash(), Inputs: inputs, Stars: stars, Index: index, Sky: src, Workers: f.workers,
		Version: version, FreeSpace: e.freeSpace, Unresolved: &unresolvedMaps}
	job.OutDir = plan.Output.Dir
	if !filepath.IsAbs(job.OutDir) {
		job.OutDir = filepath.Join(base, job.OutDir)
	}
	preview := f.preview != 1 || f.every != 1
	job.Every = f.every
	if preview && f.out == "" {
		job.OutDir = filepath.Clean(job.OutDir) + "-preview"
	}
	if f.out != "" {
		job.OutDir = f.out
	}
	if fi, err := os.Stat(job.OutDir); err == nil && !fi.IsDir() {
		if f.out != "" {
			return nil, usagef("--out %s: exists and is not a directory", f.out)
		}
		return nil, usagef("%s: output.dir %s: exists and is not a directory", planPath, job.OutDir)
	}
	rng, err := flight.ParseRange(f.frames)
	if err != nil {
		return nil, usagef("--frames: %v", err)
	}
	total := plan.Frames()
	if lo, hi := rng.Clip(total); lo >= hi && f.frames != "" {
		return nil, usagef("--frames %s: the plan has frames 0-%d", f.frames, total-1)
	}
	job.Shard = flight.Shard{K: 0, N: 1}
	if f.shard != "" || !f.verify {
		sh, why, err := flight.SelectShard(f.shard, e.getenv)
		if err != nil {
			if f.shard != "" {
				return nil, usagef("--shard %s: %v", f.shard, err)
			}
			return nil, usagef("shard from the environment: %v", err)
		}
		job.Shard = sh
		if why != "" {
			fmt.Fprintf(e.stderr, "skyframe: shard %d/%d: %s\n", sh.K, sh.N, why)
		}
	}
	job.Frames = job.Shard.Frames(total, rng)
	if err := job.CheckOutputNames(planPath); err != nil {
		return nil, err
	}
	if f.every > 1 {
		job.Frames = slices.DeleteFunc(job.Frames, func(i int) bool { return i%f.every != 0 })
	}
	if err := job.CheckCamera(); err != nil {
		return nil, err
	}
	if preview {
		job.Preview(f.preview, f.every)
	}
	if job.Layers, err = scene.PlanLayers(plan, index, &unresolvedMaps); err != nil {
		return nil, err
	}
	job.UnresolvedFollows = src.BuiltIn() && job.Layers.Unresolved != nil && plan.Frame.UnresolvedDepth == nil
	job.Credit = scene.NamesCredit(index, scene.LabelsShown(job.Layers.Labels))
	if fs0, err := plan.FrameState(0); err == nil {
		if p0, err := job.Projection(fs0); err == nil {
			if err := scene.CheckHUDFit(job.Layers, p0, framefiles.WideHUDValues(plan.Title), planPath+": overlays.hud"); err != nil {
				return nil, err
			}
		}
	}
	if plan.Output.OverlayLayer && !job.Layers.Options.Any() {
		return nil, usagef("%s: output.overlay_layer: no overlay is selected (add overlays.grid, labels, hud, …)", planPath)
	}
	if !*plan.Output.PNG && !plan.Output.FITS {
		return nil, usagef("%s: output: png = false and fits = false: nothing to write", planPath)
	}
	if (f.resume || f.verify) && !*plan.Output.Sidecar {
		return nil, usagef("%s: --resume and --verify need output.sidecar = true (the sidecar records each frame's checksums)", planPath)
	}
	return job, nil
}

func readPlanFile(ctx context.Context, path string) ([]byte, error) {
	data, err := readSmallFile(ctx, path, flight.MaxPlanBytes)
	if err != nil {
		return nil, usagef("flight: %w", err)
	}
	return data, nil
}

// cataloguePath is the plan's catalogue file (relative paths are taken
// from the plan's directory), or "" for the built-in sky.
func cataloguePath(plan *flight.Plan, base string) string {
	p := plan.Catalogue.Path
	if p == "" || p == "builtin" {
		return ""
	}
	if !filepath.IsAbs(p) {
		p = filepath.Join(base, p)
	}
	return p
}

// planNames reads the plan's catalogue.names (relative to the plan's
// directory; see loadNames) and indexes stars with it.
func planNames(plan *flight.Plan, base string, stars *catalog.Stars) (*names.Index, error) {
	path := plan.Catalogue.Names
	if path != "" && path != "none" && !filepath.IsAbs(path) {
		path = filepath.Join(base, path)
	}
	table, err := scene.LoadNames(path)
	if err != nil {
		return nil, usagef("%s: catalogue.names: %v", plan.Name, err)
	}
	return names.NewIndex(stars, table), nil
}

// planStars opens the plan's catalogue (relative to the plan's directory)
// or returns the built-in sky.
func planStars(ctx context.Context, warn io.Writer, plan *flight.Plan, base string) (*catalog.Stars, error) {
	c := plan.Catalogue
	if c.Path == "" || c.Path == "builtin" {
		if c.Format != "" || len(c.Columns) > 0 {
			return nil, usagef("%s: catalogue.format and catalogue.columns need a catalogue.path", plan.Name)
		}
		return catalog.BuiltIn(), nil
	}
	var opt catalog.ReadOptions
	if c.Format != "" {
		fm, err := catalog.ParseFormat(c.Format)
		if err != nil {
			return nil, usagef("%s: catalogue.format: %v", plan.Name, err)
		}
		opt.Format = fm
	}
	opt.Columns = c.ColumnMap
	path := cataloguePath(plan, base)
	stars, rep, err := scene.OpenCatalog(ctx, []string{path}, opt, nil)
	if err != nil {
		return nil, err
	}
	scene.WriteSkipped(warn, rep)
	return stars, nil
}

// fmtDuration rounds d for progress lines.
func fmtDuration(d time.Duration) string {
	if d < 10*time.Second {
		return d.Round(100 * time.Millisecond).String()
	}
	return d.Round(time.Second).String()
}

// comfortWarning warns on w about stretches of frames whose camera motion
// exceeds the comfort limits (flight.ComfortDegPerSec, flight.ScreenLimitPx).
func comfortWarning(w io.Writer, j *flightjob.Job, r flight.Range) error {
	st, err := flight.ComfortStretches(j.Plan, r)
	if err != nil {
		return err
	}
	limitPx := flight.ScreenLimitPx(j.Frame.Width, j.Plan.Show.FPS)
	for _, s := range st {
		fmt.Fprintf(w, "warning: frames %d-%d: camera motion above the comfort limit (up to %.3g°/s, limit %g°/s; up to %.3g px/frame at the centre, limit %.3g px/frame = the frame width in %g s)\n",
			s.First, s.Last, s.MaxRateDegS, flight.ComfortDegPerSec, s.MaxScreenPx, limitPx, flight.ComfortCrossingSec)
	}
	return nil
}

// estimate renders one representative frame (the middle one of the job)
// into a temporary directory, removed afterwards, and prints on e.stderr
// the measured render time per frame and the disk the job's frames take.
func estimate(e *env, j *flightjob.Job) error {
	if len(j.Frames) == 0 {
		return nil
	}
	i := j.Frames[len(j.Frames)/2]
	tmp, err := os.MkdirTemp("", "skyframe-estimate-")
	if err != nil {
		return err
	}
	defer os.RemoveAll(tmp)
	probe := *j
	probe.OutDir = tmp
	t0 := time.Now()
	enc := &imgfile.PNGEncoder{Workers: j.Workers}
	var prep *render.Prepared
	if j.Sky == nil {
		if prep, err = render.Prepare(j.Stars); err != nil {
			return err
		}
	} else if _, err := probe.RenderFrame(nil, enc, i); err != nil {
		// The first frame draws the sky's cells and the unresolved map
		// the frame needs; the second is the frame's own cost.
		return err
	}
	t1 := time.Now()
	if _, err := probe.RenderFrame(prep, enc, i); err != nil {
		return err
	}
	per := time.Since(t1)
	var bytes int64
	err = filepath.WalkDir(tmp, func(_ string, d os.DirEntry, err error) error {
		if err == nil && d.Type().IsRegular() {
			if info, err := d.Info(); err == nil {
				bytes += info.Size()
			}
		}
		return err
	})
	if err != nil {
		return err
	}
	n := len(j.Frames)
	total := time.Duration(n)*per + t1.Sub(t0)
	fmt.Fprintf(e.stderr, "estimate: frame %d (%dx%d) rendered and written in %v here (the catalogue prepared or the sky drawn once in %v): %d frames ≈ %v; disk ≈ %s (%s for frame %d)\n",
		i, j.Frame.Width, j.Frame.Height, per.Round(time.Millisecond), t1.Sub(t0).Round(time.Millisecond), n, fmtDuration(total),
		humanize.IBytes(uint64(bytes)*uint64(n)), humanize.IBytes(uint64(bytes)), i)
	return nil
}
