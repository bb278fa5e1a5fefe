package spectrum

import (
	"math"
	"sync"
)

// The Johnson B passband of Bessell (1990, PASP 102, 1181, Table 2),
// 360–560 nm at 10 nm, normalised to a peak of 1 (quoted from memory).
// Linear between nodes, zero outside, like the V passband beside it.
const (
	bLambda0 = 360e-9 // first node, m
	bStep    = 10e-9  // node spacing, m
)

// bTable holds the B response at λ = 360 nm + 10 nm·i.
var bTable = [21]float64{
	0.000, 0.030, 0.134, 0.567, 0.920, 0.978, 1.000, 0.978, 0.935, 0.853, 0.740,
	0.640, 0.536, 0.424, 0.325, 0.235, 0.150, 0.095, 0.043, 0.009, 0.000,
}

// B0FluxLambda is the spectral flux density f_λ of a B = 0 star in the
// Johnson B band, W m⁻² nm⁻¹ (632 × 10⁻¹¹ erg cm⁻² s⁻¹ Å⁻¹; Bessell,
// Castelli & Plez 1998, A&A 333, 231, Table A2, quoted from memory), the
// zero point that goes with V0FluxLambda.
const B0FluxLambda = 6.32e-11

var (
	bvOnce       sync.Once
	bBand        band
	lnBNorm      float64 // ln(π·10⁻⁹ / ∫S_B λ dλ): per-W B flux in W m⁻² nm⁻¹
	lnVNormBands float64 // the same for V
	bvTab        []bvNode
)

// The B−V table: nodes every ln(10)/bvPerDecade in ln T from 10^bvLogLo to
// 10^bvLogHi K, each with B−V and its derivative in ln T; cubic Hermite
// between them (error ~h⁴/384·|f⁗|: below 1e-9 of max(1 mag, |B−V|);
// TestBVTable).
const (
	bvPerDecade = 128
	bvLogLo     = 1.0
	bvLogHi     = 9.0
)

type bvNode struct{ bv, dbv float64 }

func initBV() {
	bBand = band{lam0: bLambda0, step: bStep, n: len(bTable), ncol: 1, q: 1}
	bBand.w[0] = bTable[:]
	lnBNorm = math.Log(math.Pi * 1e-9 / bBand.moments()[0][0])
	lnVNormBands = math.Log(math.Pi * 1e-9 / vBand.moments()[0][0])
	n := int((bvLogHi-bvLogLo)*bvPerDecade) + 1
	bvTab = make([]bvNode, n)
	for i := range bvTab {
		bv, dbv := bvDirectLn((bvLogLo + float64(i)/bvPerDecade) * math.Ln10)
		bvTab[i] = bvNode{bv, dbv}
	}
}

// bvDirectLn integrates both passbands at ln T: B−V and d(B−V)/d ln T.
func bvDirectLn(lnT float64) (bv, dbv float64) {
	a := C2 * math.Exp(-lnT)
	rb, rv := bBand.integrate(a), vBand.integrate(a)
	lnB := rb.ln[0] + lnBNorm
	lnV := rv.ln[0] + lnVNormBands
	bv = -2.5 / math.Ln10 * ((lnB - math.Log(B0FluxLambda)) - (lnV - math.Log(V0FluxLambda)))
	dbv = -2.5 / math.Ln10 * (rb.dln[0] - rv.dln[0])
	return bv, dbv
}

// BV returns the B−V colour index of a blackbody at T kelvin (any
// dilution: it cancels): −2.5 log₁₀((F_B/B0FluxLambda)/(F_V/V0FluxLambda)),
// where F is the photon-weighted mean flux over Bessell's passband, as in
// Blackbody.VFlux. Between 10 K and 10⁹ K it interpolates a table of the
// exact integrals (cubic Hermite in ln T, within 1e-9 of them, relative
// above 1 mag);
// outside, it integrates directly. T must be finite and > 0; otherwise the
// result is NaN. A moving star seen with Doppler factor D has the colour
// BV(D·T).
func BV(T float64) float64 {
	if !(T > 0) || math.IsInf(T, 1) {
		return math.NaN()
	}
	bvOnce.Do(initBV)
	lnT := math.Log(T)
	u := (lnT/math.Ln10 - bvLogLo) * bvPerDecade
	if !(u >= 0 && u < float64(len(bvTab)-1)) {
		bv, _ := bvDirectLn(lnT)
		return bv
	}
	i := int(u)
	t := u - float64(i)
	h := math.Ln10 / bvPerDecade
	a, b := bvTab[i], bvTab[i+1]
	d0, d1 := a.dbv*h, b.dbv*h
	c := [4]float64{a.bv, d0, 3*(b.bv-a.bv) - 2*d0 - d1, 2*(a.bv-b.bv) + d0 + d1}
	return horner(&c, t)
}
