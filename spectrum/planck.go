package spectrum

import "math"

// Physical constants, SI units. H, C and KB are exact by the 2019 definition
// of the SI (CODATA 2018).
const (
	// H is the Planck constant, J s.
	H = 6.62607015e-34
	// C is the speed of light in vacuum, m s⁻¹.
	C = 299792458.0
	// KB is the Boltzmann constant, J K⁻¹.
	KB = 1.380649e-23
	// C2 is the second radiation constant hc/k, m K (≈ 1.438776877e-2).
	C2 = H * C / KB
	// C1L is the first radiation constant for spectral radiance, 2hc², W m² sr⁻¹.
	C1L = 2 * H * C * C

	// SigmaSB is the Stefan–Boltzmann constant as published by CODATA 2018,
	// W m⁻² K⁻⁴. It equals 2π⁵k⁴/(15h³c²) to the printed digits; the tests
	// check both that and a numerical integration of Planck's law against it.
	SigmaSB = 5.670374419e-8
	// WienB is the Wien wavelength displacement constant λ_max·T, m K
	// (CODATA 2018), a check value for Planck.
	WienB = 2.897771955e-3

	// Km is the maximum luminous efficacy of radiation for photopic vision,
	// 683 lm W⁻¹ (SI definition of the candela).
	Km = 683.0

	// V0FluxLambda is the spectral flux density f_λ of a V = 0 star in the
	// Johnson V band, W m⁻² nm⁻¹ (363.1 × 10⁻¹¹ erg cm⁻² s⁻¹ Å⁻¹; Bessell,
	// Castelli & Plez 1998, A&A 333, 231, Table A2, quoted from memory).
	V0FluxLambda = 3.631e-11
)

// Planck returns the spectral radiance of a blackbody, B_λ(λ, T) =
// 2hc²/λ⁵ / (exp(hc/λkT) − 1), in W m⁻² sr⁻¹ m⁻¹, for the wavelength lambdaM
// in metres and the temperature T in kelvin.
//
// It is accurate over the whole float64 range: in the Wien regime it works
// with logarithms so that tiny λT gives 0 instead of Inf/Inf, and near the
// Rayleigh–Jeans regime it uses expm1 so that huge λT does not lose digits.
// T = 0 gives 0, T = +Inf gives +Inf; lambdaM ≤ 0, T < 0 or NaN give NaN.
func Planck(lambdaM, T float64) float64 {
	switch {
	case math.IsNaN(lambdaM) || math.IsNaN(T) || lambdaM <= 0 || T < 0:
		return math.NaN()
	case T == 0 || math.IsInf(lambdaM, 1):
		if math.IsInf(T, 1) {
			return math.NaN()
		}
		return 0
	case math.IsInf(T, 1):
		return math.Inf(1)
	}
	x := C2 / lambdaM / T
	if x > 1 {
		// B = 2hc² λ⁻⁵ e^{−x} / (1 − e^{−x}), in logs.
		return math.Exp(math.Log(C1L) - 5*math.Log(lambdaM) - x - math.Log1p(-math.Exp(-x)))
	}
	// B = (2ckT/λ⁴) · x/(eˣ − 1).
	f := 1.0
	if x > 0 {
		f = x / math.Expm1(x)
	}
	l2 := lambdaM * lambdaM
	return 2 * C * KB * T / l2 / l2 * f
}
