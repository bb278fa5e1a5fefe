package render

import (
	"errors"
	"math"
	"slices"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/spectrum"
)

// sunAt returns the Sun as a catalogue star seen from the origin at
// distance distAU au in direction dir: T = 5772 K (IAU 2015 B3 nominal
// [pub]), V = M_V + 5 log10(d/10 pc) with M_V = 4.83 [cp], which is
// −26.74 at 1 au [cp].
func sunAt(dir r3.Vec, distAU float64) *catalog.Stars {
	d := distAU * camera.AU
	s := one(dir, 4.83+5*math.Log10(d/10), 5772)
	s.Dist[0] = float32(d)
	s.Flags[0] = 0
	s.Names = map[int]string{0: "Sun"}
	return s
}

// totalLum returns the buffer's total luminance.
func totalLum(b *Buffer) float64 {
	r, g, bl := b.Sum()
	return spectrum.Luminance(r, g, bl)
}

// The Sun seen from 1 au at rest is a disc of angular radius 0.2666°: the
// IAU 2015 B3 nominal solar radius 695 700 km over the au 149 597 870.7 km
// (IAU 2012 B2) [pub] gives 0.26645°. The disc's radius here comes from
// the Sun's V and temperature as a blackbody, so it inherits the blackbody
// V-band normalisation's error: physics.md holds a 5772 K blackbody at
// V = −26.74 to within 5 % of the solar constant, i.e. 2.5 % in radius;
// the drawn radius (half the lit width of the centre row, ±1 px of 0.001°)
// is held to 2.5 %.
func TestDiscSunFromOneAU(t *testing.T) {
	p := looking(t, camera.Pinhole, 801, 801, 0.8, axisX)
	f, err := Render(sunAt(axisX, 1), Options{Projection: p})
	if err != nil {
		t.Fatal(err)
	}
	if f.Stats.Drawn != 1 {
		t.Fatalf("drawn %d, want the Sun", f.Stats.Drawn)
	}
	first, last := -1, -1
	for i := 0; i < f.W; i++ {
		if f.Luminance(i, 400) > 0 {
			if first < 0 {
				first = i
			}
			last = i
		}
	}
	fpx := 400.5 / math.Tan(0.4*math.Pi/180)
	rho := math.Atan(float64(last-first+1)/2/fpx) * 180 / math.Pi
	want := 695700 / 149597870.7 * 180 / math.Pi
	t.Logf("drawn solar radius %.5f°, IAU nominal %.5f° (%+.2f %%)", rho, want, 100*(rho/want-1))
	if !scalar.EqualWithinRel(rho, want, 0.025) {
		t.Errorf("solar angular radius %.5f°, want %.5f° within 2.5 %%", rho, want)
	}
}

// A disc's summed light equals the point-source light of the same star:
// the Sun from 1 au drawn as a disc in a 0.8° frame and as a point in a
// 60° frame (0.27° < half a 0.94° pixel) give the same total luminance,
// at rest and at 0.5 c (star ahead), within 10⁻³ (sampling of the rim
// pixels, ~10⁻⁴ here, and ∫dΩ against π sin²ρ, ρ²/4 = 5·10⁻⁶).
func TestDiscFluxMatchesPoint(t *testing.T) {
	for _, beta := range []float64{0, 0.5} {
		obs := observer(t, r3.Unit(r3.Vec{X: 1, Y: 0.2}), beta)
		stars := sunAt(axisX, 1)
		var tot [2]float64
		for k, c := range []struct {
			w   int
			fov float64
		}{{601, 0.8}, {64, 60}} {
			np, _ := obs.Boost.Apply(axisX)
			p := looking(t, camera.Pinhole, c.w, c.w, c.fov, np)
			f, err := Render(stars, Options{Projection: p, Observer: obs, Limit: math.Inf(1)})
			if err != nil {
				t.Fatal(err)
			}
			tot[k] = totalLum(&f.Buffer)
		}
		if !scalar.EqualWithinRel(tot[0], tot[1], 1e-3) {
			t.Errorf("β = %g: disc total %.6g, point total %.6g (ratio %.5f)", beta, tot[0], tot[1], tot[0]/tot[1])
		}
	}
}

// Limb darkening follows the linear law with u = 0.6 (Eddington
// approximation [pub]): at 0.9 of the radius, μ = √0.19, the surface
// brightness is 1 − 0.6(1 − μ) = 0.6615 of the centre's.
func TestDiscLimbDarkening(t *testing.T) {
	p := looking(t, camera.Pinhole, 801, 801, 0.8, axisX)
	f, err := Render(sunAt(axisX, 1), Options{Projection: p})
	if err != nil {
		t.Fatal(err)
	}
	// Find the radius from the lit width of the centre row.
	first := 0
	for f.Luminance(first, 400) == 0 {
		first++
	}
	rpx := 400.5 - float64(first)
	c := f.Luminance(400, 400)
	i := int(400.5 + 0.9*rpx)
	have := f.Luminance(i, 400) / c
	mu := math.Sqrt(1 - math.Pow((float64(i)+0.5-400.5)/rpx, 2))
	want := 1 - LimbDarkening*(1-mu)
	if !scalar.EqualWithinAbs(have, want, 0.01) {
		t.Errorf("I(%.3f)/I(1) = %.4f, want %.4f", mu, have, want)
	}
}

// An observer inside a star is an error naming it, at its centre too.
func TestDiscObserverInside(t *testing.T) {
	p := looking(t, camera.Pinhole, 64, 36, 60, axisX)
	s := sunAt(axisX, 1)
	for _, at := range []float64{0.5 * 0.00465, 0} { // au from the centre; R☉ ≈ 0.00465 au
		pos := r3.Scale((1-at)*camera.AU, axisX)
		_, err := Render(s, Options{Projection: p, Observer: camera.Observer{Position: pos}})
		var ie *InsideStarError
		if !errors.As(err, &ie) || !errors.Is(err, ErrInsideStar) || ie.Name != "Sun" {
			t.Errorf("observer %g au from the centre: have %v, want an InsideStarError naming the Sun", at, err)
		}
	}
	pos := r3.Scale((1-2*0.00465)*camera.AU, axisX) // outside: a huge disc, no error
	if _, err := Render(s, Options{Projection: p, Observer: camera.Observer{Position: pos}}); err != nil {
		t.Errorf("observer outside the star: %v", err)
	}
}

// Discs are drawn the same for any worker count, streamed or not.
func TestDiscDeterministic(t *testing.T) {
	obs := observer(t, axisY, 0.7)
	np, _ := obs.Boost.Apply(axisX)
	p := looking(t, camera.Pinhole, 160, 120, 2, np)
	var pix [][]float32
	for _, w := range []int{1, 3} {
		f, err := Render(sunAt(axisX, 1), Options{Projection: p, Observer: obs, Workers: w})
		if err != nil {
			t.Fatal(err)
		}
		pix = append(pix, f.Pix)
	}
	if !slices.Equal(pix[0], pix[1]) {
		t.Error("disc differs between 1 and 3 workers")
	}
	f, err := RenderStream(Chunks(sunAt(axisX, 1), 1), Options{Projection: p, Observer: obs, Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(f.Pix, pix[0]) {
		t.Error("streamed disc differs")
	}
}

// BenchmarkDisc draws the Sun from 1 au, a 266 px disc, per pixel of its
// box.
func BenchmarkDisc(b *testing.B) {
	p := looking(b, camera.Pinhole, 801, 801, 0.8, axisX)
	s := sunAt(axisX, 1)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Render(s, Options{Projection: p, Workers: 1}); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/(4*266*266), "ns/disc-pixel")
}
