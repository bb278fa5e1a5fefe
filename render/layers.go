package render

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
