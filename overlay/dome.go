package overlay

import (
	"errors"
	"fmt"
	"math"

	"github.com/skyframe/skyframe/camera"
)

// DomeArea is a region of the dome in dome coordinates, degrees: azimuth
// measured from the front (the bottom of a domemaster frame), positive
// toward the right of a viewer at the dome's centre facing the front;
// altitude above the spring line.
type DomeArea struct {
	AzMin, AzMax, AltMin, AltMax float64
}

// Contains reports whether (az, alt) lies in a.
func (a DomeArea) Contains(az, alt float64) bool {
	return az >= a.AzMin && az <= a.AzMax && alt >= a.AltMin && alt <= a.AltMax
}

// FrontSafeArea is the unidirectional "safe action" area of the fulldome
// show-file convention: about ±50° of azimuth from the front centre and
// 10–60° of altitude (Dome Master Show File Format 1.0, sec. II, item 9a,
// Fulldome Standards group, fulldome.org). In a fisheye frame the
// heads-up display is placed inside it.
var FrontSafeArea = DomeArea{AzMin: -50, AzMax: 50, AltMin: 10, AltMax: 60}

// ErrHUDFit reports a heads-up display that cannot fit the front safe area
// of a fisheye frame, even at half its text size.
var ErrHUDFit = errors.New("overlay: the heads-up display does not fit the dome's front safe area")

// DomeAzAlt returns the dome azimuth and altitude, degrees (see DomeArea),
// of the pixel position (x, y) of a Fisheye projection p, taking the image
// centre as the dome's zenith and the angle from it, at the projection's
// scale (equidistant: FOV/2 at the circle's edge), as the zenith distance.
// With the default 180° field the circle's edge is the spring line. The
// tilt of p does not enter: it turns the sky, not the dome. ok is false for
// other kinds.
func DomeAzAlt(p camera.Projection, x, y float64) (az, alt float64, ok bool) {
	cx, cy, r, ok := p.ImageCircle()
	if !ok {
		return 0, 0, false
	}
	dx, dy := x-cx, y-cy
	perDeg := r / (p.FieldOfView() / 2)
	return math.Atan2(dx, dy) * 180 / math.Pi, 90 - math.Hypot(dx, dy)/perDeg, true
}

// domeHUD is a heads-up display box placed in a fisheye frame: b is the
// box centred on the front meridian; the display is drawn in b turned
// about the image centre by rot degrees of azimuth (positive toward the
// viewer's right), so its text stays upright along the dome's local
// vertical. bound is the pixel bounding box of the turned box.
type domeHUD struct {
	b, bound box
	rot      float64
}

// placeDomeHUD places a bw×bh box (pixels) inside area of fisheye p, margin
// pixels inside its edges: bottom corners as low as the area allows (its
// lower corners on the lowest altitude), top corners as high (its upper
// edge on the highest altitude); left and right corners turn it from the
// front meridian toward that side, by its own half-width in azimuth or as
// far as the area allows. ok is false when it does not fit.
func placeDomeHUD(p camera.Projection, area DomeArea, bw, bh float64, c Corner, margin float64) (domeHUD, bool) {
	cx, cy, r, ok := p.ImageCircle()
	if !ok || !(bw > 0 && bh > 0) {
		return domeHUD{}, false
	}
	perDeg := r / (p.FieldOfView() / 2)
	rOut := math.Min(perDeg*(90-area.AltMin), r) - margin // farthest radius
	rIn := perDeg*(90-area.AltMax) + margin               // nearest radius
	hw := bw / 2
	if !(rOut > hw) || rIn < 0 {
		return domeHUD{}, false
	}
	var y0 float64 // top edge, below the centre
	if c == BottomLeft || c == BottomRight {
		y0 = cy + math.Sqrt(rOut*rOut-hw*hw) - bh
	} else {
		y0 = cy + rIn
	}
	y1 := y0 + bh
	// The nearest point of the box to the centre is the middle of its top
	// edge; the farthest are its lower corners.
	if y0-cy < rIn-1e-9 || math.Hypot(hw, y1-cy) > rOut+1e-9 {
		return domeHUD{}, false
	}
	// The widest azimuth is at the upper corners (nearest the centre).
	a := math.Atan2(hw, y0-cy) * 180 / math.Pi
	lo, hi := area.AzMin+a, area.AzMax-a // allowed turns
	if lo > hi {
		return domeHUD{}, false
	}
	rot := 0.0
	switch c {
	case TopLeft, BottomLeft:
		rot = math.Max(-a, lo)
	case TopRight, BottomRight:
		rot = math.Min(a, hi)
	}
	if rot < lo || rot > hi {
		rot = math.Max(lo, math.Min(hi, 0))
	}
	h := domeHUD{b: box{cx - hw, y0, cx + hw, y1}, rot: rot}
	h.bound = box{math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)}
	s, co := math.Sincos(rot * math.Pi / 180)
	for _, q := range [4][2]float64{{h.b.x0, h.b.y0}, {h.b.x1, h.b.y0}, {h.b.x0, h.b.y1}, {h.b.x1, h.b.y1}} {
		// Azimuth grows from +y toward +x: turning by rot maps
		// (dx, dy) to (dx cos + dy sin, −dx sin + dy cos).
		dx, dy := q[0]-cx, q[1]-cy
		x, y := cx+dx*co+dy*s, cy-dx*s+dy*co
		h.bound = box{math.Min(h.bound.x0, x), math.Min(h.bound.y0, y), math.Max(h.bound.x1, x), math.Max(h.bound.y1, y)}
	}
	return h, true
}

// hudFitError describes a display that does not fit.
func hudFitError(p camera.Projection, lines int, bw, bh float64) error {
	return fmt.Errorf("%w (azimuth %+g° to %+g°, altitude %g° to %g°): %d lines need %.0f×%.0f px even at half the text size, in a %d×%d fisheye with a %g° field; use a larger frame, a smaller text size, or no title",
		ErrHUDFit, FrontSafeArea.AzMin, FrontSafeArea.AzMax, FrontSafeArea.AltMin, FrontSafeArea.AltMax, lines, bw, bh, p.Width, p.Height, p.FieldOfView())
}
