package render

import (
	"math"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/spectrum"
)

// Discs in a blurred frame (RenderMotion): a star drawn as a disc is moved
// along its apparent path over the exposure, as a point star is streaked.
//
// The disc is sampled once, at the middle knot, exactly as drawDiscs draws
// it (s×s samples per pixel, each with its direction, the blackbody colour
// at its Doppler factor, the limb darkening and its solid angle). Its
// centre's path is interpolated through the knots in directions, as a
// listed streak is (streak_edge.go: each knot's apparent direction as the
// middle knot's camera shows it, quadratics through runs of three, each
// point normalised), and split into n sub-positions per segment at the
// midpoints of n equal time steps, each weighing 1/(n·segments), n from
// the segment's on-screen length so that successive sub-positions are at
// most one sample spacing (1/s px) apart (at most MaxDiscSteps). At
// sub-position i the disc is the middle one turned by the rotation R_i
// that takes the centre's middle direction to its direction then (the
// shortest one, about their common normal); every sample is turned by R_i,
// projected by the middle knot's camera, its displacement rounded to a
// whole number of sample spacings (so that it lands on the sample grid, as
// if the moved disc were sampled there) and its light, times the weight,
// added to the pixel it lands in. The rounding is dithered: each of a
// pixel's s² samples rounds up from its own phase in [0, 1), so the
// displacement is kept on average (sub-positions about one spacing apart
// would otherwise lock onto the grid and lengthen or shorten the smear by
// up to a spacing). So the light of every sample is kept
// wherever it lands in the image: the disc's summed flux is the sharp
// disc's to float32 rounding, as long as it stays in the frame. Brightness,
// colour and shape are the middle knot's, as for point stars.
//
// The samples are the pixels of the sharp disc's box (clamped to the image,
// except for a pinhole, where it may reach as far beyond the edges as the
// path is long, so that a disc moving in from beyond an edge is drawn); they are computed a band of rows
// at a time in parallel and added in a fixed order, so the frame is
// bit-identical for any worker count. A disc whose centre moves less than
// half a sample spacing is drawn sharp, as drawDiscs draws it.

// MaxDiscSteps caps the sub-positions of one segment of a disc's path.
const MaxDiscSteps = 256

// discBand is the number of source rows whose samples are computed
// together before they are moved.
const discBand = 16

// discSample is one sample of a sharp disc: the direction seen there (ship
// frame) and its linear sRGB light on the exposure scale.
type discSample struct {
	n        r3.Vec
	x, y     float64 // where it is sampled, px
	rgb      [3]float32
	phx, phy float32 // rounding phases of its displacement, in [0, 1)
}

// rot3 is a rotation matrix, by rows.
type rot3 [3]r3.Vec

func (m *rot3) apply(v r3.Vec) r3.Vec {
	return r3.Vec{X: r3.Dot(m[0], v), Y: r3.Dot(m[1], v), Z: r3.Dot(m[2], v)}
}

// turning returns the rotation by the shortest arc from unit a to unit b
// (Rodrigues' formula about a×b).
func turning(a, b r3.Vec) rot3 {
	k := r3.Cross(a, b)
	s, c := r3.Norm(k), r3.Dot(a, b)
	if s == 0 {
		return rot3{{X: 1}, {Y: 1}, {Z: 1}}
	}
	k = r3.Scale(1/s, k)
	t := 1 - c
	return rot3{
		{X: c + t*k.X*k.X, Y: t*k.X*k.Y - s*k.Z, Z: t*k.X*k.Z + s*k.Y},
		{X: t*k.Y*k.X + s*k.Z, Y: c + t*k.Y*k.Y, Z: t*k.Y*k.Z - s*k.X},
		{X: t*k.Z*k.X - s*k.Y, Y: t*k.Z*k.Y + s*k.X, Z: c + t*k.Z*k.Z},
	}
}

// discSteps returns the sub-positions of a disc whose centre follows path
// (one direction per knot, as the middle knot's camera p shows it): the
// rotations from the middle direction and their weights, for samples
// 1/s px apart, and the path's on-screen length; none when the centre
// moves less than half a sample spacing.
func discSteps(p *camera.Projection, path []r3.Vec, s int, ppr float64) ([]rot3, []float64, float64) {
	segs := (len(path) - 1) / 2
	mid := r3.Unit(path[len(path)/2])
	at := func(sg int, u float64) r3.Vec {
		return r3.Unit(quad3(path[2*sg], path[2*sg+1], path[2*sg+2], u))
	}
	const probe = 16
	lens := make([]float64, segs)
	total := 0.0
	for sg := range segs {
		prev := at(sg, -1)
		px, py, pok := p.Forward(prev)
		for i := 1; i <= probe; i++ {
			d := at(sg, -1+2*float64(i)/probe)
			x, y, ok := p.Forward(d)
			step := math.Hypot(x-px, y-py)
			if !ok || !pok || p.Kind == camera.Cube && math.Floor(x/float64(p.Height)) != math.Floor(px/float64(p.Height)) ||
				p.Kind == camera.Equirect && math.Abs(x-px) > float64(p.Width)/2 {
				// Across a seam or face edge: the angle at the
				// image centre's scale (a cube face edge's is 2×).
				step = 2 * ppr * math.Acos(math.Max(-1, math.Min(1, r3.Dot(prev, d))))
			}
			lens[sg] += step
			prev, px, py, pok = d, x, y, ok
		}
		total += lens[sg]
	}
	if !(total*float64(s) >= 0.5) {
		return nil, nil, total
	}
	var rots []rot3
	var ws []float64
	for sg := range segs {
		n := int(min(max(math.Ceil(lens[sg]*float64(s)), 1), MaxDiscSteps))
		w := 1 / (float64(n) * float64(segs))
		for i := range n {
			rots = append(rots, turning(mid, at(sg, float64(2*i+1)/float64(n)-1)))
			ws = append(ws, w)
		}
	}
	return rots, ws, total
}

// drawMovingDisc draws disc ds of a blurred frame along its path into f
// (p prepared, sa its pixel solid angles) and reports true, or reports
// false when the disc hardly moves and is to be drawn sharp.
func drawMovingDisc(f *Frame, p *camera.Projection, sa *pixelSolidAngle, ds *discStar, workers int) (bool, error) {
	boost := f.Options.Observer.Boost
	ppr := pixelsPerRadian(p)
	dg := newDiscGeom(boost, ds, ppr)
	s := dg.s
	rots, ws, pathPx := discSteps(p, ds.path, s, ppr)
	if rots == nil {
		return false, nil
	}
	ext := 0
	if p.Kind == camera.Pinhole {
		// A pinhole shows directions beyond its edges too: sample the
		// disc there as far as the path can bring it into the image.
		ext = int(math.Ceil(math.Min(pathPx, float64(2*max(p.Width, p.Height))))) + 1
	}
	x0, y0, x1, y1 := discBoxExt(p, boost, dg.ns, dg.rho, ext)
	if x0 >= x1 || y0 >= y1 {
		return true, nil
	}
	k := f.extended() / math.Pi
	color := f.Options.Color
	inv, fs := 1/float64(s), float64(s)
	rows := make([][]discSample, discBand)
	W, H := float64(f.W), float64(f.H)
	for b0 := y0; b0 < y1; b0 += discBand {
		nb := min(discBand, y1-b0)
		parallel(workers, nb, func(jj int) {
			j := b0 + jj
			out := rows[jj][:0]
			for i := x0; i < x1; i++ {
				for b := 0; b < s; b++ {
					y := float64(j) + (float64(b)+0.5)*inv
					for a := 0; a < s; a++ {
						x := float64(i) + (float64(a)+0.5)*inv
						sm, yk, np, ok := dg.sample(p, sa, x, y)
						if !ok {
							continue
						}
						xl, yl, zl := k*sm.X/sm.Y*yk, k*yk, k*(1-sm.X-sm.Y)/sm.Y*yk
						r, g, bl := spectrum.XYZToLinearSRGB(xl, yl, zl, color)
						r, g, bl = spectrum.GamutMap(r, g, bl, yl)
						if !(finite(r) && finite(g) && finite(bl)) || !(yl > 0) {
							continue
						}
						out = append(out, discSample{n: np, x: x, y: y, rgb: [3]float32{float32(r), float32(g), float32(bl)},
							phx: float32((float64(b*s+a) + 0.5) * inv * inv), phy: float32((float64(a*s+b) + 0.5) * inv * inv)})
					}
				}
			}
			rows[jj] = out
		})
		for jj := range nb {
			for _, smp := range rows[jj] {
				for i := range rots {
					x, y, ok := p.Forward(rots[i].apply(smp.n))
					if !ok {
						continue
					}
					// Moved by a whole number of sample spacings: it
					// lands on another sample of the grid, so the pixel
					// it falls in is the one a sharp disc there would
					// light with it.
					xq := smp.x + math.Floor((x-smp.x)*fs+float64(smp.phx))/fs
					yq := smp.y + math.Floor((y-smp.y)*fs+float64(smp.phy))/fs
					switch p.Kind {
					case camera.Cube:
						// Not over a face's edge into the next face
						// of the strip (another part of the sky).
						if math.Floor(xq/H) != math.Floor(x/H) || !(yq >= 0 && yq < H) {
							xq, yq = x, y
						}
					case camera.Equirect:
						if xq < 0 {
							xq += W
						} else if xq >= W {
							xq -= W
						}
					}
					x, y = xq, yq
					if !(x >= 0 && x < W && y >= 0 && y < H) {
						continue
					}
					if p.Kind == camera.Fisheye && (x-W/2)*(x-W/2)+(y-H/2)*(y-H/2) > math.Min(W, H)*math.Min(W, H)/4 {
						continue
					}
					q := 3 * (int(y)*f.W + int(x))
					w := float32(ws[i])
					px := f.Pix[q : q+3 : q+3]
					px[0] += w * smp.rgb[0]
					px[1] += w * smp.rgb[1]
					px[2] += w * smp.rgb[2]
				}
			}
		}
	}
	return true, nil
}
