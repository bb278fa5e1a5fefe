package main

import (
	"fmt"
	"io"
	"runtime"
	"strings"
	"time"

	"github.com/dustin/go-humanize"
	"github.com/spf13/pflag"

	"github.com/skyframe/skyframe/flight"
	flightjob "github.com/skyframe/skyframe/job"
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
	fs.IntVar(&f.workers, "workers", 0, "CPUs the run uses: goroutines per frame for rendering and PNG compression, and at most N running at once for everything else (0: all CPUs; output does not depend on it)")
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
	if f.workers < 0 || f.workers > maxWorkers {
		return usagef("--workers %d: want 0 ≤ N ≤ %d", f.workers, maxWorkers)
	}
	if f.workers > 0 {
		// The sky's preparation, the unresolved maps and the writers
		// size themselves by GOMAXPROCS: capping it makes --workers
		// bound the CPUs of the whole run, not only the frame passes.
		defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(f.workers))
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
	need.Overlays = job.Layers.Options.MemoryBytes(job.Frame.Width, job.Frame.Height)
	if err := checkMemory(need, budget, "reduce camera.width and camera.height (or render a --preview)"); err != nil {
		return err
	}
	// A view held still keeps its unresolved layer's values and image
	// when the budget holds them, and each frame is drawn while the
	// previous one is written when it holds that too.
	total := need.Total()
	held := total+job.HeldLayerBytes() <= budget
	if held {
		total += job.HeldLayerBytes()
	}
	overlap := total+flightjob.OverlapBytes(need) <= budget
	return renderFlight(e, job, f.resume, overlap, held)
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

// loadFlightJob reads, binds and validates the plan (job.Load) with the
// flags f, before any rendering; notes go to stderr.
func loadFlightJob(e *env, planPath string, f *flightFlags) (*flightjob.Job, error) {
	j, notes, err := flightjob.Load(e.ctx, planPath, flightjob.LoadOptions{
		Frames: f.frames, Shard: f.shard, Resume: f.resume, Verify: f.verify, Out: f.out,
		Workers: f.workers, Preview: f.preview, Every: f.every, Version: version,
		Getenv: e.getenv, FreeSpace: e.freeSpace, Maps: &unresolvedMaps, Warn: e.stderr,
	})
	for _, n := range notes {
		fmt.Fprintf(e.stderr, "skyframe: %s\n", n)
	}
	return j, err
}

// estimate renders one representative frame (job.Job.Estimate) and prints
// on e.stderr the measured render time per frame and the disk the job's
// frames take.
func estimate(e *env, j *flightjob.Job) error {
	est, ok, err := j.Estimate(time.Now)
	if err != nil || !ok {
		return err
	}
	n := len(j.Frames)
	per, setup, bytes, i := est.PerFrame, est.Setup, est.FrameBytes, est.Frame
	total := time.Duration(n)*per + setup
	fmt.Fprintf(e.stderr, "estimate: frame %d (%dx%d) rendered and written in %v here (the catalogue prepared or the sky drawn once in %v): %d frames ≈ %v; disk ≈ %s (%s for frame %d)\n",
		i, j.Frame.Width, j.Frame.Height, per.Round(time.Millisecond), setup.Round(time.Millisecond), n, fmtDuration(total),
		humanize.IBytes(uint64(bytes)*uint64(n)), humanize.IBytes(uint64(bytes)), i)
	return nil
}
