package render

import (
	"math"
	"math/rand/v2"
	"runtime"
	"sync"
	"testing"
)

// The table's buckets each hold at most one code step, and its thresholds
// are where code8Exact steps: the code at the threshold is one above the
// code of the value just below it.
func TestCode8Table(t *testing.T) {
	tab := code8Table()
	steps := 0
	for k := range code8N {
		start := uint32(code8Low + k<<code8Shift)
		end := min(start+1<<code8Shift-1, code8One)
		lo := code8Exact(float64(math.Float32frombits(start)))
		hi := code8Exact(float64(math.Float32frombits(end)))
		if int(hi) > int(lo)+1 || hi < lo {
			t.Fatalf("bucket %d: codes %d to %d", k, lo, hi)
		}
		if thr := tab.thr(k); thr != code8None {
			steps++
			below := code8Exact(float64(math.Float32frombits(thr - 1)))
			at := code8Exact(float64(math.Float32frombits(thr)))
			if below != lo || at != lo+1 {
				t.Fatalf("bucket %d: code %d below the threshold, %d at it, want %d and %d", k, below, at, lo, lo+1)
			}
		}
	}
	// Codes 1…255 each start in a bucket (code 0 below code8Low).
	if steps != 255 {
		t.Errorf("%d thresholds, want 255", steps)
	}
	if c := code8Exact(float64(math.Float32frombits(code8Low - 1))); c != 0 {
		t.Errorf("code %d just below the table, want 0", c)
	}
}

// code8 equals code8Exact for every float32 in [2⁻¹³, 1] (with -short, for
// a random million of them) and below, and is 0 for zero, negative and NaN
// values and 255 at and above 1, as Tone's clipping makes them.
func TestCode8Exhaustive(t *testing.T) {
	tab := code8Table()
	for _, v := range []float32{0, float32(math.Copysign(0, -1)), -1e-30, -1, float32(math.NaN()), float32(math.Inf(-1))} {
		if c := tab.code8(v); c != 0 {
			t.Errorf("code8(%g) = %d, want 0", v, c)
		}
	}
	for _, v := range []float32{1, 1.0000001, 3, float32(math.Inf(1)), math.MaxFloat32} {
		if c := tab.code8(v); c != 255 {
			t.Errorf("code8(%g) = %d, want 255", v, c)
		}
	}
	check := func(u uint32) bool {
		v := math.Float32frombits(u)
		want := code8Exact(float64(v))
		return tab.code8(v) == want && (u >= code8One || tab.code8Unit(u) == want && (u < tab.zero) == (want == 0))
	}
	if testing.Short() {
		r := rand.New(rand.NewPCG(8, 255))
		for range 1_000_000 {
			if u := r.Uint32N(code8One + 1); !check(u) {
				t.Fatalf("code8(%g) = %d, want %d", math.Float32frombits(u), tab.code8(math.Float32frombits(u)), code8Exact(float64(math.Float32frombits(u))))
			}
		}
		return
	}
	// Every float32 from the smallest subnormal to 1, on all CPUs.
	workers := runtime.GOMAXPROCS(0)
	bad := make([]uint32, workers)
	var wg sync.WaitGroup
	for w := range workers {
		wg.Go(func() {
			for u := uint32(1 + w); u <= code8One; u += uint32(workers) {
				if !check(u) {
					bad[w] = u
					return
				}
			}
		})
	}
	wg.Wait()
	for _, u := range bad {
		if u != 0 {
			v := math.Float32frombits(u)
			t.Fatalf("code8(%g) = %d, want %d", v, tab.code8(v), code8Exact(float64(v)))
		}
	}
}

// The 8-bit tone map with its table equals Tone followed by code8Exact,
// pixel by pixel, for both modes, over pixels at and around the shoulder's
// knee, above full scale, negative and NaN.
func TestToNRGBATable(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	b, err := NewBuffer(300, 200, false)
	if err != nil {
		t.Fatal(err)
	}
	for i := range b.Pix {
		switch r.IntN(10) {
		case 0:
			b.Pix[i] = float32(r.Float64() * 3)
		case 1:
			b.Pix[i] = -float32(r.Float64())
		case 2:
			b.Pix[i] = float32(math.NaN())
		case 3:
			b.Pix[i] = 0
		case 4:
			b.Pix[i] = float32(math.Copysign(0, -1))
		case 5: // either side of the fast path's bound
			b.Pix[i] = math.Nextafter32(toneFast, float32(r.IntN(2)))
		default:
			b.Pix[i] = float32(math.Exp(-8 * r.Float64()))
		}
	}
	for _, m := range []ToneMode{ToneLinear, ToneShoulder} {
		img := b.ToNRGBA(m)
		identity := 0
		for p := 0; p < b.W*b.H; p++ {
			s := b.Pix[3*p : 3*p+3]
			if toneIdentity(m, s[0], s[1], s[2]) {
				identity++
			}
			rr, gg, bb := Tone(m, float64(s[0]), float64(s[1]), float64(s[2]))
			want := [4]uint8{code8Exact(rr), code8Exact(gg), code8Exact(bb), 255}
			if got := [4]uint8(img.Pix[4*p : 4*p+4]); got != want {
				t.Fatalf("%v: pixel %d %v → %v, want %v", m, p, s, got, want)
			}
		}
		if identity == 0 || (m == ToneShoulder && identity == b.W*b.H) {
			t.Errorf("%v: %d of %d pixels on the table path: the test wants both paths", m, identity, b.W*b.H)
		}
	}
}

// TestToneFast checks the bound of the tone map's fast path: a pixel whose
// channels are all in [0, toneFast) has luminance below ShoulderKnee even
// at its largest (every channel the last float32 below toneFast), so
// ToneShoulder leaves it unchanged; the weights sum to 1 (IEC 61966-2-1's
// Y row, common practice).
func TestToneFast(t *testing.T) {
	if s := lumR + lumG + lumB; math.Abs(s-1) > 1e-12 {
		t.Fatalf("lumR + lumG + lumB = %v, want 1", s)
	}
	top := math.Nextafter32(toneFast, 0)
	if math.Float32bits(top) >= toneFastBits(ToneShoulder) || math.Float32bits(toneFast) != toneFastBits(ToneShoulder) {
		t.Fatalf("toneFastBits(ToneShoulder) = %#x, want the bits of %v", toneFastBits(ToneShoulder), toneFast)
	}
	if !toneIdentity(ToneShoulder, top, top, top) {
		t.Fatalf("ToneShoulder is not the identity at (%v, %v, %v)", top, top, top)
	}
	if l := lumR*float64(top) + lumG*float64(top) + lumB*float64(top); l >= ShoulderKnee {
		t.Fatalf("luminance %v at the bound, want < %v", l, ShoulderKnee)
	}
	if toneFastBits(ToneLinear) != math.Float32bits(1) {
		t.Errorf("toneFastBits(ToneLinear) = %#x, want the bits of 1", toneFastBits(ToneLinear))
	}
}
