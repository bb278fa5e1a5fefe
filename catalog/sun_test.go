package catalog

import (
	"math"
	"testing"
)

// sunSeen returns the Sun's V and the angle (rad) between the direction to
// its row and the direction to the origin, for an observer at p (pc): the
// dilution (d/r)² as camera.Observer applies it, in float64 from the
// float32 columns a catalogue stores.
func sunSeen(p [3]float64) (v, off float64) {
	sun := Sun()
	d := float64(float32(sun.Dist))
	u := [3]float64{float64(float32(sun.Dir[0])), float64(float32(sun.Dir[1])), float64(float32(sun.Dir[2]))}
	x := [3]float64{d*u[0] - p[0], d*u[1] - p[1], d*u[2] - p[2]}
	r := math.Sqrt(x[0]*x[0] + x[1]*x[1] + x[2]*x[2])
	q := d / r
	v = float64(float32(sun.Vmag)) - 5*math.Log10(q)
	// The angle between x and −p, as atan2(|x × −p|, x·−p) (acos loses
	// 10⁻⁸ rad near 0).
	cx := [3]float64{-(x[1]*p[2] - x[2]*p[1]), -(x[2]*p[0] - x[0]*p[2]), -(x[0]*p[1] - x[1]*p[0])}
	dot := -(x[0]*p[0] + x[1]*p[1] + x[2]*p[2])
	return v, math.Atan2(math.Sqrt(cx[0]*cx[0]+cx[1]*cx[1]+cx[2]*cx[2]), dot)
}

// TestSun: the Sun is a 5772 K star (IAU 2015 B3 [pub]) at the origin:
// V = −26.74 from 1 au (M_V = 4.83 [cp]) and −0.17 from 1 pc
// ([cp]: 4.83 + 5 log₁₀(1/10)), in the direction of the origin to within
// 1 km / r, from any direction (the row's offset direction, its opposite and
// across it) and from inside the solar system (0.1 au) to 1 kpc.
func TestSun(t *testing.T) {
	sun := Sun()
	if sun.Teff != 5772 || DisplayID(sun.ID) != "Sun" {
		t.Errorf("Sun: T %v, id %q; want 5772 K, Sun", sun.Teff, DisplayID(sun.ID))
	}
	u := sun.Dir
	dirs := [][3]float64{{1, 0, 0}, {0, -1, 0}, {0, 0, 1}, u, {-u[0], -u[1], -u[2]}}
	for _, dir := range dirs {
		for _, c := range []struct {
			r, want float64 // pc, V
		}{
			{AUParsec, -26.74},
			{1, -0.17},
			{0.1 * AUParsec, -26.74 - 5},
			{1000, SunAbsV + 5*2},
		} {
			p := [3]float64{c.r * dir[0], c.r * dir[1], c.r * dir[2]}
			v, off := sunSeen(p)
			if math.Abs(v-c.want) > 0.005 {
				t.Errorf("from %g pc toward %v: V = %.4f, want %.2f", c.r, dir, v, c.want)
			}
			if m := 1 / 3.0857e13; off > 1.5*m/c.r {
				t.Errorf("from %g pc toward %v: %.3g rad off the origin's direction, want ≤ 1 km / r = %.3g", c.r, dir, off, m/c.r)
			}
		}
	}
	// The solar radius: IAU 2015 B3 695 700 km [pub] is 0.00465 au.
	if got := SunRadius / AUParsec; math.Abs(got-0.0046504) > 1e-6 {
		t.Errorf("SunRadius = %.7f au, want 0.0046504", got)
	}

	s := BuiltIn()
	n := s.Len()
	w := WithSun(s, [3]float64{0, 0, 1})
	if w.Len() != n+1 || s.Len() != n || HasSun(s) || !HasSun(w) {
		t.Fatalf("WithSun: %d rows from %d (original now %d), want one more and the original untouched", w.Len(), n, s.Len())
	}
	if i, ok := w.Find("Sun"); !ok || w.ID[i] != SunID {
		t.Errorf("Find(Sun) = %d, %v", i, ok)
	}
	if WithSun(w, [3]float64{0, 0, 1}) != w {
		t.Error("WithSun added a second Sun")
	}
	// At the origin the sky is the catalogue's own, without the Sun; a
	// step away from it, however small, shows it.
	if WithSun(s, [3]float64{0, 0, 0}) != s || SunShown([3]float64{}) {
		t.Error("WithSun added the Sun for an observer at the origin")
	}
	if WithSun(s, [3]float64{AUParsec, 0, 0}) == s || !SunShown([3]float64{0, 1e-30, 0}) {
		t.Error("WithSun left out the Sun 1 au from it")
	}
	if err := w.Slice(0, n).Validate(); err != nil {
		t.Errorf("Validate: %v", err)
	}
}
