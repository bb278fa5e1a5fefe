package spectrum

import (
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"pgregory.net/rapid"
)

// simpsonX integrates column col of band b at temperature T by composite
// Simpson's rule in x = c₂/λT, panel by panel (so the kinks of the
// piecewise-linear passband fall on panel ends), with the integrand scaled
// by e^{x_min}. It is independent of integrate.go and returns
// ln ∫ B_λ S λ^q dλ.
func simpsonX(b *band, col int, T float64) float64 {
	w := b.wien(col) // long end of this column's support
	xref := C2 * w.u0 / T
	var sum float64
	for i := 0; i < b.n-1; i++ {
		lamS, lamL := b.lambda(i), b.lambda(i+1)
		xs, xl := C2/(lamL*T), C2/(lamS*T)
		if xs-xref > 80 || (b.w[col][i] == 0 && b.w[col][i+1] == 0) {
			continue
		}
		n := int(math.Ceil((xl-xs)/0.004)) + 64
		n += n % 2
		h := (xl - xs) / float64(n)
		f := func(x float64) float64 {
			lam := C2 / (x * T)
			s := b.w[col][i] + (b.w[col][i+1]-b.w[col][i])*(lam-lamS)/b.step
			s *= math.Pow(lam, float64(b.q))
			return s * C1L / (lam * lam * lam * lam) / x * math.Exp(-(x - xref)) / -math.Expm1(-x)
		}
		acc := f(xs) + f(xl)
		for k := 1; k < n; k++ {
			wt := 2.0
			if k%2 == 1 {
				wt = 4
			}
			acc += wt * f(xs+float64(k)*h)
		}
		sum += acc * h / 3
	}
	return math.Log(sum) - xref
}

// The panel integrator against brute-force Simpson from 0.3 K to 1e12 K.
func TestDirectVsSimpson(t *testing.T) {
	for _, T := range []float64{0.3, 1, 3, 30, 300, 2856, 1e4, 1e5, 1e7, 1e9, 1e12} {
		rc := cmfBand.integrate(C2 / T)
		rv := vBand.integrate(C2 / T)
		for c := 0; c < 4; c++ {
			have, b, col := 0.0, &cmfBand, c
			if c < 3 {
				have = rc.ln[c]
			} else {
				have, b, col = rv.ln[0], &vBand, 0
			}
			want := simpsonX(b, col, T)
			if !scalar.EqualWithinAbs(have, want, 1e-9) {
				t.Errorf("T=%g band %d: ln I have %.12g, want (Simpson) %.12g, diff %g", T, c, have, want, have-want)
			}
		}
	}
}

// d ln I / d ln T from the integrator against a central difference.
func TestDirectDerivative(t *testing.T) {
	p := getPhot()
	for _, lnT := range []float64{0.1, 3, 8, 12, 20, 27} {
		const d = 1e-4
		_, dln := direct(lnT, C2, &p.lnConst)
		lp, _ := direct(lnT+d, C2, &p.lnConst)
		lm, _ := direct(lnT-d, C2, &p.lnConst)
		for c := 0; c < 4; c++ {
			fd := (lp[c] - lm[c]) / (2 * d)
			if !scalar.EqualWithinAbsOrRel(dln[c], fd, 1e-6, 1e-7) {
				t.Errorf("lnT=%g band %d: derivative have %.10g, finite difference %.10g", lnT, c, dln[c], fd)
			}
		}
	}
}

func checkLookup(lnT float64) (dlnY, dlnV, dx, dy float64) {
	p := getPhot()
	ln, _ := direct(lnT, C2, &p.lnConst)
	x, y, _, _ := chroma(ln, [4]float64{})
	s := Lookup(lnT)
	return math.Abs(s.LnY - ln[1]), math.Abs(s.LnV - ln[3]), math.Abs(s.X - x), math.Abs(s.Y - y)
}

// Stated table accuracy (doc.go): 1e-6 in ln Y, ln V (1e-6 relative flux)
// and 2e-8 in x, y against direct integration, anywhere in 1 K .. 1e12 K
// and in the asymptotic ranges beyond.
const (
	tolLn  = 1e-6
	tolChr = 2e-8
)

func TestLookupVsDirectSweep(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	n := 3000
	if testing.Short() {
		n = 500
	}
	var worst [4]float64
	for i := 0; i < n; i++ {
		lnT := rng.Float64()*(math.Log(1e12)+4) - 2 // 0.14 K .. 5e13 K
		d := [4]float64{}
		d[0], d[1], d[2], d[3] = checkLookup(lnT)
		for k := range d {
			worst[k] = math.Max(worst[k], d[k])
		}
		if d[0] > tolLn || d[1] > tolLn || d[2] > tolChr || d[3] > tolChr {
			t.Fatalf("T=%g: |Δ ln Y|=%g |Δ ln V|=%g |Δx|=%g |Δy|=%g", math.Exp(lnT), d[0], d[1], d[2], d[3])
		}
	}
	t.Logf("worst |Δ ln Y|=%.2g |Δ ln V|=%.2g |Δx|=%.2g |Δy|=%.2g over %d temperatures", worst[0], worst[1], worst[2], worst[3], n)
}

func TestLookupVsDirectRapid(t *testing.T) {
	rapid.Check(t, func(rt *rapid.T) {
		lnT := rapid.Float64Range(-3, math.Log(1e12)+3).Draw(rt, "lnT")
		a, b, c, d := checkLookup(lnT)
		if a > tolLn || b > tolLn || c > tolChr || d > tolChr {
			rt.Fatalf("T=%g: |Δ ln Y|=%g |Δ ln V|=%g |Δx|=%g |Δy|=%g", math.Exp(lnT), a, b, c, d)
		}
	})
}

func TestLookupEdges(t *testing.T) {
	nan := Lookup(math.NaN())
	if !math.IsNaN(nan.LnY) || !math.IsNaN(nan.X) {
		t.Errorf("Lookup(NaN) = %+v, want NaN", nan)
	}
	hot, cold := Lookup(math.Inf(1)), Lookup(math.Inf(-1))
	if !math.IsInf(hot.LnY, 1) || !math.IsInf(cold.LnY, -1) {
		t.Errorf("Lookup(±Inf) LnY = %g, %g", hot.LnY, cold.LnY)
	}
	// T → 0: the red end of the CIE 1931 spectrum locus, x̄/(x̄+ȳ) at 830 nm
	// [pub CIE 015:2004 table]; T → ∞: see TestRayleighJeansChromaticity.
	if want := 1.251141 / (1.251141 + 0.45181); !scalar.EqualWithinAbs(cold.X, want, 1e-6) {
		t.Errorf("T→0 x have %.6f, want %.6f", cold.X, want)
	}
	// Just inside and outside the table ends.
	for _, lnT := range []float64{0, math.Log(1e12)} {
		for _, e := range []float64{-1e-9, 0, 1e-9} {
			a, b, c, d := checkLookup(lnT + e)
			if a > tolLn || b > tolLn || c > tolChr || d > tolChr {
				t.Errorf("T=%g: |Δ ln Y|=%g |Δ ln V|=%g |Δx|=%g |Δy|=%g", math.Exp(lnT+e), a, b, c, d)
			}
		}
	}
}

func TestLookupAllocs(t *testing.T) {
	getPhot()
	var s Sample
	if n := testing.AllocsPerRun(100, func() { s = Lookup(8.5) }); n != 0 {
		t.Errorf("Lookup allocates %g times", n)
	}
	_ = s
}

// TestLookupBatchMatchesLookup checks that the batch form returns exactly
// Lookup's bits (the render loop relies on it: its frames must not depend on
// which form produced them). The values cover the table, its two ends, both
// asymptotes, ±Inf and NaN.
func TestLookupBatchMatchesLookup(t *testing.T) {
	lnT := []float64{math.Inf(-1), -50, -1e-300, 0, 1e-12, math.Log(2856), math.Log(1e12) - 1e-12,
		math.Log(1e12), math.Log(1e12) + 1e-12, 60, 700, math.Inf(1), math.NaN()}
	for k := 0; k <= 4*tabN; k++ {
		lnT = append(lnT, -1+float64(k)*(math.Log(1e12)+2)/(4*tabN))
	}
	n := len(lnT)
	lnY, lnV, x, y := make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n)
	LookupBatch(lnT, lnY, lnV, x, y)
	same := func(a, b float64) bool {
		return math.Float64bits(a) == math.Float64bits(b) || (math.IsNaN(a) && math.IsNaN(b))
	}
	for k, l := range lnT {
		s := Lookup(l)
		if !same(s.LnY, lnY[k]) || !same(s.LnV, lnV[k]) || !same(s.X, x[k]) || !same(s.Y, y[k]) {
			t.Errorf("lnT=%v: batch (%v %v %v %v), Lookup %+v", l, lnY[k], lnV[k], x[k], y[k], s)
		}
	}
	if a := testing.AllocsPerRun(10, func() { LookupBatch(lnT, lnY, lnV, x, y) }); a != 0 {
		t.Errorf("LookupBatch allocates %g times", a)
	}
}

func BenchmarkLookup(b *testing.B) {
	getPhot()
	b.ReportAllocs()
	lnT, acc := 5.0, 0.0
	for i := 0; i < b.N; i++ {
		s := Lookup(lnT)
		acc += s.LnY + s.X
		lnT += 1e-3
		if lnT > 20 {
			lnT = 5
		}
	}
	_ = acc
}

func BenchmarkTableBuild(b *testing.B) {
	b.ReportAllocs()
	for i := 0; i < b.N; i++ {
		buildPhot()
	}
}

func BenchmarkLookupBatch(b *testing.B) {
	getPhot()
	lnT := make([]float64, 256)
	for k := range lnT {
		lnT[k] = 5 + 15*float64(k*97%256)/256 // 150 K … 3·10⁸ K, scattered
	}
	y, v, x, yy := make([]float64, 256), make([]float64, 256), make([]float64, 256), make([]float64, 256)
	b.ReportAllocs()
	for b.Loop() {
		LookupBatch(lnT, y, v, x, yy)
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/256, "ns/value")
}
