package render

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"pgregory.net/rapid"
)

// Splat as properties over random widths, positions, colours and buffer
// sizes (TestSplatConservesFlux checks a fixed table of widths):
//   - energy conservation [cp: the PSF window holds all the flux, its tails folded into the edge pixels]:
//     a star whose support lies inside the buffer deposits exactly its flux
//     in each channel (float32 accumulation: relative 1e-4, as in
//     TestSplatConservesFlux);
//   - anywhere else, including far outside, the deposit is finite,
//     non-negative and at most the flux (light outside is lost, never made);
//   - additivity: two stars deposit the sum of what each deposits alone;
//   - the Doppler channel of every lit pixel lies between the stars' D
//     [cp: a luminance-weighted mean lies within the range of its terms].
func TestSplatProperties(t *testing.T) {
	rapid.Check(t, func(rt *rapid.T) {
		fwhm := rapid.Float64Range(0.05, MaxFWHM).Draw(rt, "fwhm")
		p, err := NewPSF(fwhm)
		if err != nil {
			rt.Fatal(err)
		}
		margin := int(math.Ceil(p.Radius())) + 2
		w := 2*margin + rapid.IntRange(1, 40).Draw(rt, "extra w")
		h := 2*margin + rapid.IntRange(1, 40).Draw(rt, "extra h")
		var rgb [3]float64
		for c := range rgb {
			// Zero or 1e-12 … 10 of full scale: stars are culled long before
			// their flux nears float32's underflow.
			if rapid.IntRange(0, 5).Draw(rt, "dark") > 0 {
				rgb[c] = math.Pow(10, rapid.Float64Range(-12, 1).Draw(rt, "lg flux"))
			}
		}
		d1 := math.Pow(10, rapid.Float64Range(-2, 2).Draw(rt, "lg D1"))
		d2 := math.Pow(10, rapid.Float64Range(-2, 2).Draw(rt, "lg D2"))

		// Inside: exact flux.
		x := float64(margin) + rapid.Float64Range(0, float64(w-2*margin)).Draw(rt, "x")
		y := float64(margin) + rapid.Float64Range(0, float64(h-2*margin)).Draw(rt, "y")
		in, _ := NewBuffer(w, h, true)
		in.splat(x, y, rgb, d1, &p)
		got := sum3(in)
		for c := range rgb {
			if !scalar.EqualWithinAbsOrRel(got[c], rgb[c], 1e-12, 1e-4) {
				rt.Fatalf("FWHM %g at (%g, %g) in %d×%d: channel %d holds %v, want %v", fwhm, x, y, w, h, c, got[c], rgb[c])
			}
		}

		// Anywhere: bounded, and additive with a second star.
		span := 3 * float64(margin)
		x2 := rapid.Float64Range(-span, float64(w)+span).Draw(rt, "x2")
		y2 := rapid.Float64Range(-span, float64(h)+span).Draw(rt, "y2")
		alone, _ := NewBuffer(w, h, false)
		alone.splat(x2, y2, rgb, d2, &p)
		a := sum3(alone)
		for c := range rgb {
			if math.IsNaN(a[c]) || a[c] < 0 || a[c] > rgb[c]*(1+1e-4) {
				rt.Fatalf("FWHM %g at (%g, %g) in %d×%d: channel %d holds %v of %v", fwhm, x2, y2, w, h, c, a[c], rgb[c])
			}
		}
		for i, v := range alone.Pix {
			if !(v >= 0) || math.IsInf(float64(v), 0) {
				rt.Fatalf("pixel value %d = %v", i, v)
			}
		}
		in.splat(x2, y2, rgb, d2, &p)
		both := sum3(in)
		for c := range rgb {
			if !scalar.EqualWithinAbsOrRel(both[c], got[c]+a[c], 1e-9, 1e-5) {
				rt.Fatalf("channel %d: two stars %v, alone %v + %v", c, both[c], got[c], a[c])
			}
		}

		lo, hi := math.Min(d1, d2), math.Max(d1, d2)
		for i, dv := range in.Doppler {
			lit := in.Pix[3*i] != 0 || in.Pix[3*i+1] != 0 || in.Pix[3*i+2] != 0
			if !lit {
				if dv != 0 {
					rt.Fatalf("unlit pixel %d has D = %v, want 0", i, dv)
				}
				continue
			}
			if v := float64(dv); v < lo*(1-1e-5) || v > hi*(1+1e-5) {
				rt.Fatalf("pixel %d: D = %v outside [%v, %v]", i, v, lo, hi)
			}
		}
	})
}

func sum3(b *Buffer) [3]float64 {
	r, g, bl := b.Sum()
	return [3]float64{r, g, bl}
}
