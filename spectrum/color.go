package spectrum

import (
	"fmt"
	"math"
	"strings"
	"sync"

	"github.com/lucasb-eyer/go-colorful"
)

// WhitePoint is the white the viewer is adapted to: a source of that
// chromaticity is rendered neutral (R = G = B). The zero value is D65, the
// sRGB white, which needs no adaptation; the others are brought to D65 by
// the Bradford chromatic-adaptation transform (Lam 1985; matrix as
// commonly published, e.g. in ICC.1 Annex E), a von Kries scaling in a
// sharpened cone space that keeps the white's luminance.
type WhitePoint int

const (
	// WhiteD65 is CIE illuminant D65, (x, y) = (0.3127, 0.3290)
	// (IEC 61966-2-1): no adaptation.
	WhiteD65 WhitePoint = iota
	// WhiteE is the equal-energy white, (1/3, 1/3).
	WhiteE
	// WhiteD50 is CIE illuminant D50, (0.3457, 0.3585) (ICC profile
	// connection space).
	WhiteD50
	// WhiteSun is a 5772 K Planckian radiator (the IAU 2015 nominal solar
	// temperature), (x, y) ≈ (0.3266, 0.3358): the Sun looks white.
	WhiteSun
	numWhite
)

var whiteNames = [numWhite]string{"d65", "e", "d50", "sun"}

// String returns "d65", "e", "d50" or "sun".
func (w WhitePoint) String() string {
	if w >= 0 && w < numWhite {
		return whiteNames[w]
	}
	return fmt.Sprintf("WhitePoint(%d)", int(w))
}

// ParseWhitePoint parses the names String returns (case-insensitive).
func ParseWhitePoint(s string) (WhitePoint, error) {
	t := strings.ToLower(strings.TrimSpace(s))
	if t == "" {
		return WhiteD65, nil
	}
	for i, n := range whiteNames {
		if t == n {
			return WhitePoint(i), nil
		}
	}
	return 0, fmt.Errorf("spectrum: unknown white point %q (want d65, e, d50 or sun)", s)
}

// MarshalText implements encoding.TextMarshaler.
func (w WhitePoint) MarshalText() ([]byte, error) {
	if w < 0 || w >= numWhite {
		return nil, fmt.Errorf("spectrum: invalid white point %d", int(w))
	}
	return []byte(w.String()), nil
}

// UnmarshalText implements encoding.TextUnmarshaler via ParseWhitePoint.
func (w *WhitePoint) UnmarshalText(text []byte) error {
	v, err := ParseWhitePoint(string(text))
	if err != nil {
		return err
	}
	*w = v
	return nil
}

// Chromaticity returns the white's CIE 1931 (x, y); NaN for invalid values.
func (w WhitePoint) Chromaticity() (x, y float64) {
	switch w {
	case WhiteD65:
		return 0.3127, 0.3290
	case WhiteE:
		return 1.0 / 3, 1.0 / 3
	case WhiteD50:
		return 0.3457, 0.3585
	case WhiteSun:
		return Chromaticity(5772)
	}
	return math.NaN(), math.NaN()
}

// ColorOptions configures the conversion to sRGB. The zero value is D65.
type ColorOptions struct {
	White WhitePoint
}

type mat3 [3][3]float64

func (m *mat3) apply(x, y, z float64) (float64, float64, float64) {
	return m[0][0]*x + m[0][1]*y + m[0][2]*z,
		m[1][0]*x + m[1][1]*y + m[1][2]*z,
		m[2][0]*x + m[2][1]*y + m[2][2]*z
}

func (m *mat3) mul(n *mat3) (p mat3) {
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			for k := 0; k < 3; k++ {
				p[i][j] += m[i][k] * n[k][j]
			}
		}
	}
	return p
}

func (m *mat3) inverse() (inv mat3) {
	a := m
	det := a[0][0]*(a[1][1]*a[2][2]-a[1][2]*a[2][1]) -
		a[0][1]*(a[1][0]*a[2][2]-a[1][2]*a[2][0]) +
		a[0][2]*(a[1][0]*a[2][1]-a[1][1]*a[2][0])
	for i := 0; i < 3; i++ {
		for j := 0; j < 3; j++ {
			// cofactor of a[j][i]
			r0, r1 := (j+1)%3, (j+2)%3
			c0, c1 := (i+1)%3, (i+2)%3
			inv[i][j] = (a[r0][c0]*a[r1][c1] - a[r0][c1]*a[r1][c0]) / det
		}
	}
	return inv
}

// bradford is the Bradford cone-response matrix [Lam 1985].
var bradford = mat3{
	{0.8951, 0.2664, -0.1614},
	{-0.7502, 1.7135, 0.0367},
	{0.0389, -0.0685, 1.0296},
}

var (
	colorOnce sync.Once
	xyzToRGB  [numWhite]mat3
	srgbM     mat3 // XYZ → linear sRGB, IEC 61966-2-1 (via go-colorful)
)

// srgbMatrix reads go-colorful's XYZ → linear sRGB matrix (derived from
// the IEC 61966-2-1 primaries and D65 white) column by column.
func srgbMatrix() (m mat3) {
	for j := 0; j < 3; j++ {
		var v [3]float64
		v[j] = 1
		r, g, b := colorful.XyzToLinearRgb(v[0], v[1], v[2])
		m[0][j], m[1][j], m[2][j] = r, g, b
	}
	return m
}

func buildColor() {
	srgbM = srgbMatrix()
	// Destination white: the XYZ that the matrix maps to (1, 1, 1).
	dx, dy, dz := colorful.LinearRgbToXyz(1, 1, 1)
	bInv := bradford.inverse()
	dr, dg, db := bradford.apply(dx, dy, dz)
	for w := WhitePoint(0); w < numWhite; w++ {
		if w == WhiteD65 {
			xyzToRGB[w] = srgbM
			continue
		}
		x, y := w.Chromaticity()
		sr, sg, sb := bradford.apply(x/y, 1, (1-x-y)/y)
		d := mat3{{dr / sr}, {0, dg / sg}, {0, 0, db / sb}}
		a := d.mul(&bradford)
		a = bInv.mul(&a)
		xyzToRGB[w] = srgbM.mul(&a)
	}
}

// XYZToLinearSRGB converts CIE 1931 XYZ to linear sRGB with the
// IEC 61966-2-1 matrix, after Bradford adaptation from opt.White to D65
// when opt.White is not D65. The scale is kept: Y = 1 white gives
// (1, 1, 1). Channels may be negative (out of gamut, see GamutMap) or
// above 1 (tone mapping's job). An invalid White gives NaN.
func XYZToLinearSRGB(X, Y, Z float64, opt ColorOptions) (r, g, b float64) {
	colorOnce.Do(buildColor)
	if opt.White < 0 || opt.White >= numWhite {
		nan := math.NaN()
		return nan, nan, nan
	}
	return xyzToRGB[opt.White].apply(X, Y, Z)
}

// LinearSRGBToXYZ is the inverse of XYZToLinearSRGB for the D65 white.
func LinearSRGBToXYZ(r, g, b float64) (X, Y, Z float64) {
	return colorful.LinearRgbToXyz(r, g, b)
}

// Luminance weights of linear sRGB: the Y row of the IEC 61966-2-1
// RGB → XYZ matrix (0.2126, 0.7152, 0.0722 to four places).
const (
	LumR = 0.21263900587151036
	LumG = 0.71516867876775593
	LumB = 0.072192315360733715
)

// Luminance returns Y = LumR·r + LumG·g + LumB·b of a linear sRGB colour.
func Luminance(r, g, b float64) float64 { return LumR*r + LumG*g + LumB*b }

// GamutMap brings a linear sRGB colour with negative channels into
// [0, ∞)³ by desaturating it toward the white of luminance Y, (Y, Y, Y):
// the result is (Y, Y, Y) + s·(c − Luminance(c)·(1, 1, 1)) with the largest
// s ∈ [0, 1] that leaves no channel negative. It therefore has luminance Y
// exactly, keeps the hue (its chromaticity lies on the line from the white
// through the original's), and returns an in-gamut colour unchanged when Y
// is its luminance. Y is normally the Y of the XYZ the colour came from.
// Channels above 1 are left alone (fitting luminance is tone mapping's
// job). Y ≤ 0 gives black.
func GamutMap(r, g, b float64, Y float64) (float64, float64, float64) {
	if !(Y > 0) {
		if math.IsNaN(Y) {
			return Y, Y, Y
		}
		return 0, 0, 0
	}
	l := Luminance(r, g, b)
	dr, dg, db := r-l, g-l, b-l
	// Y > 0 and Y + d < 0 make Y/−d a number in (0, 1): a plain
	// comparison is math.Min here, and cheaper (it is not inlined).
	s := 1.0
	if dr < 0 && Y+dr < 0 {
		s = min(s, Y/-dr)
	}
	if dg < 0 && Y+dg < 0 {
		s = min(s, Y/-dg)
	}
	if db < 0 && Y+db < 0 {
		s = min(s, Y/-db)
	}
	r, g, b = Y+s*dr, Y+s*dg, Y+s*db
	// Rounding can leave −1e-17; the target is exactly zero there.
	return clampZero(r), clampZero(g), clampZero(b)
}

// clampZero is math.Max(v, 0) inlined: NaN stays NaN, −0 and negatives
// become +0.
func clampZero(v float64) float64 {
	if v <= 0 {
		return 0
	}
	return v
}

// EncodeSRGB applies the IEC 61966-2-1 transfer function to a linear
// value: 12.92·v for v ≤ 0.0031308, else 1.055·v^(1/2.4) − 0.055. Values
// above 1 follow the same curve; negatives stay on the linear segment.
func EncodeSRGB(v float64) float64 {
	if v <= 0.0031308 {
		return 12.92 * v
	}
	return 1.055*math.Pow(v, 1/2.4) - 0.055
}

// DecodeSRGB is the inverse of EncodeSRGB: v/12.92 for v ≤ 0.04045, else
// ((v + 0.055)/1.055)^2.4.
func DecodeSRGB(v float64) float64 {
	if v <= 0.04045 {
		return v / 12.92
	}
	return math.Pow((v+0.055)/1.055, 2.4)
}
