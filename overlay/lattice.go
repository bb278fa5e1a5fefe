package overlay

import (
	"errors"
	"fmt"
	"math"

	"git.sr.ht/~sbinet/gg"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
)

// MaxBeacons is the largest lattice drawn without LatticeOptions.Confirm.
const MaxBeacons = 1_000_000

// DefaultLatticeSpacing is the beacon spacing in parsecs when
// LatticeOptions.Spacing is 0.
const DefaultLatticeSpacing = 1.0

// ErrLattice reports unusable lattice options.
var ErrLattice = errors.New("overlay: lattice")

// LatticeOptions configure the beacon lattice: a cubic array of point
// beacons at rest in the catalogue frame, PerSide³ of them, Spacing parsecs
// apart along the ICRS axes, centred on Origin. Seen through the same
// transform as the stars (parallax from the observer's position, then the
// boost), it shows how the ship's motion distorts space around it,
// including the apparent rotation of nearby beacons. The zero value draws
// no lattice.
type LatticeOptions struct {
	// PerSide is the number of beacons along each axis; 0 draws none.
	PerSide int
	// Spacing between neighbouring beacons, parsecs; 0 means
	// DefaultLatticeSpacing.
	Spacing float64
	// Origin is the lattice centre (ICRS, parsecs, Sun at the origin),
	// normally the ship's starting point.
	Origin r3.Vec
	// Confirm allows more than MaxBeacons beacons.
	Confirm bool
}

// Beacon is one lattice point as the observer sees it.
type Beacon struct {
	// I, J, K index the beacon along ICRS x, y, z (0..PerSide−1).
	I, J, K int
	// Pos is the beacon's position (ICRS, parsecs).
	Pos r3.Vec
	// Dir is its apparent direction (ship frame) and D its Doppler factor.
	Dir r3.Vec
	D   float64
	// Dist is its distance from the observer in the catalogue frame, pc.
	Dist float64
	// X, Y are its continuous pixel coordinates.
	X, Y float64
}

// Count returns the number of beacons, PerSide³, and checks the options:
// PerSide ≥ 0, Spacing finite and ≥ 0, Origin finite, and at most
// MaxBeacons unless Confirm. The error names the count.
func (o LatticeOptions) Count() (int, error) {
	if o.PerSide < 0 {
		return 0, fmt.Errorf("%w: PerSide %d, want ≥ 0", ErrLattice, o.PerSide)
	}
	if !(o.Spacing >= 0) || math.IsInf(o.Spacing, 0) {
		return 0, fmt.Errorf("%w: Spacing %g pc, want finite and ≥ 0 (0: the default)", ErrLattice, o.Spacing)
	}
	for _, v := range []float64{o.Origin.X, o.Origin.Y, o.Origin.Z} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return 0, fmt.Errorf("%w: Origin %v is not finite", ErrLattice, o.Origin)
		}
	}
	if o.PerSide > 100_000 { // cube would overflow int64 arithmetic below
		return 0, fmt.Errorf("%w: %d per side is %.3g beacons, more than %d", ErrLattice, o.PerSide, math.Pow(float64(o.PerSide), 3), MaxBeacons)
	}
	n := o.PerSide * o.PerSide * o.PerSide
	if n > MaxBeacons && !o.Confirm {
		return n, fmt.Errorf("%w: %d per side is %d beacons, more than %d (set Confirm to draw them anyway)", ErrLattice, o.PerSide, n, MaxBeacons)
	}
	return n, nil
}

// LatticeBeacons returns the beacons visible in projection p to observer
// obs, in index order (i fastest, k slowest). For each beacon at X the
// catalogue direction is n = (X − P)/|X − P| from the observer's position P
// (a beacon exactly at P is skipped), and the apparent direction is
// obs.Boost.Apply(n). Beacons off the image (or behind a pinhole, outside a
// fisheye circle) are left out.
func LatticeBeacons(p camera.Projection, obs camera.Observer, opt LatticeOptions) ([]Beacon, error) {
	n, err := opt.Count()
	if err != nil || n == 0 {
		return nil, err
	}
	if err := p.Prepare(); err != nil {
		return nil, err
	}
	step := opt.Spacing
	if step == 0 {
		step = DefaultLatticeSpacing
	}
	half := float64(opt.PerSide-1) / 2
	w, h := float64(p.Width), float64(p.Height)
	var out []Beacon
	for k := 0; k < opt.PerSide; k++ {
		for j := 0; j < opt.PerSide; j++ {
			for i := 0; i < opt.PerSide; i++ {
				pos := r3.Add(opt.Origin, r3.Vec{X: (float64(i) - half) * step, Y: (float64(j) - half) * step, Z: (float64(k) - half) * step})
				d := r3.Sub(pos, obs.Position)
				r := r3.Norm(d)
				if !(r > 0) {
					continue
				}
				np, dop := obs.Boost.Apply(r3.Scale(1/r, d))
				x, y, ok := projectVisible(&p, np)
				if !ok || x < 0 || x > w || y < 0 || y > h {
					continue
				}
				out = append(out, Beacon{I: i, J: j, K: k, Pos: pos, Dir: np, D: dop, Dist: r, X: x, Y: y})
			}
		}
	}
	return out, nil
}

// drawBeacons draws each beacon as a small cross, larger for nearer
// beacons (arm ∝ spacing/distance, 1.5–5 points), tinted by the Doppler
// factor: bluish ahead (D > 1), reddish behind.
func drawBeacons(dc *gg.Context, beacons []Beacon, spacing, scale float64) {
	if spacing == 0 {
		spacing = DefaultLatticeSpacing
	}
	dc.SetLineWidth(1 * scale)
	for _, b := range beacons {
		arm := math.Max(1.5, math.Min(5, 3*spacing/b.Dist)) * scale
		t := math.Max(-1, math.Min(1, math.Log2(b.D)/3))
		r, g, bl := 0.85-0.3*t, 0.85, 0.85+0.15*t
		if t < 0 {
			r, g, bl = 0.85+0.15*(-t), 0.85-0.25*(-t), 0.85-0.4*(-t)
		}
		dc.SetRGBA(r, g, bl, 0.8)
		dc.MoveTo(b.X-arm, b.Y)
		dc.LineTo(b.X+arm, b.Y)
		dc.MoveTo(b.X, b.Y-arm)
		dc.LineTo(b.X, b.Y+arm)
		dc.Stroke()
	}
}
