package flight

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// segment is one piece of rectilinear motion in closed form: constant
// velocity (rate == 0) or constant proper acceleration along axis. The signed
// rapidity along axis is φ(τ) = phi0 + rate·τ, τ local ship time in years.
//
//	t(τ) = (sinh φ − sinh φ0)/rate          (cosh φ0 · τ when rate = 0)
//	x(τ) = c (cosh φ − cosh φ0)/rate · axis (c sinh φ0 · τ when rate = 0)
type segment struct {
	tau0, t0 float64 // absolute start times, yr
	pos0     r3.Vec  // start position, pc
	axis     r3.Vec  // unit axis of motion and thrust
	phi0     float64 // signed rapidity along axis at the start
	rate     float64 // dφ/dτ in 1/yr (a/c, signed); 0 for constant velocity
	dtau, dt float64 // durations, yr
	s0       float64 // path length travelled before the segment, pc
	length   float64 // path length of the segment, pc
	after    float64 // path length of the trajectory after the segment, pc
	phi1     float64 // signed rapidity at the end (exact where it matters: 0 on arrival)
	pos1     r3.Vec  // position at the end (exactly the destination on arrival)
}

// newSegment builds a segment lasting dtau years of ship time.
func newSegment(tau0, t0 float64, pos0, axis r3.Vec, phi0, rate, dtau, s0 float64) segment {
	sg := segment{tau0: tau0, t0: t0, pos0: pos0, axis: axis, phi0: phi0, rate: rate, dtau: dtau, s0: s0}
	sg.dt = sg.localT(dtau)
	sg.length = sg.localPath(dtau)
	sg.phi1 = sg.phi(dtau)
	sg.pos1 = r3.Add(pos0, r3.Scale(sg.localX(dtau), axis))
	return sg
}

func (sg *segment) phi(tau float64) float64 { return sg.phi0 + sg.rate*tau }

// localT is catalogue time elapsed after local ship time tau.
func (sg *segment) localT(tau float64) float64 {
	if sg.rate == 0 {
		return math.Cosh(sg.phi0) * tau
	}
	return sinhDiff(sg.phi0, sg.phi(tau)) / sg.rate
}

// localX is the signed displacement along axis after local ship time tau, pc.
func (sg *segment) localX(tau float64) float64 {
	if sg.rate == 0 {
		return CPcPerYr * math.Sinh(sg.phi0) * tau
	}
	return CPcPerYr * coshDiff(sg.phi0, sg.phi(tau)) / sg.rate
}

// localPath is the path length covered after local ship time tau, pc.
func (sg *segment) localPath(tau float64) float64 {
	if sg.rate == 0 {
		return math.Abs(sg.localX(tau))
	}
	return CPcPerYr * pathDiff(sg.phi0, sg.phi(tau)) / sg.rate
}

// localTau inverts localT: the local ship time at which catalogue time dt has
// elapsed, in closed form (asinh for accelerated segments).
func (sg *segment) localTau(dt float64) float64 {
	if sg.rate == 0 {
		return dt / math.Cosh(sg.phi0)
	}
	phi := math.Asinh(math.Sinh(sg.phi0) + sg.rate*dt)
	return (phi - sg.phi0) / sg.rate
}

// at returns the state at local ship time tau, clamped into [0, dtau].
func (sg *segment) at(tau float64) State {
	if tau <= 0 {
		tau = 0
	}
	if tau >= sg.dtau {
		tau = sg.dtau
	}
	phi := sg.phi(tau)
	var s State
	s.Tau = sg.tau0 + tau
	s.T = sg.t0 + sg.localT(tau)
	s.Pos = r3.Add(sg.pos0, r3.Scale(sg.localX(tau), sg.axis))
	if tau == sg.dtau {
		phi, s.Pos = sg.phi1, sg.pos1
	}
	s.Dir = sg.axis
	if phi < 0 {
		s.Dir = r3.Scale(-1, sg.axis)
	}
	s.withRapidity(math.Abs(phi))
	path := sg.localPath(tau)
	s.Travelled = sg.s0 + path
	// Remaining within the segment from the closed form, not by subtracting
	// from a large total, so it goes to zero cleanly at arrival.
	var rest float64
	if sg.rate == 0 {
		rest = CPcPerYr * math.Sinh(math.Abs(sg.phi0)) * (sg.dtau - tau)
	} else {
		rest = CPcPerYr * pathDiff(phi, sg.phi1) / sg.rate
	}
	s.Remaining = rest + sg.after
	return s
}

// atT returns the state at local catalogue time dt, clamped into the segment.
func (sg *segment) atT(dt float64) State {
	if dt >= sg.dt {
		return sg.at(sg.dtau)
	}
	if dt <= 0 {
		return sg.at(0)
	}
	return sg.at(math.Min(sg.localTau(dt), sg.dtau))
}
