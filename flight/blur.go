package flight

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
)

// Motion blur: a frame is integrated over its exposure, the shutter
// angle's share of the frame interval centred on the frame's time. The
// plan gives the state at any instant of it (FrameStateAt) and the paths
// of probe points across it (ExposureProbes); package job plans the
// integration from them (job.PlanExposure) and package render draws it
// (streaks along each star's apparent path, the diffuse layers averaged
// over a few instants).

// blurProbes is the number of probe points per axis whose on-screen paths
// decide how finely an exposure is sampled.
const blurProbes = 5

// ExposureOffset returns the offset, in frame intervals from the frame's
// time, of time u of its exposure (u = −1 when the shutter opens, 1 when
// it closes) for a shutter of shutterDeg degrees (clamped to 360).
func ExposureOffset(u, shutterDeg float64) float64 {
	return u * math.Min(shutterDeg, 360) / 720
}

// ExposureProbes returns the probe points of frame i's exposure: their
// number and a function that sets their pixels at time u of the exposure
// (see ExposureOffset), for choosing how finely the exposure is sampled
// (render.ChooseKnots). The probes are a 5×5 grid of directions seen at
// the frame's instant, followed as directions at infinity in the
// catalogue frame through the ship's and the camera's motion. Equirect x
// is unwrapped toward the probe's x at the instant; a probe that leaves
// the projection's domain, the image (by more than half its size) or its
// cube face is NaN. proj builds a frame state's projection.
func (p *Plan) ExposureProbes(i int, shutterDeg float64, proj func(FrameState) (camera.Projection, error)) (int, func(u float64, xs, ys []float64) error, error) {
	fs, err := p.FrameState(i)
	if err != nil {
		return 0, nil, err
	}
	pr, err := proj(fs)
	if err != nil {
		return 0, nil, err
	}
	obs, err := Observer(fs.State)
	if err != nil {
		return 0, nil, err
	}
	inv := obs.Boost.Inverse()
	var dirs []r3.Vec
	var px []float64
	for py := 0; py < blurProbes; py++ {
		for qx := 0; qx < blurProbes; qx++ {
			x := (float64(qx) + 0.5) / blurProbes * float64(pr.Width)
			y := (float64(py) + 0.5) / blurProbes * float64(pr.Height)
			d, ok := pr.Inverse(x, y)
			if !ok {
				continue
			}
			n, _ := inv.Apply(d)
			dirs = append(dirs, n)
			px = append(px, x)
		}
	}
	w, h := float64(pr.Width), float64(pr.Height)
	at := func(u float64, xs, ys []float64) error {
		s, err := p.FrameStateAt(i, ExposureOffset(u, shutterDeg))
		if err != nil {
			return err
		}
		q, err := proj(s)
		if err != nil {
			return err
		}
		o, err := Observer(s.State)
		if err != nil {
			return err
		}
		for k, n := range dirs {
			m, _ := o.Boost.Apply(n)
			x, y, ok := q.Forward(m)
			switch {
			case q.Kind == camera.Equirect && x-px[k] > w/2:
				x -= w
			case q.Kind == camera.Equirect && px[k]-x > w/2:
				x += w
			case q.Kind == camera.Cube && math.Floor(x/h) != math.Floor(px[k]/h):
				ok = false
			}
			if !ok || x < -w/2 || x > 1.5*w || y < -h/2 || y > 1.5*h {
				x, y = math.NaN(), math.NaN()
			}
			xs[k], ys[k] = x, y
		}
		return nil
	}
	return len(dirs), at, nil
}
