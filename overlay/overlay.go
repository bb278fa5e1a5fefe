package overlay

import (
	"errors"
	"fmt"
	"image"
	"image/draw"
	"math"

	"git.sr.ht/~sbinet/gg"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
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
	// HUD, when not nil, is shown in HUDCorner. In a fisheye frame it
	// goes into the front safe area instead (FrontSafeArea): bottom
	// corners low, top corners high on the dome, left and right turned
	// from the front meridian toward that side.
	HUD       *HUDValues
	HUDCorner Corner
	// TextSize is the size of label and HUD text in overlay points (see
	// the package doc); 0 means DefaultTextSize. At most MaxTextSize.
	TextSize float64
}

// DefaultTextSize is the label and HUD text size, in overlay points, when
// Options.TextSize is 0; MaxTextSize is the largest accepted.
const (
	DefaultTextSize = 11.0
	MaxTextSize     = 200.0
)

func (l Options) textSize() float64 {
	if l.TextSize == 0 {
		return DefaultTextSize
	}
	return l.TextSize
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
	if !(l.TextSize >= 0 && l.TextSize <= MaxTextSize) {
		return fmt.Errorf("%w: text size %g, want 0 < size ≤ %g points (0 for %g)", ErrOverlay, l.TextSize, MaxTextSize, DefaultTextSize)
	}
	return nil
}

// Any reports whether l selects any overlay.
func (l Options) Any() bool { return l.overlays() }

// overlays reports whether any overlay layer is selected.
func (l Options) overlays() bool {
	return l.Graticule.Frame != GraticuleNone || l.UnityCircle || l.Markers.Motion || l.Markers.Destination != nil ||
		l.Lattice.PerSide > 0 || l.Labels.Brightest > 0 || len(l.Labels.Stars) > 0 || l.HUD != nil
}

// Draw draws the overlays of l (see Options for the order) onto img, the
// tone-mapped frame f (same size as f's projection), seen by
// f.Options.Observer through f.Options.Projection: it composites Layer over
// img. stars is the star list f was rendered from; it is needed only to
// look up Labels.Stars. Nothing is drawn when l selects no overlay. Bad
// options, unknown label names and a HUD that does not fit (ErrHUDFit) are
// errors, and then img is left unchanged.
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
	bnd := img.Bounds()
	if p := f.Options.Projection; bnd.Dx() != p.Width || bnd.Dy() != p.Height {
		return fmt.Errorf("%w: image %d×%d, projection %d×%d", ErrOverlay, bnd.Dx(), bnd.Dy(), p.Width, p.Height)
	}
	over, err := Layer(f, stars, l)
	if err != nil {
		return err
	}
	draw.Draw(img, bnd, over, image.Point{}, draw.Over)
	return nil
}

// Layer returns the overlays of l for frame f alone, on a transparent
// image of the frame's size: alpha-premultiplied RGBA whose colours are
// sRGB-encoded like the frame's PNG, ready to be composited "over" it
// (Porter–Duff) — as Draw does — or written as a separate layer. In a
// fisheye frame nothing is drawn outside the image circle (its rim is
// anti-aliased as render.CircleCoverage describes). When l selects no
// overlay the image is fully transparent. Errors are those of Draw.
func Layer(f *render.Frame, stars *catalog.Stars, l Options) (*image.RGBA, error) {
	if err := l.Validate(); err != nil {
		return nil, err
	}
	if f == nil {
		return nil, fmt.Errorf("%w: nil frame", ErrOverlay)
	}
	p := f.Options.Projection
	if err := p.Prepare(); err != nil {
		return nil, err
	}
	over := image.NewRGBA(image.Rect(0, 0, p.Width, p.Height))
	if !l.overlays() {
		return over, nil
	}
	obs := f.Options.Observer
	// Compute everything that can fail before drawing.
	lines, err := GraticuleLines(p, obs.Boost, l.Graticule)
	if err != nil {
		return nil, err
	}
	var unity []Polyline
	if l.UnityCircle {
		if unity, err = UnityCircle(p, obs.Boost); err != nil {
			return nil, err
		}
	}
	beacons, err := LatticeBeacons(p, obs, l.Lattice)
	if err != nil {
		return nil, err
	}
	targets, err := labelTargets(f, stars, l.Labels)
	if err != nil {
		return nil, err
	}
	if err := loadFonts(); err != nil {
		return nil, err
	}
	scale := overlayScale(p.Width, p.Height)
	dc := gg.NewContextForRGBA(over)
	var hud *hudPlan
	if l.HUD != nil {
		if hud, err = planHUD(p, *l.HUD, l.HUDCorner, l.textSize(), scale, dc.MeasureString, dc.SetFontFace); err != nil {
			return nil, err
		}
	}

	var blocked []box
	if hud != nil && len(hud.lines) > 0 {
		blocked = append(blocked, hud.bound)
	}
	var marks []mark
	if l.Markers.Motion && obs.Boost.Beta() > 0 {
		if x, y, ok := projectVisible(&p, obs.Boost.Dir()); ok {
			marks = append(marks, mark{x, y, true})
			blocked = append(blocked, box{x - 11*scale, y - 11*scale, x + 11*scale, y + 11*scale})
		}
	}
	if d := l.Markers.Destination; d != nil && r3.Norm(*d) > 0 {
		n, _ := obs.Boost.Apply(r3.Unit(*d))
		if x, y, ok := projectVisible(&p, n); ok {
			marks = append(marks, mark{x, y, false})
			blocked = append(blocked, box{x - 7*scale, y - 7*scale, x + 7*scale, y + 7*scale})
		}
	}
	drawSky(dc, p, sky{lines: lines, frame: l.Graticule.Frame, unity: unity, beacons: beacons, spacing: l.Lattice.Spacing, marks: marks}, scale)
	if len(targets) > 0 {
		ts := l.textSize() / DefaultTextSize * scale
		face, err := newFace(fontSans, DefaultTextSize*ts)
		if err != nil {
			return nil, err
		}
		dc.SetFontFace(face)
		placed := placeLabels(targets, dc.MeasureString, labelRoom(p, 2*scale), blocked, 4*ts)
		drawLabels(dc, placed, face, ts)
	}
	if hud != nil {
		hud.draw(dc, p)
	}
	if cx, cy, r, ok := p.ImageCircle(); ok {
		clipCircle(over, cx, cy, r)
	}
	return over, nil
}

// mark is a direction marker at pixel (x, y): the motion ring or the
// destination diamond.
type mark struct {
	x, y   float64
	motion bool
}

// sky holds the overlays attached to the sky.
type sky struct {
	lines   []Polyline
	frame   GraticuleFrame
	unity   []Polyline
	beacons []Beacon
	spacing float64
	marks   []mark
}

// drawSky draws the graticule, the D = 1 circle, the beacons and the
// markers. In a cube strip each is drawn clipped to the face it lies in,
// so strokes and symbols never bleed into the neighbouring face.
func drawSky(dc *gg.Context, p camera.Projection, s sky, scale float64) {
	eachFace(dc, p, func(in func(x float64) bool) {
		if s.frame != GraticuleNone {
			drawGraticule(dc, onFace(s.lines, in), s.frame, scale)
		}
		strokeLines(dc, onFace(s.unity, in), styleUnity, scale)
		var bs []Beacon
		for _, b := range s.beacons {
			if in(b.X) {
				bs = append(bs, b)
			}
		}
		drawBeacons(dc, bs, s.spacing, scale)
		for _, m := range s.marks {
			switch {
			case !in(m.x):
			case m.motion:
				drawMotionMarker(dc, m.x, m.y, scale)
			default:
				drawDestinationMarker(dc, m.x, m.y, scale)
			}
		}
	})
}

// eachFace calls draw once per face of a cube strip, with drawing clipped
// to that face and in reporting whether an x coordinate lies on it; for
// other projections once, unclipped, with in always true.
func eachFace(dc *gg.Context, p camera.Projection, draw func(in func(x float64) bool)) {
	if p.Kind != camera.Cube {
		draw(func(float64) bool { return true })
		return
	}
	f := float64(p.Height)
	for k := 0; k < 6; k++ {
		x0 := float64(k) * f
		dc.DrawRectangle(x0, 0, f, f)
		dc.Clip()
		draw(func(x float64) bool { return cubeFace(x, f) == k })
		dc.ResetClip()
	}
}

// cubeFace is the face (0–5) of a cube strip with faces f pixels wide
// that holds the x coordinate.
func cubeFace(x, f float64) int {
	return max(0, min(5, int(math.Floor(x/f))))
}

// onFace returns the polylines whose middle vertex passes in (a polyline
// never crosses a face edge, the projection being discontinuous there,
// but it may end on one).
func onFace(lines []Polyline, in func(x float64) bool) []Polyline {
	var out []Polyline
	for _, l := range lines {
		if len(l.Points) > 0 && in(l.Points[len(l.Points)/2].X) {
			out = append(out, l)
		}
	}
	return out
}

// labelRoom returns the test a label box for a star at (sx, sy) must
// pass: inside the frame; for a fisheye inside the image circle with
// margin pixels to spare; for a cube strip on the star's own face.
func labelRoom(p camera.Projection, margin float64) func(b box, sx, sy float64) bool {
	w, h := float64(p.Width), float64(p.Height)
	cx, cy, r, fish := p.ImageCircle()
	return func(b box, sx, sy float64) bool {
		if b.x0 < 0 || b.y0 < 0 || b.x1 > w || b.y1 > h {
			return false
		}
		if p.Kind == camera.Cube {
			f := float64(p.Height)
			k := cubeFace(sx, f)
			return b.x0 >= float64(k)*f+margin && b.x1 <= float64(k+1)*f-margin
		}
		if !fish {
			return true
		}
		for _, q := range [4][2]float64{{b.x0, b.y0}, {b.x1, b.y0}, {b.x0, b.y1}, {b.x1, b.y1}} {
			if math.Hypot(q[0]-cx, q[1]-cy) > r-margin {
				return false
			}
		}
		return true
	}
}

// clipCircle scales every pixel of the premultiplied layer by its coverage
// by the image circle, so nothing is left outside it.
func clipCircle(img *image.RGBA, cx, cy, r float64) {
	b := img.Rect
	for j := 0; j < b.Dy(); j++ {
		row := img.Pix[j*img.Stride : j*img.Stride+4*b.Dx()]
		for i := 0; i < b.Dx(); i++ {
			px := row[4*i : 4*i+4 : 4*i+4]
			if px[3] == 0 {
				continue
			}
			c := render.CircleCoverage(cx, cy, r, i, j)
			if c >= 1 {
				continue
			}
			for k := range px {
				px[k] = uint8(float64(px[k])*c + 0.5)
			}
		}
	}
}

// Straight converts a premultiplied layer (as Layer returns) to straight
// (non-premultiplied) alpha, as PNG stores it (W3C PNG Specification,
// Second Edition, §12.4: PNG alpha is not premultiplied). Each colour is
// rounded from c·255/α; fully transparent pixels become (0, 0, 0, 0).
func Straight(src *image.RGBA) *image.NRGBA {
	b := src.Rect
	dst := image.NewNRGBA(b)
	for j := 0; j < b.Dy(); j++ {
		s := src.Pix[j*src.Stride : j*src.Stride+4*b.Dx()]
		d := dst.Pix[j*dst.Stride : j*dst.Stride+4*b.Dx()]
		for i := 0; i < len(s); i += 4 {
			a := uint32(s[i+3])
			switch a {
			case 0:
			case 255:
				copy(d[i:i+4], s[i:i+4])
			default:
				for k := 0; k < 3; k++ {
					d[i+k] = uint8(min(255, (uint32(s[i+k])*255+a/2)/a))
				}
				d[i+3] = uint8(a)
			}
		}
	}
	return dst
}
