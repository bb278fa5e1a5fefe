package spectrum

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/lucasb-eyer/go-colorful"
	"gonum.org/v1/gonum/floats/scalar"
	"pgregory.net/rapid"
)

func TestD65White(t *testing.T) {
	// IEC 61966-2-1: D65 (0.3127, 0.3290) at Y = 1 is RGB (1, 1, 1) [pub].
	x, y := 0.3127, 0.3290
	r, g, b := XYZToLinearSRGB(x/y, 1, (1-x-y)/y, ColorOptions{})
	for i, v := range []float64{r, g, b} {
		if !scalar.EqualWithinAbs(v, 1, 1e-4) {
			t.Errorf("channel %d: have %.6f, want 1", i, v)
		}
	}
}

func TestIECMatrix(t *testing.T) {
	// IEC 61966-2-1:1999 RGB → XYZ matrix, four decimals [pub, from memory].
	want := [3][3]float64{
		{0.4124, 0.3576, 0.1805},
		{0.2126, 0.7152, 0.0722},
		{0.0193, 0.1192, 0.9505},
	}
	for j := 0; j < 3; j++ {
		var v [3]float64
		v[j] = 1
		X, Y, Z := LinearSRGBToXYZ(v[0], v[1], v[2])
		for i, have := range []float64{X, Y, Z} {
			if !scalar.EqualWithinAbs(have, want[i][j], 1e-4) {
				t.Errorf("M[%d][%d] have %.6f, want %.4f", i, j, have, want[i][j])
			}
		}
	}
	// The XYZ → RGB direction is the inverse; the standard's own four-digit
	// inverse (3.2406, −1.5372, −0.4986; …) [pub, from memory] differs
	// from the exact inverse by up to 4e-4 through rounding.
	wantInv := [3][3]float64{
		{3.2406, -1.5372, -0.4986},
		{-0.9689, 1.8758, 0.0415},
		{0.0557, -0.2040, 1.0570},
	}
	for j := 0; j < 3; j++ {
		var v [3]float64
		v[j] = 1
		r, g, b := XYZToLinearSRGB(v[0], v[1], v[2], ColorOptions{})
		for i, have := range []float64{r, g, b} {
			if !scalar.EqualWithinAbs(have, wantInv[i][j], 5e-4) {
				t.Errorf("M⁻¹[%d][%d] have %.6f, want %.4f", i, j, have, wantInv[i][j])
			}
		}
	}
}

func TestTransferCurve(t *testing.T) {
	// IEC 61966-2-1 transfer function [pub]: break point 0.0031308 ↔
	// 0.04045, 1 ↔ 1, 0 ↔ 0; 0.5 → 0.735357 [cp].
	for _, c := range []struct{ lin, enc, tol float64 }{
		{0, 0, 0}, {0.0031308, 0.04045, 1e-6}, {1, 1, 1e-12}, {0.5, 0.735357, 1e-6}, {0.001, 0.01292, 1e-12},
	} {
		if have := EncodeSRGB(c.lin); !scalar.EqualWithinAbs(have, c.enc, c.tol) {
			t.Errorf("EncodeSRGB(%g) have %.7f, want %g", c.lin, have, c.enc)
		}
	}
	for v := 0.0; v <= 1.5; v += 0.01 {
		if have := DecodeSRGB(EncodeSRGB(v)); !scalar.EqualWithinAbs(have, v, 1e-12) {
			t.Errorf("round trip %g → %g", v, have)
		}
		// Same curve as go-colorful's.
		if have, want := EncodeSRGB(v), colorful.LinearRgb(v, 0, 0).R; v <= 1 && !scalar.EqualWithinAbs(have, want, 1e-12) {
			t.Errorf("EncodeSRGB(%g) = %g, colorful %g", v, have, want)
		}
	}
}

func TestWhitePointsNeutral(t *testing.T) {
	// A source with the adopted white's chromaticity renders neutral
	// (Bradford adaptation, [pub] Lam 1985 / ICC.1 Annex E).
	for w := WhitePoint(0); w < numWhite; w++ {
		x, y := w.Chromaticity()
		r, g, b := XYZToLinearSRGB(x/y, 1, (1-x-y)/y, ColorOptions{White: w})
		if !scalar.EqualWithinAbs(r, g, 1e-4) || !scalar.EqualWithinAbs(g, b, 1e-4) || !scalar.EqualWithinAbs(Luminance(r, g, b), 1, 1e-3) {
			t.Errorf("%v: white → (%.5f %.5f %.5f)", w, r, g, b)
		}
		p, err := ParseWhitePoint(w.String())
		if err != nil || p != w {
			t.Errorf("ParseWhitePoint(%q) = %v, %v", w.String(), p, err)
		}
	}
	if r, _, _ := XYZToLinearSRGB(1, 1, 1, ColorOptions{White: 42}); !math.IsNaN(r) {
		t.Error("invalid white: want NaN")
	}
	if _, err := ParseWhitePoint("d66"); err == nil {
		t.Error("ParseWhitePoint(d66): no error")
	}
}

func chromaAngle(r, g, b float64) float64 {
	X, Y, Z := LinearSRGBToXYZ(r, g, b)
	s := X + Y + Z
	return math.Atan2(Y/s-0.3290, X/s-0.3127)
}

func TestGamutMap(t *testing.T) {
	rapid.Check(t, func(rt *rapid.T) {
		// Spectral-locus-like colours: chromaticity anywhere in the
		// Planckian range or far outside sRGB.
		T := math.Exp(rapid.Float64Range(math.Log(500), math.Log(1e6)).Draw(rt, "T"))
		x, y := Chromaticity(T)
		dx := rapid.Float64Range(-0.1, 0.1).Draw(rt, "dx")
		dy := rapid.Float64Range(-0.1, 0.1).Draw(rt, "dy")
		x, y = x+dx, y+dy
		Y := math.Exp(rapid.Float64Range(-20, 5).Draw(rt, "lnY"))
		r, g, b := XYZToLinearSRGB(x/y*Y, Y, (1-x-y)/y*Y, ColorOptions{})
		mr, mg, mb := GamutMap(r, g, b, Y)
		if mr < 0 || mg < 0 || mb < 0 {
			rt.Fatalf("negative channel (%g %g %g)", mr, mg, mb)
		}
		if l := Luminance(mr, mg, mb); !scalar.EqualWithinRel(l, Y, 1e-9) {
			rt.Fatalf("luminance %g, want %g", l, Y)
		}
		if r >= 0 && g >= 0 && b >= 0 {
			if !scalar.EqualWithinRel(mr, r, 1e-9) || !scalar.EqualWithinRel(mg, g, 1e-9) || !scalar.EqualWithinRel(mb, b, 1e-9) {
				rt.Fatalf("in-gamut colour changed (%g %g %g) → (%g %g %g)", r, g, b, mr, mg, mb)
			}
			return
		}
		if math.Abs(mr-mg)+math.Abs(mg-mb) < 1e-9*Y {
			return // mapped to white: no hue left to compare
		}
		a0, a1 := chromaAngle(r, g, b), chromaAngle(mr, mg, mb)
		if d := math.Remainder(a1-a0, 2*math.Pi); math.Abs(d) > 1e-6 {
			rt.Fatalf("hue angle %g → %g", a0, a1)
		}
	})
	if r, g, b := GamutMap(-1, 2, 3, 0); r != 0 || g != 0 || b != 0 {
		t.Errorf("Y=0: (%g %g %g), want black", r, g, b)
	}
}

// TestGamutMapMatchesMathMinMax: GamutMap with plain comparisons gives
// the bits of the same steps written with math.Min and math.Max (their
// IEEE 754 definitions [cp]) on random colours, negatives, ±0, NaN and
// infinities (any NaN for a NaN).
func TestGamutMapMatchesMathMinMax(t *testing.T) {
	ref := func(r, g, b, Y float64) (float64, float64, float64) {
		if !(Y > 0) {
			if math.IsNaN(Y) {
				return Y, Y, Y
			}
			return 0, 0, 0
		}
		l := Luminance(r, g, b)
		dr, dg, db := r-l, g-l, b-l
		s := 1.0
		if dr < 0 && Y+dr < 0 {
			s = math.Min(s, Y/-dr)
		}
		if dg < 0 && Y+dg < 0 {
			s = math.Min(s, Y/-dg)
		}
		if db < 0 && Y+db < 0 {
			s = math.Min(s, Y/-db)
		}
		return math.Max(Y+s*dr, 0), math.Max(Y+s*dg, 0), math.Max(Y+s*db, 0)
	}
	special := []float64{0, math.Copysign(0, -1), 1, -1, 1e-17, -1e-17, math.NaN(), math.Inf(1), math.Inf(-1)}
	rng := rand.New(rand.NewPCG(5, 6))
	pick := func() float64 {
		if rng.IntN(4) == 0 {
			return special[rng.IntN(len(special))]
		}
		return 4*rng.Float64() - 1
	}
	for i := 0; i < 200_000; i++ {
		r, g, b, Y := pick(), pick(), pick(), pick()
		h0, h1, h2 := GamutMap(r, g, b, Y)
		w0, w1, w2 := ref(r, g, b, Y)
		same := func(a, b float64) bool { // NaN payloads may differ
			return math.Float64bits(a) == math.Float64bits(b) || math.IsNaN(a) && math.IsNaN(b)
		}
		if !same(h0, w0) || !same(h1, w1) || !same(h2, w2) {
			t.Fatalf("GamutMap(%v, %v, %v, %v) = %v %v %v, want %v %v %v", r, g, b, Y, h0, h1, h2, w0, w1, w2)
		}
	}
}
