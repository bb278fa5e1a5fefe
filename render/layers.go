package render

// Layers select the optional linear layers of a frame. The zero value adds
// nothing.
//
// Layer order. The linear layers go into the HDR buffer, so they are also
// in the FITS output: stars (Render), then the CMB (AddLinear/AddCMB).
// Tone mapping and sRGB encoding follow (ToNRGBA, ToNRGBA64). The overlays
// (coordinate graticule, labels, heads-up display…) are drawn afterwards
// on the encoded image by package overlay; they never enter the linear
// buffer or the FITS file.
type Layers struct {
	// CMB adds the cosmic microwave background with CMBOptions.
	CMB        bool
	CMBOptions CMBOptions
}

// AddLinear adds the linear layers (the CMB) to the frame's buffer: call it
// after Render and before tone mapping or writing FITS.
func (l Layers) AddLinear(f *Frame) error {
	if !l.CMB {
		return nil
	}
	return AddCMB(f, l.CMBOptions)
}
