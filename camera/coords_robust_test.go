package camera

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/spatial/r3"
	"pgregory.net/rapid"
)

// RADec and FromRADec as properties over the whole sphere
// (TestRADecRoundTrip checks a grid and the special directions): RADec
// stays in [0, 360) × [−90, 90] for any non-zero vector of any length;
// FromRADec(RADec(v)) is v's direction and FromRADec gives unit vectors,
// to 1e-15 [cp: a few float64 roundings of unit-scale values].
func TestRADecProperties(t *testing.T) {
	rapid.Check(t, func(rt *rapid.T) {
		n := drawUnit(rt, "n")
		scale := math.Pow(10, rapid.Float64Range(-200, 200).Draw(rt, "lg |v|"))
		ra, dec := RADec(r3.Scale(scale, n))
		if !(ra >= 0 && ra < 360) || !(dec >= -90 && dec <= 90) {
			rt.Fatalf("RADec(%v·%v) = (%v, %v) out of range", scale, n, ra, dec)
		}
		back := FromRADec(ra, dec)
		if a := angle(back, n); a > 1e-15 {
			rt.Fatalf("FromRADec(RADec(%v)) = %v, %g rad off", n, back, a)
		}
		ra2 := rapid.Float64Range(-720, 720).Draw(rt, "ra")
		dec2 := rapid.Float64Range(-90, 90).Draw(rt, "dec")
		if m := r3.Norm(FromRADec(ra2, dec2)); !scalar.EqualWithinAbs(m, 1, 1e-15) {
			rt.Fatalf("|FromRADec(%v, %v)| = %.17g", ra2, dec2, m)
		}
	})
}

// LookAt as a property: for any forward, any up (including zero and
// parallel to forward, where the documented fallback applies) and any roll,
// the orientation validates, is orthonormal and right-handed (Right =
// Forward × Up) to 1e-12, and Forward is the given forward's direction.
// Without roll and with a usable up, Up lies in the plane of forward and
// the given up, on its side [cp: Gram–Schmidt].
func TestLookAtProperties(t *testing.T) {
	rapid.Check(t, func(rt *rapid.T) {
		f := r3.Scale(math.Pow(10, rapid.Float64Range(-6, 6).Draw(rt, "lg |f|")), drawUnit(rt, "f"))
		var up r3.Vec
		switch rapid.IntRange(0, 3).Draw(rt, "up kind") {
		case 0:
			up = drawUnit(rt, "up")
		case 1: // zero: fallback
		case 2: // parallel or antiparallel: fallback
			up = r3.Scale(rapid.Float64Range(-3, 3).Draw(rt, "k"), f)
		case 3: // forward at a pole, up anything
			f = r3.Vec{Z: math.Copysign(1, f.Z)}
			up = drawUnit(rt, "up")
		}
		roll := 0.0
		if rapid.Bool().Draw(rt, "rolled") {
			roll = rapid.Float64Range(-720, 720).Draw(rt, "roll")
		}
		o, err := LookAt(f, up, roll)
		if err != nil {
			rt.Fatalf("LookAt(%v, %v, %v): %v", f, up, roll, err)
		}
		if err := o.Validate(); err != nil {
			rt.Fatalf("LookAt(%v, %v, %v) = %+v: %v", f, up, roll, o, err)
		}
		for _, c := range []struct {
			name string
			v    float64
			want float64
		}{
			{"|F|", r3.Norm(o.Forward), 1}, {"|R|", r3.Norm(o.Right), 1}, {"|U|", r3.Norm(o.Up), 1},
			{"F·R", r3.Dot(o.Forward, o.Right), 0}, {"F·U", r3.Dot(o.Forward, o.Up), 0}, {"R·U", r3.Dot(o.Right, o.Up), 0},
		} {
			if !scalar.EqualWithinAbs(c.v, c.want, 1e-12) {
				rt.Fatalf("%s = %.17g, want %v (%+v)", c.name, c.v, c.want, o)
			}
		}
		if d := r3.Norm(r3.Sub(r3.Cross(o.Forward, o.Up), o.Right)); d > 1e-12 {
			rt.Fatalf("Right ≠ Forward × Up by %g", d)
		}
		if a := angle(o.Forward, r3.Unit(f)); a > 1e-12 {
			rt.Fatalf("Forward %v is %g rad from %v", o.Forward, a, f)
		}
		perp := r3.Sub(up, r3.Scale(r3.Dot(up, o.Forward), o.Forward))
		if roll == 0 && r3.Norm(perp) > 1e-6*r3.Norm(up) && r3.Norm(up) > 0 {
			if a := angle(o.Up, r3.Unit(perp)); a > 1e-9 {
				rt.Fatalf("Up %v is %g rad from up's part ⟂ forward %v", o.Up, a, r3.Unit(perp))
			}
		}
	})
}
