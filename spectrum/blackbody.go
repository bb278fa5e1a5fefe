package spectrum

import (
	"errors"
	"fmt"
	"math"
)

// ErrTemperature and ErrDilution are wrapped by the errors of NewBlackbody
// and FromV, which also name the bad value.
var (
	ErrTemperature = errors.New("spectrum: temperature must be finite and > 0 K")
	ErrDilution    = errors.New("spectrum: dilution W must be finite and ≥ 0")
	ErrMagnitude   = errors.New("spectrum: magnitude must be finite")
)

// Blackbody is a diluted blackbody: spectral flux F_λ = π W B_λ(λ, T), with
// T in kelvin and W = (R/r)² the square of the angular radius (a pure
// number). The zero value is a dark source.
type Blackbody struct {
	T, W float64
}

func checkT(T float64) error {
	if !(T > 0) || math.IsInf(T, 1) {
		return fmt.Errorf("%w: T = %g", ErrTemperature, T)
	}
	return nil
}

// NewBlackbody validates T (finite, > 0) and W (finite, ≥ 0).
func NewBlackbody(T, W float64) (Blackbody, error) {
	if err := checkT(T); err != nil {
		return Blackbody{}, err
	}
	if !(W >= 0) || math.IsInf(W, 1) {
		return Blackbody{}, fmt.Errorf("%w: W = %g", ErrDilution, W)
	}
	return Blackbody{T: T, W: W}, nil
}

// FromV returns the blackbody of temperature T whose V magnitude is vmag,
// i.e. W = V0FluxLambda·10^(−0.4 vmag) / (V flux per unit W at T). Because
// Vmag uses the same passband and table, Vmag() returns vmag again (to
// rounding), so an unboosted star keeps its catalogue V exactly.
func FromV(T, vmag float64) (Blackbody, error) {
	if err := checkT(T); err != nil {
		return Blackbody{}, err
	}
	if math.IsNaN(vmag) || math.IsInf(vmag, 0) {
		return Blackbody{}, fmt.Errorf("%w: V = %g", ErrMagnitude, vmag)
	}
	s := Lookup(math.Log(T))
	lnW := LnWForV(vmag, s.LnV)
	return NewBlackbody(T, math.Exp(lnW))
}

// Observed returns the blackbody seen with Doppler factor D (observed over
// emitted frequency): T′ = D·T, W′ = W·beam.WScale(D). D must be finite and
// > 0; otherwise both fields are NaN.
func (b Blackbody) Observed(D float64, beam Beaming) Blackbody {
	if !(D > 0) || math.IsInf(D, 1) {
		return Blackbody{T: math.NaN(), W: math.NaN()}
	}
	return Blackbody{T: D * b.T, W: b.W * beam.WScale(D)}
}

// Sample returns the table photometry per unit W at b.T (see Lookup).
func (b Blackbody) Sample() Sample { return Lookup(math.Log(b.T)) }

// XYZ returns the CIE 1931 tristimulus values as illuminance in lux:
// Y = Km ∫ F_λ ȳ dλ, and X, Z likewise with x̄, z̄.
func (b Blackbody) XYZ() (X, Y, Z float64) {
	s := Lookup(math.Log(b.T))
	Y = math.Exp(math.Log(b.W) + s.LnY)
	if Y == 0 || s.Y == 0 {
		return 0, Y, 0
	}
	k := Y / s.Y
	return k * s.X, Y, k * (1 - s.X - s.Y)
}

// VFlux returns the V-band flux: the photon-weighted mean of F_λ over the
// Bessell V passband S, ∫F_λ S λ dλ / ∫S λ dλ, in W m⁻² nm⁻¹.
func (b Blackbody) VFlux() float64 {
	return math.Exp(math.Log(b.W) + Lookup(math.Log(b.T)).LnV)
}

// Vmag returns the V magnitude −2.5 log₁₀(VFlux/V0FluxLambda).
func (b Blackbody) Vmag() float64 {
	lnF := math.Log(b.W) + Lookup(math.Log(b.T)).LnV
	return -2.5 / math.Ln10 * (lnF - math.Log(V0FluxLambda))
}

// Bolometric returns the bolometric flux W σ T⁴, W m⁻² (π∫B_λ dλ = σT⁴).
func (b Blackbody) Bolometric() float64 {
	return b.W * SigmaSB * b.T * b.T * b.T * b.T
}

// Chromaticity returns the CIE 1931 (x, y) chromaticity of a Planckian
// radiator at T kelvin (from the table; any T ≥ 0, see Lookup).
func Chromaticity(T float64) (x, y float64) {
	s := Lookup(math.Log(T))
	return s.X, s.Y
}

// ChromaticityC2 returns the (x, y) chromaticity of a Planckian radiator at
// T kelvin computed by direct integration (no table) with the second
// radiation constant c2 in m K. Colorimetric standards fix c2 by
// convention: CIE 15:2004 defines illuminant A as a Planckian radiator at
// 2856 K with c2 = 1.4388 × 10⁻² m K (the 1968 temperature-scale value,
// close to but not equal to C2 = hc/k). T and c2 must be finite and > 0,
// otherwise the result is NaN.
func ChromaticityC2(T, c2 float64) (x, y float64) {
	if !(T > 0) || !(c2 > 0) || math.IsInf(T, 1) || math.IsInf(c2, 1) {
		return math.NaN(), math.NaN()
	}
	p := getPhot()
	ln, _ := direct(math.Log(T), c2, &p.lnConst)
	x, y, _, _ = chroma(ln, [4]float64{})
	return x, y
}
