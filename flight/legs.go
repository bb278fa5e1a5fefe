package flight

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// Errors returned when legs or trajectories are invalid. They are wrapped
// with the leg number and the offending value.
var (
	ErrDisconnected       = errors.New("flight: leg does not start where the previous one ended")
	ErrAccel              = errors.New("flight: acceleration must be positive")
	ErrUnknownDestination = errors.New("flight: unknown destination")
	ErrSpeedCap           = errors.New("flight: bad speed cap")
	ErrNotFinite          = errors.New("flight: value is NaN or infinite")
	ErrDuration           = errors.New("flight: bad duration")
	ErrDirection          = errors.New("flight: bad direction")
	ErrNotCollinear       = errors.New("flight: velocity not along the leg's axis")
	ErrCannotStop         = errors.New("flight: too fast to stop at the destination")
	ErrStandOff           = errors.New("flight: bad stand-off")
	ErrTooFast            = errors.New("flight: rapidity beyond the supported range")
	ErrNoLegs             = errors.New("flight: trajectory has no legs")
	ErrBadStart           = errors.New("flight: bad start state")
)

// Resolver maps a destination (a star identifier or name) to its position in
// parsecs on ICRS axes, Sun at the origin. ok is false for unknown names.
type Resolver func(name string) (pos r3.Vec, ok bool)

// LegKind names the kind of a leg.
type LegKind int

const (
	// LegCruise is motion at constant velocity (inertial coasting).
	LegCruise LegKind = iota
	// LegBoost is constant proper acceleration in a fixed direction.
	LegBoost
	// LegVoyage accelerates toward a destination, optionally coasts at a
	// speed cap, and decelerates to rest there.
	LegVoyage
)

var legKindNames = [...]string{"cruise", "boost", "voyage"}

// String returns the plan-file name of the kind.
func (k LegKind) String() string {
	if k >= 0 && int(k) < len(legKindNames) {
		return legKindNames[k]
	}
	return fmt.Sprintf("LegKind(%d)", int(k))
}

// ParseLegKind parses "cruise", "boost" or "voyage".
func ParseLegKind(s string) (LegKind, error) {
	for i, n := range legKindNames {
		if s == n {
			return LegKind(i), nil
		}
	}
	return 0, fmt.Errorf("flight: unknown leg kind %q (want cruise, boost or voyage)", s)
}

// Leg is one placed leg of a trajectory, with closed-form states at any
// instant. Times are absolute (years since the trajectory's origin) and are
// clamped into the leg.
type Leg interface {
	Kind() LegKind
	Start() State
	End() State
	AtTau(tau float64) State
	AtT(t float64) State
}

// LegSpec describes a leg before it is placed: Build places it so that it
// starts exactly at start (position, velocity, τ, t).
type LegSpec interface {
	Build(start State, resolve Resolver) (Leg, error)
}

// RestAt returns a start state at rest at pos (pc) at τ = t = 0.
func RestAt(pos r3.Vec) State {
	s := State{Pos: pos}
	s.withRapidity(0)
	return s
}

// MovingAt returns a start state at pos (pc) moving along dir at speed
// beta (0 ≤ β < 1) at τ = t = 0.
func MovingAt(pos, dir r3.Vec, beta float64) (State, error) {
	if !(beta >= 0 && beta < 1) {
		return State{}, fmt.Errorf("%w: speed β = %v (want 0 ≤ β < 1)", ErrBadStart, beta)
	}
	return MovingRapidity(pos, dir, RapidityFromBeta(beta))
}

// MovingRapidity is MovingAt with the speed given as rapidity φ ≥ 0, for
// speeds where β rounds to 1.
func MovingRapidity(pos, dir r3.Vec, phi float64) (State, error) {
	if !finiteVec(pos) || !finiteVec(dir) || !isFinite(phi) {
		return State{}, fmt.Errorf("%w: start %v %v φ=%v", ErrNotFinite, pos, dir, phi)
	}
	if phi < 0 || phi > maxRapidity {
		return State{}, fmt.Errorf("%w: rapidity %v (want 0..%v)", ErrBadStart, phi, maxRapidity)
	}
	s := State{Pos: pos}
	if r3.Norm(dir) > 0 {
		s.Dir = r3.Unit(dir)
	} else if phi > 0 {
		return State{}, fmt.Errorf("%w: moving start needs a direction", ErrBadStart)
	}
	s.withRapidity(phi)
	return s, nil
}

func isFinite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

func finiteVec(v r3.Vec) bool { return isFinite(v.X) && isFinite(v.Y) && isFinite(v.Z) }

// checkFrom verifies an explicit start position against the actual start.
func checkFrom(from *r3.Vec, start State) error {
	if from == nil {
		return nil
	}
	if !finiteVec(*from) {
		return fmt.Errorf("%w: start position %v", ErrNotFinite, *from)
	}
	tol := 1e-9 * math.Max(1, r3.Norm(start.Pos))
	if d := r3.Norm(r3.Sub(*from, start.Pos)); d > tol {
		return fmt.Errorf("%w: given start %v pc, previous leg ends at %v pc (%.3g pc apart)",
			ErrDisconnected, *from, start.Pos, d)
	}
	return nil
}

// signedRapidity returns the start rapidity signed along axis u, or an error
// when the ship moves across u.
func signedRapidity(start State, u r3.Vec) (float64, error) {
	if start.Rapidity == 0 {
		return 0, nil
	}
	cos := r3.Dot(start.Dir, u)
	if r3.Norm(r3.Cross(start.Dir, u)) > 1e-9 {
		return 0, fmt.Errorf("%w: velocity direction %v, axis %v", ErrNotCollinear, start.Dir, u)
	}
	if cos < 0 {
		return -start.Rapidity, nil
	}
	return start.Rapidity, nil
}

func checkStart(start State) error {
	if !finiteVec(start.Pos) || !finiteVec(start.Dir) || !isFinite(start.Rapidity) ||
		!isFinite(start.Tau) || !isFinite(start.T) || !isFinite(start.Travelled) {
		return fmt.Errorf("%w: start state %+v", ErrNotFinite, start)
	}
	if start.Rapidity < 0 || start.Rapidity > maxRapidity {
		return fmt.Errorf("%w: rapidity %v", ErrBadStart, start.Rapidity)
	}
	if start.Rapidity > 0 && math.Abs(r3.Norm(start.Dir)-1) > 1e-9 {
		return fmt.Errorf("%w: direction %v is not a unit vector", ErrBadStart, start.Dir)
	}
	return nil
}

// leg is the concrete Leg: up to three closed-form segments.
type leg struct {
	kind LegKind
	segs []segment
	// target is a voyage's destination (a star's position), which a
	// stand-off keeps the leg's end short of; nil for other legs.
	target *r3.Vec
}

func (l *leg) Kind() LegKind { return l.kind }
func (l *leg) Start() State  { return l.segs[0].at(0) }
func (l *leg) End() State {
	last := &l.segs[len(l.segs)-1]
	return last.at(last.dtau)
}

// AtTau returns the state at absolute ship time tau, clamped into the leg.
func (l *leg) AtTau(tau float64) State {
	for i := range l.segs {
		sg := &l.segs[i]
		if tau <= sg.tau0+sg.dtau || i == len(l.segs)-1 {
			return sg.at(tau - sg.tau0)
		}
	}
	return l.End()
}

// AtT returns the state at absolute catalogue time t, clamped into the leg.
func (l *leg) AtT(t float64) State {
	for i := range l.segs {
		sg := &l.segs[i]
		if t <= sg.t0+sg.dt || i == len(l.segs)-1 {
			return sg.atT(t - sg.t0)
		}
	}
	return l.End()
}

// appendSeg appends a segment continuing from the end of the last one (or
// from start), skipping zero-length pieces unless it would leave none.
func (l *leg) appendSeg(start State, axis r3.Vec, phi0, rate, dtau float64) {
	tau0, t0, pos0, s0 := start.Tau, start.T, start.Pos, start.Travelled
	if n := len(l.segs); n > 0 {
		p := &l.segs[n-1]
		tau0, t0, pos0, s0 = p.tau0+p.dtau, p.t0+p.dt, p.pos1, p.s0+p.length
	}
	if dtau <= 0 {
		return
	}
	l.segs = append(l.segs, newSegment(tau0, t0, pos0, axis, phi0, rate, dtau, s0))
}

// finish sets the within-leg path remaining after each segment and makes
// sure there is at least one segment.
func (l *leg) finish(start State, axis r3.Vec, phi float64) {
	if len(l.segs) == 0 {
		l.segs = append(l.segs, newSegment(start.Tau, start.T, start.Pos, axis, phi, 0, 0, start.Travelled))
	}
	var after float64
	for i := len(l.segs) - 1; i >= 0; i-- {
		l.segs[i].after = after
		after += l.segs[i].length
	}
}

// CruiseSpec is a leg at constant velocity: the velocity the previous leg
// ended with (or the trajectory's start velocity). Exactly one of ShipYears,
// CatalogueYears or Distance (pc, needs a moving ship) must be positive.
// Beta, Dir and From, when set, are checks: a mismatch with the actual start
// is ErrDisconnected. Dir also gives the heading ("ahead") of a ship at rest.
type CruiseSpec struct {
	ShipYears      float64
	CatalogueYears float64
	Distance       float64
	Beta           *float64
	Dir            r3.Vec
	From           *r3.Vec
}

// Build places the cruise at start.
func (c CruiseSpec) Build(start State, _ Resolver) (Leg, error) {
	if err := checkStart(start); err != nil {
		return nil, err
	}
	if !isFinite(c.ShipYears) || !isFinite(c.CatalogueYears) || !isFinite(c.Distance) || !finiteVec(c.Dir) {
		return nil, fmt.Errorf("%w: cruise %+v", ErrNotFinite, c)
	}
	if err := checkFrom(c.From, start); err != nil {
		return nil, err
	}
	if c.Beta != nil {
		b := *c.Beta
		if !isFinite(b) {
			return nil, fmt.Errorf("%w: cruise speed %v", ErrNotFinite, b)
		}
		if math.Abs(b-start.Beta) > 1e-9 {
			return nil, fmt.Errorf("%w: cruise speed β = %v, previous leg ends at β = %v", ErrDisconnected, b, start.Beta)
		}
	}
	axis := start.Dir
	if r3.Norm(c.Dir) > 0 {
		d := r3.Unit(c.Dir)
		if start.Rapidity > 0 && r3.Dot(d, start.Dir) < 1-1e-9 {
			return nil, fmt.Errorf("%w: cruise direction %v, velocity direction %v", ErrDisconnected, d, start.Dir)
		}
		if start.Rapidity == 0 {
			axis = d
		}
	}
	n := 0
	for _, v := range []float64{c.ShipYears, c.CatalogueYears, c.Distance} {
		if v < 0 {
			return nil, fmt.Errorf("%w: cruise duration or distance %v < 0", ErrDuration, v)
		}
		if v > 0 {
			n++
		}
	}
	if n != 1 {
		return nil, fmt.Errorf("%w: a cruise needs exactly one of ship years, catalogue years or distance", ErrDuration)
	}
	dtau := c.ShipYears
	switch {
	case c.CatalogueYears > 0:
		dtau = c.CatalogueYears / start.Gamma
	case c.Distance > 0:
		if start.Rapidity == 0 {
			return nil, fmt.Errorf("%w: cruise by distance %v pc while at rest", ErrDuration, c.Distance)
		}
		dtau = c.Distance / (CPcPerYr * start.GammaBeta)
	}
	l := &leg{kind: LegCruise}
	l.appendSeg(start, axis, start.Rapidity, 0, dtau)
	l.finish(start, axis, start.Rapidity)
	return l, nil
}

// BoostSpec is a leg of constant proper acceleration Accel (m/s², > 0)
// along the fixed direction Dir (zero: along the current velocity). The
// ship's velocity at the start must lie along ±Dir. Exactly one of ShipYears
// or CatalogueYears must be positive. From, when set, checks the start.
type BoostSpec struct {
	Accel          float64
	Dir            r3.Vec
	ShipYears      float64
	CatalogueYears float64
	From           *r3.Vec
}

// Build places the boost at start.
func (b BoostSpec) Build(start State, _ Resolver) (Leg, error) {
	if err := checkStart(start); err != nil {
		return nil, err
	}
	if !isFinite(b.Accel) || !isFinite(b.ShipYears) || !isFinite(b.CatalogueYears) || !finiteVec(b.Dir) {
		return nil, fmt.Errorf("%w: boost %+v", ErrNotFinite, b)
	}
	if b.Accel <= 0 {
		return nil, fmt.Errorf("%w: boost acceleration %v m/s²", ErrAccel, b.Accel)
	}
	if err := checkFrom(b.From, start); err != nil {
		return nil, err
	}
	axis := start.Dir
	if r3.Norm(b.Dir) > 0 {
		axis = r3.Unit(b.Dir)
	} else if start.Rapidity == 0 || r3.Norm(axis) == 0 {
		return nil, fmt.Errorf("%w: a boost from rest needs a direction", ErrDirection)
	}
	phi0, err := signedRapidity(start, axis)
	if err != nil {
		return nil, err
	}
	if b.ShipYears < 0 || b.CatalogueYears < 0 || (b.ShipYears > 0) == (b.CatalogueYears > 0) {
		return nil, fmt.Errorf("%w: a boost needs exactly one positive duration (ship %v yr, catalogue %v yr)",
			ErrDuration, b.ShipYears, b.CatalogueYears)
	}
	rate := rapidityRate(b.Accel)
	dtau := b.ShipYears
	if b.CatalogueYears > 0 {
		tmp := segment{phi0: phi0, rate: rate}
		dtau = tmp.localTau(b.CatalogueYears)
	}
	if end := phi0 + rate*dtau; math.Abs(end) > maxRapidity || !isFinite(end) {
		return nil, fmt.Errorf("%w: boost reaches rapidity %.4g (limit %v)", ErrTooFast, end, float64(maxRapidity))
	}
	l := &leg{kind: LegBoost}
	l.appendSeg(start, axis, phi0, rate, dtau)
	l.finish(start, axis, phi0)
	return l, nil
}

// VoyageSpec accelerates at Accel (m/s², > 0) toward a destination, coasts
// at the speed cap if one is set and reached, and decelerates at the same
// rate to arrive at rest. The destination is To (pc) or, when To is nil,
// Star resolved through the Resolver. BetaCap (0 < β < 1) or GammaCap
// (γ > 1) set the speed cap; zero means none. The ship's velocity at the
// start must lie along the line to the destination. From checks the start.
type VoyageSpec struct {
	Accel float64
	To    *r3.Vec
	Star  string
	// StandOff is how far short of the destination the voyage stops, pc:
	// 0 arrives at it. Negative means the star's default, to be filled in
	// by Plan.Bind (Plan.StandOff); Build refuses it.
	StandOff float64
	BetaCap  float64
	GammaCap float64
	From     *r3.Vec
}

// Build places the voyage at start.
func (v VoyageSpec) Build(start State, resolve Resolver) (Leg, error) {
	if err := checkStart(start); err != nil {
		return nil, err
	}
	if !isFinite(v.Accel) || !isFinite(v.BetaCap) || !isFinite(v.GammaCap) {
		return nil, fmt.Errorf("%w: voyage accel %v, caps β %v γ %v", ErrNotFinite, v.Accel, v.BetaCap, v.GammaCap)
	}
	if v.Accel <= 0 {
		return nil, fmt.Errorf("%w: voyage acceleration %v m/s²", ErrAccel, v.Accel)
	}
	if err := checkFrom(v.From, start); err != nil {
		return nil, err
	}
	var dest r3.Vec
	switch {
	case v.To != nil:
		dest = *v.To
		if !finiteVec(dest) {
			return nil, fmt.Errorf("%w: destination %v", ErrNotFinite, dest)
		}
	case v.Star != "" && resolve != nil:
		p, ok := resolve(v.Star)
		if !ok {
			return nil, fmt.Errorf("%w: star %q", ErrUnknownDestination, v.Star)
		}
		if !finiteVec(p) {
			return nil, fmt.Errorf("%w: star %q has no usable distance (position %v)", ErrUnknownDestination, v.Star, p)
		}
		dest = p
	case v.Star != "":
		return nil, fmt.Errorf("%w: star %q (no catalogue to look it up in)", ErrUnknownDestination, v.Star)
	default:
		return nil, fmt.Errorf("%w: voyage has no destination", ErrUnknownDestination)
	}
	capPhi := math.Inf(1)
	switch {
	case v.BetaCap != 0 && v.GammaCap != 0:
		return nil, fmt.Errorf("%w: give a β cap or a γ cap, not both", ErrSpeedCap)
	case v.BetaCap != 0:
		if !(v.BetaCap > 0 && v.BetaCap < 1) {
			return nil, fmt.Errorf("%w: β cap %v (want 0 < β < 1)", ErrSpeedCap, v.BetaCap)
		}
		capPhi = RapidityFromBeta(v.BetaCap)
	case v.GammaCap != 0:
		if !(v.GammaCap > 1) {
			return nil, fmt.Errorf("%w: γ cap %v (want γ > 1)", ErrSpeedCap, v.GammaCap)
		}
		capPhi = RapidityFromGamma(v.GammaCap)
	}
	delta := r3.Sub(dest, start.Pos)
	d := r3.Norm(delta)
	if d == 0 {
		return nil, fmt.Errorf("%w: destination %v is the start point", ErrUnknownDestination, dest)
	}
	u := r3.Scale(1/d, delta)
	target := dest
	switch so := v.StandOff; {
	case !isFinite(so) || so < 0:
		return nil, fmt.Errorf("%w: %v pc (want a finite distance ≥ 0)", ErrStandOff, so)
	case so >= d:
		return nil, fmt.Errorf("%w: %.4g pc is not short of the destination, %.4g pc away", ErrStandOff, so, d)
	case so > 0:
		// Stop short along the line of flight: the leg ends at the
		// stand-off point, the target stays the destination.
		d -= so
		dest = r3.Add(start.Pos, r3.Scale(d, u))
	}
	phiS, err := signedRapidity(start, u)
	if err != nil {
		return nil, err
	}
	rate := rapidityRate(v.Accel)
	k := d * rate / CPcPerYr // a d / c²
	hs := math.Sinh(phiS / 2)
	stop := 2 * hs * hs // cosh φs − 1: stopping distance in units of c²/a
	if phiS > 0 && stop > k*(1+1e-12) {
		return nil, fmt.Errorf("%w: stopping from β = %v at %v m/s² needs %.4g pc, destination is %.4g pc away",
			ErrCannotStop, start.Beta, v.Accel, stop*CPcPerYr/rate, d)
	}
	phiM := acosh1p(math.Max(0, (k+stop)/2))
	if phiS > capPhi && phiM > capPhi {
		return nil, fmt.Errorf("%w: already faster (β = %v) than the cap", ErrSpeedCap, start.Beta)
	}
	if phiM > maxRapidity {
		return nil, fmt.Errorf("%w: voyage would reach rapidity %.4g (limit %v); set a speed cap", ErrTooFast, phiM, float64(maxRapidity))
	}
	l := &leg{kind: LegVoyage}
	if phiM <= capPhi {
		l.appendSeg(start, u, phiS, rate, (phiM-phiS)/rate)
		l.appendSeg(start, u, phiM, -rate, phiM/rate)
	} else {
		x1 := coshDiff(phiS, capPhi)
		hc := math.Sinh(capPhi / 2)
		x3 := 2 * hc * hc
		coast := (k - x1 - x3) * CPcPerYr / rate // pc
		l.appendSeg(start, u, phiS, rate, (capPhi-phiS)/rate)
		if coast > 0 {
			l.appendSeg(start, u, capPhi, 0, coast/(CPcPerYr*math.Sinh(capPhi)))
		}
		l.appendSeg(start, u, capPhi, -rate, capPhi/rate)
	}
	// Arrive exactly: rest at the destination.
	last := &l.segs[len(l.segs)-1]
	last.phi1 = 0
	last.pos1 = dest
	l.finish(start, u, phiS)
	l.target = &target
	return l, nil
}

// TurnoverTimes returns the ship and catalogue time (years) to cover
// distance pc from rest to rest at constant proper acceleration accel
// (m/s²), turning over at the midpoint:
// τ = (2c/a) acosh(1 + a d/(2c²)), t = (2c/a) sinh(acosh(1 + a d/(2c²))).
func TurnoverTimes(accel, distance float64) (tau, t float64, err error) {
	if !isFinite(accel) || !isFinite(distance) {
		return 0, 0, fmt.Errorf("%w: accel %v, distance %v", ErrNotFinite, accel, distance)
	}
	if accel <= 0 {
		return 0, 0, fmt.Errorf("%w: %v m/s²", ErrAccel, accel)
	}
	if distance < 0 {
		return 0, 0, fmt.Errorf("%w: distance %v pc", ErrDuration, distance)
	}
	rate := rapidityRate(accel)
	phi := acosh1p(distance * rate / CPcPerYr / 2)
	return 2 * phi / rate, 2 * math.Sinh(phi) / rate, nil
}
