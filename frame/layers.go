package frame

import (
	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/overlay"
	"github.com/skyframe/skyframe/render"
)

// Layers are a frame's linear layers (added into the buffer, so they reach
// the FITS and EXR files) and its overlays (drawn on the encoded image
// only). The zero value has neither.
type Layers struct {
	render.Layers
	overlay.Options
	// UnresolvedDepth is the resolved depth (V magnitude) of the
	// unresolved-light layer, when Layers.Unresolved is set.
	UnresolvedDepth float64
}

// SidecarInfo describes the linear layers in a frame's sidecar.
func (l *Layers) SidecarInfo(side *render.Sidecar) {
	side.CMB = l.CMB
	if l.Unresolved != nil {
		side.Unresolved = &render.UnresolvedInfo{DepthV: l.UnresolvedDepth, Components: len(l.Unresolved.Temperatures())}
		if !l.DiffuseOptions.Exact {
			side.Unresolved.GridTolerance = l.DiffuseOptions.GridTolerance()
			side.Unresolved.GridCodes = l.DiffuseOptions.Codes
		}
	}
}

// ForEightBit draws the unresolved layer for a frame written only as 8-bit
// sRGB (eightBitOnly: no FITS, no OpenEXR, no 16-bit PNG) with
// render.EightBitTolerance and render.EightBitCodes, where its error stays
// within one code of the exact layer's, and continued past a fisheye's
// circle, which masks the image (DiffuseOptions.BeyondRim); otherwise it
// leaves the defaults, which the linear files keep.
func (l *Layers) ForEightBit(eightBitOnly bool) {
	if eightBitOnly {
		l.DiffuseOptions.Tolerance = render.EightBitTolerance
		l.DiffuseOptions.Codes = render.EightBitCodes
		l.DiffuseOptions.BeyondRim = true
	}
}

// CheckHUDFit reports (overlay.CheckHUDFit's error, wrapping
// overlay.ErrHUDFit) a heads-up display that has no room in the front safe
// area of fisheye projection p; v stands for the display's values. It is
// nil when there is no display.
func (l Layers) CheckHUDFit(p camera.Projection, v overlay.HUDValues) error {
	if l.HUD == nil {
		return nil
	}
	return overlay.CheckHUDFit(p, v, l.HUDCorner, l.TextSize)
}

// WideHUDValues stand for a flight's heads-up display when checking that
// it fits: every line present, with values as wide as a flight shows.
func WideHUDValues(title string) overlay.HUDValues {
	return overlay.HUDValues{Beta: 0.99999999, Gamma: 7071.07, TauYears: 1234.5, TYears: 12345.6, TravelledLy: 12345.6,
		RemainingLy: 12345.6, RateHome: 1.2345e-4, RateDest: 14142.1, Title: title}
}
