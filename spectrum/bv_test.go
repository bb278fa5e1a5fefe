package spectrum

import (
	"math"
	"testing"
)

// bvDirect integrates Planck's law against the B and V passbands with a
// composite Simpson rule on a 0.05 nm grid, independently of the panel
// integrator BV uses, and applies the same zero points.
func bvDirect(T float64) float64 {
	mean := func(lam0, step float64, tab []float64) float64 {
		lo, hi := lam0, lam0+step*float64(len(tab)-1)
		const h = 0.05e-9
		n := int(math.Round((hi - lo) / h))
		var num, den float64
		for i := 0; i <= n; i++ {
			lam := lo + float64(i)*h
			u := (lam - lam0) / step
			k := min(int(u), len(tab)-2)
			s := tab[k] + (u-float64(k))*(tab[k+1]-tab[k])
			w := 2.0
			if i == 0 || i == n {
				w = 1
			} else if i%2 == 1 {
				w = 4
			}
			num += w * math.Pi * Planck(lam, T) * 1e-9 * s * lam
			den += w * s * lam
		}
		return num / den
	}
	fb := mean(bLambda0, bStep, bTable[:])
	fv := mean(vLambda0, vStep, vTable[:])
	return -2.5 * math.Log10((fb/B0FluxLambda)/(fv/V0FluxLambda))
}

// BV against the independent integration over 1000 K to 10⁶ K (the
// temperatures a boosted star's D·T spans in practice), within 1e-6 mag.
func TestBVAgainstDirect(t *testing.T) {
	for _, T := range []float64{1000, 2500, 3500, 4500, 5772, 6504, 8000, 9600, 12000, 20000, 40000, 1e5, 1e6} {
		have, want := BV(T), bvDirect(T)
		if math.Abs(have-want) > 1e-6 {
			t.Errorf("T = %g K: B−V %.9f, direct integration %.9f", T, have, want)
		}
	}
}

// Physical checks: B−V falls monotonically with temperature; a Sun-like
// blackbody is near the Sun's B−V = 0.65 (a blackbody is not a solar
// spectrum: within 0.1; Ramírez et al. 2012, ApJ 752, 5, give 0.653, from
// memory); at very high T the Rayleigh–Jeans law B_λ ∝ T λ⁻⁴ makes B−V
// the ratio of the passbands' λ⁻⁴ means with the zero points, computed here
// by its own Simpson rule; bad temperatures give NaN.
func TestBVProperties(t *testing.T) {
	prev := math.Inf(1)
	for lt := 3.0; lt <= 8; lt += 0.05 {
		bv := BV(math.Pow(10, lt))
		if !(bv < prev) {
			t.Fatalf("B−V not falling at T = 10^%.2f K: %v after %v", lt, bv, prev)
		}
		prev = bv
	}
	if bv := BV(5772); math.Abs(bv-0.65) > 0.1 {
		t.Errorf("B−V(5772 K) = %.3f, want ≈ 0.65", bv)
	}
	rj := func(lam0, step float64, tab []float64) float64 {
		var num, den float64
		n := 20 * (len(tab) - 1)
		for i := 0; i <= n; i++ {
			lam := lam0 + float64(i)*step/20
			u := float64(i) / 20
			k := min(int(u), len(tab)-2)
			sv := tab[k] + (u-float64(k))*(tab[k+1]-tab[k])
			w := 2.0
			if i == 0 || i == n {
				w = 1
			} else if i%2 == 1 {
				w = 4
			}
			num += w * sv * math.Pow(lam, -3)
			den += w * sv * lam
		}
		return num / den
	}
	want := -2.5 * math.Log10(rj(bLambda0, bStep, bTable[:])/B0FluxLambda/(rj(vLambda0, vStep, vTable[:])/V0FluxLambda))
	if bv := BV(1e12); math.Abs(bv-want) > 1e-4 {
		t.Errorf("B−V(1e12 K) = %.5f, want the Rayleigh–Jeans limit %.5f", bv, want)
	}
	for _, T := range []float64{0, -1, math.NaN(), math.Inf(1)} {
		if !math.IsNaN(BV(T)) {
			t.Errorf("BV(%v) = %v, want NaN", T, BV(T))
		}
	}
}

// The table against the direct integrals at points between its nodes
// (and at them), and its derivative against a finite difference of the
// integrals, over its whole range.
func TestBVTable(t *testing.T) {
	BV(1000)
	worst := 0.0
	for lt := bvLogLo; lt < bvLogHi; lt += 0.0123 {
		T := math.Pow(10, lt)
		want, _ := bvDirectLn(math.Log(T))
		if e := math.Abs(BV(T)-want) / math.Max(1, math.Abs(want)); e > worst {
			worst = e
			t.Logf("T = %.4g K: B−V %.6g, error %.3g", T, want, e)
		}
	}
	if worst > 1e-9 {
		t.Errorf("table vs integrals: worst %.3g (mag, relative above 1 mag), want ≤ 1e-9", worst)
	}
	for _, lnT := range []float64{3, 8, 12, 18} {
		_, d := bvDirectLn(lnT)
		p, _ := bvDirectLn(lnT + 1e-5)
		m, _ := bvDirectLn(lnT - 1e-5)
		if fd := (p - m) / 2e-5; math.Abs(fd-d) > 1e-6*math.Max(1, math.Abs(d)) {
			t.Errorf("ln T %v: d(B−V)/d ln T %v, finite difference %v", lnT, d, fd)
		}
	}
}

// BenchmarkBV: one B−V from the table (the stars table calls it once
// per row).
func BenchmarkBV(b *testing.B) {
	b.ReportAllocs()
	T := 3000.0
	for b.Loop() {
		BV(T)
		T += 1
	}
}
