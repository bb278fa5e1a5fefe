package spectrum

import (
	"math"
	"math/rand/v2"
	"testing"
)

// simpsonLambda integrates f over [lo, hi] (metres) by the composite
// Simpson rule on a 0.05 nm grid. The passband nodes (5 nm and 10 nm
// apart) fall on even grid points, so each kink of a piecewise-linear
// passband is a panel end.
func simpsonLambda(lo, hi float64, f func(lam float64) float64) float64 {
	const h = 0.05e-9
	n := int(math.Round((hi - lo) / h))
	n += n % 2
	step := (hi - lo) / float64(n)
	sum := f(lo) + f(hi)
	for i := 1; i < n; i++ {
		w := 2.0
		if i%2 == 1 {
			w = 4
		}
		sum += w * f(lo+float64(i)*step)
	}
	return sum * step / 3
}

// vFluxDirect is the V-band flux per unit W of a blackbody at T, W m⁻² nm⁻¹,
// integrated directly from Planck's law and the Bessell (1990) V table by
// simpsonLambda, independently of integrate.go and the ln T table: the
// photon-weighted mean ∫ π B_λ S λ dλ / ∫ S λ dλ (spectrum doc).
func vFluxDirect(T float64) float64 {
	hi := vLambda0 + vStep*float64(len(vTable)-1)
	s := func(lam float64) float64 {
		u := (lam - vLambda0) / vStep
		k := min(int(u), len(vTable)-2)
		return vTable[k] + (u-float64(k))*(vTable[k+1]-vTable[k])
	}
	num := simpsonLambda(vLambda0, hi, func(lam float64) float64 { return math.Pi * Planck(lam, T) * 1e-9 * s(lam) * lam })
	den := simpsonLambda(vLambda0, hi, func(lam float64) float64 { return s(lam) * lam })
	return num / den
}

// illumDirect is the illuminance per unit W of a blackbody at T, lux:
// Km ∫ π B_λ ȳ dλ with ȳ from the CIE 1931 table (CMF), by simpsonLambda.
func illumDirect(T float64) float64 {
	hi := cmfLambda0 + cmfStep*float64(len(cmfTable)-1)
	return Km * simpsonLambda(cmfLambda0, hi, func(lam float64) float64 {
		_, y, _ := CMF(lam)
		return math.Pi * Planck(lam, T) * y
	})
}

// The temperatures and Doppler factors the renderer meets: catalogue stars
// of 2000–40000 K, D from 0.02 (far behind at γ ≈ 25) to 2000 (ahead at
// γ = 1000), so T′ from 40 K to 8·10⁷ K.
var (
	obsTemps   = []float64{2000, 3000, 4500, 5772, 6504, 9600, 20000, 40000}
	obsDoppler = []float64{0.02, 0.1, 0.3, 0.7, 0.95, 1.05, 1.5, 3, 4.36, 10, 50, 300, 2000}
)

// V′ against direct integration [pub: physics.md, T′ = D·T, W′ = W·WScale(D)
// for the three conventions; V passband Bessell 1990, PASP 102, 1181]:
// V′ − V = −2.5 log₁₀(dil·WScale(D)·F_V(D·T)/F_V(T)) with both fluxes from
// vFluxDirect, within 1e-6 mag over obsTemps × obsDoppler. The absolute
// scale too: W′ = exp(LnW) gives V′ = −2.5 log₁₀(W′·F_V(T′)/V0FluxLambda)
// and the illuminance W′·Km ∫ π B_λ(T′) ȳ dλ (CIE 1931 table, SI candela
// Km = 683 lm/W) to 1e-6 relative, the table's stated accuracy.
func TestObserveVsDirectIntegration(t *testing.T) {
	const v = 4.2
	rest := map[float64]float64{}
	for _, T := range obsTemps {
		rest[T] = vFluxDirect(T)
	}
	worstV, worstE := 0.0, 0.0
	for _, beam := range []Beaming{BeamingExact, BeamingD3, BeamingD4} {
		for _, T := range obsTemps {
			for _, D := range obsDoppler {
				for _, dil := range []float64{1, 0.0625} {
					o := Observe(v, T, D, dil, beam)
					fv := vFluxDirect(D * T)
					want := v - 2.5*math.Log10(dil*beam.WScale(D)*fv/rest[T])
					if d := math.Abs(o.V - want); d > 1e-6 {
						t.Errorf("%v T %v D %v dil %v: V′ %.9f, direct integration %.9f (off %.2g mag)", beam, T, D, dil, o.V, want, d)
					}
					abs := -2.5 * math.Log10(math.Exp(o.LnW)*fv/V0FluxLambda)
					if d := math.Abs(o.V - abs); d > 1e-6 {
						t.Errorf("%v T %v D %v dil %v: V′ %.9f, from W′ and direct F_V %.9f", beam, T, D, dil, o.V, abs)
					}
					e := math.Exp(o.LnW) * illumDirect(D*T)
					if r := math.Abs(o.Illuminance()/e - 1); r > 1e-6 {
						t.Errorf("%v T %v D %v dil %v: illuminance %.9g lux, direct integration %.9g (rel %.2g)", beam, T, D, dil, o.Illuminance(), e, r)
					}
					worstV = max(worstV, math.Abs(o.V-want))
					worstE = max(worstE, math.Abs(o.Illuminance()/e-1))
					if o.LnT != math.Log(T)+math.Log(D) {
						t.Errorf("T %v D %v: ln T′ %v, want ln T + ln D", T, D, o.LnT)
					}
				}
			}
		}
	}
	t.Logf("worst |V′ − direct| %.2g mag, illuminance %.2g relative", worstV, worstE)
}

// V′ = V exactly at β = 0 [pub: physics.md, "at β = 0 V′ = V exactly"]:
// with ln D = 0 and no dilution the observed magnitude is the catalogue
// value bit for bit, for float32 and float64 magnitudes, every convention
// and any temperature (the table's range and both asymptotes); W′ is
// FromV's W and T′ = T.
func TestObserveRestExact(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 19))
	const n = 1000
	v32 := make([]float32, n)
	v64 := make([]float64, n)
	lnT := make([]float64, n)
	lnV := make([]float64, n)
	zero := make([]float64, n)
	for k := range n {
		v32[k] = float32(-30 + 50*rng.Float64())
		v64[k] = -30 + 50*rng.Float64()
		lnT[k] = math.Log(0.1) + rng.Float64()*(math.Log(1e13)-math.Log(0.1))
		lnV[k] = Lookup(lnT[k]).LnV
	}
	out := newBatch(n)
	for _, beam := range []Beaming{BeamingExact, BeamingD3, BeamingD4} {
		for _, lnDil := range [][]float64{nil, zero} {
			ObserveBatch(beam, v32, lnT, lnV, zero, lnDil, out)
			for k := range n {
				if out.V[k] != float64(v32[k]) || out.LnT[k] != lnT[k] || out.LnV[k] != lnV[k] {
					t.Fatalf("%v float32 V %v, T %g: V′ %v, ln T′ %v (want %v)", beam, v32[k], math.Exp(lnT[k]), out.V[k], out.LnT[k], lnT[k])
				}
				if want := LnWForV(float64(v32[k]), lnV[k]); out.LnW[k] != want {
					t.Fatalf("%v: ln W′ %v, want ln W %v", beam, out.LnW[k], want)
				}
			}
			ObserveBatch(beam, v64, lnT, lnV, zero, lnDil, out)
			for k := range n {
				if out.V[k] != v64[k] {
					t.Fatalf("%v float64 V %v, T %g: V′ %v", beam, v64[k], math.Exp(lnT[k]), out.V[k])
				}
			}
		}
		for _, T := range obsTemps {
			for _, v := range []float64{-26.74, -1.46, 0, 6.5, 21} {
				o := Observe(v, T, 1, 1, beam)
				if o.V != v {
					t.Errorf("%v Observe(%v, %v K, D = 1): V′ = %v", beam, v, T, o.V)
				}
				b, _ := FromV(T, v)
				if w := math.Exp(o.LnW); w != b.W {
					t.Errorf("%v T %v V %v: W′ %v at D = 1, FromV's W %v", beam, T, v, w, b.W)
				}
			}
		}
	}
}

func newBatch(n int) ObservedBatch {
	col := func() []float64 { return make([]float64, n) }
	return ObservedBatch{V: col(), LnW: col(), LnT: col(), LnY: col(), LnV: col(), X: col(), Y: col()}
}

// Observe is ObserveBatch on one star, to the bit, for float32 and float64
// input; an unknown convention gives NaN.
func TestObserveBatchMatchesObserve(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 3))
	const n = 500
	v32 := make([]float32, n)
	T, D, dil := make([]float64, n), make([]float64, n), make([]float64, n)
	lnT, lnV, lnD, lnDil := make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n)
	for k := range n {
		v32[k] = float32(-2 + 14*rng.Float64())
		T[k] = 2000 * math.Pow(20, rng.Float64())
		D[k] = math.Exp(-4 + 8*rng.Float64())
		dil[k] = math.Exp(-3 + 4*rng.Float64())
		if k%3 == 0 {
			dil[k] = 1
		}
		lnT[k], lnD[k], lnDil[k] = math.Log(T[k]), math.Log(D[k]), math.Log(dil[k])
		lnV[k] = Lookup(lnT[k]).LnV
	}
	out := newBatch(n)
	for _, beam := range []Beaming{BeamingExact, BeamingD3, BeamingD4} {
		ObserveBatch(beam, v32, lnT, lnV, lnD, lnDil, out)
		for k := range n {
			o := Observe(float64(v32[k]), T[k], D[k], dil[k], beam)
			b := Observed{V: out.V[k], LnW: out.LnW[k], LnT: out.LnT[k],
				Sample: Sample{LnY: out.LnY[k], LnV: out.LnV[k], X: out.X[k], Y: out.Y[k]}}
			if o != b {
				t.Fatalf("%v star %d: Observe %+v, ObserveBatch %+v", beam, k, o, b)
			}
		}
	}
	if o := Observe(3, 5000, 2, 1, Beaming(7)); !math.IsNaN(o.V) || !math.IsNaN(o.LnW) {
		t.Errorf("unknown beaming: V′ %v, ln W′ %v, want NaN", o.V, o.LnW)
	}
}

// ObserveBatch allocates nothing.
func TestObserveBatchAllocs(t *testing.T) {
	const n = 256
	v := make([]float32, n)
	lnT, lnV, lnD := make([]float64, n), make([]float64, n), make([]float64, n)
	out := newBatch(n)
	if a := testing.AllocsPerRun(20, func() { ObserveBatch(BeamingExact, v, lnT, lnV, lnD, nil, out) }); a != 0 {
		t.Errorf("ObserveBatch: %v allocations per call, want 0", a)
	}
}

// BenchmarkObserveBatch measures the per-star observed photometry in blocks
// of 256 stars (the renderer's block size), with a dilution per star.
func BenchmarkObserveBatch(b *testing.B) {
	const n = 256
	rng := rand.New(rand.NewPCG(1, 1))
	v := make([]float32, n)
	lnT, lnV, lnD, lnDil := make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n)
	for k := range n {
		v[k] = float32(12 * rng.Float64())
		lnT[k] = math.Log(2500 + 30000*rng.Float64())
		lnV[k] = Lookup(lnT[k]).LnV
		lnD[k] = -3 + 6*rng.Float64()
		lnDil[k] = -rng.Float64()
	}
	out := newBatch(n)
	b.ReportAllocs()
	for b.Loop() {
		ObserveBatch(BeamingExact, v, lnT, lnV, lnD, lnDil, out)
	}
	b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds()/1e6, "Mstars/s")
}

// LookupBatch without the V band gives the other fields of Lookup bit for
// bit, inside the table and beyond both ends of it.
func TestLookupBatchWithoutV(t *testing.T) {
	lnT := []float64{math.Log(2530), math.Log(40000), math.Log(580), -5, 0.3, 30, math.Log(1e13), math.Inf(1), math.Inf(-1)}
	n := len(lnT)
	lnY, x, y := make([]float64, n), make([]float64, n), make([]float64, n)
	LookupBatch(lnT, lnY, nil, x, y)
	for k, l := range lnT {
		s := Lookup(l)
		if s.LnY != lnY[k] || s.X != x[k] || s.Y != y[k] {
			t.Errorf("ln T %g: (%v, %v, %v), Lookup (%v, %v, %v)", l, lnY[k], x[k], y[k], s.LnY, s.X, s.Y)
		}
	}
}
