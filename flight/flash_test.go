package flight

import (
	"math"
	"testing"
)

func square(hz, fps, seconds, lo, hi float64) []float64 {
	n := int(fps * seconds)
	out := make([]float64, n)
	for i := range out {
		if math.Mod(float64(i)/fps*hz*2, 2) < 1 {
			out[i] = lo
		} else {
			out[i] = hi
		}
	}
	return out
}

// WCAG 2.1 SC 2.3.1 (W3C Recommendation 2018) and ITU-R BT.1702 [pub]: no
// more than three general flashes in any one-second period; a flash is a
// pair of opposing changes of ≥ 10 % of the maximum relative luminance with
// the darker state below 0.80.
func TestFlashCheck(t *testing.T) {
	ramp := make([]float64, 300)
	for i := range ramp {
		ramp[i] = float64(i) / 299
	}
	for _, c := range []struct {
		name string
		lum  []float64
		fps  float64
		pass bool
		max  int
	}{
		{"5 Hz black/white square wave fails", square(5, 30, 2, 0, 1), 30, false, 5},
		{"4 Hz fails (more than three)", square(4, 24, 2, 0, 1), 24, false, 4},
		{"3 Hz passes (three is allowed)", square(3, 30, 2, 0, 1), 30, true, 3},
		{"10 s ramp black→white passes", ramp, 30, true, 0},
		{"10 Hz between 0.85 and 1.0 passes (darker ≥ 0.80)", square(10, 60, 2, 0.85, 1), 60, true, 0},
		{"10 Hz between 0.30 and 0.35 passes (< 10 %)", square(10, 60, 2, 0.30, 0.35), 60, true, 0},
		{"10 Hz between 0.70 and 0.95 fails", square(10, 60, 2, 0.70, 0.95), 60, false, 10},
		{"constant", make([]float64, 100), 25, true, 0},
	} {
		r := FlashCheck(c.lum, c.fps)
		if r.Err != nil || r.Pass != c.pass || r.MaxPerSecond != c.max {
			t.Errorf("%s: have pass=%v max/s=%d err=%v, want pass=%v max/s=%d", c.name, r.Pass, r.MaxPerSecond, r.Err, c.pass, c.max)
		}
	}
	if r := FlashCheck([]float64{0, math.NaN()}, 30); r.Err == nil || r.Pass {
		t.Errorf("NaN luminance accepted: %+v", r)
	}
	if r := FlashCheck([]float64{0, 1}, 0); r.Err == nil || r.Pass {
		t.Errorf("fps 0 accepted: %+v", r)
	}
}
