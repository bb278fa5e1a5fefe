package catalog

import (
	"math"
	"testing"
)

// TestSun: the Sun's row is a 5772 K star (IAU 2015 B3 [pub]) of V = −26.74
// at 1 au (M_V = 4.83 [cp]); seen from 1 pc (dilution (d/r)², as
// camera.Observer applies it) it is V ≈ −0.17 [cp: 4.83 − 5], in the
// direction of the origin within 1 au/1 pc radians.
func TestSun(t *testing.T) {
	sun := Sun()
	if sun.Teff != 5772 || math.Abs(sun.Vmag-(-26.74)) > 0.005 || DisplayID(sun.ID) != "Sun" {
		t.Errorf("Sun: T %v, V %.3f, id %q; want 5772 K, −26.74, Sun", sun.Teff, sun.Vmag, DisplayID(sun.ID))
	}
	// Observer at 1 pc along −x: the vector to the Sun's row position.
	p := [3]float64{-1, 0, 0}
	v := [3]float64{sun.Dist*sun.Dir[0] - p[0], sun.Dist*sun.Dir[1] - p[1], sun.Dist*sun.Dir[2] - p[2]}
	r := math.Sqrt(v[0]*v[0] + v[1]*v[1] + v[2]*v[2])
	dil := (sun.Dist / r) * (sun.Dist / r)
	if vObs := sun.Vmag - 2.5*math.Log10(dil); math.Abs(vObs-(-0.17)) > 0.005 {
		t.Errorf("from 1 pc: V = %.4f, want −0.17", vObs)
	}
	if ang := math.Acos(v[0] / r); ang > 1.01*AUParsec {
		t.Errorf("from 1 pc the Sun is %.3g rad off the origin's direction, want ≤ 1 au/1 pc", ang)
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
	if WithSun(s, [3]float64{0, 0, 0}) != s || WithSun(s, [3]float64{SunMinDistance / 2, 0, 0}) != s {
		t.Error("WithSun added the Sun for an observer inside the solar system")
	}
	if err := w.Validate(); err != nil {
		t.Errorf("Validate: %v", err)
	}
}
