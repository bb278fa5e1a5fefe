package catalog

import (
	"fmt"
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

func TestTeffFromBV(t *testing.T) {
	cases := []struct {
		bv, want, tol float64
		src           string
	}{
		// Ballesteros (2012) formula evaluated by hand to 0.1 K [pub].
		{0.00, 10125.2, 0.1, "[pub] Ballesteros 2012, B−V = 0"},
		{0.65, 5778.4, 0.1, "[pub] Ballesteros 2012, B−V = 0.65"},
		{1.00, 4742.7, 0.1, "[pub] Ballesteros 2012, B−V = 1.00"},
		{2.00, 3169.4, 0.1, "[pub] Ballesteros 2012, B−V = 2.00 (range edge)"},
		// Clamped outside [−0.4, 2.0]: same as the edges [cp: our documented clamp].
		{-1.0, 21707.4, 0.1, "[pub] formula at the clamp edge −0.4"},
		{3.5, 3169.4, 0.1, "[pub] formula at the clamp edge 2.0"},
		// The Sun: B−V ≈ 0.65 [mem] gives the IAU nominal 5772 K within 0.5 % [pub IAU 2015 B3].
		{SolarBV, 5772, 0.005 * 5772, "[pub] IAU 2015 B3 nominal solar Teff"},
	}
	for _, c := range cases {
		if have := TeffFromBV(c.bv); !scalar.EqualWithinAbs(have, c.want, c.tol) {
			t.Errorf("TeffFromBV(%v): have %.2f, want %.2f ± %.2f %s", c.bv, have, c.want, c.tol, c.src)
		}
	}
	if !math.IsNaN(TeffFromBV(math.NaN())) {
		t.Error("TeffFromBV(NaN) is not NaN")
	}
}

func TestTeffFromBPRP(t *testing.T) {
	cases := []struct {
		c, want, tol float64
		inRange      bool
		src          string
	}{
		// Mucciarelli & Bellazzini 2020 dwarf relation, [Fe/H] = 0, evaluated by hand [mem].
		{0.39, 7345.7, 0.1, true, "[mem] MB20 at the blue edge"},
		{1.00, 5213.1, 0.1, true, "[mem] MB20 at BP−RP = 1"},
		{1.50, 4281.1, 0.1, true, "[mem] MB20 at the red edge"},
		// Solar colour 0.82 [mem] → within 2 % of 5772 K [pub IAU 2015 B3].
		{SolarBPRP, 5772, 0.02 * 5772, true, "[pub] IAU nominal solar Teff"},
		// Our linear-in-θ extension (teff.go), evaluated by hand [cp].
		{-0.5, 19577.7, 0.1, false, "[cp] extension below 0.39"},
		{3.0, 2827.9, 0.1, false, "[cp] extension above 1.5"},
	}
	for _, c := range cases {
		have, ok := TeffFromBPRP(c.c)
		if ok != c.inRange || !scalar.EqualWithinAbs(have, c.want, c.tol) {
			t.Errorf("TeffFromBPRP(%v): have %.2f,%v want %.2f,%v %s", c.c, have, ok, c.want, c.inRange, c.src)
		}
	}
	// Continuity at both edges [cp].
	for _, e := range []float64{BPRPMin, BPRPMax} {
		a, _ := TeffFromBPRP(e - 1e-9)
		b, _ := TeffFromBPRP(e + 1e-9)
		if !scalar.EqualWithinRel(a, b, 1e-6) {
			t.Errorf("TeffFromBPRP jumps at %v: %v vs %v", e, a, b)
		}
	}
	// Monotonic decreasing over the whole clamped domain [cp].
	prev := math.Inf(1)
	for c := -1.0; c <= 6; c += 0.01 {
		v, _ := TeffFromBPRP(c)
		if v > prev+1e-9 || v <= 0 {
			t.Fatalf("TeffFromBPRP not decreasing/positive at %v: %v after %v", c, v, prev)
		}
		prev = v
	}
}

func TestVFromGaiaAndHp(t *testing.T) {
	cases := []struct {
		have, want float64
		src        string
	}{
		// Riello et al. 2021 Table C.2 polynomial evaluated by hand [mem].
		{VFromGaia(12, 0), 12.02704, "[mem] Riello 2021, C = 0"},
		{VFromGaia(12, 1), 12.21414, "[mem] Riello 2021, C = 1"},
		{VFromGaia(12, 2), 12.74688, "[mem] Riello 2021, C = 2"},
		{VFromGaia(12, 9), VFromGaia(12, 2.75), "[cp] clamped at the fit's red end"},
		// Bessell 2000 Table 2, row BT−VT = 0.75: B−V = 0.674, V − Hp = −0.134 [pub].
		{VFromHp(7, 0.674), 6.866, "[pub] Bessell 2000 Table 2"},
		// Midway between rows 0.00 (−0.005, −0.011) and 0.05 (0.040, −0.025) [pub], linear.
		{VFromHp(7, 0.0175), 7 - 0.018, "[pub] Bessell 2000 Table 2, interpolated"},
		{VFromHp(7, 3), 7 - 0.162, "[cp] held at the table's red end"},
	}
	for i, c := range cases {
		if !scalar.EqualWithinAbs(c.have, c.want, 1e-9) {
			t.Errorf("case %d: have %.6f, want %.6f %s", i, c.have, c.want, c.src)
		}
	}
}

func TestStarColourPrecedence(t *testing.T) {
	nan := math.NaN()
	cases := []struct {
		teff, bv, bprp float64
		wantT          float64
		wantF          Flag
	}{
		{6000, 0.65, 1.0, 6000, FlagTeffFromCatalogue},
		{nan, 0.65, 1.0, TeffFromBV(0.65), 0},
		{nan, 2.5, nan, TeffFromBV(2.0), FlagTeffExtrapolated},
		{nan, nan, 1.0, 5040 / mb20Theta(1.0), 0},
		{nan, nan, 3.0, 2827.925766948618, FlagTeffExtrapolated},
		{nan, nan, nan, DefaultTeff, FlagNoColour},
	}
	for _, c := range cases {
		T, f := starColour(c.teff, c.bv, c.bprp)
		if !scalar.EqualWithinAbs(T, c.wantT, 1e-6) || f != c.wantF {
			t.Errorf("starColour(%v,%v,%v): have %v,%b want %v,%b [cp: precedence in teff.go]", c.teff, c.bv, c.bprp, T, f, c.wantT, c.wantF)
		}
	}
}

func ExampleTeffFromBV() {
	fmt.Printf("%.0f K\n", TeffFromBV(0.65))
	// Output: 5778 K
}

func ExampleTeffFromBPRP() {
	t, ok := TeffFromBPRP(1.0)
	fmt.Printf("%.0f K %v\n", t, ok)
	// Output: 5213 K true
}

func ExampleVFromGaia() {
	fmt.Printf("V = %.3f\n", VFromGaia(12, 1.0))
	// Output: V = 12.214
}

func ExampleVFromHp() {
	fmt.Printf("V = %.3f\n", VFromHp(7, 0.674))
	// Output: V = 6.866
}
