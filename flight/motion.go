package flight

import (
	"fmt"
	"math"

	"github.com/skyframe/skyframe/camera"
)

// Comfort limits for camera motion, common practice of fulldome and
// cinema production rather than a published standard (from memory): a
// dome audience is kept comfortable with camera rotations below about
// 5° per second, and a pan judders when the image crosses the frame's
// width in less than about 7 seconds ("seven-second rule" of film camera
// operators).
const (
	ComfortDegPerSec   = 5.0
	ComfortCrossingSec = 7.0
)

// Motion is the camera's motion into one frame from the one before.
type Motion struct {
	// StepDeg is the rotation of the camera from the previous frame,
	// degrees; RateDegS the same per second of video.
	StepDeg, RateDegS float64
	// ScreenPx is how far the sky at the frame centre moves on screen
	// from the previous frame, pixels.
	ScreenPx float64
}

// ScreenLimitPx is the comfort limit of on-screen speed in pixels per
// frame for a frame width w at fps frames per second: the width crossed in
// ComfortCrossingSec.
func ScreenLimitPx(w int, fps float64) float64 {
	return float64(w) / (ComfortCrossingSec * fps)
}

// Projection returns the prepared projection of a frame state for the plan's
// frame options (projection kind and size) and the frame's interpolated
// camera.
func (p *Plan) Projection(fs FrameState) (camera.Projection, error) {
	fr := p.Frame.Frame()
	pr := camera.Projection{Kind: fr.Kind, Width: fr.Width, Height: fr.Height,
		FOV: fs.Camera.FOV, Tilt: fs.Camera.Tilt, Orient: fs.Camera.Orient}
	if err := pr.Prepare(); err != nil {
		return camera.Projection{}, fmt.Errorf("flight: frame %d: %w", fs.Index, err)
	}
	return pr, nil
}

// MotionAt returns the camera motion into frame i (zero for frame 0).
func (p *Plan) MotionAt(i int) (Motion, error) {
	if i <= 0 {
		return Motion{}, nil
	}
	a, err := p.FrameState(i - 1)
	if err != nil {
		return Motion{}, err
	}
	b, err := p.FrameState(i)
	if err != nil {
		return Motion{}, err
	}
	return p.motion(a, b)
}

func (p *Plan) motion(a, b FrameState) (Motion, error) {
	var m Motion
	m.StepDeg = AngleBetween(a.Camera.Orient, b.Camera.Orient)
	m.RateDegS = m.StepDeg * p.Show.FPS
	pr, err := p.Projection(b)
	if err != nil {
		return m, err
	}
	cx, cy, ok0 := pr.Forward(b.Camera.Orient.Forward)
	x, y, ok1 := pr.Forward(a.Camera.Orient.Forward)
	if ok0 && ok1 {
		m.ScreenPx = math.Hypot(x-cx, y-cy)
	} else {
		m.ScreenPx = math.Inf(1)
	}
	return m, nil
}

// Stretch is a run of consecutive frames First..Last whose camera motion
// exceeds a comfort limit, with the largest values in it.
type Stretch struct {
	First, Last      int
	MaxRateDegS      float64
	MaxScreenPx      float64
	RateOver, PxOver bool
}

// ComfortStretches lists the stretches of frames in r (clipped to the plan)
// whose angular rate exceeds ComfortDegPerSec or whose on-screen speed at
// the centre exceeds ScreenLimitPx.
func ComfortStretches(p *Plan, r Range) ([]Stretch, error) {
	lo, hi := r.Clip(p.Frames())
	limitPx := ScreenLimitPx(p.Frame.Frame().Width, p.Show.FPS)
	var out []Stretch
	var prev FrameState
	for i := max(lo-1, 0); i < hi; i++ {
		fs, err := p.FrameState(i)
		if err != nil {
			return nil, err
		}
		if i > 0 && i >= lo {
			m, err := p.motion(prev, fs)
			if err != nil {
				return nil, err
			}
			rateOver, pxOver := m.RateDegS > ComfortDegPerSec, m.ScreenPx > limitPx
			if rateOver || pxOver {
				if n := len(out); n > 0 && out[n-1].Last == i-1 {
					s := &out[n-1]
					s.Last = i
					s.MaxRateDegS = max(s.MaxRateDegS, m.RateDegS)
					s.MaxScreenPx = max(s.MaxScreenPx, m.ScreenPx)
					s.RateOver, s.PxOver = s.RateOver || rateOver, s.PxOver || pxOver
				} else {
					out = append(out, Stretch{First: i, Last: i, MaxRateDegS: m.RateDegS, MaxScreenPx: m.ScreenPx, RateOver: rateOver, PxOver: pxOver})
				}
			}
		}
		prev = fs
	}
	return out, nil
}
