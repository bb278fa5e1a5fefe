package camera

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// Orientation is a camera attitude: three orthonormal vectors on ICRS axes,
// right-handed with Right = Forward × Up. The zero value stands for
// DefaultOrientation wherever a Projection uses it.
type Orientation struct {
	Forward, Right, Up r3.Vec
}

// DefaultOrientation looks toward RA 0°, Dec 0° (ICRS +X) with the north
// celestial pole (+Z) up; Right is then −Y (RA 270°), so east (RA 90°) is on
// the left as on a sky seen from inside.
func DefaultOrientation() Orientation {
	return Orientation{Forward: r3.Vec{X: 1}, Right: r3.Vec{Y: -1}, Up: r3.Vec{Z: 1}}
}

// IsZero reports whether o is the zero value.
func (o Orientation) IsZero() bool { return o == Orientation{} }

// parallelTol is the relative size below which the part of up perpendicular
// to forward counts as zero (up ∥ forward).
const parallelTol = 1e-9

// LookAt returns the orientation looking along forward with up as close to
// the given up as possible, then rolled by rollDeg degrees about forward.
// Neither vector need be unit.
//
// Up fallback: when up is zero, or parallel to forward (its part
// perpendicular to forward is below 1e-9 of its length), up is taken to be
// the north celestial pole, ICRS +Z; when forward itself points at a pole
// (±Z), ICRS +X (toward RA 0°) is used instead.
//
// Roll: positive rollDeg banks the camera to the right, the camera's up
// turning toward its right; stars in the image then turn counterclockwise.
func LookAt(forward, up r3.Vec, rollDeg float64) (Orientation, error) {
	f, err := unitDir(forward)
	if err != nil {
		return Orientation{}, fmt.Errorf("forward: %w", err)
	}
	if !finiteVec(up) {
		return Orientation{}, fmt.Errorf("%w: up (%v, %v, %v) is not finite", ErrDirection, up.X, up.Y, up.Z)
	}
	if math.IsNaN(rollDeg) || math.IsInf(rollDeg, 0) {
		return Orientation{}, fmt.Errorf("%w: roll %v° is not finite", ErrProjection, rollDeg)
	}
	u, ok := perpTo(f, up)
	if !ok {
		u, ok = perpTo(f, r3.Vec{Z: 1})
	}
	if !ok {
		u, _ = perpTo(f, r3.Vec{X: 1})
	}
	r := r3.Unit(r3.Cross(f, u))
	if rollDeg != 0 {
		s, c := math.Sincos(rollDeg * deg)
		u = r3.Unit(r3.Add(r3.Scale(c, u), r3.Scale(s, r)))
		r = r3.Unit(r3.Cross(f, u))
	}
	return Orientation{Forward: f, Right: r, Up: u}, nil
}

// perpTo returns the unit part of v perpendicular to unit f, and false when
// that part is too small to define a direction.
func perpTo(f, v r3.Vec) (r3.Vec, bool) {
	n := r3.Norm(v)
	if n == 0 {
		return r3.Vec{}, false
	}
	p := r3.Sub(v, r3.Scale(r3.Dot(v, f), f))
	m := r3.Norm(p)
	if m <= parallelTol*n {
		return r3.Vec{}, false
	}
	p = r3.Scale(1/m, p)
	// A second Gram–Schmidt pass removes the residue left by cancellation
	// when v is nearly parallel to f.
	p = r3.Sub(p, r3.Scale(r3.Dot(p, f), f))
	return r3.Unit(p), true
}

// orthoTol is how far from orthonormal an Orientation may be.
const orthoTol = 1e-9

// Validate reports whether o is orthonormal and right-handed within 1e-9,
// naming the first bad field. The zero value is valid (it means
// DefaultOrientation).
func (o Orientation) Validate() error {
	if o.IsZero() {
		return nil
	}
	for _, c := range []struct {
		name string
		v    r3.Vec
	}{{"Forward", o.Forward}, {"Right", o.Right}, {"Up", o.Up}} {
		if !finiteVec(c.v) {
			return fmt.Errorf("%w: Orient.%s = %v is not finite", ErrProjection, c.name, c.v)
		}
		if n := r3.Norm(c.v); math.Abs(n-1) > orthoTol {
			return fmt.Errorf("%w: Orient.%s = %v has length %v, want 1", ErrProjection, c.name, c.v, n)
		}
	}
	if d := r3.Dot(o.Forward, o.Up); math.Abs(d) > orthoTol {
		return fmt.Errorf("%w: Orient.Up is not perpendicular to Orient.Forward (cos = %v)", ErrProjection, d)
	}
	if d := r3.Norm(r3.Sub(r3.Cross(o.Forward, o.Up), o.Right)); d > orthoTol {
		return fmt.Errorf("%w: Orient.Right = %v is not Forward × Up = %v", ErrProjection, o.Right, r3.Cross(o.Forward, o.Up))
	}
	return nil
}
