package render

import (
	"math"
	"math/rand/v2"
	"testing"

	"pgregory.net/rapid"
)

// ulps returns how many float64 steps apart a and b are (both finite and
// of one sign).
func ulps(a, b float64) int64 {
	d := int64(math.Float64bits(a)) - int64(math.Float64bits(b))
	if d < 0 {
		d = -d
	}
	return d
}

// The reference for both functions is the Go math package, whose Log and
// Exp are documented as accurate to within 1 ulp; the fast forms are held
// to 2 ulp of them. (Where the two differ by 2 ulp, math.Exp is the farther
// from the true value: at x = −104.25964334051514 expFast is 0.40 ulp and
// math.Exp 0.94 ulp away, checked with 60-digit decimal arithmetic.)
func TestLnFast(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	worst := int64(0)
	check := func(d float64) {
		have, want := lnFast(d), math.Log(d)
		if want == 0 {
			if have != 0 {
				t.Errorf("lnFast(%v) = %v, want 0", d, have)
			}
			return
		}
		if u := ulps(have, want); u > worst {
			worst = u
			if u > 2 {
				t.Errorf("lnFast(%v) = %v, math.Log %v: %d ulp", d, have, want, u)
			}
		}
	}
	for range 1_000_000 {
		check(math.Exp(rng.Float64()*1400 - 700)) // the whole normal range
		check(1 + (rng.Float64()-0.5)*1e-3)       // near 1, where ln is small
	}
	for _, d := range []float64{1, 2, 0.5, math.E, 0x1p-1022, math.MaxFloat64, 1 - 0x1p-53, 1 + 0x1p-52} {
		check(d)
	}
	t.Logf("worst %d ulp", worst)
	if lnFast(1) != 0 {
		t.Errorf("lnFast(1) = %v", lnFast(1))
	}
	// Outside the normal range it is math.Log.
	for _, d := range []float64{0, -1, 0x1p-1074, math.Inf(1), math.Inf(-1)} {
		if have, want := lnFast(d), math.Log(d); have != want && !(math.IsNaN(have) && math.IsNaN(want)) {
			t.Errorf("lnFast(%v) = %v, want %v", d, have, want)
		}
	}
	if !math.IsNaN(lnFast(math.NaN())) {
		t.Error("lnFast(NaN) is not NaN")
	}
}

func TestExpFast(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	worst := int64(0)
	check := func(x float64) {
		have, want := expFast(x), math.Exp(x)
		if u := ulps(have, want); u > worst {
			worst = u
			if u > 2 {
				t.Errorf("expFast(%v) = %v, math.Exp %v: %d ulp", x, have, want, u)
			}
		}
	}
	for range 1_000_000 {
		check(rng.Float64()*1416 - 708)
		check((rng.Float64() - 0.5) * 1e-2)
	}
	for _, x := range []float64{1, -1, math.Ln2, -math.Ln2, 707.99, -707.99, math.Ln2 / 128, 1e-300} {
		check(x)
	}
	t.Logf("worst %d ulp", worst)
	if expFast(0) != 1 {
		t.Errorf("expFast(0) = %v", expFast(0))
	}
	for _, x := range []float64{-708, 709, -745, -800, 710, 1000, math.Inf(1), math.Inf(-1)} {
		if have, want := expFast(x), math.Exp(x); have != want {
			t.Errorf("expFast(%v) = %v, want %v", x, have, want)
		}
	}
	if !math.IsNaN(expFast(math.NaN())) {
		t.Error("expFast(NaN) is not NaN")
	}
}

// TestFastMathRapid draws arguments the sweeps above might miss.
func TestFastMathRapid(t *testing.T) {
	rapid.Check(t, func(rt *rapid.T) {
		x := rapid.Float64Range(-707.9, 708.9).Draw(rt, "x")
		if u := ulps(expFast(x), math.Exp(x)); u > 2 {
			rt.Fatalf("expFast(%v): %d ulp", x, u)
		}
		if d := math.Exp(x); d != 1 {
			if u := ulps(lnFast(d), math.Log(d)); u > 2 {
				rt.Fatalf("lnFast(%v): %d ulp", d, u)
			}
		}
	})
}

func BenchmarkExpFast(b *testing.B) {
	x, s := -5.0, 0.0
	for b.Loop() {
		s += expFast(x)
		x += 1e-6
	}
	_ = s
}

func BenchmarkMathExp(b *testing.B) {
	x, s := -5.0, 0.0
	for b.Loop() {
		s += math.Exp(x)
		x += 1e-6
	}
	_ = s
}
