package imgfile

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
)

// World coordinate system (WCS) keywords for FITS frames, following
// Greisen & Calabretta (2002), "Representations of world coordinates in
// FITS", A&A 395, 1061 (Paper I: CRPIX, PCi_j, CDELT, CRVAL, CTYPE, CUNIT)
// and Calabretta & Greisen (2002), "Representations of celestial
// coordinates in FITS", A&A 395, 1077 (Paper II: the TAN, ARC and CAR
// projections, LONPOLE, LATPOLE, RADESYS).
//
// What the WCS describes: the image shows the sky as the moving observer
// sees it, so the celestial coordinates (RA, Dec on ICRS axes) are those of
// the apparent, aberrated directions of the light in the ship frame, not the
// catalogue positions. A star at catalogue position (α, δ) appears at the
// pixel whose WCS coordinates are its aberrated direction.
//
// Pixel convention: FITS pixel coordinates are 1-based at pixel centres
// with (1,1) the bottom-left pixel (WriteFITS stores the bottom row first).
// A point at continuous image coordinates (x, y) — origin at the top-left
// corner, y down, as camera.Projection.Forward returns — has FITS pixel
// coordinates p1 = x + 1/2, p2 = H − y + 1/2.
//
// Orientation: the sky is seen from inside, so with north up, east (RA
// increasing) is to the left. The intermediate world coordinate x runs
// toward −Right and y toward Up, hence CDELT1 < 0 < CDELT2 for an unrolled
// camera; roll enters through the PCi_j rotation (TAN, ARC) or through
// LONPOLE and LATPOLE (CAR).

// ErrNoWCS reports a projection that has no single celestial WCS.
var ErrNoWCS = errors.New("imgfile: projection has no single WCS")

// WCSCards returns the celestial WCS header cards of projection p for
// WriteFITS: Pinhole → TAN (gnomonic), Fisheye → ARC (zenithal
// equidistant) with the reference point on the fisheye axis (which a Tilt
// moves away from Forward), Equirect → CAR (plate carrée) with the native
// reference point (φ0, θ0) = (0, 0) at Forward. The reference pixel is the
// image centre; CRVAL is its apparent RA and Dec; RADESYS is ICRS.
//
// A Cube strip has no single WCS (its six faces are six gnomonic
// projections): WCSCards returns an error wrapping ErrNoWCS and no cards,
// and callers then write the frame without a WCS. An invalid p gives
// camera's validation error.
func WCSCards(p camera.Projection) ([]Card, error) {
	if err := p.Validate(); err != nil {
		return nil, fmt.Errorf("imgfile: WCS: %w", err)
	}
	o := p.CentreOrientation()
	g := wcsGeometry{width: p.Width, height: p.Height, ref: o.Forward, right: o.Right, up: o.Up}
	switch p.Kind {
	case camera.Pinhole:
		// x − W/2 = f·tan(angle), f = (W/2)/tan(FOV/2) pixels: (180/π)/f
		// degrees per pixel at the centre, the same along x and y.
		f := float64(p.Width) / 2 / math.Tan(p.FieldOfView()*math.Pi/360)
		g.code, g.scaleX, g.scaleY = "TAN", 180/math.Pi/f, 180/math.Pi/f
	case camera.Fisheye:
		// r ∝ angle from the axis, FOV across min(W, H) pixels.
		s := p.FieldOfView() / float64(min(p.Width, p.Height))
		g.code, g.scaleX, g.scaleY = "ARC", s, s
	case camera.Equirect:
		g.code, g.scaleX, g.scaleY = "CAR", 360/float64(p.Width), 180/float64(p.Height)
	default:
		return nil, fmt.Errorf("imgfile: %v projection: %w", p.Kind, ErrNoWCS)
	}
	return g.cards()
}

// wcsGeometry is a projection reduced to what its WCS needs: the projection
// code, the image size, the angular scale at the reference point in degrees
// per pixel along x and y, and the frame (reference direction, image right,
// image up) at the image centre.
type wcsGeometry struct {
	code          string // "TAN", "ARC", "CAR"
	width, height int
	scaleX        float64 // deg per pixel, > 0
	scaleY        float64
	// ref is the direction at the image centre, right and up the unit
	// vectors along which image x grows and image y shrinks there; the
	// three are orthonormal with right = ref × up.
	ref, right, up r3.Vec
}

// radec returns the ICRS right ascension in [0, 360) and declination of a
// direction, in degrees.
func radec(v r3.Vec) (ra, dec float64) {
	ra = math.Atan2(v.Y, v.X) * 180 / math.Pi
	if ra < 0 {
		ra += 360
	}
	if ra >= 360 {
		ra -= 360
	}
	dec = math.Atan2(v.Z, math.Hypot(v.X, v.Y)) * 180 / math.Pi
	return ra, dec
}

// eastNorth returns the unit vectors toward increasing RA and Dec at the
// direction (ra, dec) in degrees. At the poles they follow the meridian ra.
func eastNorth(ra, dec float64) (e, n r3.Vec) {
	sa, ca := math.Sincos(ra * math.Pi / 180)
	sd, cd := math.Sincos(dec * math.Pi / 180)
	return r3.Vec{X: -sa, Y: ca}, r3.Vec{X: -sd * ca, Y: -sd * sa, Z: cd}
}

// cards builds the WCS header cards of g.
func (g wcsGeometry) cards() ([]Card, error) {
	if g.width < 1 || g.height < 1 || !(g.scaleX > 0) || !(g.scaleY > 0) ||
		math.IsInf(g.scaleX, 0) || math.IsInf(g.scaleY, 0) {
		return nil, fmt.Errorf("imgfile: WCS for %d×%d pixels at %g×%g deg/pixel: bad geometry", g.width, g.height, g.scaleX, g.scaleY)
	}
	// The reference point is the image centre (W/2, H/2) in continuous
	// coordinates: FITS pixel (W/2 + 1/2, H/2 + 1/2).
	crpix1 := float64(g.width)/2 + 0.5
	crpix2 := float64(g.height)/2 + 0.5
	ra0, dec0 := radec(g.ref)
	c := []Card{
		{"WCSNAME", "apparent ICRS", "aberrated directions seen by the observer"},
		{"RADESYS", "ICRS", "celestial reference system"},
		{"EQUINOX", 2000.0, "[yr] for readers that expect one"},
		{"CTYPE1", "RA---" + g.code, "right ascension, " + projName(g.code)},
		{"CTYPE2", "DEC--" + g.code, "declination, " + projName(g.code)},
		{"CUNIT1", "deg", ""},
		{"CUNIT2", "deg", ""},
		{"CRPIX1", crpix1, "reference pixel: image centre"},
		{"CRPIX2", crpix2, "reference pixel: image centre"},
		{"CRVAL1", posZero(ra0), "[deg] RA at reference pixel"},
		{"CRVAL2", posZero(dec0), "[deg] Dec at reference pixel"},
		{"CDELT1", -g.scaleX, "[deg] x scale; negative: east to the left"},
		{"CDELT2", g.scaleY, "[deg] y scale"},
	}
	switch g.code {
	case "TAN", "ARC":
		// Zenithal: the native pole (θ = 90°) is the reference point. With
		// LONPOLE = 180° (Paper II §2.4 default for zenithal projections)
		// the intermediate axes x, y point east and north at the reference
		// point, and PCi_j rotates the image axes (−right, up) onto them:
		// (x_east, y_north) = M·(u, v) with u = −right, v = up components,
		// and x_i = CDELT_i Σ_j PCi_j (p_j − CRPIX_j) (Paper I eq. 1).
		e, n := eastNorth(ra0, dec0)
		pc11 := -r3.Dot(e, g.right)
		pc12 := -r3.Dot(e, g.up)
		pc21 := r3.Dot(n, g.right)
		pc22 := r3.Dot(n, g.up)
		c = append(c,
			Card{"PC1_1", posZero(pc11), "rotation: image to east/north"},
			Card{"PC1_2", posZero(pc12 * g.scaleY / g.scaleX), ""},
			Card{"PC2_1", posZero(pc21 * g.scaleX / g.scaleY), ""},
			Card{"PC2_2", posZero(pc22), ""},
			Card{"LONPOLE", 180.0, "[deg] native longitude of celestial pole"},
		)
	case "CAR":
		// Cylindrical: the reference point is native (φ0, θ0) = (0, 0) in
		// direction ref, native longitude grows toward −right and the
		// native pole is up. LONPOLE is the native longitude of the
		// celestial north pole P and LATPOLE the declination of the native
		// pole (Paper II §2.4), which picks the right one of the two
		// solutions for δp.
		p := r3.Vec{Z: 1}
		phiP := math.Atan2(-r3.Dot(p, g.right), r3.Dot(p, g.ref)) * 180 / math.Pi
		if math.Abs(r3.Dot(p, g.right)) < 1e-15 && math.Abs(r3.Dot(p, g.ref)) < 1e-15 {
			// Native and celestial poles coincide: any LONPOLE gives the
			// same transformation (α = α0 ± φ); use the default 0.
			phiP = 0
		}
		raP, decP := radec(g.up)
		switch {
		case math.Hypot(g.ref.X, g.ref.Y) < 1e-8:
			// Reference point at a celestial pole (within 1e-8 rad):
			// CRVAL1 is then free, and Paper II §2.4 takes αp = CRVAL1,
			// so write the RA of the native pole there; the celestial
			// north pole is at native (0, 0) or (180°, 0). Snapping the
			// reference point onto the pole moves the sky by < 1e-8 rad,
			// less than the rounding error of CRVAL1 it avoids.
			if g.ref.Z > 0 {
				setCard(c, "CRVAL2", 90.0)
				phiP = 0
			} else {
				setCard(c, "CRVAL2", -90.0)
				phiP = 180
			}
			setCard(c, "CRVAL1", raP)
			decP = 0
		case math.Abs(math.Cos(phiP*math.Pi/180)) < 1e-5:
			// The celestial pole lies (nearly) on the native meridian
			// φ = ±90°, so the reference point is (nearly) on the
			// celestial equator. The equation for δp (Paper II eq. 8–9,
			// sin δ0 = cos δp cos φp) degenerates to 0 = 0 there and is
			// ill-conditioned nearby; at exactly δ0 = 0, |φp| = 90° the
			// paper lets LATPOLE give δp alone. Snap onto that case: the
			// sky moves by less than 1e-5 rad, and the rounding error it
			// avoids would be larger.
			setCard(c, "CRVAL2", 0.0)
			phiP = math.Copysign(90, phiP)
		}
		c = append(c,
			Card{"LONPOLE", posZero(phiP), "[deg] native longitude of celestial pole"},
			Card{"LATPOLE", posZero(decP), "[deg] declination of native pole"},
		)
	default:
		return nil, fmt.Errorf("imgfile: WCS projection code %q: %w", g.code, ErrNoWCS)
	}
	return c, nil
}

// posZero turns −0 into 0, for tidy headers.
func posZero(v float64) float64 {
	if v == 0 {
		return 0
	}
	return v
}

// setCard replaces the value of the card with the given key.
func setCard(c []Card, key string, v any) {
	for i := range c {
		if c[i].Key == key {
			c[i].Value = v
		}
	}
}

func projName(code string) string {
	switch code {
	case "TAN":
		return "gnomonic"
	case "ARC":
		return "zenithal equidistant"
	case "CAR":
		return "plate carree"
	}
	return code
}
