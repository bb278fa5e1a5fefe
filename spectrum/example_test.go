package spectrum_test

import (
	"fmt"

	"github.com/skyframe/skyframe/spectrum"
)

func ExampleChromaticity() {
	x, y := spectrum.Chromaticity(2856)
	fmt.Printf("2856 K: x=%.4f y=%.4f\n", x, y)
	x, y = spectrum.ChromaticityC2(2856, 1.4388e-2) // CIE illuminant A
	fmt.Printf("illuminant A: x=%.4f y=%.4f\n", x, y)
	// Output:
	// 2856 K: x=0.4475 y=0.4074
	// illuminant A: x=0.4475 y=0.4074
}

func ExampleBlackbody_Observed() {
	sun, _ := spectrum.FromV(5772, -26.74)
	ahead := sun.Observed(2, spectrum.BeamingExact) // D = 2
	fmt.Printf("T′ = %.0f K, V′ = %.2f, bolometric ×%.2f\n",
		ahead.T, ahead.Vmag(), ahead.Bolometric()/sun.Bolometric())
	// Output:
	// T′ = 11544 K, V′ = -27.81, bolometric ×4.00
}

func ExampleFromV() {
	b, _ := spectrum.FromV(5772, -26.74)
	fmt.Printf("W = %.3g, bolometric = %.0f W/m², V = %.2f\n", b.W, b.Bolometric(), b.Vmag())
	// Output:
	// W = 2.25e-05, bolometric = 1419 W/m², V = -26.74
}

func ExampleBeaming_WScale() {
	for _, b := range []spectrum.Beaming{spectrum.BeamingExact, spectrum.BeamingD3, spectrum.BeamingD4} {
		fmt.Println(b, b.WScale(2), b.FluxExponent())
	}
	// Output:
	// exact 0.25 2
	// d3 0.5 3
	// d4 1 4
}

func ExampleXYZToLinearSRGB() {
	x, y := 0.3127, 0.3290 // D65 white at Y = 1
	r, g, b := spectrum.XYZToLinearSRGB(x/y, 1, (1-x-y)/y, spectrum.ColorOptions{})
	fmt.Printf("%.4f %.4f %.4f\n", r, g, b)
	fmt.Printf("%.4f\n", spectrum.EncodeSRGB(0.5))
	// Output:
	// 1.0000 1.0000 1.0000
	// 0.7354
}

// A star of V = 2 seen with Doppler factor D: at D = 1 V′ = V exactly
// (physics.md); a very hot star at D = 3 under the exact convention is in
// the Rayleigh–Jeans limit, F′_V/F_V → 1/D, so V′ → 2 + 2.5 log₁₀ 3 = 3.193
// (physics.md); a 3000 K star at D = 4.4 brightens by about 4.2 mag
// (physics.md, depth needed).
func ExampleObserve() {
	fmt.Printf("%.3f\n", spectrum.Observe(2, 5772, 1, 1, spectrum.BeamingExact).V)
	fmt.Printf("%.3f\n", spectrum.Observe(2, 1e9, 3, 1, spectrum.BeamingExact).V)
	fmt.Printf("%.1f\n", spectrum.Observe(2, 3000, 4.4, 1, spectrum.BeamingExact).V-2)
	// Output:
	// 2.000
	// 3.193
	// -4.2
}
