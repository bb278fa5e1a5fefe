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
)

func initBV() {
	bBand = band{lam0: bLambda0, step: bStep, n: len(bTable), ncol: 1, q: 1}
	bBand.w[0] = bTable[:]
	lnBNorm = math.Log(math.Pi * 1e-9 / bBand.moments()[0][0])
	lnVNormBands = math.Log(math.Pi * 1e-9 / vBand.moments()[0][0])
}

// BV returns the B−V colour index of a blackbody at T kelvin (any
// dilution: it cancels): −2.5 log₁₀((F_B/B0FluxLambda)/(F_V/V0FluxLambda)),
// where F is the photon-weighted mean flux over Bessell's passband, as in
// Blackbody.VFlux. It integrates the passbands directly (no table), so it
// is meant for tables and reports, not per-pixel work. T must be finite and
// > 0; otherwise the result is NaN. A moving star seen with Doppler factor
// D has the colour BV(D·T).
func BV(T float64) float64 {
	if !(T > 0) || math.IsInf(T, 1) {
		return math.NaN()
	}
	bvOnce.Do(initBV)
	a := C2 / T
	lnB := bBand.integrate(a).ln[0] + lnBNorm
	lnV := vBand.integrate(a).ln[0] + lnVNormBands
	return -2.5 / math.Ln10 * ((lnB - math.Log(B0FluxLambda)) - (lnV - math.Log(V0FluxLambda)))
}
