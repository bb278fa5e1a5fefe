package job

import (
	"fmt"
	"math"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/flight"
	"github.com/skyframe/skyframe/render"
)

// Exposure says how a flight frame is integrated over its shutter (motion
// blur). Offsets are in frame intervals from the frame's time (see
// flight.ExposureOffset).
type Exposure struct {
	// Path is the longest on-screen path, in pixels, of the probe grid
	// (flight.Plan.ExposureProbes) over the exposure.
	Path float64
	// Knots are the offsets of the streak knots, evenly spaced from the
	// shutter's opening to its closing, the middle one 0 (for
	// render.Prepared.RenderMotion); nil when the frame is its instant
	// alone.
	Knots []float64
	// KnotError is the probes' largest distance, in pixels, from the
	// path interpolated through the knots.
	KnotError float64
	// Layers and LayerWeights are the offsets and weights of the instants
	// whose diffuse layers are averaged (render.Layers.AddLinearMotion);
	// nil when Knots is.
	Layers, LayerWeights []float64
}

// pathSteps is the number of steps over which the probes' paths are
// measured.
const pathSteps = 16

// PlanExposure returns how frame i of plan is integrated over a shutter of
// shutterDeg degrees with a PSF of fwhm pixels; proj builds a frame
// state's projection. A closed shutter, or probes that move less than a
// quarter of the FWHM, give the frame's instant alone (the same bytes as
// a closed shutter). Otherwise the knots are render.ChooseKnots' for the
// probes and the layers' instants render.LayerTimes' for the path. The
// result depends only on the plan, i and the arguments.
func PlanExposure(plan *flight.Plan, i int, shutterDeg, fwhm float64, proj func(flight.FrameState) (camera.Projection, error)) (Exposure, error) {
	if !(shutterDeg > 0) {
		return Exposure{}, nil
	}
	n, at, err := plan.ExposureProbes(i, shutterDeg, proj)
	if err != nil {
		return Exposure{}, err
	}
	var e Exposure
	xs, ys := make([]float64, n), make([]float64, n)
	px, py := make([]float64, n), make([]float64, n)
	length := make([]float64, n)
	for s := 0; s <= pathSteps; s++ {
		if err := at(-1+2*float64(s)/pathSteps, xs, ys); err != nil {
			return Exposure{}, err
		}
		for k := range xs {
			if s > 0 {
				// A probe undefined at a step (NaN) adds nothing.
				if d := math.Hypot(xs[k]-px[k], ys[k]-py[k]); d > 0 {
					length[k] += d
				}
			}
			px[k], py[k] = xs[k], ys[k]
		}
	}
	for _, l := range length {
		e.Path = math.Max(e.Path, l)
	}
	if e.Path < 0.25*fwhm {
		return e, nil
	}
	k, kerr, err := render.ChooseKnots(n, 0, at)
	if err != nil {
		return Exposure{}, err
	}
	e.KnotError = kerr
	e.Knots = make([]float64, k)
	for j := range e.Knots {
		e.Knots[j] = flight.ExposureOffset(-1+2*float64(j)/float64(k-1), shutterDeg)
	}
	e.Knots[k/2] = 0 // the frame's instant, to the bit
	u, w := render.LayerTimes(e.Path)
	e.Layers, e.LayerWeights = make([]float64, len(u)), w
	for j, v := range u {
		e.Layers[j] = flight.ExposureOffset(v, shutterDeg)
	}
	return e, nil
}

// Instants returns the observer and camera of frame i of plan at each
// offset (see Exposure); proj builds a frame state's projection.
func Instants(plan *flight.Plan, i int, offsets []float64, proj func(flight.FrameState) (camera.Projection, error)) ([]render.Instant, error) {
	out := make([]render.Instant, len(offsets))
	for k, dt := range offsets {
		fs, err := plan.FrameStateAt(i, dt)
		if err != nil {
			return nil, err
		}
		obs, err := flight.Observer(fs.State)
		if err != nil {
			return nil, fmt.Errorf("flight: frame %d: %w", i, err)
		}
		p, err := proj(fs)
		if err != nil {
			return nil, fmt.Errorf("flight: frame %d: %w", i, err)
		}
		out[k] = render.Instant{Observer: obs, Projection: p}
	}
	return out, nil
}
