package render

import (
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/catalog"
)

// sunRow returns a catalogue holding only catalog.Sun(), the Sun at the
// origin.
func sunRow() *catalog.Stars {
	s := &catalog.Stars{}
	s.Append(catalog.Sun())
	return s
}

// The Sun at the origin (catalog.Sun) through the renderer: from 1 au and
// from 1 pc, in three directions, at rest its observed V is −26.74 and
// −0.17 (M_V = 4.83 [cp], IAU 2015 B3 5772 K [pub]; 4.83 + 5 log₁₀(r/10 pc))
// within 0.005 mag, and it lies in the direction of the origin within
// 10⁻⁶ px of the frame centre; an observer inside its radius (695 700 km,
// IAU 2015 B3 [pub]) is an InsideStarError naming it, one at 1.03 R☉ is
// not (the radius drawn comes from the Sun's V and temperature as a
// blackbody, 1.2 % above the nominal one; see TestDiscSunFromOneAU).
func TestSunAtOrigin(t *testing.T) {
	for _, dir := range []r3.Vec{{X: 1}, r3.Unit(r3.Vec{X: -1, Y: 2, Z: 0.5}), r3.Unit(r3.Vec{X: 0, Y: 0.3, Z: 0.9})} {
		for _, c := range []struct{ r, want, fov float64 }{{camera.AU, -26.74, 60}, {1, -0.17, 1}} {
			pos := r3.Scale(c.r, dir)
			p := looking(t, camera.Pinhole, 65, 65, c.fov, r3.Scale(-1, dir))
			f, err := Render(sunRow(), Options{Projection: p, Observer: camera.Observer{Position: pos}, Limit: math.Inf(1)})
			if err != nil {
				t.Fatal(err)
			}
			if len(f.Stats.Brightest) != 1 {
				t.Fatalf("from %g pc: %d stars listed, want the Sun", c.r, len(f.Stats.Brightest))
			}
			b := f.Stats.Brightest[0]
			if math.Abs(b.V-c.want) > 0.005 || b.Name != catalog.SunName {
				t.Errorf("from %g pc toward %v: %s at V = %.4f, want the Sun at %.2f", c.r, dir, b.Name, b.V, c.want)
			}
			if math.Hypot(b.X-32.5, b.Y-32.5) > 1e-6 {
				t.Errorf("from %g pc: the Sun at (%.8f, %.8f), want the frame centre (32.5, 32.5)", c.r, b.X, b.Y)
			}
		}
	}
	p := looking(t, camera.Pinhole, 64, 36, 60, axisX)
	rs := catalog.SunRadius
	for _, at := range []float64{0.5 * rs, 0.999 * rs} {
		_, err := Render(sunRow(), Options{Projection: p, Observer: camera.Observer{Position: r3.Scale(at, r3.Vec{X: -1})}})
		var ie *InsideStarError
		if !errors.As(err, &ie) || ie.Name != catalog.SunName {
			t.Errorf("observer %.3g R☉ from the Sun's centre: have %v, want an InsideStarError naming the Sun", at/rs, err)
		}
	}
	if _, err := Render(sunRow(), Options{Projection: p, Observer: camera.Observer{Position: r3.Scale(1.03*rs, r3.Vec{X: -1})}}); err != nil {
		t.Errorf("observer 1.03 R☉ from the Sun's centre: %v", err)
	}
}
