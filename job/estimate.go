package job

import (
	"os"
	"path/filepath"
	"time"

	"github.com/skyframe/skyframe/imgfile"
	"github.com/skyframe/skyframe/render"
)

// Estimate is what one representative frame of a job cost: the frame, the
// time to render and write it, the one-off time before it (the catalogue
// prepared or the built-in sky drawn) and the bytes its files take.
type Estimate struct {
	Frame      int
	PerFrame   time.Duration
	Setup      time.Duration
	FrameBytes int64
}

// Estimate renders one representative frame (the middle one of the job)
// into a temporary directory, removed afterwards, and measures it with the
// clock now. ok is false when the job has no frames.
func (j *Job) Estimate(now func() time.Time) (est Estimate, ok bool, err error) {
	if len(j.Frames) == 0 {
		return Estimate{}, false, nil
	}
	i := j.Frames[len(j.Frames)/2]
	tmp, err := os.MkdirTemp("", "skyframe-estimate-")
	if err != nil {
		return Estimate{}, false, err
	}
	defer os.RemoveAll(tmp)
	probe := *j
	probe.OutDir = tmp
	t0 := now()
	enc := &imgfile.PNGEncoder{Workers: j.Workers}
	var prep *render.Prepared
	if j.Sky == nil {
		if prep, err = render.Prepare(j.Stars); err != nil {
			return Estimate{}, false, err
		}
	} else if _, err := probe.RenderFrame(nil, enc, i); err != nil {
		// The first frame draws the sky's cells and the unresolved map
		// the frame needs; the second is the frame's own cost.
		return Estimate{}, false, err
	}
	t1 := now()
	if _, err := probe.RenderFrame(prep, enc, i); err != nil {
		return Estimate{}, false, err
	}
	per := now().Sub(t1)
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
		return Estimate{}, false, err
	}
	return Estimate{Frame: i, PerFrame: per, Setup: t1.Sub(t0), FrameBytes: bytes}, true, nil
}
