package catalog

import "math"

// Galactic coordinates, used only to build the synthetic sky. The rotation is
// defined by the ICRS position of the north galactic pole, (α, δ) =
// (192.85948°, 27.12825°), and the galactic longitude of the north celestial
// pole, 122.93192° (The Hipparcos and Tycho Catalogues, ESA SP-1200, Vol. 1,
// §1.5.3). The package keeps its own copy so that catalog imports no other
// skyframe package.
const (
	galNGPRA  = 192.85948 // degrees, ICRS
	galNGPDec = 27.12825  // degrees, ICRS
	galLonNCP = 122.93192 // degrees, galactic longitude of the NCP
)

// galToICRS holds the galactic basis vectors in ICRS: row 0 is the direction
// (l, b) = (0°, 0°) (the galactic centre), row 1 is (90°, 0°), row 2 is the
// north galactic pole. An ICRS vector is v = Σ g_i · galToICRS[i].
var galToICRS = func() [3][3]float64 {
	ra, dec := galNGPRA*math.Pi/180, galNGPDec*math.Pi/180
	zg := [3]float64{math.Cos(dec) * math.Cos(ra), math.Cos(dec) * math.Sin(ra), math.Sin(dec)}
	// Part of the celestial pole (0,0,1) perpendicular to the galactic pole:
	// it points to galactic longitude galLonNCP in the galactic plane.
	u := [3]float64{-zg[2] * zg[0], -zg[2] * zg[1], 1 - zg[2]*zg[2]}
	n := math.Sqrt(u[0]*u[0] + u[1]*u[1] + u[2]*u[2])
	u = [3]float64{u[0] / n, u[1] / n, u[2] / n}
	// w = zg × u points to longitude galLonNCP + 90°.
	w := [3]float64{zg[1]*u[2] - zg[2]*u[1], zg[2]*u[0] - zg[0]*u[2], zg[0]*u[1] - zg[1]*u[0]}
	s, c := math.Sincos(galLonNCP * math.Pi / 180)
	var m [3][3]float64
	for i := 0; i < 3; i++ {
		m[0][i] = c*u[i] - s*w[i]
		m[1][i] = s*u[i] + c*w[i]
		m[2][i] = zg[i]
	}
	return m
}()

// galacticToICRS converts a galactic unit vector to ICRS.
func galacticToICRS(gx, gy, gz float64) (x, y, z float64) {
	m := &galToICRS
	x = gx*m[0][0] + gy*m[1][0] + gz*m[2][0]
	y = gx*m[0][1] + gy*m[1][1] + gz*m[2][1]
	z = gx*m[0][2] + gy*m[1][2] + gz*m[2][2]
	return x, y, z
}

// icrsToGalactic is the inverse of galacticToICRS (the matrix is orthogonal).
func icrsToGalactic(x, y, z float64) (gx, gy, gz float64) {
	m := &galToICRS
	gx = x*m[0][0] + y*m[0][1] + z*m[0][2]
	gy = x*m[1][0] + y*m[1][1] + z*m[1][2]
	gz = x*m[2][0] + y*m[2][1] + z*m[2][2]
	return gx, gy, gz
}

// galacticLB returns the unit vector of galactic longitude l and latitude b
// (degrees) on galactic axes.
func galacticLB(l, b float64) (gx, gy, gz float64) {
	sl, cl := math.Sincos(l * math.Pi / 180)
	sb, cb := math.Sincos(b * math.Pi / 180)
	return cb * cl, cb * sl, sb
}
