package overlay

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"git.sr.ht/~sbinet/gg"
	"golang.org/x/image/font"
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

// drawHUD draws the display on a translucent dark panel.
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
		dc.SetRGBA(0.90, 0.93, 0.97, 0.97)
		dc.DrawString(l, b.x0+pad, b.y0+pad+asc+float64(i)*lead)
	}
}
