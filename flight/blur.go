package flight

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
)

// Motion blur: a frame is integrated over its exposure, the shutter angle's
// share of the frame interval centred on the frame's time, as the mean of
// sub-frames at evenly spaced times (the midpoint rule). Each sub-frame is
// a complete render of that instant — ship position and velocity (so
// aberration and beaming), camera orientation, field of view and exposure
// all at that time — so every star's light is spread along its own
// apparent path and its summed flux is the mean of its fluxes over the
// exposure (unchanged for a steady star). The diffuse layers are rendered
// per sub-frame too and blur with the same motion.

// Blur sampling limits.
const (
	// BlurSpacing is the largest distance between successive images of a
	// star along its streak, in units of the PSF's FWHM. Gaussians spaced by
	// 0.75 FWHM sum to a streak whose brightness ripples by under 0.5 %
	// (the ripple of a sampled Gaussian is ≈ 2·exp(−2π²σ²/d²)).
	BlurSpacing = 0.75
	// MaxBlurSamples caps the sub-frames of one frame.
	MaxBlurSamples = 64
	// blurProbes is the number of probe points per axis whose on-screen
	// paths decide the sample count.
	blurProbes = 5
)

// BlurSamples returns the sub-frame offsets, in frame intervals from frame
// i, that integrate it over a shutter of shutterDeg degrees (0 to 360), and
// the longest on-screen path in pixels over the exposure of probe points
// spread over the frame (a 5×5 grid): ⌈path/(BlurSpacing·fwhm)⌉ + 1
// samples, at most MaxBlurSamples, or the single offset 0 when the path is
// under a quarter of the FWHM or the shutter is closed. proj builds a
// frame state's projection (the frame's size and kind). The result depends
// only on the plan, i and the arguments.
func (p *Plan) BlurSamples(i int, shutterDeg, fwhm float64, proj func(FrameState) (camera.Projection, error)) ([]float64, float64, error) {
	if !(shutterDeg > 0) {
		return []float64{0}, 0, nil
	}
	half := math.Min(shutterDeg, 360) / 360 / 2
	a, err := p.FrameStateAt(i, -half)
	if err != nil {
		return nil, 0, err
	}
	b, err := p.FrameStateAt(i, half)
	if err != nil {
		return nil, 0, err
	}
	pa, err := proj(a)
	if err != nil {
		return nil, 0, err
	}
	pb, err := proj(b)
	if err != nil {
		return nil, 0, err
	}
	oa, err := Observer(a.State)
	if err != nil {
		return nil, 0, err
	}
	ob, err := Observer(b.State)
	if err != nil {
		return nil, 0, err
	}
	inv := oa.Boost.Inverse()
	path := 0.0
	for py := 0; py < blurProbes; py++ {
		for px := 0; px < blurProbes; px++ {
			x := (float64(px) + 0.5) / blurProbes * float64(pa.Width)
			y := (float64(py) + 0.5) / blurProbes * float64(pa.Height)
			d, ok := pa.Inverse(x, y)
			if !ok {
				continue
			}
			n, _ := inv.Apply(d)      // catalogue-frame direction at the start
			m, _ := ob.Boost.Apply(n) // where it appears at the end
			x1, y1, ok := pb.Forward(m)
			if !ok {
				continue
			}
			path = math.Max(path, math.Hypot(x1-x, y1-y))
		}
	}
	if path < 0.25*fwhm {
		return []float64{0}, path, nil
	}
	k := min(int(math.Ceil(path/(BlurSpacing*fwhm)))+1, MaxBlurSamples)
	out := make([]float64, k)
	for j := range out {
		out[j] = -half + 2*half*(float64(j)+0.5)/float64(k)
	}
	return out, path, nil
}

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
