package overlay

import (
	"errors"
	"fmt"
	"image"
	"image/draw"
	"math"

	"git.sr.ht/~sbinet/gg"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/render"
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

// Options select the overlays of a frame. The zero value draws nothing.
//
// Order: the overlays are drawn, anti-aliased, on a transparent layer
// composited over the tone-mapped, sRGB-encoded image, in this order:
// coordinate graticule, D = 1 circle, beacon lattice, direction markers,
// star labels, heads-up display. They never enter the linear buffer or the
// FITS file.
type Options struct {
	// Graticule is the coordinate graticule (GraticuleNone: none).
	Graticule GraticuleOptions
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

// ErrOverlay reports an overlay that cannot be drawn on the given image.
var ErrOverlay = errors.New("overlay")

// The heads-up display takes at most these fractions of a frame's height
// and width (it shrinks on small frames, down to half its normal size).
const (
	hudMaxHeight = 0.45
	hudMaxWidth  = 0.6
)

// Validate checks the options that do not need the star list: the
// graticule step and frame, the lattice size, the label count and the HUD
// corner. Unknown label names are reported by Draw (or ResolveLabels).
func (l Options) Validate() error {
	if l.Graticule.Frame != GraticuleNone {
		if l.Graticule.Frame != GraticuleEquatorial && l.Graticule.Frame != GraticuleGalactic {
			return fmt.Errorf("%w: unknown Frame %d", ErrGraticule, int(l.Graticule.Frame))
		}
		if _, err := l.Graticule.step(); err != nil {
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
		return fmt.Errorf("%w: HUD corner %d", ErrOverlay, int(l.HUDCorner))
	}
	return nil
}

// overlays reports whether any overlay layer is selected.
func (l Options) overlays() bool {
	return l.Graticule.Frame != GraticuleNone || l.UnityCircle || l.Markers.Motion || l.Markers.Destination != nil ||
		l.Lattice.PerSide > 0 || l.Labels.Brightest > 0 || len(l.Labels.Stars) > 0 || l.HUD != nil
}

// Draw draws the overlays of l (see Options for the order)
// onto img, the tone-mapped frame f (same size as f's projection), seen by
// f.Options.Observer through f.Options.Projection. stars is the star list
// f was rendered from; it is needed only to look up Labels.Stars. Nothing
// is drawn when l selects no overlay. Bad options and unknown label names
// are errors, and then img is left unchanged.
func Draw(img draw.Image, f *render.Frame, stars *catalog.Stars, l Options) error {
	if err := l.Validate(); err != nil {
		return err
	}
	if !l.overlays() {
		return nil
	}
	if f == nil || img == nil {
		return fmt.Errorf("%w: nil frame or image", ErrOverlay)
	}
	p := f.Options.Projection
	if err := p.Prepare(); err != nil {
		return err
	}
	bnd := img.Bounds()
	if bnd.Dx() != p.Width || bnd.Dy() != p.Height {
		return fmt.Errorf("%w: image %d×%d, projection %d×%d", ErrOverlay, bnd.Dx(), bnd.Dy(), p.Width, p.Height)
	}
	obs := f.Options.Observer
	// Compute everything that can fail before drawing.
	lines, err := GraticuleLines(p, obs.Boost, l.Graticule)
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
	hudFace, err := newFace(fontMon, 11*scale)
	if err != nil {
		return err
	}
	hudScale := scale
	if l.HUD != nil {
		dc.SetFontFace(hudFace)
		hudLines, hudBox, hudLead = hudLayout(*l.HUD, l.HUDCorner, p.Width, p.Height, dc.MeasureString, scale)
		// On a small frame, shrink the display to at most hudMaxHeight of
		// the height and hudMaxWidth of the width, but not below half size.
		fit := math.Min(hudMaxHeight*float64(p.Height)/(hudBox.y1-hudBox.y0), hudMaxWidth*float64(p.Width)/(hudBox.x1-hudBox.x0))
		if fit < 1 {
			hudScale = scale * math.Max(fit, 0.5)
			if hudFace, err = newFace(fontMon, 11*hudScale); err != nil {
				return err
			}
			dc.SetFontFace(hudFace)
			hudLines, hudBox, hudLead = hudLayout(*l.HUD, l.HUDCorner, p.Width, p.Height, dc.MeasureString, hudScale)
		}
	}

	if l.Graticule.Frame != GraticuleNone {
		drawGraticule(dc, lines, l.Graticule.Frame, scale)
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
		face, err := newFace(fontSans, 11*scale)
		if err != nil {
			return err
		}
		dc.SetFontFace(face)
		placed := placeLabels(targets, dc.MeasureString, p.Width, p.Height, blocked, 4*scale)
		drawLabels(dc, placed, face, scale)
	}
	drawHUD(dc, hudLines, hudBox, hudLead, hudFace, hudScale)

	draw.Draw(img, bnd, over, image.Point{}, draw.Over)
	return nil
}
