package job

import (
	"context"
	"errors"
	"fmt"
	"os"
	"slices"
	"time"

	"github.com/skyframe/skyframe/imgfile"
	"github.com/skyframe/skyframe/render"
	"github.com/skyframe/skyframe/sky"
)

// ErrInterrupted is wrapped by the error of a run stopped because its
// context was done ("interrupted after frame N").
var ErrInterrupted = errors.New("interrupted")

// RunOptions are the settings and seams of a rendering run (Job.Run).
type RunOptions struct {
	// Resume skips the frames already written intact (CheckFrame).
	Resume bool
	// Now is the clock, for the lock's start time (nil: the lock records
	// the zero time).
	Now func() time.Time
	// Note receives the lock's notes (a stale lock removed); nil: dropped.
	Note func(msg string)
	// Resumed, with Resume, is told how many of the job's frames were
	// already done, before anything renders.
	Resumed func(done, total int)
	// Start is called once before the first frame renders, with the
	// number of frames to render; Done after each frame is written.
	Start func(todo int)
	Done  func(frame int)
	// Pace, when positive, is a pause after each frame (tests use it to
	// interrupt a run of tiny frames reliably; the output does not change).
	Pace time.Duration
	// Overlap draws each frame while the previous one is encoded and
	// written, which keeps both CPUs busy through the parts of a frame
	// that run on one (settling its catalogue, writing and syncing its
	// files). It holds a second frame's image, PNG and other files
	// (OverlapBytes). The files are the same either way.
	Overlap bool
	// HeldLayer lets a frame whose unresolved layer is the last one's
	// (a view held still: render.DiffuseMemo) leave the layer to the tone
	// map, which then works only on the pixels the stars light
	// (render.PendingLayer); a frame whose layer changed has the tone map
	// add it to each row as it tone-maps the row, instead of in a pass
	// of its own. It keeps the layer's values and image (HeldLayerBytes)
	// and applies to 8-bit PNG frames without FITS or OpenEXR files. The
	// files are the same either way.
	HeldLayer bool
}

// RunResult is what a run did: the frames it rendered (Rendered), the
// luminance of every frame it rendered or found done (for the flash
// check), and the frames whose catalogue falls short, in rendering order,
// with their completeness reports.
type RunResult struct {
	Rendered int
	Lum      map[int]Lum
	Short    []int
	Reports  map[int]sky.Report
}

// Run renders the job's frames into OutDir, skipping intact ones with
// o.Resume: it takes the directory's lock for the job's frames (before the
// resume check when the directory exists, else once it is created after
// the free-space check, which must not create it), checks the free space
// before and while rendering, removes temporary files an interrupted run
// left, and stops between frames when ctx is done (ErrInterrupted).
func (j *Job) Run(ctx context.Context, o RunOptions) (RunResult, error) {
	res := RunResult{Lum: make(map[int]Lum, len(j.Frames)), Reports: map[int]sky.Report{}}
	now := o.Now
	if now == nil {
		now = func() time.Time { return time.Time{} }
	}
	todo := j.Frames
	var lock *Lock
	defer func() { lock.Release() }()
	takeLock := func() error {
		if lock != nil || len(j.Frames) == 0 {
			return nil
		}
		l, notes, err := j.LockFrames(slices.Min(j.Frames), slices.Max(j.Frames), now())
		for _, n := range notes {
			if o.Note != nil {
				o.Note(n)
			}
		}
		lock = l
		return err
	}
	if fi, err := os.Stat(j.OutDir); err == nil && fi.IsDir() {
		if err := takeLock(); err != nil {
			return res, err
		}
	}
	if o.Resume {
		todo = todo[:0:0]
		for _, i := range j.Frames {
			if st, l, _ := j.CheckFrame(i); st == Intact {
				res.Lum[i] = l
				continue
			}
			todo = append(todo, i)
		}
		if o.Resumed != nil {
			o.Resumed(len(j.Frames)-len(todo), len(j.Frames))
		}
	}
	if err := j.CheckSpace(len(todo)); err != nil {
		return res, err
	}
	if err := os.MkdirAll(j.OutDir, 0o755); err != nil {
		return res, err
	}
	if err := takeLock(); err != nil {
		return res, err
	}
	// Temporary files an interrupted run left for the job's frames, done
	// or to do, all at once (each directory read once: removing them
	// frame by frame read a show's frames directory for every frame);
	// under the lock no other run writes these frames.
	if err := j.RemoveFrameTemps(j.Frames...); err != nil {
		return res, err
	}
	if o.Start != nil {
		o.Start(len(todo))
	}
	var prep *render.Prepared
	if len(todo) > 0 && j.Sky == nil {
		var err error
		if prep, err = render.Prepare(j.Stars); err != nil {
			return res, err
		}
	}
	outer := j.Completeness
	defer func() { j.Completeness = outer }()
	j.Completeness = func(i int, r sky.Report) {
		if !r.Complete() {
			res.Short = append(res.Short, i)
			res.Reports[i] = r
		}
		if outer != nil {
			outer(i, r)
		}
	}
	enc := &imgfile.PNGEncoder{Workers: j.Workers}
	last := -1
	var biggest int64 // largest frame written so far, bytes
	// A frame being written while the next one is drawn (o.Overlap).
	var writing *drawnFrame
	var written chan error
	// finish waits for the frame being written and accounts for it.
	finish := func() error {
		if writing == nil {
			return nil
		}
		d := writing
		writing = nil
		if err := <-written; err != nil {
			return err
		}
		res.Lum[d.i] = d.lum
		last = d.i
		res.Rendered++
		if o.Done != nil {
			o.Done(d.i)
		}
		if err := j.CheckSpaceLeft(d.i, len(todo)-res.Rendered, &biggest); err != nil {
			return err
		}
		if o.Pace > 0 {
			select {
			case <-time.After(o.Pace):
			case <-ctx.Done():
			}
		}
		return nil
	}
	for _, i := range todo {
		if err := ctx.Err(); err != nil {
			if err := finish(); err != nil {
				return res, err
			}
			if last < 0 {
				return res, fmt.Errorf("%w before frame %d", ErrInterrupted, i)
			}
			return res, fmt.Errorf("%w after frame %d", ErrInterrupted, last)
		}
		d, err := j.drawFrame(prep, i, o.HeldLayer)
		if err != nil {
			if ferr := finish(); ferr != nil {
				return res, ferr
			}
			return res, err
		}
		if o.Overlap {
			if err := finish(); err != nil {
				d.release()
				return res, err
			}
			writing, written = d, make(chan error, 1)
			go func() { written <- j.writeFrame(d, enc) }()
			continue
		}
		writing, written = d, make(chan error, 1)
		written <- j.writeFrame(d, enc)
		if err := finish(); err != nil {
			return res, err
		}
	}
	if err := finish(); err != nil {
		return res, err
	}
	return res, nil
}

// FrameCheck is the state of one frame found by Verify.
type FrameCheck struct {
	Frame  int
	Status Status
	Why    string
}

// Verify checks every selected frame (CheckFrame): it returns the missing
// and corrupt ones in frame order and the luminance of the intact ones.
func (j *Job) Verify() (bad []FrameCheck, lum map[int]Lum) {
	lum = make(map[int]Lum, len(j.Frames))
	for _, i := range j.Frames {
		st, l, why := j.CheckFrame(i)
		if st == Intact {
			lum[i] = l
			continue
		}
		bad = append(bad, FrameCheck{Frame: i, Status: st, Why: why})
	}
	return bad, lum
}
