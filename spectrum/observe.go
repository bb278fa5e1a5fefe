package spectrum

import "math"

// The per-star observed photometry: one definition, used by the renderer,
// the census, the stars table and the completeness bound.

// magToLn is 0.4·ln 10: a magnitude difference times this is a ln flux
// ratio; lnToMag is its inverse, 2.5/ln 10.
const (
	magToLn = 0.4 * math.Ln10
	lnToMag = 1 / magToLn
)

// lnV0Flux is ln V0FluxLambda, the V-band flux of a V = 0 star.
var lnV0Flux = math.Log(V0FluxLambda)

// LnWForV returns ln W, the dilution of a star of V magnitude vmag whose
// V-band flux per unit W is e^lnV (Sample.LnV at its temperature):
//
//	ln W = ln V0FluxLambda − 0.4·ln 10·vmag − lnV.
//
// FromV, ObserveBatch and the renderer's exposure scale all normalise with
// this expression.
func LnWForV(vmag, lnV float64) float64 {
	return lnV0Flux - magToLn*vmag - lnV
}

// ObservedBatch holds the outputs of ObserveBatch in struct-of-arrays
// form, one element per star. Every slice must be at least as long as the
// input magnitudes.
type ObservedBatch struct {
	// V is the observed V magnitude V′.
	V []float64
	// LnW is ln W′, the observed dilution: ln W + ln dilution + ln
	// Beaming.WScale(D).
	LnW []float64
	// LnT is ln T′ = ln T + ln D.
	LnT []float64
	// LnY, LnV, X and Y are Lookup(LnT)'s fields: the illuminance and V
	// flux per unit W at T′ and the chromaticity (x, y). The observed
	// illuminance is E′ = exp(LnW + LnY) lux.
	LnY, LnV, X, Y []float64
}

// ObserveBatch computes the observed photometry of stars seen with Doppler
// factors D through a change of dilution (W(P)/W⊙ = (d⊙/r)² for an observer
// away from the Sun) under the beaming convention beam. For each
// k < len(vmag), with rest inputs
//
//	vmag[k]  the catalogue V (seen from the Sun, at rest),
//	lnT0[k]  ln T, the rest temperature in kelvin,
//	lnV0[k]  Lookup(lnT0[k]).LnV (the caller may keep it across frames),
//
// and per-observer inputs
//
//	lnD[k]   ln D,
//	lnDil[k] ln of the dilution factor (nil: all 1, an observer at the Sun),
//
// it sets, with ΔlnW = (beam.FluxExponent() − 4)·ln D + lnDil[k] (so
// W′/W = dilution·WScale(D)):
//
//	out.LnT[k] = lnT0[k] + lnD[k]
//	out.LnY, out.LnV, out.X, out.Y = Lookup(out.LnT[k])
//	out.V[k]   = vmag[k] − 2.5/ln 10 · (ΔlnW + out.LnV[k] − lnV0[k])
//	out.LnW[k] = LnWForV(vmag[k], lnV0[k]) + ΔlnW.
//
// V′ is thus V − 2.5 log₁₀ of the V-band flux ratio F′_V/F_V, with W fixed
// by the catalogue V through the same passband table, so at D = 1 with no
// dilution (ln D = 0, nil lnDil) V′ = V bit for bit. The logarithms are the
// caller's (a fast log that rounds within an ulp changes V′ by ~1e-16 mag);
// keeping them as inputs lets a renderer reuse ln D and ln T across stages.
//
// The input slices must be as long as vmag (lnDil may be nil), and every
// output slice at least as long. An invalid beam gives NaN for V and LnW.
// It allocates nothing; per star it costs one table look-up and a few
// additions (see BenchmarkObserveBatch).
func ObserveBatch[F float32 | float64](beam Beaming, vmag []F, lnT0, lnV0, lnD, lnDil []float64, out ObservedBatch) {
	n := len(vmag)
	lnT0, lnV0, lnD = lnT0[:n], lnV0[:n], lnD[:n]
	lnT := out.LnT[:n]
	for k, l := range lnT0 {
		lnT[k] = l + lnD[k]
	}
	LookupBatch(lnT, out.LnY, out.LnV, out.X, out.Y)
	beamExp := beamExponent(beam)
	lnV, vObs, lnW := out.LnV[:n], out.V[:n], out.LnW[:n]
	if lnDil != nil {
		lnDil = lnDil[:n]
	}
	for k, v32 := range vmag {
		v := float64(v32)
		dlnW := beamExp * lnD[k]
		if lnDil != nil {
			dlnW += lnDil[k]
		}
		vObs[k], lnW[k] = observed(v, lnV0[k], lnV[k], dlnW)
	}
}

// beamExponent returns FluxExponent − 4, the power of D in WScale(D)
// (−2, −1 or 0), or NaN for an unknown convention.
func beamExponent(beam Beaming) float64 {
	if e := beam.FluxExponent(); e != 0 {
		return float64(e - 4)
	}
	return math.NaN()
}

// observed returns V′ and ln W′ of a star of catalogue magnitude v, with
// V flux per unit W e^lnV0 at rest and e^lnV at T′, whose dilution changes
// by e^dlnW. ObserveBatch and Observe share it, so they agree to the bit.
func observed(v, lnV0, lnV, dlnW float64) (vObs, lnW float64) {
	return v - lnToMag*(dlnW+lnV-lnV0), LnWForV(v, lnV0) + dlnW
}

// Observed is the photometry of one star as seen by a moving observer (see
// Observe): its observed V′, dilution W′ and temperature T′ = D·T, and the
// table sample at T′ (Sample's X and Y are the chromaticity x, y).
type Observed struct {
	V   float64 // observed V magnitude V′
	LnW float64 // ln W′, the observed dilution
	LnT float64 // ln T′, T′ in kelvin
	Sample
}

// Illuminance returns the observed illuminance exp(LnW + LnY), lux.
func (o Observed) Illuminance() float64 { return math.Exp(o.LnW + o.LnY) }

// Blackbody returns the diluted blackbody seen: T′ = exp(LnT), W′ = exp(LnW).
func (o Observed) Blackbody() Blackbody {
	return Blackbody{T: math.Exp(o.LnT), W: math.Exp(o.LnW)}
}

// Observe returns the photometry of a star of catalogue magnitude vmag and
// rest temperature T (K) seen with Doppler factor D through a dilution
// factor dil (1 for an observer at the Sun, or for an infinitely far star)
// under beam. It is ObserveBatch on one star with math.Log's logarithms
// (nil lnDil when dil = 1), and gives the same bits as that call: V′ = vmag
// exactly when D = 1 and dil = 1. T, D and dil must be finite and > 0;
// otherwise the fields are NaN, ±Inf or meaningless, as the logarithms
// make them.
func Observe(vmag, T, D, dil float64, beam Beaming) Observed {
	lnT0, lnD := math.Log(T), math.Log(D)
	lnV0 := Lookup(lnT0).LnV
	o := Observed{LnT: lnT0 + lnD}
	o.Sample = Lookup(o.LnT)
	dlnW := beamExponent(beam) * lnD
	if dil != 1 {
		dlnW += math.Log(dil)
	}
	o.V, o.LnW = observed(vmag, lnV0, o.LnV, dlnW)
	return o
}
