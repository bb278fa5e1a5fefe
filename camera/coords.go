package camera

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

const (
	deg = math.Pi / 180
	rad = 180 / math.Pi
)

// RADec returns the right ascension in [0, 360) and declination in
// [−90, 90] degrees of direction v on ICRS axes. v need not be unit. The zero
// vector gives (0, 0).
func RADec(v r3.Vec) (raDeg, decDeg float64) {
	ra := math.Atan2(v.Y, v.X) * rad
	if ra < 0 {
		ra += 360
		if ra == 360 { // −0 or a tiny negative angle rounds up
			ra = 0
		}
	}
	return ra, math.Atan2(v.Z, math.Hypot(v.X, v.Y)) * rad
}

// FromRADec returns the ICRS unit vector of right ascension ra and
// declination dec, both in degrees.
func FromRADec(raDeg, decDeg float64) r3.Vec {
	sa, ca := math.Sincos(raDeg * deg)
	sd, cd := math.Sincos(decDeg * deg)
	return r3.Vec{X: cd * ca, Y: cd * sa, Z: sd}
}

// Galactic frame definition, The Hipparcos and Tycho Catalogues (ESA SP-1200,
// 1997), Vol. 1, §1.5.3: north galactic pole at ICRS (α, δ) =
// (192.85948°, 27.12825°); galactic longitude of the north celestial pole
// l = 122.93192°.
const (
	NGPRA  = 192.85948 // degrees
	NGPDec = 27.12825  // degrees
	LNCP   = 122.93192 // degrees
)

// galX, galY, galZ are the galactic x (toward l = 0, b = 0), y (l = 90°)
// and z (north galactic pole) axes in ICRS components.
var galX, galY, galZ = galacticAxes()

func galacticAxes() (x, y, z r3.Vec) {
	z = FromRADec(NGPRA, NGPDec)
	// e: the NCP projected on the galactic plane; it has longitude LNCP.
	e := r3.Unit(r3.Sub(r3.Vec{Z: 1}, r3.Scale(z.Z, z)))
	f := r3.Cross(z, e) // e turned +90° about the pole
	s, c := math.Sincos(LNCP * deg)
	x = r3.Sub(r3.Scale(c, e), r3.Scale(s, f))
	y = r3.Add(r3.Scale(s, e), r3.Scale(c, f))
	return x, y, z
}

// ToGalactic returns v (ICRS axes) expressed on galactic axes.
func ToGalactic(v r3.Vec) r3.Vec {
	return r3.Vec{X: r3.Dot(galX, v), Y: r3.Dot(galY, v), Z: r3.Dot(galZ, v)}
}

// FromGalactic returns g (galactic axes) expressed on ICRS axes.
func FromGalactic(g r3.Vec) r3.Vec {
	return r3.Add(r3.Add(r3.Scale(g.X, galX), r3.Scale(g.Y, galY)), r3.Scale(g.Z, galZ))
}

// GalacticLB returns the galactic longitude in [0, 360) and latitude in
// [−90, 90] degrees of ICRS direction v.
func GalacticLB(v r3.Vec) (lDeg, bDeg float64) {
	return RADec(ToGalactic(v))
}

// FromGalacticLB returns the ICRS unit vector of galactic longitude l and
// latitude b, in degrees.
func FromGalacticLB(lDeg, bDeg float64) r3.Vec {
	return FromGalactic(FromRADec(lDeg, bDeg))
}
