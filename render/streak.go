package render

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"sync"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
)

// Motion blur by streaks: a frame integrated over its exposure draws each
// star along its own apparent path instead of averaging whole sub-frames.
//
// The caller gives the observer and camera at K evenly spaced knots of the
// exposure (K odd, the middle knot the frame's instant). Every star is
// transformed at every knot — its direction and Doppler factor through
// each knot's observer (or the middle one's, reused when the observer does
// not change), its pixel through each knot's projection — and its path is
// interpolated between knots by quadratics through each run of three
// (segment s spans knots 2s, 2s+1, 2s+2). Along each segment the star is
// deposited with the PSF at n sub-positions at the midpoints of n equal
// steps of time, each with weight 1/(n·segments): the midpoint rule for
// the time integral, so the summed flux is the star's (to rounding) and a
// star that moves slowly on screen is denser where it is slower. n comes
// from the segment's own on-screen speed: successive sub-positions are at
// most StreakSpacing·FWHM apart (n ≤ MaxStreakSamples), so a streak is
// continuous; a star that moves less than that is deposited once, at the
// middle knot, exactly as Render deposits it. The photometry (brightness,
// colour, Doppler factor, culling) is the middle knot's: over one
// exposure it changes by far less than its first-order term, whose time
// mean the middle value already is.

// Streak sampling limits.
const (
	// StreakSpacing is the largest distance between successive
	// sub-positions of a streak, in units of the PSF's FWHM. Gaussians
	// spaced by 0.75 FWHM (σ·1.77) sum to a line whose brightness ripples
	// by under 0.5 % (the ripple of a sampled Gaussian is about
	// 2·exp(−2π²σ²/d²) for spacing d; Poisson summation [cp]).
	StreakSpacing = 0.75
	// MaxStreakSamples caps the sub-positions of one segment of a streak.
	MaxStreakSamples = 64
	// MaxKnots caps the knots of a frame's exposure (16 segments).
	MaxKnots = 33
	// KnotTolerance is the largest distance, in pixels, between a path
	// interpolated through the knots ChooseKnots picks and the exact path
	// at its probe points: 0.05 px, 3 % of the default FWHM.
	KnotTolerance = 0.05
)

// ChooseKnots returns the smallest number of knots K (3, 5, 9, 17 or
// MaxKnots) whose piecewise quadratic follows the exact on-screen paths of
// a set of probe points within tol pixels (0 means KnotTolerance), and the
// largest deviation found. at(u, xs, ys) sets the probes' pixels at time u
// of the exposure (u from −1 at the shutter's opening to 1 at its
// closing; NaN where a probe is not defined, which is then skipped). Each
// segment is checked at u = ±1/√3 of its half-width from its middle knot,
// where the error of a quadratic through three points peaks when the
// path's third derivative is steady. When even MaxKnots misses tol, it
// returns MaxKnots.
func ChooseKnots(probes int, tol float64, at func(u float64, xs, ys []float64) error) (int, float64, error) {
	if !(tol > 0) {
		tol = KnotTolerance
	}
	type pos struct{ x, y []float64 }
	cache := map[float64]pos{}
	get := func(u float64) (pos, error) {
		if p, ok := cache[u]; ok {
			return p, nil
		}
		p := pos{make([]float64, probes), make([]float64, probes)}
		if err := at(u, p.x, p.y); err != nil {
			return p, err
		}
		cache[u] = p
		return p, nil
	}
	var worst float64
	for _, k := range []int{3, 5, 9, 17, MaxKnots} {
		segs := (k - 1) / 2
		worst = 0
		for sg := 0; sg < segs; sg++ {
			ua := -1 + 2*float64(sg)/float64(segs)
			um := -1 + (2*float64(sg)+1)/float64(segs)
			ub := -1 + 2*float64(sg+1)/float64(segs)
			p0, err := get(ua)
			if err != nil {
				return 0, 0, err
			}
			p1, err := get(um)
			if err != nil {
				return 0, 0, err
			}
			p2, err := get(ub)
			if err != nil {
				return 0, 0, err
			}
			for _, v := range []float64{-1 / math.Sqrt(3), 1 / math.Sqrt(3)} {
				pv, err := get(um + v*(um-ua))
				if err != nil {
					return 0, 0, err
				}
				for j := range probes {
					qx := p1.x[j] + v*((p2.x[j]-p0.x[j])/2+v*(p2.x[j]-2*p1.x[j]+p0.x[j])/2)
					qy := p1.y[j] + v*((p2.y[j]-p0.y[j])/2+v*(p2.y[j]-2*p1.y[j]+p0.y[j])/2)
					if e := math.Hypot(qx-pv.x[j], qy-pv.y[j]); e > worst {
						worst = e // NaN never compares greater
					}
				}
			}
		}
		if worst <= tol {
			return k, worst, nil
		}
	}
	return MaxKnots, worst, nil
}

// ErrMotion reports unusable knots for RenderMotion.
var ErrMotion = errors.New("render: motion")

// Instant is the observer and the camera at one moment of a frame's
// exposure.
type Instant struct {
	Observer   camera.Observer
	Projection camera.Projection
}

// StreakSamples returns the number of sub-positions of a streak segment
// whose interpolated path p(u) = p₁ + a·u + b·u² (u from −1 to 1, pixels)
// has the end velocities a ± 2b: ⌈2·max|p′|/(StreakSpacing·fwhm)⌉, at
// least 1 and at most MaxStreakSamples.
func StreakSamples(ax, ay, bx, by, fwhm float64) int {
	v := math.Max(math.Hypot(ax-2*bx, ay-2*by), math.Hypot(ax+2*bx, ay+2*by))
	n := math.Ceil(2 * v / (StreakSpacing * fwhm))
	if !(n > 1) {
		return 1
	}
	return int(math.Min(n, MaxStreakSamples))
}

// RenderMotion renders the prepared stars integrated over an exposure:
// knots are the observer and camera at evenly spaced times from the
// shutter's opening (knots[0]) to its closing (knots[K−1]), K odd and at
// most MaxKnots; the middle knot is the frame's instant, whose observer
// and projection replace opt's (Frame.Options holds them). Every knot's
// projection must have the middle one's kind and size. One knot is the
// instant alone (Render); with no knots opt is rendered as it is.
//
// Each star is streaked along its apparent path (see the comment at the
// top of streak.go), and a star drawn as a disc is moved along its
// centre's path (disc_blur.go). A star whose path leaves the projection's
// domain (behind a pinhole's image plane) or crosses between cube faces
// within the exposure is streaked through its directions, sub-position by
// sub-position (streak_edge.go): the part of its streak in the frame is
// drawn, and on a cube each face gets its share. A star seen at the middle
// knot is needed: one the middle knot's camera cannot show is off the
// frame. Streaks are continuous across an equirectangular frame's ±180°
// seam. Stats describe the middle knot (a star counts as off the
// frame when no part of its streak can light it).
//
// The output is bit-identical for any worker count, like Render's: stars
// are transformed in fixed chunks, their streak records binned into tiles
// in catalogue order, and each tile adds them in that order (a streak's
// deposits into a pixel are summed in float64 first, then added to the
// pixel in float32).
func (p *Prepared) RenderMotion(opt Options, knots []Instant) (*Frame, error) {
	return p.renderMotion(nil, opt, knots)
}

// RenderMotionInto is RenderMotion drawing into dst, which it overwrites:
// dst's buffers are cleared and reused when they fit, as RenderInto
// reuses them (a flight drawing its blurred frames into one Frame touches
// no new frame memory after the first). The frame is bit-identical to
// RenderMotion's. On error dst's pixels are unspecified.
func (p *Prepared) RenderMotionInto(dst *Frame, opt Options, knots []Instant) error {
	if dst == nil {
		return errors.New("render: RenderMotionInto: nil Frame")
	}
	_, err := p.renderMotion(dst, opt, knots)
	return err
}

// renderMotion is RenderMotion into dst, or into a new frame when dst is
// nil.
func (p *Prepared) renderMotion(dst *Frame, opt Options, knots []Instant) (*Frame, error) {
	switch k := len(knots); {
	case k == 0:
		return p.render(dst, opt)
	case k == 1:
		opt.Observer, opt.Projection = knots[0].Observer, knots[0].Projection
		return p.render(dst, opt)
	case k%2 == 0 || k > MaxKnots:
		return nil, fmt.Errorf("%w: %d knots, want an odd number up to %d", ErrMotion, k, MaxKnots)
	}
	mid := len(knots) / 2
	opt.Observer, opt.Projection = knots[mid].Observer, knots[mid].Projection
	opt, psf, workers, err := resolveOptions(opt)
	if err != nil {
		return nil, err
	}
	projs := make([]camera.Projection, len(knots))
	same := make([]bool, len(knots))
	for k := range knots {
		projs[k] = knots[k].Projection
		if err := projs[k].Prepare(); err != nil {
			return nil, fmt.Errorf("%w: knot %d: %w", ErrMotion, k, err)
		}
		q := &projs[k]
		if q.Kind != opt.Projection.Kind || q.Width != opt.Projection.Width || q.Height != opt.Projection.Height {
			return nil, fmt.Errorf("%w: knot %d is a %v %d×%d, the frame a %v %d×%d", ErrMotion, k,
				q.Kind, q.Width, q.Height, opt.Projection.Kind, opt.Projection.Width, opt.Projection.Height)
		}
		same[k] = knots[k].Observer == opt.Observer
	}
	f, sc, err := startFrame(dst, opt, &psf, workers)
	if err != nil {
		return nil, err
	}
	f.release(sc) // the streaks keep their own working memory
	n := p.Stars.Len()
	f.Stats.Total = n
	segs := (len(knots) - 1) / 2

	// Phase 1: transform at every knot; chunk c's records start at
	// c·chunkSize·segs.
	recs := make([]streakRec, n*segs)
	nChunks := (n + chunkSize - 1) / chunkSize
	chunks := make([]chunkResult, nChunks)
	counts := make([]int, nChunks)
	paths := make([][]explicitPath, nChunks)
	parallel(workers, nChunks, func(c int) {
		lo := c * chunkSize
		hi := min(lo+chunkSize, n)
		st := newStreaker(p, &f.Options, &psf, f.Scale, knots, projs, same)
		counts[c] = st.run(lo, hi, recs[lo*segs:hi*segs], &chunks[c])
		paths[c] = st.paths
	})
	discs, err := p.gather(f, chunks)
	if err != nil {
		return nil, err
	}
	// The listed streaks, chunk by chunk; records point into them.
	var all []explicitPath
	for c := range paths {
		off := int32(len(all))
		if off > 0 {
			for k := c * chunkSize * segs; k < c*chunkSize*segs+counts[c]; k++ {
				if recs[k].ex != 0 {
					recs[k].ex += off
				}
			}
		}
		all = append(all, paths[c]...)
	}

	// Phase 2: bin into tiles; phase 3: add each tile's streaks.
	g := newGrid(f.W, f.H, psf.Radius(), opt.Projection.Kind)
	sg := &streakGrid{grid: g, paths: all}
	sg.binAll(recs, counts, chunkSize*segs, workers)
	sg.addTiles(&f.Buffer, &psf, workers)
	finishFrame(&f.Buffer, workers)
	if err := drawDiscs(f, discs, workers); err != nil {
		return nil, err
	}
	return f, nil
}

// streakRec is one segment of a star's streak: the path
// p(u) = (x, y) + u·(ax, ay) + u²·(bx, by), u ∈ [−1, 1], in pixels
// (unwrapped across an equirect seam), n sub-positions at u_i =
// (2i+1)/n − 1, each with weight 1/(n·parts) of the colour rgb; d is the
// Doppler factor. A star deposited once has a = b = 0, n = parts = 1.
type streakRec struct {
	x, y           float64
	ax, ay, bx, by float32
	rgb            [3]float32
	d              float32
	n, parts       uint16
	// ex is 1 + the index of the record's listed sub-positions in
	// streakGrid.paths (streak_edge.go), 0 for a quadratic path.
	ex int32
}

// streaker transforms one chunk of stars at every knot.
type streaker struct {
	t     *transformer // the middle knot: photometry, culling, colour
	mid   int
	projs []camera.Projection
	// geo[k] computes knot k's directions when its observer differs from
	// the middle one's (nil: the middle knot's boosted directions are
	// projected by knot k's camera).
	geo    []*transformer
	gb     []*geomBlock
	px, py [][blockSize]float64
	segs   int
	fwhm   float64
	radius float64 // PSF radius, px
	margin float64 // PSF radius + 1 px
	// Scratch of star: the knots' positions and the segments.
	xs, ys [MaxKnots]float64
	seg    [MaxKnots / 2]streakRec
	// Listed streaks (streak_edge.go): each knot's view, the middle
	// knot's axes, the knots' directions, and the chunk's paths.
	views []knotView
	om    camera.Orientation
	dirs  [MaxKnots]r3.Vec
	paths []explicitPath
	arena []subPos
	cuts  []float64
}

func newStreaker(p *Prepared, opt *Options, psf *PSF, scale float64, knots []Instant, projs []camera.Projection, same []bool) *streaker {
	k := len(knots)
	s := &streaker{t: newTransformer(p, opt, psf, scale), mid: k / 2, projs: projs,
		geo: make([]*transformer, k), gb: make([]*geomBlock, k),
		px: make([][blockSize]float64, k), py: make([][blockSize]float64, k),
		segs: (k - 1) / 2, fwhm: psf.FWHM(), radius: psf.Radius(), margin: psf.Radius() + 1}
	s.views = newKnotViews(projs, s.mid)
	s.om = s.views[s.mid].o
	for i := range knots {
		if i == s.mid || same[i] {
			continue
		}
		o := *opt
		o.Observer = knots[i].Observer
		s.geo[i] = newTransformer(p, &o, nil, scale)
		s.gb[i] = &s.geo[i].geom
	}
	return s
}

// run transforms stars lo..hi−1 and writes their streak records to out
// (at most segs per star), returning how many it wrote; res counts the
// stars as Render's transform does.
func (s *streaker) run(lo, hi int, out []streakRec, res *chunkResult) int {
	t := s.t
	gb := &t.geom
	k := 0
	for b0 := lo; b0 < hi; b0 += blockSize {
		m := min(blockSize, hi-b0)
		t.geometry(b0, m, gb)
		t.photometry(b0, m, gb)
		t.proj.ForwardBatch(gb.x[:m], gb.y[:m], gb.z[:m], gb.px[:m], gb.py[:m])
		for i := range s.projs {
			switch {
			case i == s.mid:
				copy(s.px[i][:m], gb.px[:m])
				copy(s.py[i][:m], gb.py[:m])
			case s.geo[i] != nil:
				g := s.gb[i]
				s.geo[i].geometry(b0, m, g)
				s.projs[i].ForwardBatch(g.x[:m], g.y[:m], g.z[:m], s.px[i][:m], s.py[i][:m])
			default:
				s.projs[i].ForwardBatch(gb.x[:m], gb.y[:m], gb.z[:m], s.px[i][:m], s.py[i][:m])
			}
		}
		for j := 0; j < m; j++ {
			if c := s.star(b0+j, j, out[k:], res); c > 0 {
				k += c
				res.n++
			}
		}
	}
	return k
}

// star writes the streak records of star i (index j of the block) and
// returns how many; like transformer.star it counts discs, culled,
// invalid and off-frame stars.
func (s *streaker) star(i, j int, out []streakRec, res *chunkResult) int {
	t := s.t
	gb := &t.geom
	if gb.bad[j] || gb.lnW[j] > t.lnDiscPre {
		nd := len(res.discs)
		if done, _ := t.disc(i, j, gb, res); done {
			if len(res.discs) > nd {
				// A disc moves along its centre's path (disc_blur.go).
				res.discs[nd].path = slices.Clone(s.knotDirs(j))
			}
			return 0
		}
	}
	switch t.see(j, gb) {
	case seeCulled:
		res.culled++
		return 0
	case seeInvalid:
		res.invalid++
		return 0
	}
	xm, ym := gb.px[j], gb.py[j]
	if math.IsNaN(xm) || math.IsNaN(ym) {
		res.off++
		return 0
	}
	// The knots' positions, unwrapped across an equirect seam; a star
	// undefined at a knot or changing cube face has its sub-positions
	// listed (streak_edge.go).
	xs, ys := s.xs[:len(s.projs)], s.ys[:len(s.projs)]
	steady, listed := false, false
	kind, w := t.proj.Kind, t.w
	face := math.Floor(xm / t.h)
	x0, x1, y0, y1 := xm, xm, ym, ym
	for k := range xs {
		x, y := s.px[k][j], s.py[k][j]
		if math.IsNaN(x) || math.IsNaN(y) {
			listed = true
			break
		}
		switch kind {
		case camera.Equirect:
			if x-xm > w/2 {
				x -= w
			} else if xm-x > w/2 {
				x += w
			}
		case camera.Cube:
			if math.Floor(x/t.h) != face {
				listed = true
			}
		}
		xs[k], ys[k] = x, y
		x0, x1 = math.Min(x0, x), math.Max(x1, x)
		y0, y1 = math.Min(y0, y), math.Max(y1, y)
	}
	if listed {
		return s.listed(i, j, xm, ym, out, res)
	}
	if kind != camera.Equirect {
		// Far off the frame: the path through the knots overshoots
		// their bounding box by at most an eighth of its size.
		m := s.margin + 0.25*math.Max(x1-x0, y1-y0)
		if x1 < -m || x0 > w+m || y1 < -m || y0 > t.h+m {
			res.off++
			return 0
		}
	}
	{
		// A star whose whole path is within one sub-position's spacing
		// is deposited once, at the middle knot, as Render draws it.
		L := 0.0
		for sg := 0; sg < s.segs; sg++ {
			ax, ay, bx, by := segment(xs[2*sg:], ys[2*sg:])
			L += 2 * math.Max(math.Hypot(ax-2*bx, ay-2*by), math.Hypot(ax+2*bx, ay+2*by))
		}
		steady = !(L > StreakSpacing*s.fwhm)
	}
	if steady {
		if !t.onFrame(xm, ym) {
			res.off++
			return 0
		}
		var rec splatRec
		if t.record(i, j, gb, xm, ym, &rec, res) == 0 {
			return 0
		}
		out[0] = streakRec{x: rec.x, y: rec.y, rgb: rec.rgb, d: rec.d, n: 1, parts: 1}
		return 1
	}
	// Segments, and whether any of them can light the frame.
	segRec := &s.seg
	lit := false
	for sg := 0; sg < s.segs; sg++ {
		ax, ay, bx, by := segment(xs[2*sg:], ys[2*sg:])
		n := StreakSamples(ax, ay, bx, by, s.fwhm)
		r := streakRec{x: xs[2*sg+1], y: ys[2*sg+1], n: uint16(n), parts: uint16(s.segs)}
		if n > 1 {
			r.ax, r.ay, r.bx, r.by = float32(ax), float32(ay), float32(bx), float32(by)
		}
		segRec[sg] = r
		if !lit && s.segmentOnFrame(&r) {
			lit = true
		}
	}
	if !lit {
		res.off++
		return 0
	}
	var rec splatRec
	if t.record(i, j, gb, xm, ym, &rec, res) == 0 {
		return 0
	}
	k := 0
	for sg := 0; sg < s.segs; sg++ {
		r := segRec[sg]
		if !s.segmentOnFrame(&r) {
			continue
		}
		r.rgb, r.d = rec.rgb, rec.d
		out[k] = r
		k++
	}
	return k
}

// segment returns the coefficients of the quadratic p(u) = p₁ + a·u + b·u²
// through the three knots xs[0..2], ys[0..2] at u = −1, 0, 1.
func segment(xs, ys []float64) (ax, ay, bx, by float64) {
	ax, ay = (xs[2]-xs[0])/2, (ys[2]-ys[0])/2
	bx, by = (xs[2]-2*xs[1]+xs[0])/2, (ys[2]-2*ys[1]+ys[0])/2
	return ax, ay, bx, by
}

// onFrame is transformer.star's test of whether a star at (x, y) can light
// the frame: within the PSF radius + 1 px of the image, and inside a
// fisheye's circle.
func (t *transformer) onFrame(x, y float64) bool {
	if !(x > -t.margin && x < t.w+t.margin && y > -t.margin && y < t.h+t.margin) {
		return false
	}
	return t.proj.Kind != camera.Fisheye || (x-t.w/2)*(x-t.w/2)+(y-t.h/2)*(y-t.h/2) <= t.rFish*t.rFish
}

// bounds returns the bounding box of r's path (before any equirect wrap).
func (r *streakRec) bounds() (x0, x1, y0, y1 float64) {
	ext := func(c, a, b float64) (float64, float64) {
		lo, hi := math.Min(c-a+b, c+a+b), math.Max(c-a+b, c+a+b)
		if b != 0 {
			if u := -a / (2 * b); u > -1 && u < 1 {
				v := c + u*(a+u*b)
				lo, hi = math.Min(lo, v), math.Max(hi, v)
			}
		}
		return lo, hi
	}
	x0, x1 = ext(r.x, float64(r.ax), float64(r.bx))
	y0, y1 = ext(r.y, float64(r.ay), float64(r.by))
	return
}

// segmentOnFrame reports whether some sub-position of r can light the
// frame: its path's bounding box, widened by the PSF radius + 1 px, meets
// the image (an equirect path is tested after wrapping), and for a fisheye
// it comes within that margin of the image circle.
func (s *streaker) segmentOnFrame(r *streakRec) bool {
	t := s.t
	x0, x1, y0, y1 := r.bounds()
	m := s.margin
	if y1 < -m || y0 > t.h+m {
		return false
	}
	if t.proj.Kind == camera.Equirect {
		return true // every x lies in the image after wrapping
	}
	if x1 < -m || x0 > t.w+m {
		return false
	}
	if t.proj.Kind == camera.Fisheye {
		cx, cy := t.w/2, t.h/2
		dx := math.Max(0, math.Max(x0-cx, cx-x1))
		dy := math.Max(0, math.Max(y0-cy, cy-y1))
		return math.Hypot(dx, dy) <= t.rFish
	}
	return true
}

// streakGrid bins streak records into the tiles of grid, in catalogue
// order within each tile.
type streakGrid struct {
	*grid
	recs  []streakRec
	paths []explicitPath // listed streaks (streakRec.ex)
}

// colRanges returns the pixel column ranges [lo, hi] (at most two, after
// an equirect wrap; a cube record keeps to its middle knot's face) that
// record r's kernels may light, and the row range.
func (g *streakGrid) colRanges(r *streakRec) (cols [2][2]int, nc, row0, row1 int) {
	x0, x1, y0, y1 := r.bounds()
	listed := r.ex != 0
	if listed {
		p := &g.paths[r.ex-1]
		x0, x1, y0, y1 = p.x0, p.x1, p.y0, p.y1
	}
	row0 = max(int(math.Floor(y0-g.radius)), 0)
	row1 = min(int(math.Floor(y1+g.radius)), g.h-1)
	if row0 > row1 {
		return cols, 0, row0, row1
	}
	c0, c1 := int(math.Floor(x0-g.radius)), int(math.Floor(x1+g.radius))
	switch g.kind {
	case camera.Equirect:
		if c1-c0+1 >= g.w {
			cols[0] = [2]int{0, g.w - 1}
			return cols, 1, row0, row1
		}
		// Shift so that c0 is in [0, W); the range may then run past W
		// and continue from column 0.
		sh := floorDiv(c0, g.w) * g.w
		c0, c1 = c0-sh, c1-sh
		cols[0] = [2]int{c0, min(c1, g.w-1)}
		nc = 1
		if c1 >= g.w {
			cols[1] = [2]int{0, c1 - g.w}
			nc = 2
		}
		return cols, nc, row0, row1
	case camera.Cube:
		lo, hi, _ := g.span(r.x)
		if listed {
			lo, hi = 0, g.w
		}
		c0, c1 = max(c0, lo), min(c1, hi-1)
	default:
		c0, c1 = max(c0, 0), min(c1, g.w-1)
	}
	if c0 > c1 {
		return cols, 0, row0, row1
	}
	cols[0] = [2]int{c0, c1}
	return cols, 1, row0, row1
}

// single reports whether r is a single deposit (Render's splat).
func (r *streakRec) single() bool { return r.n == 1 && r.parts == 1 && r.ex == 0 }

func floorDiv(a, b int) int {
	q := a / b
	if a%b != 0 && a < 0 {
		q--
	}
	return q
}

// eachTile calls fn for every tile record r may light, in a fixed order.
func (g *streakGrid) eachTile(r *streakRec, fn func(t int)) {
	cols, nc, row0, row1 := g.colRanges(r)
	for ty := row0 / tileSize; ty <= row1/tileSize && nc > 0; ty++ {
		for c := 0; c < nc; c++ {
			for tx := cols[c][0] / tileSize; tx <= cols[c][1]/tileSize; tx++ {
				fn(ty*g.tw + tx)
			}
		}
	}
}

// binAll bins the records of every transform chunk (chunk c's counts[c]
// records start at c·stride) into tiles: a tile's list holds chunk 0's
// records, then chunk 1's, …, each in catalogue order, whatever the
// worker count (the counting sort of grid.binAll).
func (g *streakGrid) binAll(recs []streakRec, counts []int, stride, workers int) {
	nt := len(g.start) - 1
	nc := len(counts)
	off := make([]int32, nt*nc) // off[c*nt+t]: chunk c's count, then its next slot, in tile t
	parallel(workers, nc, func(c int) {
		cnt := off[c*nt : (c+1)*nt]
		for k := c * stride; k < c*stride+counts[c]; k++ {
			g.eachTile(&recs[k], func(t int) { cnt[t]++ })
		}
	})
	var run int32
	for t := 0; t < nt; t++ {
		g.start[t] = run
		for c := 0; c < nc; c++ {
			n := off[c*nt+t]
			off[c*nt+t] = run
			run += n
		}
	}
	g.start[nt] = run
	g.recs = make([]streakRec, run)
	parallel(workers, nc, func(c int) {
		next := off[c*nt : (c+1)*nt]
		for k := c * stride; k < c*stride+counts[c]; k++ {
			r := &recs[k]
			g.eachTile(r, func(t int) {
				g.recs[next[t]] = *r
				next[t]++
			})
		}
	})
}

// streakAcc is one worker's scratch: a tile's running sums (tileAcc, whose
// accumulate deposits single-position records) and the float64 stamp a
// streak's sub-positions are summed in before it is added to the tile.
type streakAcc struct {
	tileAcc
	stamp [tilePix]float64
	one   []splatRec
}

// addTiles adds every tile's records into b on workers goroutines.
func (g *streakGrid) addTiles(b *Buffer, psf *PSF, workers int) {
	var pool sync.Pool
	parallel(workers, len(g.start)-1, func(ti int) {
		a, _ := pool.Get().(*streakAcc)
		if a == nil {
			a = &streakAcc{}
		}
		a.add(b, g, ti, psf)
		pool.Put(a)
	})
}

// add sums tile ti's records, in order, into a copy of the tile and
// writes it back to b (a Render of one pass: the tile starts black).
func (a *streakAcc) add(b *Buffer, g *streakGrid, ti int, psf *PSF) {
	list := g.recs[g.start[ti]:g.start[ti+1]]
	if len(list) == 0 {
		return
	}
	ox, oy := (ti%g.tw)*tileSize, (ti/g.tw)*tileSize
	tw, th := min(tileSize, b.W-ox), min(tileSize, b.H-oy)
	doppler := b.Doppler != nil
	clear(a.rgb[:])
	if doppler {
		clear(a.dsum[:])
	}
	for k := 0; k < len(list); {
		// A run of single-position records goes through the splat
		// primitive as it is; a streak through the stamp.
		if list[k].single() {
			a.one = a.one[:0]
			for ; k < len(list) && list[k].single(); k++ {
				r := &list[k]
				a.one = append(a.one, splatRec{x: r.x, y: r.y, rgb: r.rgb, d: r.d})
			}
			a.accumulate(g.grid, ti, a.one, psf, doppler)
			continue
		}
		a.streak(g, ox, oy, tw, th, &list[k], psf, doppler)
		k++
	}
	for j := 0; j < th; j++ {
		p := (oy+j)*b.W + ox
		copy(b.Pix[3*p:3*(p+tw)], a.rgb[3*j*tileSize:3*(j*tileSize+tw)])
		if doppler {
			copy(b.Doppler[p:p+tw], a.dsum[j*tileSize:j*tileSize+tw])
		}
	}
}

// streak deposits record r's sub-positions that light the tile at (ox, oy)
// of tw×th pixels: each PSF weight wx·wy/(n·parts) is summed in the stamp
// (float64), then every stamp pixel adds stamp·rgb to the tile in float32
// (and stamp·luminance·D to the Doppler sums).
func (a *streakAcc) streak(g *streakGrid, ox, oy, tw, th int, r *streakRec, psf *PSF, doppler bool) {
	var q0, q1, p0, p1 int
	if r.ex != 0 {
		q0, q1, p0, p1 = a.explicitStamp(g, ox, oy, tw, th, &g.paths[r.ex-1], psf)
	} else {
		q0, q1, p0, p1 = a.quadStamp(g, ox, oy, tw, th, r, psf)
	}
	if q1 < q0 {
		return
	}
	a.flush(r, q0, q1, p0, p1, doppler)
}

// quadStamp deposits the sub-positions of record r's quadratic path that
// light the tile at (ox, oy) of tw×th pixels into a's stamp and returns
// the stamp's range used, [q0, q1]×[p0, p1] in tile coordinates (q1 < q0
// when none).
func (a *streakAcc) quadStamp(g *streakGrid, ox, oy, tw, th int, r *streakRec, psf *PSF) (q0, q1, p0, p1 int) {
	inv := 1 / (float64(r.n) * float64(r.parts))
	ax, ay, bx, by := float64(r.ax), float64(r.ay), float64(r.bx), float64(r.by)
	W := float64(g.w)
	fish := g.kind == camera.Fisheye
	cx, cy, rf := W/2, float64(g.h)/2, float64(min(g.w, g.h))/2
	clip0, clip1, _ := g.span(r.x) // a cube streak keeps to its face
	q0, q1, p0, p1 = tileSize, -1, tileSize, -1
	wx, wy := &a.wx, &a.wy
	for i := 0; i < int(r.n); i++ {
		u := float64(2*i+1)/float64(r.n) - 1
		x := r.x + u*(ax+u*bx)
		y := r.y + u*(ay+u*by)
		if fy := math.Floor(y - g.radius); fy >= float64(oy+th) || fy+2*g.radius+1 < float64(oy) {
			continue
		}
		if fish && (x-cx)*(x-cx)+(y-cy)*(y-cy) > rf*rf {
			continue // outside the image circle, like a star there
		}
		wrap := 0
		if g.kind == camera.Equirect {
			if x < 0 {
				x += W
			} else if x >= W {
				x -= W
			}
			_, _, wrap = g.span(x)
		}
		y0, ny := psf.Weights(y, wy[:])
		j0, j1 := max(y0, oy), min(y0+ny, oy+th)
		if j0 >= j1 {
			continue
		}
		for rep := 0; rep < 2; rep++ {
			xx := x
			if rep == 1 {
				if wrap == 0 {
					break
				}
				xx += float64(wrap) * W
			}
			if fx := math.Floor(xx - g.radius); fx >= float64(ox+tw) || fx+2*g.radius+1 < float64(ox) {
				continue
			}
			x0, nx := psf.Weights(xx, wx[:])
			i0 := max(x0, ox, clip0)
			i1 := min(x0+nx, ox+tw, clip1)
			if i0 >= i1 {
				continue
			}
			q0, q1 = min(q0, i0-ox), max(q1, i1-1-ox)
			p0, p1 = min(p0, j0-oy), max(p1, j1-1-oy)
			wxs := wx[i0-x0 : i1-x0]
			for jj := j0; jj < j1; jj++ {
				wyj := wy[jj-y0] * inv
				row := a.stamp[(jj-oy)*tileSize+i0-ox:][:len(wxs)]
				for ii, wxi := range wxs {
					row[ii] += wxi * wyj
				}
			}
		}
	}
	return q0, q1, p0, p1
}

// flush adds the stamp's range [q0, q1]×[p0, p1] times record r's colour
// to the tile's sums, in float32, and clears it.
func (a *streakAcc) flush(r *streakRec, q0, q1, p0, p1 int, doppler bool) {
	rgb := [3]float64{float64(r.rgb[0]), float64(r.rgb[1]), float64(r.rgb[2])}
	lumD := (lumR*rgb[0] + lumG*rgb[1] + lumB*rgb[2]) * float64(r.d)
	for j := p0; j <= p1; j++ {
		row := a.stamp[j*tileSize+q0 : j*tileSize+q1+1]
		acc := a.rgb[3*(j*tileSize+q0) : 3*(j*tileSize+q1+1)]
		for ii, w := range row {
			if w == 0 {
				continue
			}
			px := acc[3*ii : 3*ii+3 : 3*ii+3]
			px[0] += float32(w * rgb[0])
			px[1] += float32(w * rgb[1])
			px[2] += float32(w * rgb[2])
		}
		if doppler {
			ds := a.dsum[j*tileSize+q0 : j*tileSize+q1+1]
			for ii, w := range row {
				if w != 0 {
					ds[ii] += float32(w * lumD)
				}
			}
		}
		clear(row)
	}
}
