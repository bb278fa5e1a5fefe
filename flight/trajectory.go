package flight

import (
	"fmt"
	"sort"
	"strings"

	"gonum.org/v1/gonum/spatial/r3"
)

// Trajectory is a chain of legs, each starting exactly where the previous
// one ended in position, velocity, ship time and catalogue time. States
// before the start or after the end are clamped to the start or end state.
type Trajectory struct {
	legs []*leg
	segs []*segment // all segments in order, for lookups
	home r3.Vec     // start position
}

// LegError is an error in one leg of a trajectory, numbered from 1.
type LegError struct {
	Leg int
	Err error
}

// Error formats the problem as "flight: leg N: message".
func (e *LegError) Error() string {
	return fmt.Sprintf("flight: leg %d: %s", e.Leg, strings.TrimPrefix(e.Err.Error(), "flight: "))
}

// Unwrap returns the leg's error (ErrAccel, ErrDisconnected, ...).
func (e *LegError) Unwrap() error { return e.Err }

// NewTrajectory places specs one after another from start (see RestAt,
// MovingAt). resolve looks up star destinations; it may be nil when no leg
// names a star. The error names the first bad leg (numbered from 1).
func NewTrajectory(start State, specs []LegSpec, resolve Resolver) (*Trajectory, error) {
	if len(specs) == 0 {
		return nil, ErrNoLegs
	}
	if err := checkStart(start); err != nil {
		return nil, err
	}
	start.Travelled = 0
	tr := &Trajectory{home: start.Pos}
	cur := start
	for i, sp := range specs {
		if sp == nil {
			return nil, &LegError{Leg: i + 1, Err: fmt.Errorf("%w: nil leg", ErrDuration)}
		}
		lg, err := sp.Build(cur, resolve)
		if err != nil {
			return nil, &LegError{Leg: i + 1, Err: err}
		}
		l, ok := lg.(*leg)
		if !ok {
			return nil, &LegError{Leg: i + 1, Err: fmt.Errorf("flight: unsupported leg type %T", lg)}
		}
		tr.legs = append(tr.legs, l)
		cur = l.End()
	}
	// Path still to go after each segment, over the whole trajectory.
	var after float64
	for i := len(tr.legs) - 1; i >= 0; i-- {
		l := tr.legs[i]
		for j := len(l.segs) - 1; j >= 0; j-- {
			l.segs[j].after = after
			after += l.segs[j].length
		}
	}
	for _, l := range tr.legs {
		for j := range l.segs {
			tr.segs = append(tr.segs, &l.segs[j])
		}
	}
	tr.fillAxes()
	return tr, nil
}

// fillAxes gives segments at rest without a heading the heading of the
// nearest segment that has one, so that "ahead" is defined everywhere.
func (tr *Trajectory) fillAxes() {
	var last r3.Vec
	for _, sg := range tr.segs {
		if r3.Norm(sg.axis) == 0 {
			sg.axis = last
		} else {
			last = sg.axis
		}
	}
	last = r3.Vec{}
	for i := len(tr.segs) - 1; i >= 0; i-- {
		sg := tr.segs[i]
		if r3.Norm(sg.axis) == 0 {
			sg.axis = last
		} else {
			last = sg.axis
		}
	}
}

// Legs returns the placed legs in order.
func (tr *Trajectory) Legs() []Leg {
	out := make([]Leg, len(tr.legs))
	for i, l := range tr.legs {
		out[i] = l
	}
	return out
}

// Start returns the state at the start of the first leg.
func (tr *Trajectory) Start() State { return tr.segs[0].at(0) }

// End returns the state at the end of the last leg.
func (tr *Trajectory) End() State {
	sg := tr.segs[len(tr.segs)-1]
	return sg.at(sg.dtau)
}

// Home returns the start position (pc).
func (tr *Trajectory) Home() r3.Vec { return tr.home }

// Destination returns the end position (pc); for a final voyage that stops
// short of its destination (a stand-off), the destination itself.
func (tr *Trajectory) Destination() r3.Vec {
	if t := tr.legs[len(tr.legs)-1].target; t != nil {
		return *t
	}
	return tr.segs[len(tr.segs)-1].pos1
}

// Length returns the total path length in parsecs.
func (tr *Trajectory) Length() float64 { return tr.segs[0].s0 + tr.segs[0].length + tr.segs[0].after }

// AtTau returns the state at ship time tau (years), clamped to the
// trajectory.
func (tr *Trajectory) AtTau(tau float64) State {
	i := sort.Search(len(tr.segs), func(i int) bool { return tr.segs[i].tau0+tr.segs[i].dtau >= tau })
	if i == len(tr.segs) {
		return tr.End()
	}
	sg := tr.segs[i]
	return sg.at(tau - sg.tau0)
}

// AtT returns the state at catalogue time t (years), clamped to the
// trajectory. The inversion t → τ is closed-form within each segment.
func (tr *Trajectory) AtT(t float64) State {
	i := sort.Search(len(tr.segs), func(i int) bool { return tr.segs[i].t0+tr.segs[i].dt >= t })
	if i == len(tr.segs) {
		return tr.End()
	}
	sg := tr.segs[i]
	return sg.atT(t - sg.t0)
}
