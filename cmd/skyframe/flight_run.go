package main

import (
	"fmt"
	"io"
	"os"
	"time"

	"github.com/schollz/progressbar/v3"
	"golang.org/x/term"

	flightjob "github.com/skyframe/skyframe/job"
)

// envTestPace, when set to a duration, is a pause after each frame. Tests
// set it to interrupt a run of tiny frames reliably; it does not change
// any output.
const envTestPace = "SKYFRAME_TEST_PACE"

// renderFlight renders the job's frames (job.Job.Run), skipping intact
// ones with resume, drawing each frame while the previous one is written
// with overlap and leaving a held view's unresolved layer to the tone map
// with held, with progress, warnings and the summary line.
func renderFlight(e *env, j *flightjob.Job, resume, overlap, held bool) error {
	var pace time.Duration
	if s := e.getenv(envTestPace); s != "" {
		d, err := time.ParseDuration(s)
		if err != nil {
			return usagef("%s=%q: %v", envTestPace, s, err)
		}
		pace = d
	}
	var start time.Time
	var prog *frameProgress
	res, err := j.Run(e.ctx, flightjob.RunOptions{
		Resume: resume, Now: time.Now, Pace: pace, Overlap: overlap, HeldLayer: held,
		Note: func(n string) { fmt.Fprintf(e.stderr, "skyframe: %s\n", n) },
		Resumed: func(done, total int) {
			fmt.Fprintf(e.stderr, "resume: %d of %d frames already done\n", done, total)
		},
		Start: func(todo int) {
			start = time.Now()
			prog = newFrameProgress(e.stderr, "flight", todo)
		},
		Done: func(int) { prog.add() },
	})
	if prog != nil {
		prog.finish()
	}
	if err != nil {
		return err
	}
	took := time.Since(start)
	if msg := flightjob.DepthWarning(res.Short, res.Reports); msg != "" {
		fmt.Fprintln(e.stderr, msg)
	}
	flashWarning(e.stderr, j, res.Lum)
	rate := 0.0
	if took > 0 {
		rate = float64(res.Rendered) / took.Seconds()
	}
	fmt.Fprintf(e.stdout, "skyframe %s: %s, shard %s: rendered %d frames (%d already done) into %s in %v (%.2f frames/s)\n",
		version, j.Plan.Name, j.Shard, res.Rendered, len(j.Frames)-res.Rendered, j.OutDir, took.Round(time.Millisecond), rate)
	return nil
}

// flashWarning runs the general flash check over the frames in lum (the
// contiguous block this run handled; flightjob.FlashWarning) and warns on w
// when it fails.
func flashWarning(w io.Writer, j *flightjob.Job, lum map[int]flightjob.Lum) {
	if j.Every > 1 {
		fmt.Fprintf(w, "skyframe: flash check skipped: --every %d renders one frame in %d, not a sequence at the plan's frame rate\n", j.Every, j.Every)
		return
	}
	if msg := flightjob.FlashWarning(j.Frames, lum, j.Plan.Show.FPS); msg != "" {
		fmt.Fprintf(w, "skyframe: %s\n", msg)
	}
}

// verifyFlight checks every selected frame (job.Job.Verify) and lists the
// missing and corrupt ones.
func verifyFlight(e *env, j *flightjob.Job) error {
	bad, lum := j.Verify()
	var missing, corrupt int
	for _, b := range bad {
		what := "missing"
		if b.Status == flightjob.Corrupt {
			what = "corrupt"
			corrupt++
		} else {
			missing++
		}
		fmt.Fprintf(e.stdout, "%s frame %d: %s\n", what, b.Frame, b.Why)
	}
	fmt.Fprintf(e.stdout, "verify %s: %d frames, %d intact, %d missing, %d corrupt\n",
		j.OutDir, len(j.Frames), len(j.Frames)-missing-corrupt, missing, corrupt)
	if missing+corrupt > 0 {
		return fmt.Errorf("verify: %d missing and %d corrupt frames in %s", missing, corrupt, j.OutDir)
	}
	flashWarning(e.stderr, j, lum)
	return nil
}

// frameProgress shows render progress: a bar with ETA and frames/s on a
// terminal, plain periodic lines otherwise.
type frameProgress struct {
	w           io.Writer
	label       string
	bar         *progressbar.ProgressBar
	total, done int
	start, last time.Time
}

// progressEvery is the interval between plain progress lines.
const progressEvery = 5 * time.Second

func newFrameProgress(w io.Writer, label string, total int) *frameProgress {
	p := &frameProgress{w: w, label: label, total: total, start: time.Now()}
	p.last = p.start
	if f, ok := w.(*os.File); ok && term.IsTerminal(int(f.Fd())) && total > 0 {
		p.bar = progressbar.NewOptions(total, progressbar.OptionSetWriter(w),
			progressbar.OptionSetDescription(label), progressbar.OptionShowCount(),
			progressbar.OptionShowIts(), progressbar.OptionSetItsString("frames"),
			progressbar.OptionSetPredictTime(true), progressbar.OptionThrottle(100*time.Millisecond))
	}
	return p
}

func (p *frameProgress) add() {
	p.done++
	if p.bar != nil {
		_ = p.bar.Add(1)
		return
	}
	now := time.Now()
	if now.Sub(p.last) >= progressEvery || p.done == p.total {
		p.last = now
		fmt.Fprintln(p.w, p.line(now))
	}
}

// line formats "frame 120/600 (20%), 3.1 frames/s, ETA 2m35s".
func (p *frameProgress) line(now time.Time) string {
	el := now.Sub(p.start).Seconds()
	rate := 0.0
	if el > 0 {
		rate = float64(p.done) / el
	}
	s := fmt.Sprintf("%s: frame %d/%d (%.0f%%), %.1f frames/s", p.label, p.done, p.total, 100*float64(p.done)/float64(max(p.total, 1)), rate)
	if rate > 0 && p.done < p.total {
		s += ", ETA " + fmtDuration(time.Duration(float64(p.total-p.done)/rate*float64(time.Second)))
	}
	return s
}

func (p *frameProgress) finish() {
	if p.bar != nil {
		_ = p.bar.Finish()
		fmt.Fprintln(p.w)
		p.bar = nil
	}
}
