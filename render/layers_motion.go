package render

import (
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/integrate/quad"
)

// Diffuse layers under motion blur. The CMB and the unresolved starlight
// are smooth on the sky (the unresolved layer is sampled at
// DefaultDiffuseFootprint, 0.25°, and its model has no structure finer
// than about 1°), so their time mean over an exposure is computed by
// Gauss–Legendre quadrature in time: the layer is evaluated at a few
// instants of the exposure, weighted and summed. An m-point rule is exact
// for a pixel whose value changes as a polynomial of degree 2m − 1 in
// time, and a smooth layer swept a few pixels is such a pixel to far
// better than 8-bit precision (TestAddLinearMotion measures it).

// Limits of LayerTimes.
const (
	// LayerNodeSpacing is the on-screen path, in pixels, per quadrature
	// node of the diffuse layers: 4 px, half the width (σ) of the sharpest
	// band TestAddLinearMotion sweeps, 8 px — the unresolved layer's
	// sampling footprint (0.25°) in a 1920-pixel 60° frame.
	LayerNodeSpacing = 4.0
	// MaxLayerNodes caps the quadrature nodes.
	MaxLayerNodes = 16
)

// LayerTimes returns the times u (−1 at the shutter's opening, 1 at its
// closing) and weights (summing to 1) at which AddLinearMotion evaluates
// the diffuse layers of a frame whose longest on-screen path over the
// exposure is path pixels: the m-point Gauss–Legendre rule with
// m = ⌈path/LayerNodeSpacing⌉, at least 2 and at most MaxLayerNodes.
func LayerTimes(path float64) (u, w []float64) {
	m := 2
	if path > 2*LayerNodeSpacing {
		m = int(math.Min(math.Ceil(path/LayerNodeSpacing), MaxLayerNodes))
	}
	u, w = make([]float64, m), make([]float64, m)
	quad.Legendre{}.FixedLocations(u, w, -1, 1)
	for k := range w {
		w[k] /= 2
	}
	return u, w
}

// AddLinearMotion adds the linear layers of l (the CMB, the unresolved
// starlight) to f's buffer as their weighted time mean over instants: for
// each instant in at (the observer and camera at time LayerTimes' u), the
// layer as seen then, on f's photometric scale times w[k] (every layer is
// linear in the frame's Scale) — layer by layer, in Names order, as
// AddLinearMotionKept does, so both leave the same frame. The CMB is
// summed over the instants into a black buffer, which is then added to
// f's (it needs one more buffer of f's size). The unresolved starlight is
// drawn once on one adaptive grid for all instants (each node evaluated
// exactly at every instant, the weighted mean checked and interpolated:
// see AddDiffuse), which costs the instants' node evaluations but fills
// the pixels once, and holds the grid's bound for the mean itself
// (TestDiffuseMeanGridBound). The additions are in a fixed order, so the
// result does not depend on the worker count. Every instant's projection
// must have f's kind and size; the weights must be finite and positive.
func (l Layers) AddLinearMotion(f *Frame, at []Instant, w []float64) error {
	_, err := l.addMotion(f, at, w, false)
	return err
}

// AddLinearMotionKept does what AddLinearMotion does and also returns every
// contribution as its own buffer, in Names order (the stars, a copy of the
// buffer before the layers, then each layer), like AddLinearKept.
func (l Layers) AddLinearMotionKept(f *Frame, at []Instant, w []float64) ([]Contribution, error) {
	return l.addMotion(f, at, w, true)
}

func (l Layers) addMotion(f *Frame, at []Instant, w []float64, keep bool) ([]Contribution, error) {
	if f == nil || len(at) == 0 || len(at) != len(w) {
		return nil, fmt.Errorf("%w: AddLinearMotion needs a frame and one weight per instant", ErrMotion)
	}
	for k, in := range at {
		p := in.Projection
		if p.Kind != f.Options.Projection.Kind || p.Width != f.W || p.Height != f.H {
			return nil, fmt.Errorf("%w: instant %d is a %v %d×%d, the frame a %v %d×%d", ErrMotion, k,
				p.Kind, p.Width, p.Height, f.Options.Projection.Kind, f.W, f.H)
		}
		if !(w[k] > 0) || math.IsInf(w[k], 0) {
			return nil, fmt.Errorf("%w: weight %d is %v", ErrMotion, k, w[k])
		}
	}
	var out []Contribution
	if keep {
		out = append(out, Contribution{Name: LayerStars, Pix: slices.Clone(f.Pix)})
	}
	var scratch []float32
	if l.CMB {
		scratch = make([]float32, len(f.Pix))
		cmb := Layers{CMB: true, CMBOptions: l.CMBOptions}
		for k, in := range at {
			g := *f
			g.Buffer = Buffer{W: f.W, H: f.H, Pix: scratch}
			g.Options.Observer, g.Options.Projection = in.Observer, in.Projection
			g.Scale = f.Scale * w[k]
			if err := cmb.AddLinear(&g); err != nil {
				return nil, err
			}
		}
		if err := f.Buffer.Add(&Buffer{W: f.W, H: f.H, Pix: scratch}); err != nil {
			return nil, err
		}
		if keep {
			out = append(out, Contribution{Name: LayerCMB, Pix: scratch})
		}
	}
	if l.Unresolved != nil {
		// One grid for the mean of the instants (addDiffuseMean). Without
		// a kept layer it goes straight into the frame: 0 + v is exact,
		// so that is the frame the kept path leaves (its own buffer, then
		// Add).
		dst := &f.Buffer
		if keep {
			dst = &Buffer{W: f.W, H: f.H, Pix: make([]float32, len(f.Pix))}
		}
		if err := addDiffuseMean(f, l.Unresolved, l.DiffuseOptions, at, w, dst); err != nil {
			return nil, err
		}
		if keep {
			if err := f.Buffer.Add(dst); err != nil {
				return nil, err
			}
			out = append(out, Contribution{Name: LayerUnresolved, Pix: dst.Pix})
		}
	}
	return out, nil
}
