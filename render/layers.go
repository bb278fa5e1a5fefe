package render

import (
	"errors"
	"fmt"
	"image"
	"image/draw"
	"math"

	"github.com/fogleman/gg"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/catalog"
)

// MarkerOptions choose the direction markers.
type MarkerOptions struct {
	// Motion marks the direction of motion (a ring with ticks). Nothing is
	// drawn at rest.
	Motion bool
	// Destination, when not nil, is the catalogue-frame direction from the
	// ship toward the destination (need not be unit); it is marked with a
	// diamond at its aberrated position.
	Destination *r3.Vec
}

// Layers select the optional outreach layers of a frame. The zero value
// adds nothing.
//
// Layer order. The linear layers go into the HDR buffer, so they are also
// in the FITS output: stars (Render), then the CMB (AddLinear/AddCMB).
// Tone mapping and sRGB encoding follow (ToNRGBA, ToNRGBA64). The overlays
// are then drawn, anti-aliased, on a transparent layer composited over the
// encoded image, in this order: reference grid, D = 1 circle, beacon
// lattice, direction markers, star labels, heads-up display. Overlays never
// enter the linear buffer or the FITS file.
type Layers struct {
	// CMB adds the cosmic microwave background with CMBOptions.
	CMB        bool
	CMBOptions CMBOptions
	// Grid is the reference grid (GridNone: none).
	Grid GridOptions
	// UnityCircle draws the circle where the Doppler factor is 1.
	UnityCircle bool
	// Markers mark the direction of motion and the destination.
	Markers MarkerOptions
	// Lattice is the beacon lattice (PerSide 0: none).
	Lattice LatticeOptions
	// Labels name stars.
	Labels LabelOptions
	// HUD, when not nil, is shown in HUDCorner.
	HUD       *HUDValues
	HUDCorner Corner
}

// ErrLayers reports an overlay that cannot be drawn on the given image.
var ErrLayers = errors.New("render: layers")

// Validate checks the options that do not need the star list: the grid
// step and frame, the lattice size, the label count and the HUD corner.
// Unknown label names are reported by DrawOverlays (or ResolveLabels).

// The heads-up display takes at most these fractions of a frame's height
// and width (it shrinks on small frames, down to half its normal size).
const (
	hudMaxHeight = 0.45
	hudMaxWidth  = 0.6
)

func (l Layers) Validate() error {
	if l.Grid.Frame != GridNone {
		if l.Grid.Frame != GridEquatorial && l.Grid.Frame != GridGalactic {
			return fmt.Errorf("%w: unknown Frame %d", ErrGrid, int(l.Grid.Frame))
		}
		if _, err := l.Grid.step(); err != nil {
			return err
		}
	}
	if _, err := l.Lattice.Count(); err != nil {
		return err
	}
	if l.Labels.Brightest < 0 {
		return fmt.Errorf("%w: Brightest %d, want ≥ 0", ErrLabel, l.Labels.Brightest)
	}
	if l.HUDCorner < TopLeft || l.HUDCorner > BottomRight {
		return fmt.Errorf("%w: HUD corner %d", ErrLayers, int(l.HUDCorner))
	}
	return nil
}

// AddLinear adds the linear layers (the CMB) to the frame's buffer: call it
// after Render and before tone mapping or writing FITS.
func (l Layers) AddLinear(f *Frame) error {
	if !l.CMB {
		return nil
	}
	return AddCMB(f, l.CMBOptions)
}

// overlays reports whether any overlay layer is selected.
func (l Layers) overlays() bool {
	return l.Grid.Frame != GridNone || l.UnityCircle || l.Markers.Motion || l.Markers.Destination != nil ||
		l.Lattice.PerSide > 0 || l.Labels.Brightest > 0 || len(l.Labels.Stars) > 0 || l.HUD != nil
}

// DrawOverlays draws the overlay layers of l (see Layers for the order)
// onto img, the tone-mapped frame f (same size as f's projection), seen by
// f.Options.Observer through f.Options.Projection. stars is the star list
// f was rendered from; it is needed only to look up Labels.Stars. Nothing
// is drawn when l selects no overlay. Bad options and unknown label names
// are errors, and then img is left unchanged.
func DrawOverlays(img draw.Image, f *Frame, stars *catalog.Stars, l Layers) error {
	if err := l.Validate(); err != nil {
		return err
	}
	if !l.overlays() {
		return nil
	}
	if f == nil || img == nil {
		return fmt.Errorf("%w: nil frame or image", ErrLayers)
	}
	p := f.Options.Projection
	if err := p.Prepare(); err != nil {
		return err
	}
	bnd := img.Bounds()
	if bnd.Dx() != p.Width || bnd.Dy() != p.Height {
		return fmt.Errorf("%w: image %d×%d, projection %d×%d", ErrLayers, bnd.Dx(), bnd.Dy(), p.Width, p.Height)
	}
	obs := f.Options.Observer
	// Compute everything that can fail before drawing.
	grid, err := GridLines(p, obs.Boost, l.Grid)
	if err != nil {
		return err
	}
	var unity []Polyline
	if l.UnityCircle {
		if unity, err = UnityCircle(p, obs.Boost); err != nil {
			return err
		}
	}
	beacons, err := LatticeBeacons(p, obs, l.Lattice)
	if err != nil {
		return err
	}
	targets, err := labelTargets(f, stars, l.Labels)
	if err != nil {
		return err
	}
	if err := loadFonts(); err != nil {
		return err
	}
	scale := overlayScale(p.Width, p.Height)
	over := image.NewRGBA(image.Rect(0, 0, p.Width, p.Height))
	dc := gg.NewContextForRGBA(over)

	var hudLines []string
	var hudBox box
	var hudLead float64
	hudFace, hudScale := newFace(fontMon, 11*scale), scale
	if l.HUD != nil {
		dc.SetFontFace(hudFace)
		hudLines, hudBox, hudLead = hudLayout(*l.HUD, l.HUDCorner, p.Width, p.Height, dc.MeasureString, scale)
		// On a small frame, shrink the display to at most hudMaxHeight of
		// the height and hudMaxWidth of the width, but not below half size.
		fit := math.Min(hudMaxHeight*float64(p.Height)/(hudBox.y1-hudBox.y0), hudMaxWidth*float64(p.Width)/(hudBox.x1-hudBox.x0))
		if fit < 1 {
			hudScale = scale * math.Max(fit, 0.5)
			hudFace = newFace(fontMon, 11*hudScale)
			dc.SetFontFace(hudFace)
			hudLines, hudBox, hudLead = hudLayout(*l.HUD, l.HUDCorner, p.Width, p.Height, dc.MeasureString, hudScale)
		}
	}

	if l.Grid.Frame != GridNone {
		drawGrid(dc, grid, l.Grid.Frame, scale)
	}
	strokeLines(dc, unity, styleUnity, scale)
	drawBeacons(dc, beacons, l.Lattice.Spacing, scale)
	var blocked []box
	if len(hudLines) > 0 {
		blocked = append(blocked, hudBox)
	}
	if l.Markers.Motion && obs.Boost.Beta() > 0 {
		if x, y, ok := projectVisible(&p, obs.Boost.Dir()); ok {
			drawMotionMarker(dc, x, y, scale)
			blocked = append(blocked, box{x - 11*scale, y - 11*scale, x + 11*scale, y + 11*scale})
		}
	}
	if d := l.Markers.Destination; d != nil && r3.Norm(*d) > 0 {
		n, _ := obs.Boost.Apply(r3.Unit(*d))
		if x, y, ok := projectVisible(&p, n); ok {
			drawDestinationMarker(dc, x, y, scale)
			blocked = append(blocked, box{x - 7*scale, y - 7*scale, x + 7*scale, y + 7*scale})
		}
	}
	if len(targets) > 0 {
		face := newFace(fontSans, 11*scale)
		dc.SetFontFace(face)
		placed := placeLabels(targets, dc.MeasureString, p.Width, p.Height, blocked, 4*scale)
		drawLabels(dc, placed, face, scale)
	}
	drawHUD(dc, hudLines, hudBox, hudLead, hudFace, hudScale)

	draw.Draw(img, bnd, over, image.Point{}, draw.Over)
	return nil
}
