package render

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
)

// Streaks that cross a cube face edge, or leave the projection's domain,
// within the exposure.
//
// A cube frame's pixel coordinates jump where a path passes from one face
// to the next, and a pinhole has none for a direction on or behind its
// image plane, so such a path cannot be interpolated in pixels. It is
// interpolated in directions instead: knot k's apparent direction is
// expressed as the direction the middle knot's camera shows at the same
// pixel (knot k's camera-frame components on the middle knot's axes; a
// pinhole's tangents and a fisheye's off-axis angle scaled by the ratio of
// the knots' pixel scales, should the field change), the quadratics run
// through those vectors as through pixels elsewhere (segment s spans knots
// 2s, 2s+1, 2s+2), and every sub-position is projected through the middle
// knot's camera on its own. The sub-positions are listed one by one
// (explicitPath). Each segment is first cut where the face changes, or
// where the camera starts or stops showing the star (behind a pinhole),
// the times found by bisection between 16 probes; each piece of duration
// Δu then gets n sub-positions at the midpoints of n equal steps, each
// weighing Δu/(2·n·segments), n from the piece's on-screen length so that
// they are at most StreakSpacing·FWHM apart (at most MaxStreakSamples). A
// piece the camera does not show deposits nothing: that part of the streak
// is off the frame. So the time a star spends on each face, or in view, is
// kept to the bisection's precision however few the sub-positions.
//
// On a cube each sub-position lights only its own face, with its kernel
// renormalised to the face (the face's four edges are all edges to other
// faces, not the sky's end), so a star's summed flux is kept whichever
// faces its streak crosses, and each face gets the fraction of the
// exposure the star spends on it.
// On a flat frame the light that falls outside the image is lost, as for
// any star there.

// edgeProbes is the number of steps at which a listed segment is probed
// for a change of face (or of whether it is shown).
const edgeProbes = 16

// subPos is one listed sub-position: pixel (x, y) and weight w.
type subPos struct{ x, y, w float64 }

// explicitPath is a streak given as its sub-positions, with their bounding
// box; cube is set when each sub-position's kernel is renormalised to its
// cube face.
type explicitPath struct {
	pts            []subPos
	x0, x1, y0, y1 float64
	cube           bool
}

// knotView maps knot k's apparent directions into the middle knot's
// camera (see equiv).
type knotView struct {
	o     camera.Orientation // knot's axes at the image centre
	scale float64            // pinhole: ratio of tangent scales; fisheye: of angle scales
}

// newKnotViews returns the mapping of every knot (middle one included).
func newKnotViews(projs []camera.Projection, mid int) []knotView {
	v := make([]knotView, len(projs))
	m := &projs[mid]
	for k := range projs {
		p := &projs[k]
		v[k] = knotView{o: p.CentreOrientation(), scale: 1}
		switch p.Kind {
		case camera.Pinhole:
			v[k].scale = math.Tan(m.FieldOfView()*math.Pi/360) / math.Tan(p.FieldOfView()*math.Pi/360)
		case camera.Fisheye:
			v[k].scale = m.FieldOfView() / p.FieldOfView()
		}
	}
	return v
}

// equiv returns the direction the middle knot's camera (axes om) shows at
// the pixel where knot k's camera (view kv) shows direction n.
func equiv(kv *knotView, om *camera.Orientation, kind camera.Kind, n r3.Vec) r3.Vec {
	a, b, c := r3.Dot(kv.o.Forward, n), r3.Dot(kv.o.Right, n), r3.Dot(kv.o.Up, n)
	switch {
	case kv.scale == 1:
	case kind == camera.Pinhole:
		b, c = b*kv.scale, c*kv.scale
	case kind == camera.Fisheye:
		s := math.Hypot(b, c)
		if s > 0 {
			th := math.Min(math.Atan2(s, a)*kv.scale, math.Pi)
			st, ct := math.Sincos(th)
			a, b, c = ct, st*b/s, st*c/s
		}
	}
	return r3.Add(r3.Scale(a, om.Forward), r3.Add(r3.Scale(b, om.Right), r3.Scale(c, om.Up)))
}

// quad3 returns the quadratic through v0, v1, v2 (u = −1, 0, 1) at u.
func quad3(v0, v1, v2 r3.Vec, u float64) r3.Vec {
	a := r3.Scale(0.5, r3.Sub(v2, v0))
	b := r3.Scale(0.5, r3.Add(r3.Sub(v2, r3.Scale(2, v1)), v0))
	return r3.Add(v1, r3.Scale(u, r3.Add(a, r3.Scale(u, b))))
}

// explicit builds star j's listed streak from the knots' directions dirs
// (already in the middle knot's camera, see equiv) into path, and reports
// whether any of it can light the frame.
func (s *streaker) explicit(dirs []r3.Vec, path *explicitPath) bool {
	t := s.t
	proj := &t.proj
	cube := proj.Kind == camera.Cube
	*path = explicitPath{cube: cube,
		x0: math.Inf(1), x1: math.Inf(-1), y0: math.Inf(1), y1: math.Inf(-1)}
	// The sub-positions go to the chunk's arena; a path keeps its slice
	// of it (a later growth of the arena leaves the slice's array as it
	// is).
	start := len(s.arena)
	spacing := StreakSpacing * s.fwhm
	for sg := 0; sg < s.segs; sg++ {
		v0, v1, v2 := dirs[2*sg], dirs[2*sg+1], dirs[2*sg+2]
		at := func(u float64) (x, y float64, key int) {
			x, y, ok := proj.Forward(quad3(v0, v1, v2, u))
			switch {
			case !ok || !t.onFrame(x, y):
				return x, y, -1
			case cube:
				return x, y, max(0, min(5, int(math.Floor(x/t.h))))
			}
			return x, y, 0
		}
		// Cut the segment where the face changes, or where the star
		// enters or leaves the part of the image plane that can light
		// the frame: found between probes, then by bisection.
		s.cuts = append(s.cuts[:0], -1)
		_, _, kp := at(-1)
		for i := 1; i <= edgeProbes; i++ {
			u := -1 + 2*float64(i)/edgeProbes
			if _, _, k := at(u); k != kp {
				lo, hi := u-2.0/edgeProbes, u
				for range 48 {
					m := (lo + hi) / 2
					if _, _, km := at(m); km == kp {
						lo = m
					} else {
						hi = m
					}
				}
				s.cuts = append(s.cuts, hi)
				kp = k
			}
		}
		s.cuts = append(s.cuts, 1)
		for c := 0; c+1 < len(s.cuts); c++ {
			ua, ub := s.cuts[c], s.cuts[c+1]
			if _, _, k := at((ua + ub) / 2); k < 0 || !(ub > ua) {
				continue // nothing shown there: this part is off the frame
			}
			L := 0.0
			px, py, kp := at(ua)
			for i := 1; i <= edgeProbes/2; i++ {
				x, y, k := at(ua + (ub-ua)*float64(i)/(edgeProbes/2))
				if k >= 0 && kp >= 0 {
					L += math.Hypot(x-px, y-py)
				}
				px, py, kp = x, y, k
			}
			n := int(min(max(math.Ceil(L/spacing), 1), MaxStreakSamples))
			w := (ub - ua) / 2 / (float64(n) * float64(s.segs))
			for i := 0; i < n; i++ {
				x, y, k := at(ua + (ub-ua)*float64(2*i+1)/float64(2*n))
				if k < 0 {
					continue
				}
				s.arena = append(s.arena, subPos{x, y, w})
				path.x0, path.x1 = math.Min(path.x0, x), math.Max(path.x1, x)
				path.y0, path.y1 = math.Min(path.y0, y), math.Max(path.y1, y)
			}
		}
	}
	path.pts = s.arena[start:len(s.arena):len(s.arena)]
	if len(path.pts) == 0 {
		return false
	}
	m := s.margin
	if path.x1 < -m || path.x0 > t.w+m || path.y1 < -m || path.y0 > t.h+m {
		return false
	}
	if proj.Kind == camera.Fisheye {
		for _, p := range path.pts {
			if t.onFrame(p.x, p.y) {
				return true
			}
		}
		return false
	}
	return true
}

// explicitStamp deposits path's sub-positions that light the tile at
// (ox, oy) of tw×th pixels into a's stamp, each with its weight (on a cube
// its kernel renormalised to its face), and returns the stamp's range used
// as quadStamp does.
func (a *streakAcc) explicitStamp(g *streakGrid, ox, oy, tw, th int, path *explicitPath, psf *PSF) (q0, q1, p0, p1 int) {
	q0, q1, p0, p1 = tileSize, -1, tileSize, -1
	wx, wy := &a.wx, &a.wy
	fish := g.kind == camera.Fisheye
	W, H := float64(g.w), float64(g.h)
	cx, cy, rf := W/2, H/2, math.Min(W, H)/2
	for _, sp := range path.pts {
		x, y := sp.x, sp.y
		if fy := math.Floor(y - g.radius); fy >= float64(oy+th) || fy+2*g.radius+1 < float64(oy) {
			continue
		}
		if fx := math.Floor(x - g.radius); fx >= float64(ox+tw) || fx+2*g.radius+1 < float64(ox) {
			continue
		}
		if fish && (x-cx)*(x-cx)+(y-cy)*(y-cy) > rf*rf {
			continue
		}
		clip0, clip1 := 0, g.w
		if path.cube {
			clip0, clip1, _ = g.span(x)
		}
		y0, ny := psf.Weights(y, wy[:])
		x0, nx := psf.Weights(x, wx[:])
		w := sp.w
		if path.cube {
			// The kernel's share on the face, row and column.
			sx, sy := 0.0, 0.0
			for k := max(clip0-x0, 0); k < min(clip1-x0, nx); k++ {
				sx += wx[k]
			}
			for k := max(-y0, 0); k < min(g.h-y0, ny); k++ {
				sy += wy[k]
			}
			if !(sx > 0 && sy > 0) {
				continue
			}
			w /= sx * sy
		}
		j0, j1 := max(y0, oy), min(y0+ny, oy+th)
		i0, i1 := max(x0, ox, clip0), min(x0+nx, ox+tw, clip1)
		if j0 >= j1 || i0 >= i1 {
			continue
		}
		q0, q1 = min(q0, i0-ox), max(q1, i1-1-ox)
		p0, p1 = min(p0, j0-oy), max(p1, j1-1-oy)
		wxs := wx[i0-x0 : i1-x0]
		for jj := j0; jj < j1; jj++ {
			wyj := wy[jj-y0] * w
			row := a.stamp[(jj-oy)*tileSize+i0-ox:][:len(wxs)]
			for ii, wxi := range wxs {
				row[ii] += wxi * wyj
			}
		}
	}
	return q0, q1, p0, p1
}

// knotDirs returns the apparent directions of star j of the block at
// every knot, as the middle knot's camera shows them (equiv), in s.dirs.
func (s *streaker) knotDirs(j int) []r3.Vec {
	dirs := s.dirs[:len(s.projs)]
	for k := range dirs {
		g := &s.t.geom
		if s.geo[k] != nil {
			g = s.gb[k]
		}
		n := r3.Vec{X: g.x[j], Y: g.y[j], Z: g.z[j]}
		dirs[k] = equiv(&s.views[k], &s.om, s.t.proj.Kind, n)
	}
	return dirs
}

// listed writes the record of star i (index j of the block, shown at
// (xm, ym) at the middle knot) whose sub-positions are listed, and returns
// 1, or 0 when it is off the frame or invalid.
func (s *streaker) listed(i, j int, xm, ym float64, out []streakRec, res *chunkResult) int {
	gb := &s.t.geom
	dirs := s.knotDirs(j)
	s.paths = append(s.paths, explicitPath{})
	path := &s.paths[len(s.paths)-1]
	start := len(s.arena)
	if !s.explicit(dirs, path) {
		s.paths, s.arena = s.paths[:len(s.paths)-1], s.arena[:start]
		res.off++
		return 0
	}
	var rec splatRec
	if s.t.record(i, j, gb, xm, ym, &rec, res) == 0 {
		s.paths, s.arena = s.paths[:len(s.paths)-1], s.arena[:start]
		return 0
	}
	out[0] = streakRec{x: xm, y: ym, rgb: rec.rgb, d: rec.d, n: 1, parts: 1, ex: int32(len(s.paths))}
	return 1
}
