package render

import (
	"errors"
	"fmt"
	"math"
	"runtime"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/spectrum"
)

// Cosmic microwave background constants.
const (
	// CMBTemperature is the CMB monopole temperature T₀ in kelvin
	// (Fixsen 2009, ApJ 707, 916).
	CMBTemperature = 2.72548
	// SunCMBSpeed is the Sun's speed relative to the CMB rest frame, km/s
	// (Planck 2018 results I, A&A 641, A1).
	SunCMBSpeed = 369.82
	// SunCMBL and SunCMBB are the galactic longitude and latitude, degrees,
	// toward which the Sun moves relative to the CMB (Planck 2018 I).
	SunCMBL = 264.021
	SunCMBB = 48.253
)

// speedOfLightKMS is c in km/s (exact by the SI definition of the metre).
const speedOfLightKMS = 299792.458

// ErrCMB reports unusable CMB options or a frame the background cannot be
// added to.
var ErrCMB = errors.New("render: CMB")

// CMBOptions control AddCMB. The zero value renders the CMB at T₀ =
// CMBTemperature with the Sun's measured motion through it, on the frame's
// worker count.
type CMBOptions struct {
	// T0 is the CMB rest-frame temperature in kelvin; 0 means CMBTemperature.
	T0 float64
	// NoSunMotion treats the catalogue frame as the CMB rest frame (drops
	// the 369.82 km/s solar dipole), for tests and comparisons.
	NoSunMotion bool
	// Workers is the number of goroutines; 0 means the frame's
	// Options.Workers, and then runtime.GOMAXPROCS(0). The result does not
	// depend on it: every pixel is computed independently.
	Workers int
}

// SunCMBBoost returns the boost from the CMB rest frame to the catalogue
// (solar-system barycentric) frame: speed SunCMBSpeed/c toward galactic
// (SunCMBL, SunCMBB).
func SunCMBBoost() camera.Boost {
	b, err := camera.NewBoost(camera.FromGalacticLB(SunCMBL, SunCMBB), SunCMBSpeed/speedOfLightKMS)
	if err != nil { // unreachable: the constants are valid
		return camera.Boost{}
	}
	return b
}

// cmbModel evaluates T′(n′) for one ship boost.
type cmbModel struct {
	t0     float64
	shipIn camera.Boost // ship frame → catalogue frame
	sunIn  camera.Boost // catalogue frame → CMB frame
	sun    bool
}

func newCMBModel(ship camera.Boost, opt CMBOptions) cmbModel {
	m := cmbModel{t0: opt.T0, shipIn: ship.Inverse(), sun: !opt.NoSunMotion}
	if m.t0 == 0 {
		m.t0 = CMBTemperature
	}
	if m.sun {
		m.sunIn = SunCMBBoost().Inverse()
	}
	return m
}

// temperature returns T′ for the apparent (ship-frame) unit direction n′.
//
// Going back along the chain ship → catalogue → CMB frame: the inverse
// ship boost gives the catalogue-frame direction n and the factor
// 1/D_ship = γ(1 − β n′·b̂); the inverse solar boost gives
// 1/D_sun = γ_s(1 − β_s n·b̂_s). A photon of frequency ν in the CMB frame is
// seen at ν·D_sun·D_ship, so T′ = T₀·D_sun(n)·D_ship(n′), the exact
// relativistic composition of both motions.
func (m *cmbModel) temperature(np r3.Vec) float64 {
	n, dInv := m.shipIn.Apply(np)
	if m.sun {
		dInv *= m.sunIn.Doppler(n)
	}
	return m.t0 / dInv
}

// CMBTemperatureAt returns the CMB temperature T′ in kelvin seen by a ship
// with the given boost (relative to the catalogue frame) in apparent
// direction np (ship frame, ICRS axes, need not be unit), with the Sun's
// motion through the CMB included unless opt.NoSunMotion. At rest it is
// T₀ times the solar dipole, 1 ± 1.23·10⁻³.
func CMBTemperatureAt(ship camera.Boost, np r3.Vec, opt CMBOptions) float64 {
	m := newCMBModel(ship, opt)
	return m.temperature(np)
}

// pixelSolidAngle evaluates the solid angle in steradians of one pixel of a
// projection at the pixel whose centre shows direction n: the Jacobian
// of Inverse at the pixel centre (exact per row for Equirect).
type pixelSolidAngle struct {
	kind   camera.Kind
	w, h   float64
	invF2  float64 // Pinhole, Cube: 1/f², f the focal length in pixels
	axis   r3.Vec  // Pinhole, Fisheye: optical axis
	faces  [6]r3.Vec
	invK2  float64 // Fisheye: 1/k², k pixels per radian
	invK   float64 // Fisheye: 1/k
	cx, cy float64 // Fisheye: the image centre, px
	lonPix float64 // Equirect: 2π/W
}

func newPixelSolidAngle(p *camera.Projection) (pixelSolidAngle, error) {
	s := pixelSolidAngle{kind: p.Kind, w: float64(p.Width), h: float64(p.Height), axis: p.Centre()}
	switch p.Kind {
	case camera.Pinhole:
		f := (s.w / 2) / math.Tan(p.FieldOfView()*math.Pi/360)
		s.invF2 = 1 / (f * f)
	case camera.Fisheye:
		k := (math.Min(s.w, s.h) / 2) / (p.FieldOfView() * math.Pi / 360)
		s.invK2, s.invK = 1/(k*k), 1/k
		s.cx, s.cy = s.w/2, s.h/2
	case camera.Equirect:
		s.lonPix = 2 * math.Pi / s.w
	case camera.Cube:
		f := s.h / 2
		s.invF2 = 1 / (f * f)
		for i := range s.faces {
			d, ok := p.Inverse((float64(i)+0.5)*s.h, s.h/2)
			if !ok {
				return s, fmt.Errorf("%w: cube face %d has no centre direction", ErrCMB, i)
			}
			s.faces[i] = d
		}
	default:
		return s, fmt.Errorf("%w: projection kind %v", ErrCMB, p.Kind)
	}
	return s, nil
}

// max returns an upper bound on the solid angle of any pixel.
func (s *pixelSolidAngle) max() float64 {
	switch s.kind {
	case camera.Pinhole, camera.Cube:
		return s.invF2
	case camera.Fisheye:
		return s.invK2
	default:
		return s.lonPix * math.Pi / s.h
	}
}

// at returns the solid angle of pixel (i, j) whose centre direction is n.
func (s *pixelSolidAngle) at(i, j int, n r3.Vec) float64 {
	switch s.kind {
	case camera.Pinhole:
		c := r3.Dot(n, s.axis)
		return c * c * c * s.invF2
	case camera.Cube:
		face := min(5, max(0, int(float64(i)/s.h)))
		c := r3.Dot(n, s.faces[face])
		return c * c * c * s.invF2
	case camera.Fisheye:
		return s.fisheye(float64(i)+0.5, float64(j)+0.5)
	default: // Equirect: lat = (H/2 − y)·π/H, exact over the row.
		top := (s.h/2 - float64(j)) * math.Pi / s.h
		bot := (s.h/2 - float64(j) - 1) * math.Pi / s.h
		return s.lonPix * (math.Sin(top) - math.Sin(bot))
	}
}

// sub returns the solid angle of a sub-pixel of side 1/s pixels centred on
// the continuous image position (x, y), whose direction is n: the
// Jacobian at n times 1/s² (Equirect: exact over the sub-row). With s = 1
// at a pixel centre it equals at.
func (s *pixelSolidAngle) sub(x, y float64, ns int, n r3.Vec) float64 {
	inv := 1 / float64(ns)
	switch s.kind {
	case camera.Pinhole:
		c := r3.Dot(n, s.axis)
		return c * c * c * s.invF2 * inv * inv
	case camera.Cube:
		face := min(5, max(0, int(x/s.h)))
		c := r3.Dot(n, s.faces[face])
		return c * c * c * s.invF2 * inv * inv
	case camera.Fisheye:
		return s.fisheye(x, y) * inv * inv
	default:
		top := (s.h/2 - (y - 0.5*inv)) * math.Pi / s.h
		bot := (s.h/2 - (y + 0.5*inv)) * math.Pi / s.h
		return s.lonPix * inv * (math.Sin(top) - math.Sin(bot))
	}
}

// fisheye returns the Jacobian of the equidistant fisheye at the image
// position (x, y): r = kα, so dA = r dr dφ = k²α dα dφ and dΩ = sin α dα
// dφ, and α = r/k from the distance r to the image centre (the direction's
// angle from the axis, without finding it from the direction).
func (s *pixelSolidAngle) fisheye(x, y float64) float64 {
	dx, dy := x-s.cx, y-s.cy
	a := math.Sqrt(dx*dx+dy*dy) * s.invK
	if a < 1e-8 {
		return s.invK2
	}
	return math.Sin(a) / a * s.invK2
}

// AddCMB adds the cosmic microwave background, as seen from the frame's
// observer (f.Options.Observer), to the linear buffer of f, at its true
// surface brightness relative to the stars. It belongs to the linear stage:
// call it after Render and before tone mapping, so the background is also
// in the FITS output.
//
// Each pixel gets the radiance of a blackbody at T′(n′) (see
// CMBTemperatureAt) for the direction n′ at its centre. A diffuse source of
// luminance L (cd/m² = lux/sr) puts illuminance L·Ω_px on a pixel of solid
// angle Ω_px, and the frame converts illuminance to buffer units with
// f.Scale, so the pixel's luminance is Scale·L·Ω_px. The blackbody's
// luminance is L = e^LnY/π, since spectrum.Lookup gives the illuminance
// πB per unit dilution. Ω_px is the Jacobian of the projection at the pixel
// centre (Pinhole and Cube faces: cos³α/f²; Fisheye: sin α/(α k²); Equirect:
// exact per row). Colour comes from the Planckian chromaticity through
// f.Options.Color, like the stars'. The bolometric surface brightness then
// scales as T′⁴ ∝ D⁴ with no further factor.
//
// The Doppler channel, which describes stars, is not changed. Pixels outside
// a fisheye's circle stay as they are. AddCMB does not allocate per pixel;
// rows run in parallel and the result does not depend on the worker count.
func AddCMB(f *Frame, opt CMBOptions) error {
	if f == nil {
		return fmt.Errorf("%w: nil frame", ErrCMB)
	}
	if !(opt.T0 >= 0) || math.IsInf(opt.T0, 0) {
		return fmt.Errorf("%w: T0 %g K, want a finite temperature ≥ 0", ErrCMB, opt.T0)
	}
	if opt.Workers < 0 {
		return fmt.Errorf("%w: negative Workers %d", ErrCMB, opt.Workers)
	}
	p := f.Options.Projection
	if err := p.Prepare(); err != nil {
		return err
	}
	if p.Width != f.W || p.Height != f.H {
		return fmt.Errorf("%w: projection %d×%d does not match the buffer %d×%d", ErrCMB, p.Width, p.Height, f.W, f.H)
	}
	if k := f.extended(); !(k > 0) || math.IsInf(k, 0) {
		return fmt.Errorf("%w: frame Scale %g × ExtendedScale %g, want finite > 0", ErrCMB, f.Scale, f.Options.ExtendedScale)
	}
	sa, err := newPixelSolidAngle(&p)
	if err != nil {
		return err
	}
	m := newCMBModel(f.Options.Observer.Boost, opt)
	workers := opt.Workers
	if workers == 0 {
		workers = f.Options.Workers
	}
	if workers == 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	// Buffer luminance per (cd/m² · sr): Scale, and L = e^LnY/π.
	k := f.extended() / math.Pi
	// Pixels whose luminance would be below the smallest normal float32
	// (e^−87.3) even at the largest pixel solid angle skip the exponential.
	lnMin := -87.3 - math.Log(k*sa.max())
	color := f.Options.Color
	parallel(workers, f.H, func(j int) {
		row := f.Pix[3*j*f.W : 3*(j+1)*f.W]
		y := float64(j) + 0.5
		for i := 0; i < f.W; i++ {
			n, ok := p.Inverse(float64(i)+0.5, y)
			if !ok {
				continue
			}
			t := m.temperature(n)
			if !(t > 0) {
				continue
			}
			sm := spectrum.Lookup(math.Log(t))
			if sm.LnY < lnMin {
				continue
			}
			yl := k * sa.at(i, j, n) * math.Exp(sm.LnY)
			if !(yl > 0) || math.IsInf(yl, 0) {
				continue // far below one float32 ulp, or not representable
			}
			xl := sm.X / sm.Y * yl
			zl := (1 - sm.X - sm.Y) / sm.Y * yl
			r, g, b := spectrum.XYZToLinearSRGB(xl, yl, zl, color)
			r, g, b = spectrum.GamutMap(r, g, b, yl)
			px := row[3*i : 3*i+3]
			px[0] += float32(r)
			px[1] += float32(g)
			px[2] += float32(b)
		}
	})
	return nil
}
