package job

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"syscall"

	"github.com/dustin/go-humanize"

	"github.com/skyframe/skyframe/flight"
)

// FreeSpace reports the bytes available to an unprivileged user on the
// file system holding dir (or its nearest existing ancestor).
func FreeSpace(dir string) (uint64, error) {
	for {
		var st syscall.Statfs_t
		err := syscall.Statfs(dir, &st)
		if err == nil {
			return st.Bavail * uint64(st.Bsize), nil
		}
		parent := filepath.Dir(dir)
		if !errors.Is(err, syscall.ENOENT) || parent == dir {
			return 0, err
		}
		dir = parent
	}
}

// Per-frame size estimates. A PNG of a star field is black sky, which
// deflates to almost nothing, plus the stars' blobs, which hardly compress.
// Frames of the built-in sky (41 713 stars) measured up to 29 bytes per
// drawn star (647 KB for a dense 1920×1080 frame with 22 070 stars drawn,
// 10 % of raw) and, at 480×270, up to 58 % of raw where blobs overlap. The
// estimate allows raw/50 for the background plus 48 bytes per catalogue
// star, capped at the raw size plus deflate's stored-block overhead; FITS is
// exact (2880-byte blocks); a sidecar with its ten brightest stars is about
// 5 KB.
const (
	pngBytesPerStar = 48
	pngOverhead     = 2048
	sidecarBytes    = 8192
	fitsHeaderMax   = 4 * 2880
)

// FrameBytes estimates the bytes one frame of w × h pixels of a catalogue
// of stars stars writes with the outputs o.
func FrameBytes(o flight.OutputSpec, w, h, stars int) uint64 {
	uw, uh := uint64(w), uint64(h)
	var n uint64
	if *o.PNG {
		raw := uw * uh * 3
		est := min(raw/50+uint64(stars)*pngBytesPerStar, raw+raw/1000)
		n += est + pngOverhead
	}
	if o.FITS {
		data := (uw*uh*3*4 + 2879) / 2880 * 2880
		n += data + fitsHeaderMax
	}
	if *o.Sidecar {
		n += sidecarBytes
	}
	if o.EXR {
		// ZIP-compressed half RGB and up to four layers: black sky
		// compresses like the PNG's; allow a fiftieth of 16 half channels
		// raw, at most the raw size of the combined RGB.
		raw := uw * uh * 2 * 16
		n += raw/50 + uint64(stars)*pngBytesPerStar + pngOverhead
	}
	if o.OverlayLayer {
		// Mostly transparent RGBA: about a fiftieth of the raw size, as
		// for a star field, at most the raw size.
		raw := uw * uh * 4
		n += raw/50 + pngOverhead
	}
	return n
}

func (j *Job) freeSpace(dir string) (uint64, error) {
	if j.FreeSpace != nil {
		return j.FreeSpace(dir)
	}
	return FreeSpace(dir)
}

// EstimateFrameBytes estimates the bytes one frame of the job writes.
func (j *Job) EstimateFrameBytes() uint64 {
	return FrameBytes(j.Plan.Output, j.Frame.Width, j.Frame.Height, j.Stars.Len())
}

// CheckSpace refuses (an InputError) a render of frames frames whose
// estimated output exceeds the free space.
func (j *Job) CheckSpace(frames int) error {
	if frames == 0 {
		return nil
	}
	need := uint64(frames) * j.EstimateFrameBytes()
	free, err := j.freeSpace(j.OutDir)
	if err != nil {
		return inputf("output directory %s: %v", j.OutDir, err)
	}
	if need > free {
		return inputf("output directory %s: %d frames need about %s (%s each), only %s free",
			j.OutDir, frames, humanize.IBytes(need), humanize.IBytes(j.EstimateFrameBytes()), humanize.IBytes(free))
	}
	return nil
}

// SpaceMargin is the factor on the largest frame written so far in the
// running free-space check: frame sizes vary along a flight (78–200 KB in
// one audit of a 1080p flight with overlays, where the first estimate was
// 58 KiB), so the check uses what was written, not a model.
const SpaceMargin = 1.5

// CheckSpaceLeft measures the files frame i wrote, keeps the largest frame
// size in *biggest, and returns an error (the run stops; resuming
// continues) when the remaining frames at that size times SpaceMargin
// would not fit in the free space, before the disk fills mid-frame.
func (j *Job) CheckSpaceLeft(i, remaining int, biggest *int64) error {
	var n int64
	for _, f := range j.Files(i).List() {
		if fi, err := os.Stat(j.Path(f.Rel)); err == nil {
			n += fi.Size()
		}
	}
	*biggest = max(*biggest, n)
	if remaining <= 0 {
		return nil
	}
	need := uint64(float64(remaining) * float64(*biggest) * SpaceMargin)
	free, err := j.freeSpace(j.OutDir)
	if err != nil {
		return nil // the up-front check reported an unreadable directory
	}
	if need > free {
		return fmt.Errorf("output directory %s: stopping after frame %d: frames take up to %s here, the %d remaining need about %s (×%.1f margin) and only %s is free; free some space and run again with --resume",
			j.OutDir, i, humanize.IBytes(uint64(*biggest)), remaining, humanize.IBytes(need), SpaceMargin, humanize.IBytes(free))
	}
	return nil
}
