package flight

import (
	"crypto/sha256"
	"encoding/csv"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strconv"

	"gonum.org/v1/gonum/spatial/r3"
)

// FramePhase says which part of the video a frame belongs to.
type FramePhase int

const (
	// PhaseHoldStart frames show the start state.
	PhaseHoldStart FramePhase = iota
	// PhaseFlight frames step through the trajectory.
	PhaseFlight
	// PhaseHoldEnd frames show the end state.
	PhaseHoldEnd
)

// String returns "hold-start", "flight" or "hold-end".
func (f FramePhase) String() string {
	switch f {
	case PhaseHoldStart:
		return "hold-start"
	case PhaseFlight:
		return "flight"
	default:
		return "hold-end"
	}
}

// FrameState is everything a renderer needs to know about one frame.
type FrameState struct {
	Index   int
	Seconds float64 // video time of the frame, i/fps
	Phase   FramePhase
	State   State   // ship state (State.Tau, State.T: ship and catalogue time)
	Look    LookKey // the look key in effect (the last with At ≤ Seconds)
	LookDir r3.Vec  // interpolated unit viewing direction, ICRS axes
	Roll    float64 // interpolated roll, degrees
}

// Frames returns the number of frames of the video.
func (p *Plan) Frames() int { return p.nHold0 + p.nFly + p.nHold1 }

// FrameState returns the state of frame i (0-based). It depends only on the
// plan and i: flight frames are spaced evenly in ship or catalogue time
// (Show.Spacing), the first at the start and the last at the end of the
// trajectory; hold frames repeat the start or end state.
func (p *Plan) FrameState(i int) (FrameState, error) {
	if p.traj == nil {
		return FrameState{}, ErrUnbound
	}
	if i < 0 || i >= p.Frames() {
		return FrameState{}, fmt.Errorf("%w: frame %d of %d", ErrRange, i, p.Frames())
	}
	fs := FrameState{Index: i, Seconds: float64(i) / p.Show.FPS}
	tr := p.traj
	switch k := i - p.nHold0; {
	case k < 0:
		fs.Phase, fs.State = PhaseHoldStart, tr.Start()
	case k >= p.nFly:
		fs.Phase, fs.State = PhaseHoldEnd, tr.End()
	default:
		fs.Phase = PhaseFlight
		u := 0.0
		if p.nFly > 1 {
			u = float64(k) / float64(p.nFly-1)
		}
		s0, s1 := tr.Start(), tr.End()
		switch {
		case k == p.nFly-1 && p.nFly > 1:
			fs.State = s1
		case p.spacing == SpacingCatalogue:
			fs.State = tr.AtT(s0.T + u*(s1.T-s0.T))
		default:
			fs.State = tr.AtTau(s0.Tau + u*(s1.Tau-s0.Tau))
		}
	}
	fs.Look, fs.LookDir, fs.Roll = p.look(fs.Seconds, fs.State)
	return fs, nil
}

// look interpolates the look keys at video time s.
func (p *Plan) look(s float64, st State) (LookKey, r3.Vec, float64) {
	ks := p.looks
	j := 0
	for j+1 < len(ks) && ks[j+1].at <= s {
		j++
	}
	cur := ks[j]
	lk := LookKey{At: cur.at, Look: p.lookName(j), Roll: cur.roll}
	d0 := p.lookDir(cur, st)
	if j+1 == len(ks) || s <= cur.at {
		return lk, d0, cur.roll
	}
	nx := ks[j+1]
	w := (s - cur.at) / (nx.at - cur.at)
	return lk, slerp(d0, p.lookDir(nx, st), w), cur.roll + w*(nx.roll-cur.roll)
}

func (p *Plan) lookName(j int) string {
	if j < len(p.Camera.Look) {
		if v := p.Camera.Look[j].Look; v != "" {
			return v
		}
	}
	return "ahead"
}

// lookDir resolves a key's direction for the ship state st.
func (p *Plan) lookDir(k lookKey, st State) r3.Vec {
	ahead := st.Dir
	if r3.Norm(ahead) == 0 {
		ahead = r3.Vec{X: 1}
	}
	switch k.mode {
	case lookBehind:
		return r3.Scale(-1, ahead)
	case lookFixed:
		return k.dir
	case lookStar:
		if d := r3.Sub(k.dir, st.Pos); r3.Norm(d) > 0 {
			return r3.Unit(d)
		}
		return ahead
	default:
		return ahead
	}
}

// slerp interpolates unit vectors a → b along the great circle; for
// opposite vectors it turns about an axis perpendicular to a, chosen from
// the ICRS axes so the result is deterministic.
func slerp(a, b r3.Vec, w float64) r3.Vec {
	cos := math.Max(-1, math.Min(1, r3.Dot(a, b)))
	if cos > 1-1e-12 {
		return a
	}
	var perp r3.Vec
	if cos < -1+1e-12 {
		ax := r3.Vec{Z: 1}
		if math.Abs(a.Z) > 0.9 {
			ax = r3.Vec{X: 1}
		}
		perp = r3.Unit(r3.Cross(ax, a))
	} else {
		perp = r3.Unit(r3.Sub(b, r3.Scale(cos, a)))
	}
	th := w * math.Acos(cos)
	return r3.Add(r3.Scale(math.Cos(th), a), r3.Scale(math.Sin(th), perp))
}

// Hash returns the hex SHA-256 of a canonical encoding of the decoded plan
// (after defaults), so it does not change with key order, whitespace,
// comments or spelling out a default. It identifies the plan for caches and
// sidecar files; a new schema version may change it.
func (p *Plan) Hash() string {
	canon := struct {
		Schema    string
		Title     string
		Catalogue CatalogueSpec
		Start     StartSpec
		Legs      []LegEntry
		Show      ShowSpec
		Camera    CameraSpec
		Output    OutputSpec
		Overlays  OverlaySpec
	}{"skyframe-plan-1", p.Title, p.Catalogue, p.Start, p.Legs, p.Show, p.Camera, p.Output, p.Overlays}
	b, err := json.Marshal(canon)
	if err != nil {
		// Only finite numbers, strings, booleans and maps of strings reach
		// here; keep a deterministic answer anyway.
		b = []byte(fmt.Sprintf("%#v", canon))
	}
	h := sha256.Sum256(b)
	return hex.EncodeToString(h[:])
}

// DryRunColumns are the columns WriteDryRunCSV writes, in order.
var DryRunColumns = []string{"frame", "tau_yr", "t_yr", "beta", "gamma", "x_pc", "y_pc", "z_pc",
	"doppler_ahead", "doppler_behind", "rate_home", "rate_dest"}

// WriteDryRunCSV writes one CSV row per frame of frames (clipped to the
// plan): frame index, ship and catalogue time (yr), β, γ, position (pc),
// Doppler factors straight ahead, γ(1+β) = e^φ, and straight behind,
// γ(1−β) = e^(−φ), and the received rates of once-per-second signals from
// home (the trajectory's start point) and from the destination (its end
// point), which are the Doppler factors toward each. At the point itself
// the direction is taken as behind (home) or ahead (destination).
func WriteDryRunCSV(w io.Writer, p *Plan, frames Range) error {
	if p.traj == nil {
		return ErrUnbound
	}
	cw := csv.NewWriter(w)
	if err := cw.Write(DryRunColumns); err != nil {
		return fmt.Errorf("flight: dry run: %w", err)
	}
	home, dest := p.traj.Home(), p.traj.Destination()
	lo, hi := frames.Clip(p.Frames())
	f := func(v float64) string { return strconv.FormatFloat(v, 'g', 12, 64) }
	row := make([]string, len(DryRunColumns))
	for i := lo; i < hi; i++ {
		fs, err := p.FrameState(i)
		if err != nil {
			return err
		}
		s := fs.State
		toHome, toDest := r3.Sub(home, s.Pos), r3.Sub(dest, s.Pos)
		rateHome := s.DopplerBehind()
		if r3.Norm(toHome) > 0 {
			rateHome = s.Doppler(toHome)
		}
		rateDest := s.DopplerAhead()
		if r3.Norm(toDest) > 0 {
			rateDest = s.Doppler(toDest)
		}
		row = append(row[:0], strconv.Itoa(i), f(s.Tau), f(s.T), f(s.Beta), f(s.Gamma),
			f(s.Pos.X), f(s.Pos.Y), f(s.Pos.Z), f(s.DopplerAhead()), f(s.DopplerBehind()), f(rateHome), f(rateDest))
		if err := cw.Write(row); err != nil {
			return fmt.Errorf("flight: dry run: %w", err)
		}
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return fmt.Errorf("flight: dry run: %w", err)
	}
	return nil
}
