package main

import (
	"errors"
	"fmt"
	"io"
	"os"
	"slices"
	"strconv"
	"time"

	"github.com/schollz/progressbar/v3"
	"golang.org/x/term"

	"github.com/skyframe/skyframe/imgfile"
	flightjob "github.com/skyframe/skyframe/job"
	"github.com/skyframe/skyframe/render"
	"github.com/skyframe/skyframe/sky"
)

// errInterrupted is wrapped by the error of a render stopped by a signal.
var errInterrupted = errors.New("interrupted")

// flightPace, when positive, is a pause after each frame. Tests set it
// through SKYFRAME_TEST_PACE to interrupt a run of tiny frames reliably; it
// does not change any output.
const envTestPace = "SKYFRAME_TEST_PACE"

// renderFlight renders the job's frames, skipping intact ones with resume.
func renderFlight(e *env, j *flightjob.Job, resume bool) error {
	todo := j.Frames
	// The lock is taken before the resume check when the directory exists
	// (another run may be writing there), else once it is created, after
	// the free-space check (which must not create it).
	var lock *flightjob.Lock
	defer func() { lock.Release() }()
	takeLock := func() error {
		if lock != nil || len(j.Frames) == 0 {
			return nil
		}
		l, notes, err := j.LockFrames(slices.Min(j.Frames), slices.Max(j.Frames), time.Now())
		for _, n := range notes {
			fmt.Fprintf(e.stderr, "skyframe: %s\n", n)
		}
		lock = l
		return err
	}
	if fi, err := os.Stat(j.OutDir); err == nil && fi.IsDir() {
		if err := takeLock(); err != nil {
			return err
		}
	}
	lum := make(map[int]flightjob.Lum, len(j.Frames))
	if resume {
		todo = todo[:0:0]
		for _, i := range j.Frames {
			if st, l, _ := j.CheckFrame(i); st == flightjob.Intact {
				lum[i] = l
				// Temporary files an interrupted run left beside an
				// intact frame; under the lock no other run writes it.
				if lock != nil {
					if err := j.RemoveFrameTemps(i); err != nil {
						return err
					}
				}
				continue
			}
			todo = append(todo, i)
		}
		fmt.Fprintf(e.stderr, "resume: %d of %d frames already done\n", len(j.Frames)-len(todo), len(j.Frames))
	}
	if err := j.CheckSpace(len(todo)); err != nil {
		return err
	}
	var pace time.Duration
	if s := e.getenv(envTestPace); s != "" {
		d, err := time.ParseDuration(s)
		if err != nil {
			return usagef("%s=%q: %v", envTestPace, s, err)
		}
		pace = d
	}
	if err := os.MkdirAll(j.OutDir, 0o755); err != nil {
		return err
	}
	if err := takeLock(); err != nil {
		return err
	}
	start := time.Now()
	var prep *render.Prepared
	if len(todo) > 0 && j.Sky == nil {
		var err error
		if prep, err = render.Prepare(j.Stars); err != nil {
			return err
		}
	}
	var short []int // frames whose catalogue falls short, and their reports
	reps := map[int]sky.Report{}
	j.Completeness = func(i int, r sky.Report) {
		if !r.Complete() {
			short = append(short, i)
			reps[i] = r
		}
	}
	enc := &imgfile.PNGEncoder{Workers: j.Workers}
	prog := newFrameProgress(e.stderr, "flight", len(todo))
	last := -1
	var biggest int64 // largest frame written so far, bytes
	done := 0
	for _, i := range todo {
		if err := e.ctx.Err(); err != nil {
			prog.finish()
			if last < 0 {
				return fmt.Errorf("%w before frame %d", errInterrupted, i)
			}
			return fmt.Errorf("%w after frame %d", errInterrupted, last)
		}
		if err := j.RemoveFrameTemps(i); err != nil {
			prog.finish()
			return err
		}
		l, err := j.RenderFrame(prep, enc, i)
		if err != nil {
			prog.finish()
			return err
		}
		lum[i] = l
		last = i
		prog.add()
		done++
		if err := j.CheckSpaceLeft(i, len(todo)-done, &biggest); err != nil {
			prog.finish()
			return err
		}
		if pace > 0 {
			select {
			case <-time.After(pace):
			case <-e.ctx.Done():
			}
		}
	}
	prog.finish()
	took := time.Since(start)
	depthWarning(e.stderr, short, reps)
	flashWarning(e.stderr, j, lum)
	rate := 0.0
	if took > 0 {
		rate = float64(len(todo)) / took.Seconds()
	}
	fmt.Fprintf(e.stdout, "skyframe %s: %s, shard %s: rendered %d frames (%d already done) into %s in %v (%.2f frames/s)\n",
		version, j.Plan.Name, j.Shard, len(todo), len(j.Frames)-len(todo), j.OutDir, took.Round(time.Millisecond), rate)
	return nil
}

// flashWarning runs the general flash check over the frames in lum (the
// contiguous block this run handled; flightjob.FlashWarning) and warns on w
// when it fails.
func flashWarning(w io.Writer, j *flightjob.Job, lum map[int]flightjob.Lum) {
	if j.Every > 1 {
		fmt.Fprintf(w, "skyframe: flash check skipped: --every %d renders every %dth frame, not a sequence at the plan's frame rate\n", j.Every, j.Every)
		return
	}
	if msg := flightjob.FlashWarning(j.Frames, lum, j.Plan.Show.FPS); msg != "" {
		fmt.Fprintf(w, "skyframe: %s\n", msg)
	}
}

// verifyFlight checks every selected frame and lists the missing and
// corrupt ones.
func verifyFlight(e *env, j *flightjob.Job) error {
	var missing, corrupt int
	lum := make(map[int]flightjob.Lum, len(j.Frames))
	for _, i := range j.Frames {
		st, l, why := j.CheckFrame(i)
		switch st {
		case flightjob.Intact:
			lum[i] = l
		case flightjob.Missing:
			missing++
			fmt.Fprintf(e.stdout, "missing frame %d: %s\n", i, why)
		case flightjob.Corrupt:
			corrupt++
			fmt.Fprintf(e.stdout, "corrupt frame %d: %s\n", i, why)
		}
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

// depthWarning writes the completeness warning of a flight for the worst
// of the frames whose catalogue falls short (short, in rendering order,
// with their reports), naming it and how many fall short.
func depthWarning(w io.Writer, short []int, reps map[int]sky.Report) {
	if len(short) == 0 {
		return
	}
	list := make([]sky.Report, len(short))
	for k, i := range short {
		list[k] = reps[i]
	}
	worst, k := sky.Worst(list)
	if k < 0 {
		return
	}
	what := fmt.Sprintf("frame %d, the worst of %d frames that fall short (%s),", short[k], len(short), frameSpan(short))
	if len(short) == 1 {
		what = fmt.Sprintf("frame %d", short[k])
	}
	fmt.Fprintln(w, worst.Warning("flight", what))
}

// frameSpan describes a sorted list of frame numbers by its first and last.
func frameSpan(frames []int) string {
	if len(frames) == 1 {
		return strconv.Itoa(frames[0])
	}
	return fmt.Sprintf("frames %d–%d", frames[0], frames[len(frames)-1])
}
