package camera

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// Observer is a ship: where it is and how it moves. The zero value is an
// observer at rest at the Sun.
type Observer struct {
	// Position in parsecs on ICRS axes, Sun at the origin.
	Position r3.Vec
	// Boost from the catalogue frame to the ship frame.
	Boost Boost
}

// See returns what the observer sees of a star in catalogue direction u
// (unit vector from the Sun, ICRS) at dist parsecs from the Sun:
//
//   - n: apparent unit direction in the ship frame (ICRS axes);
//   - d: Doppler factor D of the star's light;
//   - dilution: (dist/r)², the factor by which the star's dilution W
//     changes from the Sun to the observer, W(P) = W⊙·(d⊙/r)²;
//   - r: distance from the observer to the star, parsecs.
//
// Stars of unknown distance (dist = +Inf; also NaN, zero or negative, which
// are read as unknown) are infinitely far: n is u boosted, dilution is 1 and
// r is +Inf. The Sun itself should be given a finite distance such as 1 au
// (AU parsecs) with its apparent magnitude there.
//
// Degenerate case: when the observer is exactly at the star (r = 0) the
// direction is undefined. See then returns r = 0 and dilution = +Inf as the
// flag, with n and d those of u; callers must skip such stars (test r == 0).
// See never panics and returns no error.
func (o Observer) See(u r3.Vec, dist float64) (n r3.Vec, d float64, dilution float64, r float64) {
	if !(dist > 0) || math.IsInf(dist, 1) {
		n, d = o.Boost.Apply(u)
		return n, d, 1, math.Inf(1)
	}
	p := o.Position
	if p == (r3.Vec{}) {
		n, d = o.Boost.Apply(u)
		return n, d, 1, dist
	}
	v := r3.Vec{X: dist*u.X - p.X, Y: dist*u.Y - p.Y, Z: dist*u.Z - p.Z}
	r = math.Sqrt(v.X*v.X + v.Y*v.Y + v.Z*v.Z)
	if r == 0 {
		n, d = o.Boost.Apply(u)
		return n, d, math.Inf(1), 0
	}
	if math.IsInf(r, 1) { // overflow of the squares: recompute safely
		r = r3.Norm(v)
	}
	n, d = o.Boost.Apply(r3.Vec{X: v.X / r, Y: v.Y / r, Z: v.Z / r})
	q := dist / r
	return n, d, q * q, r
}

// SeeBatch applies See to the catalogue columns x, y, z (unit directions
// from the Sun) and dist (parsecs, +Inf unknown), in the float32 form the
// catalogue stores them, writing n′ to (nx, ny, nz), D to d, the dilution
// factor to dilution and the distance from the observer to r. dilution and r
// may be nil. It processes the length of the shortest slice given and never
// allocates. Each u is renormalised in float64 first (float32 unit vectors
// are unit only to ~1e-7).
func (o Observer) SeeBatch(x, y, z, dist []float32, nx, ny, nz, d, dilution, r []float64) {
	n := min(len(x), len(y), len(z), len(dist), len(nx), len(ny), len(nz), len(d))
	if dilution != nil {
		n = min(n, len(dilution))
	}
	if r != nil {
		n = min(n, len(r))
	}
	omb, beta, gamma, ig := o.Boost.consts()
	bx, by, bz := o.Boost.dir.X, o.Boost.dir.Y, o.Boost.dir.Z
	px, py, pz := o.Position.X, o.Position.Y, o.Position.Z
	atSun := o.Position == (r3.Vec{})
	inf := math.Inf(1)
	for i := range n {
		ux, uy, uz := unitish(float64(x[i]), float64(y[i]), float64(z[i]))
		dd := float64(dist[i])
		dil, rr := 1.0, inf
		switch {
		case !(dd > 0) || math.IsInf(dd, 1):
			// unknown distance: infinitely far
		case atSun:
			rr = dd
		default:
			vx, vy, vz := dd*ux-px, dd*uy-py, dd*uz-pz
			r2 := vx*vx + vy*vy + vz*vz
			if r2 == 0 || math.IsInf(r2, 1) { // at the star, or overflow: the careful path
				v, dp, dl, rp := o.See(r3.Vec{X: ux, Y: uy, Z: uz}, dd)
				nx[i], ny[i], nz[i], d[i] = v.X, v.Y, v.Z, dp
				if dilution != nil {
					dilution[i] = dl
				}
				if r != nil {
					r[i] = rp
				}
				continue
			}
			rr = math.Sqrt(r2)
			s := 1 / rr
			ux, uy, uz = vx*s, vy*s, vz*s
			q := dd * s
			dil = q * q
		}
		nx[i], ny[i], nz[i], d[i] = kernel(bx, by, bz, omb, beta, gamma, ig, ux, uy, uz)
		if dilution != nil {
			dilution[i] = dil
		}
		if r != nil {
			r[i] = rr
		}
	}
}

// AU is the astronomical unit in parsecs (IAU 2012 B2: 1 au =
// 149 597 870 700 m; 1 pc = 648000/π au), so 1 au = π/648000 pc.
const AU = math.Pi / 648000
