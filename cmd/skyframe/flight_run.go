package main

import (
	"errors"
	"fmt"
	"github.com/dustin/go-humanize"
	"io"
	"os"
	"slices"
	"time"

	"github.com/schollz/progressbar/v3"
	"golang.org/x/term"

	flightjob "github.com/skyframe/skyframe/job"
	"github.com/skyframe/skyframe/render"
)

// errInterrupted is wrapped by the error of a render stopped by a signal.
var errInterrupted = errors.New("interrupted")

// flightPace, when positive, is a pause after each frame. Tests set it
// through SKYFRAME_TEST_PACE to interrupt a run of tiny frames reliably; it
// does not change any output.
const envTestPace = "SKYFRAME_TEST_PACE"

// render renders the job's frames, skipping intact ones with resume.
func (j *flightJob) render(e *env, resume bool) error {
	todo := j.frames
	// The lock is taken before the resume check when the directory exists
	// (another run may be writing there), else once it is created, after
	// the free-space check (which must not create it).
	var lock *dirLock
	defer func() { lock.release() }()
	takeLock := func() (err error) {
		if lock == nil && len(j.frames) > 0 {
			lock, err = j.lockFrames(e.stderr, slices.Min(j.frames), slices.Max(j.frames), time.Now())
		}
		return err
	}
	if fi, err := os.Stat(j.outDir); err == nil && fi.IsDir() {
		if err := takeLock(); err != nil {
			return err
		}
	}
	lum := make(map[int]flightjob.Lum, len(j.frames))
	if resume {
		todo = todo[:0:0]
		for _, i := range j.frames {
			if st, l, _ := j.checkFrame(i); st == frameIntact {
				lum[i] = l
				// Temporary files an interrupted run left beside an
				// intact frame; under the lock no other run writes it.
				if lock != nil {
					if err := j.removeStaleTemps(i); err != nil {
						return err
					}
				}
				continue
			}
			todo = append(todo, i)
		}
		fmt.Fprintf(e.stderr, "resume: %d of %d frames already done\n", len(j.frames)-len(todo), len(j.frames))
	}
	if err := j.checkSpace(len(todo)); err != nil {
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
	if err := os.MkdirAll(j.outDir, 0o755); err != nil {
		return err
	}
	if err := takeLock(); err != nil {
		return err
	}
	start := time.Now()
	var prep *render.Prepared
	if len(todo) > 0 {
		var err error
		if prep, err = render.Prepare(j.stars); err != nil {
			return err
		}
	}
	enc := &render.PNGEncoder{Workers: j.workers}
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
		if err := j.removeStaleTemps(i); err != nil {
			prog.finish()
			return err
		}
		l, err := j.renderFrame(prep, enc, i)
		if err != nil {
			prog.finish()
			return err
		}
		lum[i] = l
		last = i
		prog.add()
		done++
		if err := j.checkSpaceLeft(i, len(todo)-done, &biggest); err != nil {
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
	j.flashWarning(e.stderr, lum)
	rate := 0.0
	if took > 0 {
		rate = float64(len(todo)) / took.Seconds()
	}
	fmt.Fprintf(e.stdout, "skyframe %s: %s, shard %s: rendered %d frames (%d already done) into %s in %v (%.2f frames/s)\n",
		version, j.plan.Name, j.shard, len(todo), len(j.frames)-len(todo), j.outDir, took.Round(time.Millisecond), rate)
	return nil
}

// flashWarning runs the general flash check over the frames in lum (the
// contiguous block this run handled) and warns on w when it fails: on the
// whole-frame mean, and on each window of the regional check (see
// meanLuminance), which catches a flash confined to part of the frame that
// the whole-frame mean dilutes below threshold.
func (j *flightJob) flashWarning(w io.Writer, lum map[int]flightjob.Lum) {
	if j.every > 1 {
		fmt.Fprintf(w, "skyframe: flash check skipped: --every %d renders every %dth frame, not a sequence at the plan's frame rate\n", j.every, j.every)
		return
	}
	if msg := flightjob.FlashWarning(j.frames, lum, j.plan.Show.FPS); msg != "" {
		fmt.Fprintf(w, "skyframe: %s\n", msg)
	}
}

// freeSpace reports the bytes free on the file system holding a directory
// (flightjob.FreeSpace). Tests replace it.
var freeSpace = flightjob.FreeSpace

// frameBytes estimates the bytes one frame writes.
func (j *flightJob) frameBytes() uint64 {
	return flightjob.FrameBytes(j.plan.Output, j.frame.Width, j.frame.Height, j.stars.Len())
}

// checkSpace refuses a render whose estimated output exceeds the free space.
func (j *flightJob) checkSpace(frames int) error {
	if frames == 0 {
		return nil
	}
	need := uint64(frames) * j.frameBytes()
	free, err := freeSpace(j.outDir)
	if err != nil {
		return usagef("output directory %s: %v", j.outDir, err)
	}
	if need > free {
		return usagef("output directory %s: %d frames need about %s (%s each), only %s free",
			j.outDir, frames, humanBytes(need), humanBytes(j.frameBytes()), humanBytes(free))
	}
	return nil
}

// spaceMargin is the factor on the largest frame written so far in the
// running free-space check: frame sizes vary along a flight (78–200 KB in
// one audit of a 1080p flight with overlays, where the first estimate was
// 58 KiB), so the check uses what was written, not a model.
const spaceMargin = 1.5

// checkSpaceLeft measures the files frame i wrote, keeps the largest frame
// size in *biggest, and stops the run (status 1; --resume continues) when
// the remaining frames at that size times spaceMargin would not fit in the
// free space, before the disk fills mid-frame.
func (j *flightJob) checkSpaceLeft(i, remaining int, biggest *int64) error {
	var n int64
	for _, f := range j.files(i).list() {
		if fi, err := os.Stat(j.path(f.rel)); err == nil {
			n += fi.Size()
		}
	}
	*biggest = max(*biggest, n)
	if remaining <= 0 {
		return nil
	}
	need := uint64(float64(remaining) * float64(*biggest) * spaceMargin)
	free, err := freeSpace(j.outDir)
	if err != nil {
		return nil // the up-front check reported an unreadable directory
	}
	if need > free {
		return fmt.Errorf("output directory %s: stopping after frame %d: frames take up to %s here, the %d remaining need about %s (×%.1f margin) and only %s is free; free some space and run again with --resume",
			j.outDir, i, humanBytes(uint64(*biggest)), remaining, humanBytes(need), spaceMargin, humanBytes(free))
	}
	return nil
}

func humanBytes(n uint64) string { return humanize.IBytes(n) }

// verify checks every selected frame and lists the missing and corrupt ones.
func (j *flightJob) verify(e *env) error {
	var missing, corrupt int
	lum := make(map[int]flightjob.Lum, len(j.frames))
	for _, i := range j.frames {
		st, l, why := j.checkFrame(i)
		switch st {
		case frameIntact:
			lum[i] = l
		case frameMissing:
			missing++
			fmt.Fprintf(e.stdout, "missing frame %d: %s\n", i, why)
		case frameCorrupt:
			corrupt++
			fmt.Fprintf(e.stdout, "corrupt frame %d: %s\n", i, why)
		}
	}
	fmt.Fprintf(e.stdout, "verify %s: %d frames, %d intact, %d missing, %d corrupt\n",
		j.outDir, len(j.frames), len(j.frames)-missing-corrupt, missing, corrupt)
	if missing+corrupt > 0 {
		return fmt.Errorf("verify: %d missing and %d corrupt frames in %s", missing, corrupt, j.outDir)
	}
	j.flashWarning(e.stderr, lum)
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
