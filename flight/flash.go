package flight

import (
	"errors"
	"fmt"
	"math"
)

// Thresholds of the general flash threshold of WCAG 2.1 success criterion
// 2.3.1 "Three Flashes or Below Threshold" (W3C Recommendation, 2018), whose
// definition follows ITU-R BT.1702 "Guidance for the reduction of
// photosensitive epileptic seizures caused by television".
const (
	// FlashDelta is the least change in relative luminance, as a fraction
	// of the maximum relative luminance (1.0), that counts toward a flash.
	FlashDelta = 0.10
	// FlashDarkLimit: a change counts only if the darker of its two states
	// has relative luminance below this.
	FlashDarkLimit = 0.80
	// FlashMaxPerSecond: more flashes than this in any one-second period
	// fail.
	FlashMaxPerSecond = 3
)

// ErrFlashInput is reported in FlashReport.Err for unusable input.
var ErrFlashInput = errors.New("flight: bad flash-check input")

// FlashReport is the result of FlashCheck.
type FlashReport struct {
	// Changes lists the frames at which a qualifying luminance change
	// completed (a flash is a pair of opposing changes).
	Changes []int
	// Flashes is the number of flashes in the whole sequence (changes/2).
	Flashes int
	// MaxPerSecond is the largest number of flashes in any one-second
	// window, and WorstFrame the first frame of such a window.
	MaxPerSecond int
	WorstFrame   int
	// Pass is true when no one-second window holds more than
	// FlashMaxPerSecond flashes (and the input was usable).
	Pass bool
	// Err is non-nil when fps or a luminance value is unusable.
	Err error
}

// FlashCheck applies the general flash threshold to the mean relative
// luminance of each frame (linear, 0 = black, 1 = white; values outside are
// clamped) shown at fps frames per second.
//
// A change is a run of rising or falling luminance whose extent reaches
// FlashDelta while its darker end is below FlashDarkLimit; smaller wiggles do
// not end a run (hysteresis of FlashDelta). A flash is a pair of opposing
// changes, so a window holding n changes holds ⌊n/2⌋ flashes. Windows are the
// frames whose times i/fps lie in [t, t+1 s). Only the whole-frame mean is
// tested: that is conservative for the area condition (a flash covering the
// whole frame exceeds any area limit), but misses flashes confined to a small
// region and does not check the red-flash threshold. The flight command also
// applies it to the mean of each of 5×5 overlapping windows a third of the
// frame each way (WCAG 2.1's estimate of a 10° visual field).
func FlashCheck(meanLum []float64, fps float64) FlashReport {
	var rep FlashReport
	if !(fps > 0) || math.IsInf(fps, 0) {
		rep.Err = fmt.Errorf("%w: fps %v", ErrFlashInput, fps)
		return rep
	}
	for i, v := range meanLum {
		if math.IsNaN(v) {
			rep.Err = fmt.Errorf("%w: luminance of frame %d is NaN", ErrFlashInput, i)
			return rep
		}
	}
	clamp := func(v float64) float64 { return math.Min(1, math.Max(0, v)) }
	if len(meanLum) > 0 {
		// trend: 0 before the first run, +1 rising, −1 falling; from is the
		// luminance where the current run began, ext its running extreme.
		trend, counted := 0, false
		from := clamp(meanLum[0])
		lo, hi := from, from
		var ext float64
		for i := 1; i < len(meanLum); i++ {
			v := clamp(meanLum[i])
			switch trend {
			case 0:
				lo, hi = math.Min(lo, v), math.Max(hi, v)
				switch {
				case v-lo >= FlashDelta:
					trend, from, ext, counted = 1, lo, v, false
				case hi-v >= FlashDelta:
					trend, from, ext, counted = -1, hi, v, false
				}
			case 1:
				if v > ext {
					ext = v
				} else if ext-v >= FlashDelta {
					trend, from, ext, counted = -1, ext, v, false
				}
			case -1:
				if v < ext {
					ext = v
				} else if v-ext >= FlashDelta {
					trend, from, ext, counted = 1, ext, v, false
				}
			}
			if trend != 0 && !counted && math.Abs(ext-from) >= FlashDelta &&
				math.Min(ext, from) < FlashDarkLimit {
				counted = true
				rep.Changes = append(rep.Changes, i)
			}
		}
	}
	rep.Flashes = len(rep.Changes) / 2
	// Sliding one-second window over frame times.
	j := 0
	for i := range rep.Changes {
		for float64(rep.Changes[i]-rep.Changes[j])/fps >= 1 {
			j++
		}
		if f := (i - j + 1) / 2; f > rep.MaxPerSecond {
			rep.MaxPerSecond, rep.WorstFrame = f, rep.Changes[j]
		}
	}
	rep.Pass = rep.MaxPerSecond <= FlashMaxPerSecond
	return rep
}
