package render

import (
	"fmt"
	"math"
	"sync"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/spectrum"
)

// BrighteningV returns ΔV = V′ − V, the change of a star's V magnitude when
// a blackbody of temperature T (K) is seen with Doppler factor D under beam:
// the renderer's photometry (spectrum.Observe, the one definition) for one
// star at its rest-frame distance,
//
//	ΔV = −2.5 log₁₀( WScale(D) · F_V(D·T)/F_V(T) ),
//
// F_V the V-band flux per unit dilution (spectrum.Lookup's LnV). Negative
// values are brightenings: about −4.2 mag at 3000 K and D ≈ 4.4, while very
// hot stars fade toward +2.5 log₁₀ D (exact beaming). NaN for T or D not
// positive and finite, or an unknown beam.
func BrighteningV(T, D float64, beam spectrum.Beaming) float64 {
	if !(T > 0 && D > 0) || math.IsInf(T, 0) || math.IsInf(D, 0) {
		return math.NaN()
	}
	return spectrum.Observe(0, T, D, 1, beam).V
}

// Depth is the completeness bound of a frame: the faintest catalogue V whose
// star can reach the frame's limit somewhere in view.
type Depth struct {
	// Needed is the faintest catalogue V (seen from the Sun) a star may
	// have and still be drawn: Limit − DeltaV.
	Needed float64
	// DeltaV is the most negative V′ − V over the temperatures and Doppler
	// factors in view, at temperature T and Doppler factor D.
	DeltaV, T, D float64
	// DMin and DMax are the smallest and largest Doppler factors in view.
	DMin, DMax float64
}

// DopplerRange returns the smallest and largest Doppler factors of light
// reaching the frame opt describes: D(n′) = 1/(γ(1 − β cos θ′)) for the
// apparent directions n′ of its pixels, cos θ′ = n′·b̂. The extremes are the
// direction of motion and its opposite when they are in view, else found on
// a grid of 257 × 257 pixel positions (borders included), refined on a
// 33 × 33 grid around each, and widened by the fine grid's step, so the
// range contains the exact one. A fisheye images exactly the directions
// within half its field of its centre direction (its circle lies inside
// the frame), so its extremes are at the angles α ∓ FOV/2 from the
// direction of motion, α the centre's, clipped to [0, π]: exact, widened
// by 10⁻⁹ rad for rounding.
func DopplerRange(opt Options) (dmin, dmax float64, err error) {
	p := opt.Projection
	if err := p.Validate(); err != nil {
		return 0, 0, err
	}
	b := opt.Observer.Boost
	if b.Beta() == 0 {
		return 1, 1, nil
	}
	if p.Kind == camera.Fisheye {
		inv, dir := b.Inverse(), b.Dir()
		const eps = 1e-9
		alpha := math.Acos(math.Max(-1, math.Min(1, r3.Dot(r3.Unit(p.CentreOrientation().Forward), dir))))
		half := p.FieldOfView() * math.Pi / 180 / 2
		thMin, thMax := math.Max(0, alpha-half-eps), math.Min(math.Pi, alpha+half+eps)
		return 1 / inv.Doppler(unitAt(dir, thMax)), 1 / inv.Doppler(unitAt(dir, thMin)), nil
	}
	return dopplerRangeGrid(p, b)
}

// dopplerRangeGrid is DopplerRange by the grid of pixel positions, for any
// projection.
func dopplerRangeGrid(p camera.Projection, b camera.Boost) (dmin, dmax float64, err error) {
	inv := b.Inverse()
	dir := b.Dir()
	// cos θ′ extremes.
	cmin, cmax := 2.0, -2.0
	inView := func(v r3.Vec) bool {
		x, y, ok := p.Forward(v)
		return ok && x >= 0 && y >= 0 && x <= float64(p.Width) && y <= float64(p.Height)
	}
	if inView(dir) {
		cmax = 1
	}
	if inView(r3.Scale(-1, dir)) {
		cmin = -1
	}
	// A grid of pixel positions, then a finer one around each extreme.
	const n = 256
	sx, sy := float64(p.Width)/n, float64(p.Height)/n
	var minAt, maxAt [2]float64
	scan := func(x0, y0, dx, dy float64, m int) {
		for j := 0; j <= m; j++ {
			for i := 0; i <= m; i++ {
				x := math.Max(0, math.Min(float64(p.Width), x0+float64(i)*dx))
				y := math.Max(0, math.Min(float64(p.Height), y0+float64(j)*dy))
				v, ok := p.Inverse(x, y)
				if !ok {
					continue
				}
				c := r3.Dot(v, dir)
				if c < cmin {
					cmin, minAt = c, [2]float64{x, y}
				}
				if c > cmax {
					cmax, maxAt = c, [2]float64{x, y}
				}
			}
		}
	}
	scan(0, 0, sx, sy, n)
	if cmin > cmax {
		return 0, 0, fmt.Errorf("render: no pixel of the frame has a direction")
	}
	const m = 32
	if cmax < 1 {
		scan(maxAt[0]-sx, maxAt[1]-sy, 2*sx/m, 2*sy/m, m)
	}
	if cmin > -1 {
		scan(minAt[0]-sx, minAt[1]-sy, 2*sx/m, 2*sy/m, m)
	}
	// Widen by twice the angle of one fine step's diagonal at the centre's
	// pixel scale, which covers the projections' distortion at that scale.
	step := 2 * math.Hypot(2*sx/m, 2*sy/m) * p.PixelScale() * math.Pi / 180
	thMin := math.Max(0, math.Acos(math.Min(1, cmax))-step)
	thMax := math.Min(math.Pi, math.Acos(math.Max(-1, cmin))+step)
	dmax = 1 / inv.Doppler(unitAt(dir, thMin))
	dmin = 1 / inv.Doppler(unitAt(dir, thMax))
	return dmin, dmax, nil
}

// unitAt returns a unit vector at angle th from the unit vector d.
func unitAt(d r3.Vec, th float64) r3.Vec {
	// Any vector perpendicular to d.
	a := r3.Vec{X: 1}
	if math.Abs(d.X) > 0.9 {
		a = r3.Vec{Y: 1}
	}
	p := r3.Unit(r3.Cross(d, a))
	s, c := math.Sincos(th)
	return r3.Add(r3.Scale(c, d), r3.Scale(s, p))
}

// MaxBrightening returns the most negative BrighteningV over temperatures
// in [tmin, tmax] and Doppler factors in [dmin, dmax], and where it is: a
// 65 × 65 grid in ln T and ln D, refined twice around its best point.
// The extreme lies at a corner for most ranges (coolest star, largest D) but
// not always (hot stars brighten most at an intermediate D), hence the grid.
func MaxBrightening(tmin, tmax, dmin, dmax float64, beam spectrum.Beaming) (dv, T, D float64) {
	lt0, lt1 := math.Log(tmin), math.Log(tmax)
	ld0, ld1 := math.Log(dmin), math.Log(dmax)
	dv = math.Inf(1)
	const n = 64
	bt, bd := lt0, ld0
	for level := 0; level < 3; level++ {
		for i := 0; i <= n; i++ {
			lt := lt0 + (lt1-lt0)*float64(i)/n
			for j := 0; j <= n; j++ {
				ld := ld0 + (ld1-ld0)*float64(j)/n
				if v := BrighteningV(math.Exp(lt), math.Exp(ld), beam); v < dv {
					dv, T, D, bt, bd = v, math.Exp(lt), math.Exp(ld), lt, ld
				}
			}
		}
		// Refine within one cell of the best point.
		ht, hd := (lt1-lt0)/n, (ld1-ld0)/n
		lt0, lt1 = math.Max(math.Log(tmin), bt-ht), math.Min(math.Log(tmax), bt+ht)
		ld0, ld1 = math.Max(math.Log(dmin), bd-hd), math.Min(math.Log(dmax), bd+hd)
	}
	return dv, T, D
}

// NeededDepth returns the completeness bound of the frame opt describes for
// a catalogue whose temperatures span [tmin, tmax] K: the faintest catalogue
// V a star may have and still reach opt.Limit (DefaultLimitOffset fainter
// than Exposure when Limit is zero) somewhere in view, from the largest
// V-band brightening over those temperatures and the Doppler factors in
// view (DopplerRange). Stars are compared at their rest-frame distance from
// the Sun: a ship far from the Sun brightens stars it approaches, which the
// bound does not count.
func NeededDepth(opt Options, tmin, tmax float64) (Depth, error) {
	if !(tmin > 0 && tmax >= tmin) || math.IsInf(tmax, 0) {
		return Depth{}, fmt.Errorf("render: temperature range [%v, %v] K: want 0 < min ≤ max, finite", tmin, tmax)
	}
	lim := opt.Limit
	if lim == 0 {
		lim = opt.Exposure + DefaultLimitOffset
	}
	if math.IsNaN(lim) {
		return Depth{}, ErrLimit
	}
	dmin, dmax, err := DopplerRange(opt)
	if err != nil {
		return Depth{}, err
	}
	dv, T, D := MaxBrightening(tmin, tmax, dmin, dmax, opt.Beaming)
	return Depth{Needed: lim - dv, DeltaV: dv, T: T, D: D, DMin: dmin, DMax: dmax}, nil
}

// DepthProfile answers, for the frame it was made for, how deep a catalogue
// must go for stars whose Doppler factor lies in a given range (a patch of
// sky): the frame's limit minus the largest brightening over the
// temperature range and the part of that range in view.
type DepthProfile struct {
	Depth              // the frame's bound
	limit      float64 // the frame's limit
	ld0, ld1   float64 // ln D range in view
	tl0, tl1   float64 // ln D range of the table: ld0, ld1 rounded out to ldQuantum
	minDV      []float64
	tmin, tmax float64
	beaming    spectrum.Beaming
}

// NewDepthProfile tabulates min over T of ΔV on 257 values of ln D over the
// frame's range of Doppler factors (rounded out to ldQuantum); see
// NeededDepth for the arguments.
func NewDepthProfile(opt Options, tmin, tmax float64) (*DepthProfile, error) {
	return new(DepthProfiles).New(opt, tmin, tmax)
}

// ldQuantum is the step to which a depth profile's table range is rounded
// out (ln D, about 1.5·10⁻⁵): the table of a frame is a function of its
// rounded range, so frames whose Doppler ranges differ in their last bits
// (the heading of a flight is renormalised at every frame) share one.
const ldQuantum = 1.0 / (1 << 16)

// DepthProfiles makes depth profiles (NewDepthProfile), reusing the table
// of a recent one whose inputs — the range of Doppler factors in view
// rounded out to ldQuantum, the temperature range and the beaming
// convention — were the same: the frames of a cruise with the camera held
// have one range, and the table's 257 × 65 brightenings cost more than the
// rest of the frame's depth. The profiles are identical to
// NewDepthProfile's, so a frame's depth does not depend on the frames
// drawn before it. Its zero value is ready to use; it is safe for
// concurrent use.
type DepthProfiles struct {
	mu     sync.Mutex
	recent [4]*DepthProfile // newest first
}

// New is NewDepthProfile, with a recent profile's table when it has one
// for the same inputs.
func (c *DepthProfiles) New(opt Options, tmin, tmax float64) (*DepthProfile, error) {
	dep, err := NeededDepth(opt, tmin, tmax)
	if err != nil {
		return nil, err
	}
	ld0, ld1 := math.Log(dep.DMin), math.Log(dep.DMax)
	p := &DepthProfile{Depth: dep, limit: dep.Needed + dep.DeltaV, ld0: ld0, ld1: ld1,
		tl0: math.Floor(ld0/ldQuantum) * ldQuantum, tl1: math.Ceil(ld1/ldQuantum) * ldQuantum,
		tmin: tmin, tmax: tmax, beaming: opt.Beaming}
	c.mu.Lock()
	for _, q := range c.recent {
		if q != nil && q.tl0 == p.tl0 && q.tl1 == p.tl1 && q.tmin == tmin && q.tmax == tmax && q.beaming == p.beaming {
			p.minDV = q.minDV // read-only once made
			break
		}
	}
	c.mu.Unlock()
	if p.minDV != nil {
		return p, nil
	}
	const n = 256
	p.minDV = make([]float64, n+1)
	for i := range p.minDV {
		ld := p.tl0 + (p.tl1-p.tl0)*float64(i)/n
		best := math.Inf(1)
		for j := 0; j <= 64; j++ {
			T := tmin * math.Pow(tmax/tmin, float64(j)/64)
			best = math.Min(best, BrighteningV(T, math.Exp(ld), opt.Beaming))
		}
		p.minDV[i] = best
	}
	c.mu.Lock()
	copy(c.recent[1:], c.recent[:len(c.recent)-1])
	c.recent[0] = p
	c.mu.Unlock()
	return p, nil
}

// NeededFor returns the catalogue depth needed for sources whose Doppler
// factors lie in [dmin, dmax]: the frame's limit minus the largest
// brightening over the part of the range in view (tabulated nodes around
// it, less 0.02 mag for the temperature and D grids, and never shallower
// than the frame's own bound allows at its extreme). −Inf when no part of
// the range is in view.
func (p *DepthProfile) NeededFor(dmin, dmax float64) float64 {
	a, b := math.Log(dmin), math.Log(dmax)
	a, b = math.Max(a, p.ld0), math.Min(b, p.ld1)
	if !(a <= b) {
		return math.Inf(-1)
	}
	n := len(p.minDV) - 1
	if p.ld1 == p.ld0 {
		return p.Needed
	}
	i0 := int(math.Floor((a - p.tl0) / (p.tl1 - p.tl0) * float64(n)))
	i1 := int(math.Ceil((b - p.tl0) / (p.tl1 - p.tl0) * float64(n)))
	i0, i1 = max(0, i0), min(n, i1)
	best := math.Inf(1)
	for i := i0; i <= i1; i++ {
		best = math.Min(best, p.minDV[i])
	}
	if i1 == n {
		best = math.Min(best, p.DeltaV)
	}
	return p.limit - best + 0.02
}
