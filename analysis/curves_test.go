package analysis

import (
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"github.com/skyframe/skyframe/spectrum"
)

var testSpeeds = Betas(0.1, 0.3, 0.6, 0.9, 0.99, 0.999)

// at returns the value of column c at the grid point x (which must be on
// the grid).
func at(t *testing.T, tab *Table, col string, x float64) float64 {
	t.Helper()
	c := tab.Column(col)
	if c == nil {
		t.Fatalf("%s: no column %q", tab.Name, col)
	}
	for i, v := range tab.X {
		if v == x {
			return c.Y[i]
		}
	}
	t.Fatalf("%s: %v not on the grid", tab.Name, x)
	return 0
}

func TestAberrationSideways(t *testing.T) {
	// A star at θ = 90° in the rest frame appears at cos θ′ = β
	// (aberration formula, physics.md; [cp]).
	tab, err := Aberration(testSpeeds, 361)
	if err != nil {
		t.Fatal(err)
	}
	for _, s := range testSpeeds {
		have := math.Cos(at(t, tab, "theta_obs_"+speedName(s), 90) * math.Pi / 180)
		if !scalar.EqualWithinAbs(have, s.Beta, 1e-12) {
			t.Errorf("β = %v: cos θ′(90°) have %.15g, want %v", s.Beta, have, s.Beta)
		}
	}
}

func TestAberrationFormula(t *testing.T) {
	// cos θ′ = (cos θ + β)/(1 + β cos θ) (physics.md).
	tab, err := Aberration(testSpeeds, 181)
	if err != nil {
		t.Fatal(err)
	}
	for k, s := range testSpeeds {
		for i, th := range tab.X {
			c := math.Cos(th * math.Pi / 180)
			want := (c + s.Beta) / (1 + s.Beta*c)
			have := math.Cos(tab.Columns[k].Y[i] * math.Pi / 180)
			if !scalar.EqualWithinAbs(have, want, 1e-12) {
				t.Errorf("β = %v θ = %v: cos θ′ have %.15g, want %.15g", s.Beta, th, have, want)
			}
		}
		if y := tab.Columns[k].Y; y[0] != 0 || y[len(y)-1] != 180 {
			t.Errorf("β = %v: ends θ′ = %v, %v; want 0 and 180 (the axis is fixed)", s.Beta, y[0], y[len(y)-1])
		}
	}
}

func TestDopplerCurve(t *testing.T) {
	// D = 1/(γ(1 − β cos θ′)) (physics.md).
	tab, err := DopplerCurve(testSpeeds, 181)
	if err != nil {
		t.Fatal(err)
	}
	for k, s := range testSpeeds {
		g := 1 / math.Sqrt(1-s.Beta*s.Beta)
		for i, th := range tab.X {
			want := 1 / (g * (1 - s.Beta*math.Cos(th*math.Pi/180)))
			if have := tab.Columns[k].Y[i]; !scalar.EqualWithinRel(have, want, 1e-11) {
				t.Errorf("β = %v θ′ = %v: D have %.15g, want %.15g", s.Beta, th, have, want)
			}
		}
	}
	// β = 0.6: D ahead = 2, D behind = 0.5 (physics.md check values [cp]).
	tab, err = DopplerCurve(Betas(0.6), 3)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct{ th, want float64 }{{0, 2}, {180, 0.5}} {
		if have := at(t, tab, "doppler_b0.6", c.th); !scalar.EqualWithinRel(have, c.want, 1e-14) {
			t.Errorf("β = 0.6 θ′ = %v: D have %v, want %v", c.th, have, c.want)
		}
	}
	// γ given directly: ahead D = γ(1+β) ≈ 2γ for γ = 1e9, where β rounds to 1.
	tab, err = DopplerCurve(Gammas(1e9), 3)
	if err != nil {
		t.Fatal(err)
	}
	if have := at(t, tab, "doppler_g1e+09", 0); !scalar.EqualWithinRel(have, 2e9, 1e-9) {
		t.Errorf("γ = 1e9 ahead: D have %v, want ≈ 2e9 (γ(1+β), physics.md)", have)
	}
}

func TestDeltaVLimits(t *testing.T) {
	// T → ∞: the V flux ratio tends to 1/D, so ΔV → +2.5 log10 D (physics.md,
	// Rayleigh–Jeans limit). At T = 1e12 K the first correction, x′/2 =
	// c₂/(2λT′) at the observed T′ = D·T ≥ 7e10 K, is below 2e-7 at 550 nm.
	for _, s := range Betas(0.3, 0.9, 0.99) {
		tab, err := DeltaV(s, []float64{1e12, 5772}, 37)
		if err != nil {
			t.Fatal(err)
		}
		d, _ := DopplerCurve([]Speed{s}, 37)
		for i, th := range tab.X {
			D := d.Columns[0].Y[i]
			want := 2.5 * math.Log10(D)
			if have := tab.Column("dv_T1e+12").Y[i]; !scalar.EqualWithinAbs(have, want, 1e-5) {
				t.Errorf("%v θ′ = %v: ΔV(1e12 K) have %.8f, want %.8f", s.Label(), th, have, want)
			}
			if have := tab.Column("dv_rj_limit").Y[i]; !scalar.EqualWithinAbs(have, want, 1e-12) {
				t.Errorf("%v θ′ = %v: RJ limit column have %v, want %v", s.Label(), th, have, want)
			}
		}
		// Sideways in the ship frame at β: sign checks only. Straight ahead
		// a Sun-like star brightens for β ≥ 0.3 (Wien side of the V band
		// moves in) — ΔV < 0 [physics.md: cool stars brighten steeply].
		if v := at(t, tab, "dv_T5772", 0); !(v < 0) {
			t.Errorf("%v: ΔV(5772 K) straight ahead = %v, want < 0 (brighter)", s.Label(), v)
		}
	}
}

func TestBrightening(t *testing.T) {
	tab, err := Brightening([]float64{3000, 30000, 1e12}, 0.1, 10, 101)
	if err != nil {
		t.Fatal(err)
	}
	for i, D := range tab.X {
		// Bolometric F′/F = D² (physics.md).
		if have := tab.Column("bolometric").Y[i]; !scalar.EqualWithinRel(have, D*D, 1e-12) {
			t.Errorf("D = %v: bolometric have %.15g, want D² = %.15g", D, have, D*D)
		}
		// V band, T → ∞: 1/D (physics.md), correction < 1e-6 at 1e12 K.
		if have := tab.Column("v_T1e+12").Y[i]; !scalar.EqualWithinRel(have, 1/D, 1e-5) {
			t.Errorf("D = %v: V ratio at 1e12 K have %.9g, want 1/D = %.9g", D, have, 1/D)
		}
	}
	// A hot star ahead fades in V while its bolometric flux rises
	// (physics.md): 30000 K at D = 10.
	if v, b := at(t, tab, "v_T30000", 10), at(t, tab, "bolometric", 10); !(v < 1 && b > 1) {
		t.Errorf("30000 K at D = 10: V ratio %v (want < 1), bolometric %v (want > 1)", v, b)
	}
	// A cool star ahead brightens in V (Wien side, physics.md): 3000 K at
	// D = 10.
	if v := at(t, tab, "v_T3000", 10); !(v > 1) {
		t.Errorf("3000 K at D = 10: V ratio %v, want > 1", v)
	}
}

func TestConventionsArePowersOfD(t *testing.T) {
	// Exact, D³ and D⁴ conventions: bolometric F′/F = D², D³, D⁴
	// (physics.md; spectrum.Beaming.WScale).
	for _, s := range Betas(0.5, 0.9, 0.99) {
		tab, err := Conventions(s, 5772, 91)
		if err != nil {
			t.Fatal(err)
		}
		d := tab.Column("doppler").Y
		for i := range tab.X {
			D := d[i]
			for _, c := range []struct {
				name string
				p    float64
			}{{"flux_exact", 2}, {"flux_d3", 3}, {"flux_d4", 4}} {
				want := math.Pow(D, c.p)
				if have := tab.Column(c.name).Y[i]; !scalar.EqualWithinRel(have, want, 1e-12) {
					t.Errorf("%v D = %v: %s have %.15g, want D^%v = %.15g", s.Label(), D, c.name, have, c.p, want)
				}
			}
			// Each extra power of D brightens by 2.5 log10 D (same T′).
			step := 2.5 * math.Log10(D)
			if have := tab.Column("dv_exact").Y[i] - tab.Column("dv_d3").Y[i]; !scalar.EqualWithinAbs(have, step, 1e-9) {
				t.Errorf("%v D = %v: ΔV exact − d3 have %v, want %v", s.Label(), D, have, step)
			}
			if have := tab.Column("dv_d3").Y[i] - tab.Column("dv_d4").Y[i]; !scalar.EqualWithinAbs(have, step, 1e-9) {
				t.Errorf("%v D = %v: ΔV d3 − d4 have %v, want %v", s.Label(), D, have, step)
			}
		}
	}
}

func TestCurvesDefaults(t *testing.T) {
	cs, err := Curves(CurveOptions{Points: 19})
	if err != nil {
		t.Fatal(err)
	}
	if len(cs.Speeds) != len(DefaultSpeeds) || len(cs.DeltaV) != len(DefaultSpeeds) || len(cs.Aberration.Columns) != len(DefaultSpeeds) {
		t.Errorf("default speeds: have %d speeds, %d ΔV tables, %d aberration columns; want %d",
			len(cs.Speeds), len(cs.DeltaV), len(cs.Aberration.Columns), len(DefaultSpeeds))
	}
	// The convention comparison defaults to the fastest speed (0.99).
	if want := "β = 0.99"; !containsStr(cs.Conventions.Title, want) {
		t.Errorf("conventions title %q does not name %q", cs.Conventions.Title, want)
	}
	// Brightening spans the fastest speed's Doppler range [1/(γ(1+β)), γ(1+β)].
	g := 1 / math.Sqrt(1-0.99*0.99)
	x := cs.Brightening.X
	if !scalar.EqualWithinRel(x[len(x)-1], g*1.99, 1e-12) || !scalar.EqualWithinRel(x[0], 1/(g*1.99), 1e-12) {
		t.Errorf("brightening D range [%v, %v], want [%v, %v]", x[0], x[len(x)-1], 1/(g*1.99), g*1.99)
	}
	if n := len(cs.Tables()); n != 4+len(DefaultSpeeds) {
		t.Errorf("Tables: %d, want %d", n, 4+len(DefaultSpeeds))
	}
}

func containsStr(s, sub string) bool { return lastIndex(s, sub) >= 0 }

func TestCurveErrors(t *testing.T) {
	nan := math.NaN()
	cases := []struct {
		name string
		opt  CurveOptions
		want error
	}{
		{"β = 1", CurveOptions{Speeds: Betas(0.5, 1)}, ErrSpeed},
		{"β < 0", CurveOptions{Speeds: Betas(-0.1)}, ErrSpeed},
		{"β NaN", CurveOptions{Speeds: Betas(nan)}, ErrSpeed},
		{"γ < 1", CurveOptions{Speeds: Gammas(0.5)}, ErrSpeed},
		{"γ Inf", CurveOptions{Speeds: Gammas(math.Inf(1))}, ErrSpeed},
		{"T NaN", CurveOptions{Temps: []float64{5000, nan}}, ErrTemperature},
		{"T ≤ 0", CurveOptions{Temps: []float64{0}}, ErrTemperature},
		{"1 point", CurveOptions{Points: 1}, ErrPoints},
		{"convention speed", CurveOptions{ConventionSpeed: Speed{Beta: 2}}, ErrSpeed},
	}
	for _, c := range cases {
		if _, err := Curves(c.opt); !errors.Is(err, c.want) {
			t.Errorf("%s: error %v, want %v", c.name, err, c.want)
		}
	}
	if _, err := Aberration(nil, 10); !errors.Is(err, ErrNoSpeeds) {
		t.Errorf("no speeds: error %v, want %v", err, ErrNoSpeeds)
	}
	if _, err := Brightening([]float64{5000}, 2, 1, 10); err == nil {
		t.Error("Brightening with dMax < dMin: no error")
	}
}

func TestDeltaVConventionMatchesSpectrum(t *testing.T) {
	// The ΔV column is V′ − V from spectrum's own photometry (consistency
	// with the core, not an independent value): β = 0 gives 0 exactly.
	tab, err := DeltaV(Speed{}, []float64{4000}, 5)
	if err != nil {
		t.Fatal(err)
	}
	for i, v := range tab.Column("dv_T4000").Y {
		if v != 0 {
			t.Errorf("β = 0 θ′ = %v: ΔV = %v, want 0 (V′ = V at rest, physics.md)", tab.X[i], v)
		}
	}
	_ = spectrum.BeamingExact
}
