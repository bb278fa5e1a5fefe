package render

import (
	"fmt"
	"slices"
)

// Layers select the optional linear layers of a frame. The zero value adds
// nothing.
//
// Layer order. The linear layers go into the HDR buffer, so they are also
// in the FITS output: stars (Render), then the CMB (AddCMB), then the
// unresolved starlight (AddDiffuse), both through AddLinear.
// Tone mapping and sRGB encoding follow (ToNRGBA, ToNRGBA64). The overlays
// (coordinate graticule, labels, heads-up display…) are drawn afterwards
// on the encoded image by package overlay; they never enter the linear
// buffer or the FITS file.
type Layers struct {
	// CMB adds the cosmic microwave background with CMBOptions.
	CMB        bool
	CMBOptions CMBOptions
	// Unresolved, when not nil, adds the light of the stars too faint to
	// be drawn as a diffuse layer (AddDiffuse) with DiffuseOptions.
	Unresolved     UnresolvedSky
	DiffuseOptions DiffuseOptions
}

// AddLinear adds the linear layers (the CMB, the unresolved starlight) to
// the frame's buffer: call it after Render and before tone mapping or
// writing FITS.
func (l Layers) AddLinear(f *Frame) error {
	if l.CMB {
		if err := AddCMB(f, l.CMBOptions); err != nil {
			return err
		}
	}
	if l.Unresolved != nil {
		return AddDiffuse(f, l.Unresolved, l.DiffuseOptions)
	}
	return nil
}

// AddLinearPending is AddLinear leaving the unresolved layer out of f,
// pending (DiffusePending), when it is the only layer and its memo holds
// it: the tone map then adds it (Frame.ToNRGBAPending) and the caller
// releases it. With the CMB every pixel is lit, so nothing would be gained:
// the layers are added and the result is nil.
func (l Layers) AddLinearPending(f *Frame) (*PendingLayer, error) {
	if l.CMB || l.Unresolved == nil {
		return nil, l.AddLinear(f)
	}
	return DiffusePending(f, l.Unresolved, l.DiffuseOptions)
}

// Names of the linear contributions, as recorded in file metadata (FITS
// LAYERS, PNG text, sidecar) and used as OpenEXR layer prefixes.
const (
	LayerStars      = "stars"
	LayerCMB        = "cmb"
	LayerUnresolved = "unresolved"
)

// Names returns the linear contributions a frame rendered with l holds, in
// the order they are added: the stars, then the CMB and the unresolved
// starlight when selected.
func (l Layers) Names() []string {
	n := []string{LayerStars}
	if l.CMB {
		n = append(n, LayerCMB)
	}
	if l.Unresolved != nil {
		n = append(n, LayerUnresolved)
	}
	return n
}

// Contribution is one linear contribution to a frame kept as its own
// buffer: Pix is laid out like Buffer.Pix (W×H interleaved R, G, B).
type Contribution struct {
	Name string
	Pix  []float32
}

// AddLinearKept does what AddLinear does and also returns every
// contribution as its own buffer, in Names order: the stars (a copy of the
// buffer before the layers are added) and each layer. The frame ends
// bit-identical to AddLinear's: each layer is computed into a black buffer
// (where 0 + v is exact) and then added, the same float32 additions in the
// same order. It costs one extra buffer per contribution.
func (l Layers) AddLinearKept(f *Frame) ([]Contribution, error) {
	if f == nil {
		return nil, fmt.Errorf("%w: nil frame", ErrCMB)
	}
	out := []Contribution{{Name: LayerStars, Pix: slices.Clone(f.Pix)}}
	layer := func() *Frame {
		g := *f
		g.Buffer = Buffer{W: f.W, H: f.H, Pix: make([]float32, len(f.Pix))}
		return &g
	}
	if l.CMB {
		g := layer()
		if err := AddCMB(g, l.CMBOptions); err != nil {
			return nil, err
		}
		if err := f.Buffer.Add(&g.Buffer); err != nil {
			return nil, err
		}
		out = append(out, Contribution{Name: LayerCMB, Pix: g.Pix})
	}
	if l.Unresolved != nil {
		g := layer()
		opt := l.DiffuseOptions
		opt.Into = &g.Buffer
		if err := AddDiffuse(f, l.Unresolved, opt); err != nil {
			return nil, err
		}
		if err := f.Buffer.Add(&g.Buffer); err != nil {
			return nil, err
		}
		out = append(out, Contribution{Name: LayerUnresolved, Pix: g.Pix})
	}
	return out, nil
}
