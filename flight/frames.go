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

	"github.com/skyframe/skyframe/frameopt"
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
	LookDir r3.Vec  // interpolated unit viewing direction, apparent (ship frame, ICRS axes)
	Roll    float64 // interpolated roll, degrees (as keyed; the orientation carries it)
	// Camera is the interpolated camera: orientation (ship frame), field
	// of view, tilt and exposure.
	Camera Camera
}

// Frames returns the number of frames of the video.
func (p *Plan) Frames() int { return p.nHold0 + p.nFly + p.nHold1 }

// FrameState returns the state of frame i (0-based). It depends only on the
// plan and i: flight frames are spaced evenly in ship or catalogue time
// (Show.Spacing), the first at the start and the last at the end of the
// trajectory; hold frames repeat the start or end state.
func (p *Plan) FrameState(i int) (FrameState, error) {
	return p.FrameStateAt(i, 0)
}

// FrameStateAt is the state at dt frame intervals from frame i (|dt| ≤ ½:
// within the frame's exposure), for motion blur: the video time is
// (i + dt)/fps, the flight clock moves on by dt frame steps (held at the
// trajectory's ends and during holds), and the camera keys are evaluated at
// that time. FrameStateAt(i, 0) is FrameState(i), to the bit.
func (p *Plan) FrameStateAt(i int, dt float64) (FrameState, error) {
	if p.traj == nil {
		return FrameState{}, ErrUnbound
	}
	if i < 0 || i >= p.Frames() {
		return FrameState{}, fmt.Errorf("%w: frame %d of %d", ErrRange, i, p.Frames())
	}
	if !(dt >= -0.5 && dt <= 0.5) {
		return FrameState{}, fmt.Errorf("%w: frame offset %v outside [-0.5, 0.5]", ErrRange, dt)
	}
	fs := FrameState{Index: i, Seconds: float64(i) / p.Show.FPS}
	if dt != 0 {
		fs.Seconds = (float64(i) + dt) / p.Show.FPS
	}
	tr := p.traj
	switch k := i - p.nHold0; {
	case k < 0:
		fs.Phase, fs.State = PhaseHoldStart, tr.Start()
	case k >= p.nFly:
		fs.Phase, fs.State = PhaseHoldEnd, tr.End()
	default:
		fs.Phase = PhaseFlight
		kf := float64(k) + dt
		u := 0.0
		if p.nFly > 1 {
			u = math.Max(0, math.Min(1, kf/float64(p.nFly-1)))
		}
		s0, s1 := tr.Start(), tr.End()
		switch {
		case (k == p.nFly-1 && dt >= 0 || u == 1) && p.nFly > 1:
			fs.State = s1
		case p.spacing == SpacingCatalogue:
			fs.State = tr.AtT(s0.T + u*(s1.T-s0.T))
		default:
			fs.State = tr.AtTau(s0.Tau + u*(s1.Tau-s0.Tau))
		}
	}
	cam, key, err := p.camera(fs.Seconds, fs.State)
	if err != nil {
		return FrameState{}, fmt.Errorf("flight: frame %d: %w", i, err)
	}
	fs.Camera, fs.Look = cam, key
	fs.LookDir, fs.Roll = cam.Orient.Forward, cam.Roll
	return fs, nil
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
		Frame     frameopt.Options
	}{"skyframe-plan-2", p.Title, p.Catalogue, p.Start, p.Legs, p.Show, p.Camera, p.Output, p.Frame}
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
	"doppler_ahead", "doppler_behind", "rate_home", "rate_dest", "camera_deg_s", "centre_px_frame"}

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
	var prev FrameState
	if lo > 0 {
		var err error
		if prev, err = p.FrameState(lo - 1); err != nil {
			return err
		}
	}
	for i := lo; i < hi; i++ {
		fs, err := p.FrameState(i)
		if err != nil {
			return err
		}
		var m Motion
		if i > 0 {
			if m, err = p.motion(prev, fs); err != nil {
				return err
			}
		}
		prev = fs
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
			f(s.Pos.X), f(s.Pos.Y), f(s.Pos.Z), f(s.DopplerAhead()), f(s.DopplerBehind()), f(rateHome), f(rateDest),
			f(m.RateDegS), f(m.ScreenPx))
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
