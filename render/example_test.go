package render_test

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/render"
)

// The naked-eye preset puts a V = 6.5 star's peak at 8-bit code 8:
// 6.5 + 2.5·log10(8/255/12.92) = −0.037.
func ExampleNakedEyeExposure() {
	fmt.Printf("%.4f\n", render.NakedEyeExposure())
	fmt.Printf("%.4f\n", render.ExposureForLimit(10))
	// Output:
	// -0.0368
	// 3.4632
}

// A pixel-centred default PSF (FWHM 1.5 px, σ = 0.637 px) keeps
// (2Φ(0.785) − 1)² = 0.322 of the flux in its central pixel.
func ExamplePSF_PeakFraction() {
	p, err := render.NewPSF(render.DefaultFWHM)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("σ = %.4f px, radius = %.3f px, peak = %.4f\n", p.Sigma(), p.Radius(), p.PeakFraction())
	// Output:
	// σ = 0.6370 px, radius = 2.000 px, peak = 0.3221
}

// ToneShoulder leaves values below the knee alone and maps luminance 1 to
// 0.5 + 0.5·(1 − e⁻¹) = 0.8161.
func ExampleTone() {
	fmt.Println(render.Tone(render.ToneShoulder, 0.25, 0.25, 0.25))
	r, g, b := render.Tone(render.ToneShoulder, 1, 1, 1)
	fmt.Printf("%.4f %.4f %.4f\n", r, g, b)
	fmt.Println(render.Tone(render.ToneLinear, 2, 0.5, -1))
	// Output:
	// 0.25 0.25 0.25
	// 0.8161 0.8161 0.8161
	// 1 0.5 0
}

// Render one white star of V = Exposure straight ahead: its peak pixel has
// luminance 1 (the exposure definition).
func ExampleRender() {
	stars := &catalog.Stars{Source: "example"}
	stars.Append(catalog.Star{ID: 1, Name: "ahead", RA: 0, Dec: 0, Dist: math.Inf(1),
		Vmag: 2, Teff: render.WhiteTemperature, BV: math.NaN(), RV: math.NaN()})
	look, _ := camera.LookAt(r3.Vec{X: 1}, r3.Vec{Z: 1}, 0)
	f, err := render.Render(stars, render.Options{
		Projection: camera.Projection{Kind: camera.Pinhole, Width: 33, Height: 33, Orient: look},
		Exposure:   2,
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("drawn %d, peak luminance %.4f, V′ %.2f\n", f.Stats.Drawn, f.Luminance(16, 16), f.Stats.Brightest[0].V)
	// Output:
	// drawn 1, peak luminance 1.0000, V′ 2.00
}
