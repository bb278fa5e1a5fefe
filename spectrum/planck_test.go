package spectrum

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/integrate"
)

func TestConstants(t *testing.T) {
	for _, c := range []struct {
		name       string
		have, want float64
		tol        float64
		src        string
	}{
		{"c2 = hc/k", C2, 1.438776877e-2, 1e-9, "[pub] CODATA 2018 second radiation constant"},
		{"σ = 2π⁵k⁴/15h³c²", 2 * math.Pow(math.Pi, 5) * math.Pow(KB, 4) / (15 * H * H * H * C * C), SigmaSB, 1e-9, "[pub] CODATA 2018 Stefan–Boltzmann constant"},
	} {
		if !scalar.EqualWithinRel(c.have, c.want, c.tol) {
			t.Errorf("%s: have %.10g, want %.10g %s", c.name, c.have, c.want, c.src)
		}
	}
}

// π ∫ B_λ dλ = σT⁴, integrated numerically with Simpson's rule in ln λ.
func TestStefanBoltzmannNumerical(t *testing.T) {
	for _, T := range []float64{3, 5772, 1e7} {
		const n = 20001
		lo, hi := math.Log(WienB/T/50), math.Log(WienB/T*2000)
		xs, fs := make([]float64, n), make([]float64, n)
		for i := range xs {
			s := lo + (hi-lo)*float64(i)/(n-1)
			lam := math.Exp(s)
			xs[i], fs[i] = s, math.Pi*Planck(lam, T)*lam
		}
		sigma := integrate.Simpsons(xs, fs) / math.Pow(T, 4)
		if !scalar.EqualWithinRel(sigma, SigmaSB, 1e-6) {
			t.Errorf("T=%g: σ have %.10g, want %.10g [pub CODATA 2018]", T, sigma, SigmaSB)
		}
	}
}

// The maximum of B_λ is at λT = b (golden-section search on Planck).
func TestWienDisplacement(t *testing.T) {
	for _, T := range []float64{300, 5772, 1e6} {
		a, b := 1e-3/T, 1e-2/T
		g := (math.Sqrt(5) - 1) / 2
		for i := 0; i < 200; i++ {
			c, d := b-g*(b-a), a+g*(b-a)
			if Planck(c, T) > Planck(d, T) {
				b = d
			} else {
				a = c
			}
		}
		if have := (a + b) / 2 * T; !scalar.EqualWithinRel(have, WienB, 1e-7) {
			t.Errorf("T=%g: λmax·T have %.10g, want %.10g [pub CODATA 2018]", T, have, WienB)
		}
	}
}

func TestPlanckRobust(t *testing.T) {
	// Rayleigh–Jeans limit 2ckT/λ⁴ [pub, Planck's law] and the Wien limit
	// 2hc²/λ⁵ e^{−x} [pub].
	lam := 500e-9
	if have, want := Planck(lam, 1e15), 2*C*KB*1e15/math.Pow(lam, 4); !scalar.EqualWithinRel(have, want, 1e-7) {
		t.Errorf("RJ: have %g, want %g", have, want)
	}
	if have, want := Planck(lam, 500), C1L/math.Pow(lam, 5)*math.Exp(-C2/lam/500); !scalar.EqualWithinRel(have, want, 1e-12) {
		t.Errorf("Wien: have %g, want %g", have, want)
	}
	for _, c := range []struct{ lam, T float64 }{
		{1e-12, 1e-3}, {1e-70, 1}, {1e-9, 1e-300}, {1, 1e300}, {1e300, 1}, {lam, math.SmallestNonzeroFloat64},
	} {
		v := Planck(c.lam, c.T)
		if math.IsNaN(v) || v < 0 {
			t.Errorf("Planck(%g, %g) = %g, want finite ≥ 0", c.lam, c.T, v)
		}
	}
	for _, c := range []struct{ lam, T float64 }{{0, 1}, {-1, 1}, {lam, -1}, {math.NaN(), 1}, {lam, math.NaN()}} {
		if v := Planck(c.lam, c.T); !math.IsNaN(v) {
			t.Errorf("Planck(%g, %g) = %g, want NaN", c.lam, c.T, v)
		}
	}
	if v := Planck(lam, 0); v != 0 {
		t.Errorf("Planck(λ, 0) = %g, want 0", v)
	}
}
