package flight

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// State is the ship's kinematic state at one instant, in the catalogue frame.
//
// Tau is ship (proper) time and T catalogue time, both Julian years since the
// trajectory's origin. Pos is in parsecs on ICRS axes, Sun at the origin. Dir
// is the unit direction of the velocity; when the ship is at rest it is the
// direction the current leg thrusts or heads in (so "ahead" stays defined),
// and the zero vector only if no leg of the trajectory has any direction.
// Rapidity φ ≥ 0 is carried exactly; Beta = tanh φ, Gamma = cosh φ and
// GammaBeta = sinh φ are derived from it, so γ stays accurate up to 1e8 and
// beyond while Beta rounds to 1. Travelled is the path length covered since
// the start of the trajectory and Remaining the path length still to go to its
// end, both in parsecs.
type State struct {
	Tau, T    float64
	Pos       r3.Vec
	Dir       r3.Vec
	Rapidity  float64
	Beta      float64
	Gamma     float64
	GammaBeta float64
	Travelled float64
	Remaining float64
}

// OneMinusBeta returns 1 − β without cancellation: e^(−φ)/γ = 1/(γ²(1+β)).
func (s State) OneMinusBeta() float64 { return math.Exp(-s.Rapidity) / s.Gamma }

// DopplerAhead returns the Doppler factor straight ahead, γ(1+β) = e^φ.
func (s State) DopplerAhead() float64 { return math.Exp(s.Rapidity) }

// DopplerBehind returns the Doppler factor straight behind,
// γ(1−β) = 1/(γ(1+β)) = e^(−φ), computed without cancellation.
func (s State) DopplerBehind() float64 { return math.Exp(-s.Rapidity) }

// Doppler returns D = γ(1 + β cos θ) for the unit direction n toward a source
// at rest in the catalogue frame, cos θ = n·Dir. It is computed as
// e^(−φ) + γβ·|n + Dir|²/2, which has no cancellation for sources behind a
// fast ship. It is also the rate at which once-per-second signals from that
// source are received. A zero n is treated as straight behind.
func (s State) Doppler(n r3.Vec) float64 {
	if s.Rapidity == 0 {
		return 1
	}
	if r3.Norm2(n) == 0 {
		return s.DopplerBehind()
	}
	n = r3.Unit(n)
	onePlusCos := r3.Norm2(r3.Add(n, s.Dir)) / 2
	return math.Exp(-s.Rapidity) + s.GammaBeta*onePlusCos
}

// withRapidity fills Beta, Gamma, GammaBeta from φ ≥ 0.
func (s *State) withRapidity(phi float64) {
	s.Rapidity = phi
	s.Beta = math.Tanh(phi)
	s.Gamma = math.Cosh(phi)
	s.GammaBeta = math.Sinh(phi)
}

// RapidityFromBeta returns atanh β for 0 ≤ β < 1.
func RapidityFromBeta(beta float64) float64 { return math.Atanh(beta) }

// RapidityFromGamma returns acosh γ for γ ≥ 1, accurate near γ = 1.
func RapidityFromGamma(gamma float64) float64 { return acosh1p(gamma - 1) }

// acosh1p returns acosh(1 + x) for x ≥ 0 without losing precision at small x.
func acosh1p(x float64) float64 {
	if x > 1e8 {
		return math.Acosh(1 + x)
	}
	return math.Log1p(x + math.Sqrt(x*(x+2)))
}

// coshDiff returns cosh b − cosh a without cancellation.
func coshDiff(a, b float64) float64 {
	return 2 * math.Sinh((a+b)/2) * math.Sinh((b-a)/2)
}

// sinhDiff returns sinh b − sinh a without cancellation.
func sinhDiff(a, b float64) float64 {
	return 2 * math.Cosh((a+b)/2) * math.Sinh((b-a)/2)
}

// pathDiff returns F(b) − F(a) for F(φ) = sign(φ)(cosh φ − 1), the path
// length (in units of c²/a) covered while rapidity goes from a to b under a
// constant proper acceleration; it stays correct when the velocity reverses.
func pathDiff(a, b float64) float64 {
	if (a >= 0) == (b >= 0) {
		d := coshDiff(a, b)
		if a < 0 {
			d = -d
		}
		return d
	}
	h := func(x float64) float64 { s := math.Sinh(x / 2); return 2 * s * s }
	if a < 0 {
		return h(a) + h(b)
	}
	return -(h(a) + h(b))
}
