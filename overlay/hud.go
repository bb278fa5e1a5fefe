package overlay

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"git.sr.ht/~sbinet/gg"
	"golang.org/x/image/font"

	"github.com/skyframe/skyframe/camera"
)

// Corner places the heads-up display.
type Corner int

const (
	// TopLeft is the zero value.
	TopLeft Corner = iota
	TopRight
	BottomLeft
	BottomRight
)

var cornerNames = [...]string{"top-left", "top-right", "bottom-left", "bottom-right"}

// String returns "top-left", "top-right", "bottom-left" or "bottom-right".
func (c Corner) String() string {
	if c >= 0 && int(c) < len(cornerNames) {
		return cornerNames[c]
	}
	return fmt.Sprintf("Corner(%d)", int(c))
}

// ParseCorner parses the names String returns, or their initials "tl",
// "tr", "bl", "br" (case-insensitive).
func ParseCorner(s string) (Corner, error) {
	s = strings.ToLower(strings.TrimSpace(s))
	for i, n := range cornerNames {
		short := string(n[0]) + string(n[strings.IndexByte(n, '-')+1])
		if s == n || s == short {
			return Corner(i), nil
		}
	}
	return 0, fmt.Errorf("overlay: HUD corner %q: want top-left, top-right, bottom-left or bottom-right", s)
}

// HUDValues are the numbers the heads-up display shows, filled in by the
// caller; NaN leaves a line out (the zero value of a field is shown as 0).
type HUDValues struct {
	// Beta is v/c and Gamma the Lorentz factor.
	Beta, Gamma float64
	// TauYears is the ship's proper time and TYears catalogue time since
	// departure, Julian years.
	TauYears, TYears float64
	// TravelledLy and RemainingLy are catalogue-frame distances, light-years.
	TravelledLy, RemainingLy float64
	// RateHome and RateDest are the received rates of a once-per-second
	// signal from home and from the destination, per second of ship time
	// (the Doppler factor of each source).
	RateHome, RateDest float64
	// Title is shown first when not empty.
	Title string
}

// NoHUDValues returns HUDValues with every number NaN, to be filled in.
func NoHUDValues() HUDValues {
	n := math.NaN()
	return HUDValues{n, n, n, n, n, n, n, n, ""}
}

func hudNum(v float64, digits int) string {
	a := math.Abs(v)
	if a != 0 && (a >= 1e6 || a < 1e-3) {
		return strconv.FormatFloat(v, 'e', digits-1, 64)
	}
	s := strconv.FormatFloat(v, 'g', digits, 64)
	if strings.ContainsAny(s, "e") {
		return strconv.FormatFloat(v, 'f', 0, 64)
	}
	return s
}

// hudBeta shows β with its gap to 1 when β is close to 1 (then from γ,
// 1 − β = 1/(γ²(1+β)), which keeps its digits).
func hudBeta(beta, gamma float64) string {
	if beta < 0.999 || math.IsNaN(gamma) || !(gamma >= 1) {
		return strconv.FormatFloat(beta, 'f', 6, 64) + " c"
	}
	gap := 1 / (gamma * gamma * (1 + beta))
	return "1 − " + strconv.FormatFloat(gap, 'e', 3, 64) + " c"
}

// Lines returns the display lines: label and value pairs, NaN values left
// out, with the title (if any) first as a single entry.
func (v HUDValues) Lines() [][2]string {
	var out [][2]string
	if v.Title != "" {
		out = append(out, [2]string{v.Title, ""})
	}
	add := func(label string, x float64, s string) {
		if !math.IsNaN(x) {
			out = append(out, [2]string{label, s})
		}
	}
	add("speed", v.Beta, hudBeta(v.Beta, v.Gamma))
	add("Lorentz γ", v.Gamma, hudNum(v.Gamma, 5))
	add("ship clock", v.TauYears, hudNum(v.TauYears, 4)+" yr")
	add("home clock", v.TYears, hudNum(v.TYears, 4)+" yr")
	add("covered", v.TravelledLy, hudNum(v.TravelledLy, 4)+" ly")
	add("to go", v.RemainingLy, hudNum(v.RemainingLy, 4)+" ly")
	add("home signal", v.RateHome, "×"+hudNum(v.RateHome, 4))
	add("target signal", v.RateDest, "×"+hudNum(v.RateDest, 4))
	return out
}

// hudLayout returns the text lines (labels padded to one column) and the
// backing box of the display in corner c of a w×h image.
func hudLayout(v HUDValues, c Corner, w, h int, measure func(string) (float64, float64), scale float64) ([]string, box, float64) {
	pairs := v.Lines()
	if len(pairs) == 0 {
		return nil, box{}, 0
	}
	width := 0
	for i, p := range pairs {
		if p[1] != "" || i > 0 || v.Title == "" {
			width = max(width, len([]rune(p[0])))
		}
	}
	lines := make([]string, len(pairs))
	tw, lineH := 0.0, 0.0
	for i, p := range pairs {
		if p[1] == "" && i == 0 && v.Title != "" {
			lines[i] = p[0]
		} else {
			lines[i] = p[0] + strings.Repeat(" ", width-len([]rune(p[0]))+2) + p[1]
		}
		lw, lh := measure(lines[i])
		tw, lineH = math.Max(tw, lw), math.Max(lineH, lh)
	}
	lead := lineH * 1.25
	pad, margin := 6*scale, 8*scale
	bw, bh := tw+2*pad, lead*float64(len(lines))-(lead-lineH)+2*pad
	x0, y0 := margin, margin
	if c == TopRight || c == BottomRight {
		x0 = float64(w) - margin - bw
	}
	if c == BottomLeft || c == BottomRight {
		y0 = float64(h) - margin - bh
	}
	return lines, box{x0, y0, x0 + bw, y0 + bh}, lead
}

// hudPlan is a heads-up display laid out for one frame.
type hudPlan struct {
	lines []string
	b     box // the panel, before turning (fisheye)
	bound box // what the drawn panel covers, for label placement
	lead  float64
	face  font.Face
	scale float64 // overlay points to pixels for this display
	rot   float64 // fisheye: turn about the image centre, degrees of azimuth
	fish  bool
}

// planHUD lays out display v for projection p with text of size points at
// overlay scale scale. Flat frames: in corner c, shrunk on small frames to
// at most hudMaxHeight of the height and hudMaxWidth of the width (down to
// half size). Fisheye frames: in the front safe area (placeDomeHUD), shrunk
// until it fits, down to half size; below that, an error wrapping
// ErrHUDFit. setFace selects the face that measure uses.
func planHUD(p camera.Projection, v HUDValues, c Corner, size, scale float64, measure func(string) (float64, float64), setFace func(font.Face)) (*hudPlan, error) {
	layout := func(hs float64) (*hudPlan, error) {
		face, err := newFace(fontMon, DefaultTextSize*hs)
		if err != nil {
			return nil, err
		}
		setFace(face)
		lines, b, lead := hudLayout(v, c, p.Width, p.Height, measure, hs)
		return &hudPlan{lines: lines, b: b, bound: b, lead: lead, face: face, scale: hs}, nil
	}
	hs := size / DefaultTextSize * scale
	if _, _, _, fish := p.ImageCircle(); fish {
		var last *hudPlan
		for k := 0; k <= 10; k++ {
			h, err := layout(hs * (1 - 0.05*float64(k)))
			if err != nil {
				return nil, err
			}
			if len(h.lines) == 0 {
				return h, nil
			}
			last = h
			d, ok := placeDomeHUD(p, FrontSafeArea, h.b.x1-h.b.x0, h.b.y1-h.b.y0, c, 2*h.scale)
			if ok {
				h.b, h.bound, h.rot, h.fish = d.b, d.bound, d.rot, true
				return h, nil
			}
		}
		return nil, hudFitError(p, len(last.lines), last.b.x1-last.b.x0, last.b.y1-last.b.y0)
	}
	h, err := layout(hs)
	if err != nil || len(h.lines) == 0 {
		return h, err
	}
	fit := math.Min(hudMaxHeight*float64(p.Height)/(h.b.y1-h.b.y0), hudMaxWidth*float64(p.Width)/(h.b.x1-h.b.x0))
	if fit < 1 {
		return layout(hs * math.Max(fit, 0.5))
	}
	return h, nil
}

// CheckHUDFit reports, before anything is rendered, whether display v
// with text of size points (0: DefaultTextSize) fits projection p: an
// error wrapping ErrHUDFit when a fisheye frame has no room for it in the
// front safe area, nil otherwise (flat frames always make room).
func CheckHUDFit(p camera.Projection, v HUDValues, c Corner, size float64) error {
	if err := (Options{HUD: &v, HUDCorner: c, TextSize: size}).Validate(); err != nil {
		return err
	}
	if err := p.Prepare(); err != nil {
		return err
	}
	if err := loadFonts(); err != nil {
		return err
	}
	if size == 0 {
		size = DefaultTextSize
	}
	var face font.Face
	measure := func(s string) (float64, float64) {
		return float64(font.MeasureString(face, s)) / 64, float64(face.Metrics().Height) / 64
	}
	_, err := planHUD(p, v, c, size, overlayScale(p.Width, p.Height), measure, func(f font.Face) { face = f })
	return err
}

// draw draws the planned display; in a fisheye frame turned about the
// image centre by its azimuth, so its text stays upright along the dome's
// local vertical.
func (h *hudPlan) draw(dc *gg.Context, p camera.Projection) {
	if len(h.lines) == 0 {
		return
	}
	if h.fish && h.rot != 0 {
		cx, cy, _, _ := p.ImageCircle()
		dc.Push()
		defer dc.Pop()
		dc.RotateAbout(-h.rot*math.Pi/180, cx, cy)
	}
	drawHUD(dc, h.lines, h.b, h.lead, h.face, h.scale)
}

// drawHUD draws the display on a translucent dark panel, the text with a
// dark halo.
func drawHUD(dc *gg.Context, lines []string, b box, lead float64, face font.Face, scale float64) {
	if len(lines) == 0 {
		return
	}
	dc.SetRGBA(0.04, 0.05, 0.09, 0.62)
	dc.DrawRoundedRectangle(b.x0, b.y0, b.x1-b.x0, b.y1-b.y0, 4*scale)
	dc.Fill()
	dc.SetRGBA(0.55, 0.62, 0.75, 0.5)
	dc.SetLineWidth(1 * scale)
	dc.DrawRoundedRectangle(b.x0+0.5, b.y0+0.5, b.x1-b.x0-1, b.y1-b.y0-1, 4*scale)
	dc.Stroke()
	dc.SetFontFace(face)
	asc := float64(face.Metrics().Ascent.Round())
	pad := 6 * scale
	for i, l := range lines {
		x, y := b.x0+pad, b.y0+pad+asc+float64(i)*lead
		drawHalo(dc, l, x, y, scale)
		dc.SetRGBA(0.90, 0.93, 0.97, 0.97)
		dc.DrawString(l, x, y)
	}
}
