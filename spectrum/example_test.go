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
