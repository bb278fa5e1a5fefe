package render

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/spectrum"
)

// LimbDarkening is the coefficient u of the linear limb-darkening law
// I(μ)/I(1) = 1 − u(1 − μ) used for stars drawn as discs: u = 0.6, the
// Eddington approximation of a grey atmosphere, I(μ) ∝ 2 + 3μ (Eddington
// 1926, The Internal Constitution of the Stars; Mihalas 1978, Stellar
// Atmospheres, 2nd ed., §3-3). It is applied alike at every wavelength.
const LimbDarkening = 0.6

// DiscThreshold is the apparent angular radius, in pixels at the image
// centre (see Options), above which a star is drawn as a limb-darkened
// disc of its true size instead of as a point through the PSF.
const DiscThreshold = 0.5

// ErrInsideStar reports an observer inside a star's radius (or at its
// centre); the error is an *InsideStarError.
var ErrInsideStar = errors.New("render: observer inside a star")

// InsideStarError names the star the observer is inside of.
type InsideStarError struct {
	Row     int    // catalogue row
	ID      int64  // catalogue id
	Name    string // designation, "" when none
	RadiusP float64
	DistP   float64 // observer's distance from the star's centre, pc
}

func (e *InsideStarError) Error() string {
	who := e.Name
	if who == "" {
		who = catalog.DisplayID(e.ID)
	}
	return fmt.Sprintf("%v: %s (row %d): the observer is %.4g pc from its centre, inside its radius %.4g pc (from its luminosity and temperature)",
		ErrInsideStar, who, e.Row, e.DistP, e.RadiusP)
}

func (e *InsideStarError) Unwrap() error { return ErrInsideStar }

// discStar is a star to be drawn as a disc, found by the transform.
type discStar struct {
	row  int     // row in the chunk's Stars
	app  r3.Vec  // apparent direction of the centre (ship frame)
	lnW  float64 // ln of the rest dilution at the observer, sin²ρ
	teff float64 // rest temperature, K
	gRow int     // global row (stream: offset by the earlier chunks)
	// path is the apparent direction of the centre at each knot of a
	// blurred frame's exposure, as the middle knot's camera shows it
	// (RenderMotion; see disc_blur.go); nil for an instant.
	path []r3.Vec
}

// pixelsPerRadian returns the image scale at the image centre, used by the
// disc criterion: pinhole f, fisheye k, equirect W/2π, cube face h/2.
func pixelsPerRadian(p *camera.Projection) float64 {
	w, h := float64(p.Width), float64(p.Height)
	switch p.Kind {
	case camera.Pinhole:
		return (w / 2) / math.Tan(p.FieldOfView()*math.Pi/360)
	case camera.Fisheye:
		return (math.Min(w, h) / 2) / (p.FieldOfView() * math.Pi / 360)
	case camera.Equirect:
		return w / (2 * math.Pi)
	default:
		return h / 2
	}
}

// lnDiscThreshold is ln of the smallest observed dilution ρ′² of a disc.
func lnDiscThreshold(p *camera.Projection) float64 {
	r := DiscThreshold / pixelsPerRadian(p)
	return 2 * math.Log(r)
}

// drawDiscs draws each disc star, in catalogue order, into f's buffer.
//
// A star whose observer-frame dilution at rest is W = sin²ρ (ρ its angular
// radius in the catalogue frame, R = r·√W, from its luminosity and
// temperature through the catalogue V) is a sphere of radius R. Each sample
// direction n′ of a pixel is taken back through the exact inverse
// aberration to n and its Doppler factor D; when n meets the sphere
// (angle θ to the centre < ρ) the sample has the intensity of a blackbody
// at D·T (the I_ν/ν³ invariance, point by point), limb-darkened by the
// linear law with μ = √(1 − sin²θ/sin²ρ) and normalised by 1/(1 − u/3) so
// that the disc's flux is the star's: ∫I dΩ = πB sin²ρ to O(ρ²). Samples:
// s×s per pixel of the disc's bounding box, s = 8 for discs under 4 px of
// radius, 4 under 32 px, 2 beyond; each weighted by its solid angle. The
// Doppler channel is not changed by discs.
func drawDiscs(f *Frame, stars []discStar, workers int) error {
	if len(stars) == 0 {
		return nil
	}
	p := f.Options.Projection
	if err := p.Prepare(); err != nil {
		return err
	}
	sa, err := newPixelSolidAngle(&p)
	if err != nil {
		return err
	}
	boost := f.Options.Observer.Boost
	ppr := pixelsPerRadian(&p)
	k := f.extended() / math.Pi
	for _, ds := range stars {
		if ds.path != nil {
			if moved, err := drawMovingDisc(f, &p, &sa, &ds, workers); err != nil || moved {
				if err != nil {
					return err
				}
				continue
			}
		}
		dg := newDiscGeom(boost, &ds, ppr)
		s := dg.s
		x0, y0, x1, y1 := discBox(&p, boost, dg.ns, dg.rho)
		if x0 >= x1 || y0 >= y1 {
			continue
		}
		color := f.Options.Color
		parallel(workers, y1-y0, func(jj int) {
			j := y0 + jj
			row := f.Pix[3*j*f.W : 3*(j+1)*f.W]
			inv := 1 / float64(s)
			for i := x0; i < x1; i++ {
				var X, Y, Z float64
				for b := 0; b < s; b++ {
					y := float64(j) + (float64(b)+0.5)*inv
					for a := 0; a < s; a++ {
						x := float64(i) + (float64(a)+0.5)*inv
						sm, yk, _, ok := dg.sample(&p, &sa, x, y)
						if !ok {
							continue
						}
						X += sm.X / sm.Y * yk
						Y += yk
						Z += (1 - sm.X - sm.Y) / sm.Y * yk
					}
				}
				if !(Y > 0) {
					continue
				}
				xl, yl, zl := k*X, k*Y, k*Z
				r, g, b := spectrum.XYZToLinearSRGB(xl, yl, zl, color)
				r, g, b = spectrum.GamutMap(r, g, b, yl)
				if !(finite(r) && finite(g) && finite(b)) {
					continue
				}
				px := row[3*i : 3*i+3]
				px[0] += float32(r)
				px[1] += float32(g)
				px[2] += float32(b)
			}
		})
	}
	return nil
}

// discBox returns the pixel box [x0, x1)×[y0, y1) holding the aberrated
// image of the disc of angular radius rho around the catalogue-frame
// direction ns: the box of 64 rim points and the centre, one pixel wider
// each way, clamped to the image; the whole image when a rim point does
// not project or the disc may straddle an equirect seam.
func discBox(p *camera.Projection, boost camera.Boost, ns r3.Vec, rho float64) (x0, y0, x1, y1 int) {
	return discBoxExt(p, boost, ns, rho, 0)
}

// discBoxExt is discBox clamped to the image widened by ext pixels each
// way instead of to the image (ext > 0 only for a pinhole, which shows
// directions beyond its edges too).
func discBoxExt(p *camera.Projection, boost camera.Boost, ns r3.Vec, rho float64, ext int) (x0, y0, x1, y1 int) {
	W, H := p.Width, p.Height
	e1 := r3.Cross(ns, r3.Vec{Z: 1})
	if r3.Norm2(e1) < 1e-6 {
		e1 = r3.Cross(ns, r3.Vec{X: 1})
	}
	e1 = r3.Unit(e1)
	e2 := r3.Cross(ns, e1)
	minX, minY, maxX, maxY := math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)
	cr, sr := math.Cos(rho), math.Sin(rho)
	for k := -1; k < 64; k++ {
		d := ns
		if k >= 0 {
			a := 2 * math.Pi * float64(k) / 64
			d = r3.Add(r3.Scale(cr, ns), r3.Add(r3.Scale(sr*math.Cos(a), e1), r3.Scale(sr*math.Sin(a), e2)))
		}
		np, _ := boost.Apply(d)
		x, y, ok := p.Forward(np)
		if !ok || !finite(x) || !finite(y) {
			return 0, 0, W, H
		}
		minX, maxX = math.Min(minX, x), math.Max(maxX, x)
		minY, maxY = math.Min(minY, y), math.Max(maxY, y)
	}
	// The rim polygon misses at most the sagitta of a 1/64 arc (< 0.5 % of
	// the radius); a pixel of margin each way covers it for any disc up to
	// 200 px, and larger ones get 1 % of their size.
	m := 1 + 0.01*math.Max(maxX-minX, maxY-minY)
	if p.Kind == camera.Equirect {
		if maxX-minX > float64(W)/2 {
			minX, maxX = 0, float64(W)
		}
		// A disc holding a pole reaches the top or bottom row (ns here is
		// the apparent centre's catalogue direction; the apparent disc is
		// within a few radii of the apparent centre, so test that too).
		np, d := boost.Apply(ns)
		if rr := 2 * rho / d; math.Abs(np.Z) > math.Cos(rr) {
			minX, maxX = 0, float64(W)
			if np.Z > 0 {
				minY = 0
			} else {
				maxY = float64(H)
			}
		}
	}
	x0 = int(math.Max(-float64(ext), math.Floor(minX-m)))
	y0 = int(math.Max(-float64(ext), math.Floor(minY-m)))
	x1 = int(math.Min(float64(W+ext), math.Ceil(maxX+m)))
	y1 = int(math.Min(float64(H+ext), math.Ceil(maxY+m)))
	return x0, y0, x1, y1
}

// discGeom is one disc's geometry in a frame: its centre ns in the ship's
// rest frame (catalogue frame boosted back), sin²ρ and ρ of its angular
// radius there, its sub-sampling s per pixel axis, ln T of its surface and
// the limb-darkening normalisation. Sharp and blurred discs sample it alike.
type discGeom struct {
	shipIn     camera.Boost
	ns         r3.Vec
	sin2, rho  float64
	s          int
	lnT0, norm float64
}

// newDiscGeom returns ds's geometry (ppr the projection's pixels per
// radian at the centre): s = 8 for discs under 4 px of radius, 4 under 32,
// 2 beyond, the radius taken at the disc's Doppler factor.
func newDiscGeom(boost camera.Boost, ds *discStar, ppr float64) discGeom {
	g := discGeom{shipIn: boost.Inverse(), sin2: math.Exp(ds.lnW), lnT0: math.Log(ds.teff), norm: 1 / (1 - LimbDarkening/3)}
	g.ns, _ = g.shipIn.Apply(ds.app)
	g.rho = math.Asin(math.Sqrt(g.sin2))
	_, dc := boost.Apply(g.ns)
	rpx := g.rho / dc * ppr
	g.s = 2
	switch {
	case rpx < 4:
		g.s = 8
	case rpx < 32:
		g.s = 4
	}
	return g
}

// sample returns the disc's spectrum and luminance weight yk (limb
// darkening × D-shifted Y × the sub-sample's solid angle) at sub-pixel
// centre (x, y) of p, with the direction np there; ok is false where the
// point has no direction or misses the disc.
func (g *discGeom) sample(p *camera.Projection, sa *pixelSolidAngle, x, y float64) (sm spectrum.Sample, yk float64, np r3.Vec, ok bool) {
	np, ok = p.Inverse(x, y)
	if !ok {
		return sm, 0, np, false
	}
	n, dInv := g.shipIn.Apply(np)
	if r3.Dot(n, g.ns) <= 0 {
		return sm, 0, np, false
	}
	st2 := r3.Norm2(r3.Cross(n, g.ns))
	if st2 >= g.sin2 {
		return sm, 0, np, false
	}
	mu := math.Sqrt(1 - st2/g.sin2)
	ld := (1 - LimbDarkening*(1-mu)) * g.norm
	sm = spectrum.Lookup(g.lnT0 - math.Log(dInv))
	yk = ld * math.Exp(sm.LnY) * sa.sub(x, y, g.s, np)
	return sm, yk, np, true
}
