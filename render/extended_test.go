package render

import (
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
)

// Options.ExtendedScale multiplies extended light and nothing else: the
// Sun's disc seen from 1 au (sharp and blurred), the unresolved starlight and the CMB each
// come out e times their value with ExtendedScale e (to float32
// rounding), point stars are unchanged, and 0 means 1. A negative, NaN or
// infinite scale is ErrExtended.
func TestExtendedScale(t *testing.T) {
	const e = 1.0 / 16
	close := func(what string, a, b []float32, k float64) {
		t.Helper()
		lit, top := 0, 0.0
		for _, v := range b {
			top = math.Max(top, float64(v))
		}
		for i := range a {
			if d := math.Abs(float64(a[i]) - k*float64(b[i])); d > 1e-6*math.Abs(float64(a[i]))+1e-9*top {
				t.Fatalf("%s: value %d is %g, want %g × %g", what, i, a[i], k, b[i])
			}
			if b[i] > 0 {
				lit++
			}
		}
		if lit == 0 {
			t.Fatalf("%s: nothing drawn", what)
		}
	}
	// The Sun's disc from 1 au, 0.53° across: 25 px in a 2° pinhole.
	obs := camera.Observer{Position: r3.Scale(camera.AU, r3.Vec{X: -1})}
	var sun [2][]float32
	for k, x := range []float64{1, e} {
		f, err := Render(sunRow(), Options{Projection: looking(t, camera.Pinhole, 96, 64, 2, axisX), Observer: obs, ExtendedScale: x, Exposure: -26})
		if err != nil {
			t.Fatal(err)
		}
		sun[k] = f.Pix
	}
	close("the Sun's disc", sun[1], sun[0], e)
	// Blurred along a pan (TestDiscMotionPan's).
	ps, knots := preparedSun(t, axisX), panKnots(t, camera.Pinhole, 201, 201, 2, 0.1, 3, camera.Observer{})
	for k, x := range []float64{1, e} {
		f, err := ps.RenderMotion(Options{Exposure: -20, Limit: math.Inf(1), ExtendedScale: x}, knots)
		if err != nil {
			t.Fatal(err)
		}
		sun[k] = f.Pix
	}
	close("the Sun's disc, blurred", sun[1], sun[0], e)
	// Point stars.
	p := looking(t, camera.Pinhole, 96, 64, 60, axisX)
	stars := randomStars(2000, -1, 7, 8)
	a, err := Render(stars, Options{Projection: p, Exposure: 2})
	if err != nil {
		t.Fatal(err)
	}
	b, err := Render(stars, Options{Projection: p, Exposure: 2, ExtendedScale: e})
	if err != nil {
		t.Fatal(err)
	}
	close("point stars", b.Pix, a.Pix, 1)
	// The layers: the unresolved starlight at 0.9 c, the CMB at 2500 K
	// ahead (it glows only at γ ≈ 200 and more).
	u := builtInUnresolved(t)
	b9, err := camera.NewBoost(axisX, 0.9)
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name  string
		boost camera.Boost
		add   func(f *Frame) error
	}{
		{"unresolved starlight", b9, func(f *Frame) error { return AddDiffuse(f, u, DiffuseOptions{}) }},
		{"CMB", boostForForwardT(t, 2500), func(f *Frame) error { return AddCMB(f, CMBOptions{}) }},
	} {
		var pix [3][]float32
		for k, x := range []float64{1, e, 0} {
			f := blankFrame(t, looking(t, camera.Fisheye, 64, 64, 40, c.boost.Dir()), camera.Observer{Boost: c.boost})
			f.Options.ExtendedScale = x
			f.Scale = ExposureScale(20) // the CMB's pixels well above float32's smallest
			if err := c.add(f); err != nil {
				t.Fatal(err)
			}
			pix[k] = f.Pix
		}
		close(c.name, pix[1], pix[0], e)
		close(c.name+", ExtendedScale 0", pix[2], pix[0], 1)
	}
	for _, x := range []float64{-1, math.NaN(), math.Inf(1)} {
		if _, err := Render(stars, Options{Projection: p, ExtendedScale: x}); !errors.Is(err, ErrExtended) {
			t.Errorf("ExtendedScale %v: %v, want ErrExtended", x, err)
		}
	}
}
