package render

import (
	"cmp"
	"math"
	"slices"
	"sync"
	"unsafe"

	"github.com/skyframe/skyframe/camera"
)

// Drawing smooth layers (the unresolved starlight, the CMB) on an adaptive
// grid of image cells.
//
// A diffuse layer changes little from one pixel to the next almost
// everywhere, so evaluating it exactly at every pixel wastes most of the
// work. addSmooth evaluates it exactly at the corners of square cells of
// smoothCell pixels (more where pixels are small: smoothGrid.cell) and
// fills each cell by bilinear interpolation of the
// corner values, after checking the interpolation against exact values at
// nine points: the cell's centre, the midpoints of its four edges and the
// centres of its four quarters. For a function with continuous second
// derivatives the error of bilinear interpolation is −½[f_xx (x−x₀)(x₁−x) +
// f_yy (y−y₀)(y₁−y)] to leading order, largest at the centre (both terms)
// and, where f_xx and f_yy have opposite signs and cancel there, at the
// edge midpoints (one term each); where the curvature changes sign inside
// the cell (the flank of a narrow band) the error vanishes at the centre
// and peaks near the quarter points. When any check misses the exact value
// by more than the tolerance times the pixel's largest channel, the cell is
// split into four (its checks at the midpoints become their corners) down
// to smoothMinCell pixels, below which its pixels are evaluated exactly. A
// cell is also split, and at the smallest size evaluated exactly, when any
// of its corners or checks is not smooth: a pixel the evaluator sub-samples
// (its value varies within the pixel), or one without a direction (outside
// a fisheye's circle or at its rim). So the fisheye rim, the fast-varying
// forward beam at high speed and any structure finer than a cell are exact,
// and cells never straddle an image edge, the equirect seam (the image's
// left and right edges) or a cube face (each face is its own column of
// cells); the equirect poles are rows of the image like any other, their
// pixels' solid angle exact per row. Cells wholly outside a fisheye's
// circle get nothing.
//
// Each cell is computed on its own from exact evaluations, and rows of
// cells run in parallel, each writing only its own pixels: the result is
// the same for any worker count, bit for bit.

// Parameters of the adaptive grid.
const (
	// smoothCell is the least side of the top-level cells, pixels; the
	// side doubles while it spans at most smoothCellAngle at the image
	// centre (64 px in an 8192² fisheye), the angle 32 px span in a 4096²
	// one, since the layer's structure is set on the sky (the model map's
	// nodes are 2° apart in longitude and 0.5° in latitude near the
	// plane), not in pixels: a larger top cell that passes its checks
	// costs 13 evaluations for 4 times the pixels, and one that fails
	// hands its checks down as its quarters' corners and centres.
	smoothCell = 32
	// smoothCellAngle is the largest angle, degrees, a top-level cell
	// larger than smoothCell may span.
	smoothCellAngle = 1.5
	// smoothMinCell is the side below which a failing cell is evaluated
	// exactly instead of split.
	smoothMinCell = 4
	// DefaultSmoothTolerance is the largest error the interpolation of a
	// diffuse layer may leave at the checked points, relative to the
	// pixel's largest channel (see DiffuseOptions.Tolerance): 10⁻³ is a
	// tenth of an 8-bit sRGB step at full scale and smaller elsewhere.
	DefaultSmoothTolerance = 1e-3
	// EightBitTolerance is the tolerance for a layer whose frame is
	// written only as 8-bit sRGB. An error of ε times the pixel's largest
	// channel M moves that channel's sRGB code by at most 255·(1.055/2.4)·
	// M^(1/2.4)·ε ≤ 112ε codes (at full scale; less below it, under the
	// shoulder and where clipped), 0.45 of a step at 4·10⁻³, and a
	// channel at a quarter of M by up to one step.
	// TestDiffuseEightBitTolerance holds 8-bit frames of the built-in
	// sky's layer drawn with it to within one code of the exact layer's.
	EightBitTolerance = 4e-3
	// EightBitCodes is DiffuseOptions.Codes for a layer whose frame is
	// written only as 8-bit sRGB: an error of 0.45 of a code step, with
	// rounding, moves a code by at most one. TestDiffuseEightBitTolerance
	// holds such layers within one code of the exact layer's.
	EightBitCodes = 0.45
)

// pixelEval evaluates a layer exactly at pixel (i, j): the linear RGB to
// add, whether the value may be interpolated (smooth) and an error that
// stops the drawing. A value that adds nothing is (0, 0, 0).
type pixelEval func(i, j int) (v [3]float64, smooth bool, err error)

// smoothGrid describes the cells of one image.
type smoothGrid struct {
	w, h    int
	cell    int      // the top-level cells' side, pixels
	segs    [][2]int // column segments [a, b): cube faces, else the whole width
	circle  imageCircle
	tol     float64
	codes   float64 // DiffuseOptions.Codes
	workers int
}

func newSmoothGrid(p *camera.Projection, tol float64, workers int) smoothGrid {
	g := smoothGrid{w: p.Width, h: p.Height, cell: smoothCell, tol: tol, workers: workers}
	if s := p.PixelScale(); s > 0 {
		for 2*float64(g.cell)*s <= smoothCellAngle && g.cell < 256 {
			g.cell *= 2
		}
	}
	if p.Kind == camera.Cube && p.Width%6 == 0 && p.Width/6 == p.Height {
		for k := 0; k < 6; k++ {
			g.segs = append(g.segs, [2]int{k * p.Height, (k + 1) * p.Height})
		}
	} else {
		g.segs = [][2]int{{0, p.Width}}
	}
	g.circle.cx, g.circle.cy, g.circle.r, g.circle.ok = p.ImageCircle()
	return g
}

// nodes returns the node pixels of the span [a, b): a, a+side, … and b−1.
func nodes(a, b, side int) []int {
	var n []int
	for x := a; x < b-1; x += side {
		n = append(n, x)
	}
	return append(n, b-1)
}

// add draws the layer into dst (W×H interleaved RGB) with one pixelEval per
// worker from newEval. The top-level cells' corners are evaluated first,
// each once (a corner is shared by up to four cells), then the cells band
// by band. It returns the first error of the corners in row order, else
// the first in band order. With rec not nil it also records the layer
// there (rec.bands, one per band of cells), for replay; with dst nil as
// well, it only records it.
func (g *smoothGrid) add(dst []float32, newEval func() pixelEval, rec *gridRecord) error {
	rows := nodes(0, g.h, g.cell)
	bands := max(1, len(rows)-1)
	errs := make([]error, bands)
	corners, err := g.corners(rows, newEval)
	if err != nil {
		return err
	}
	if rec != nil {
		// A record drawn before lends its bands' storage.
		rec.w, rec.workers, rec.sorted = g.w, g.workers, false
		if len(rec.bands) != bands {
			rec.bands = make([]gridBand, bands)
		}
	}
	var leaves sync.Pool // *[]smoothLeaf, one in use per worker
	parallel(g.workers, bands, func(k int) {
		ev := newEval()
		y0, y1 := rows[k], rows[min(k+1, len(rows)-1)]
		lp, _ := leaves.Get().(*[]smoothLeaf)
		if lp == nil {
			lp = new([]smoothLeaf)
		}
		c := smoothCellState{dst: dst, w: g.w, ev: ev, tol: g.tol, codes: g.codes, circle: g.circle, leaves: (*lp)[:0]}
		if rec != nil {
			c.rec = &rec.bands[k]
			c.rec.y0, c.rec.ye = y0, fillEnd(y1, k == bands-1)
			c.rec.exact = c.rec.exact[:0]
		}
		defer func() { *lp = c.leaves[:0]; leaves.Put(lp) }()
		kb := min(k+1, len(rows)-1)
		n := corners.n
		top, bottom := corners.row(k), corners.row(kb)
		for si := range g.segs {
			cols := corners.cols[si]
			off := corners.off[si]
			for m := 0; m < max(1, len(cols)-1); m++ {
				x0, x1 := cols[m], cols[min(m+1, len(cols)-1)]
				if !c.circle.meets(x0, y0, x1+1, y1+1) {
					continue // outside a fisheye's circle: no light
				}
				a, b := off+m, off+min(m+1, len(cols)-1)
				lastX, lastY := m+1 >= len(cols)-1, k == bands-1
				v := [4]nodeVal{top[a], top[b], bottom[a], bottom[b]}
				edges := [4]nodeVal{corners.hmid[k*n+a], corners.hmid[kb*n+a], corners.vmid[k*n+a], corners.vmid[k*n+b]}
				if err := c.refine(x0, x1, y0, y1, lastX, lastY, v, nil, &edges); err != nil {
					errs[k] = err
					return
				}
			}
		}
		c.fill(y0, fillEnd(y1, k == bands-1))
	})
	for _, err := range errs {
		if err != nil {
			return err
		}
	}
	return nil
}

// cornerGrid holds the exact values at the corners of the top-level
// cells and at the midpoints of their edges, each shared by the cells on
// either side: node row r (pixel row rows[r]), node column cols[s][m] of
// segment s at val[r·n + off[s] + m]; the midpoint of the edge from that
// node to the next column's at hmid[r·n + off[s] + m], and of the edge
// from it to the next row's (band r) at vmid[r·n + off[s] + m].
type cornerGrid struct {
	cols       [][]int
	off        []int
	n          int // nodes per row
	val        []nodeVal
	hmid, vmid []nodeVal
}

func (cg *cornerGrid) row(r int) []nodeVal { return cg.val[r*cg.n : (r+1)*cg.n] }

// corners evaluates, on g.workers goroutines, what the top-level cells
// that meet the image circle (the others stay zero) share: first their
// corners, then the midpoints of the edges of those whose checks refine
// evaluates (two pixels or more each way, and smooth corners or room to
// split), each once for all the cells that share it.
func (g *smoothGrid) corners(rows []int, newEval func() pixelEval) (*cornerGrid, error) {
	cg := &cornerGrid{cols: make([][]int, len(g.segs)), off: make([]int, len(g.segs))}
	for si, s := range g.segs {
		cg.cols[si] = nodes(s[0], s[1], g.cell)
		cg.off[si] = cg.n
		cg.n += len(cg.cols[si])
	}
	n := cg.n
	cg.val = make([]nodeVal, len(rows)*n)
	cg.hmid, cg.vmid = make([]nodeVal, len(rows)*n), make([]nodeVal, len(rows)*n)
	need := make([]bool, len(cg.val))
	hneed, vneed := make([]bool, len(cg.val)), make([]bool, len(cg.val))
	bands := max(1, len(rows)-1)
	// cells calls fn for every top-level cell that meets the circle: its
	// band k, node rows r0 and r1, and node indices a and b of its left and
	// right corners in a row.
	cells := func(fn func(k, r0, r1, a, b int)) {
		for k := range bands {
			r0, r1 := k, min(k+1, len(rows)-1)
			for si, cols := range cg.cols {
				for m := 0; m < max(1, len(cols)-1); m++ {
					m1 := min(m+1, len(cols)-1)
					if g.circle.meets(cols[m], rows[r0], cols[m1]+1, rows[r1]+1) {
						fn(k, r0, r1, cg.off[si]+m, cg.off[si]+m1)
					}
				}
			}
		}
	}
	cells(func(_, r0, r1, a, b int) {
		need[r0*n+a], need[r0*n+b], need[r1*n+a], need[r1*n+b] = true, true, true, true
	})
	// x and mid give a node's column and the midpoint of its edge to the
	// next (−1 at a segment's last node).
	x, mid := make([]int, n), make([]int, n)
	for si, cols := range cg.cols {
		for m, c := range cols {
			x[cg.off[si]+m], mid[cg.off[si]+m] = c, -1
			if m+1 < len(cols) {
				mid[cg.off[si]+m] = (c + cols[m+1]) / 2
			}
		}
	}
	errs := make([]error, len(rows))
	eval := func(r int, ev pixelEval, need []bool, dst []nodeVal, px func(i int) (int, int)) bool {
		for i := r * n; i < (r+1)*n; i++ {
			if !need[i] {
				continue
			}
			xi, yi := px(i - r*n)
			v, ok, err := ev(xi, yi)
			if err != nil {
				errs[r] = err
				return false
			}
			dst[i] = nodeVal{v: v, ok: ok}
		}
		return true
	}
	firstErr := func() error {
		for _, err := range errs {
			if err != nil {
				return err
			}
		}
		return nil
	}
	parallel(g.workers, len(rows), func(r int) {
		eval(r, newEval(), need, cg.val, func(i int) (int, int) { return x[i], rows[r] })
	})
	if err := firstErr(); err != nil {
		return nil, err
	}
	cells(func(k, r0, r1, a, b int) {
		if x[b]-x[a] < 2 || rows[r1]-rows[r0] < 2 {
			return // refine evaluates the cell exactly, without checks
		}
		v := cg.val
		good := v[r0*n+a].ok && v[r0*n+b].ok && v[r1*n+a].ok && v[r1*n+b].ok
		if !good && max(x[b]-x[a], rows[r1]-rows[r0]) <= smoothMinCell {
			return // the same
		}
		hneed[r0*n+a], hneed[r1*n+a], vneed[k*n+a], vneed[k*n+b] = true, true, true, true
	})
	parallel(g.workers, len(rows), func(r int) {
		ev := newEval()
		if !eval(r, ev, hneed, cg.hmid, func(i int) (int, int) { return mid[i], rows[r] }) || r >= bands {
			return
		}
		ym := (rows[r] + rows[min(r+1, len(rows)-1)]) / 2
		eval(r, ev, vneed, cg.vmid, func(i int) (int, int) { return x[i], ym })
	})
	if err := firstErr(); err != nil {
		return nil, err
	}
	return cg, nil
}

type smoothCellState struct {
	dst    []float32
	w      int
	ev     pixelEval
	tol    float64
	codes  float64     // DiffuseOptions.Codes
	circle imageCircle // pixels wholly outside it get nothing
	// leaves are the band's interpolated cells, filled row by row once
	// the band is decided (fill): along whole rows the buffer is read and
	// written in order, about four times faster than cell by cell, whose
	// rows are a frame's width apart.
	leaves []smoothLeaf
	// rec, when not nil, records the band's leaves and exact pixels.
	rec *gridBand
}

// smoothLeaf is a cell to fill by bilinear interpolation of v (corners
// (x0,y0), (x1,y0), (x0,y1), (x1,y1)) over x0 ≤ x < xe, y0 ≤ y < ye.
type smoothLeaf struct {
	x0, x1, xe, y0, y1, ye int
	v                      [4][3]float64
}

// nodeVal is an exact value at a node and whether it is smooth.
type nodeVal struct {
	v  [3]float64
	ok bool
}

// refine draws a cell whose corner values are v, in the order (x0,y0),
// (x1,y0), (x0,y1), (x1,y1): by interpolation when every corner and check
// is smooth and the checks pass, else split into four, else exactly.
// centre, when not nil, is the value at the cell's centre check, known
// from the parent's checks (a quarter's centre is its parent's quarter
// check); edges, when not nil, are the values at its top, bottom, left
// and right midpoint checks (a top-level cell's, shared with its
// neighbours: smoothGrid.corners).
func (c *smoothCellState) refine(x0, x1, y0, y1 int, lastX, lastY bool, v [4]nodeVal, centre *nodeVal, edges *[4]nodeVal) error {
	corners := [4]knownVal{{x0, y0, v[0].v}, {x1, y0, v[1].v}, {x0, y1, v[2].v}, {x1, y1, v[3].v}}
	if x1-x0 < 2 || y1-y0 < 2 {
		return c.exact(x0, x1, y0, y1, lastX, lastY, corners[:])
	}
	xm, ym := (x0+x1)/2, (y0+y1)/2
	good := v[0].ok && v[1].ok && v[2].ok && v[3].ok
	split := max(x1-x0, y1-y0) > smoothMinCell
	if !good && !split {
		return c.exact(x0, x1, y0, y1, lastX, lastY, corners[:])
	}
	var cv [4][3]float64
	for q := range cv {
		cv[q] = v[q].v
	}
	// Checks: centre, top, bottom, left, right midpoints, then the centres
	// of the four quarters.
	qx0, qx1 := (x0+xm)/2, (xm+x1)/2
	qy0, qy1 := (y0+ym)/2, (ym+y1)/2
	pts := [9][2]int{{xm, ym}, {xm, y0}, {xm, y1}, {x0, ym}, {x1, ym}, {qx0, qy0}, {qx1, qy0}, {qx0, qy1}, {qx1, qy1}}
	var e [9]nodeVal
	for q, p := range pts {
		if q == 0 && centre != nil {
			e[0] = *centre
		} else if q >= 1 && q <= 4 && edges != nil {
			e[q] = edges[q-1]
		} else {
			var err error
			if e[q].v, e[q].ok, err = c.ev(p[0], p[1]); err != nil {
				return err
			}
		}
		if good {
			tx := float64(p[0]-x0) / float64(x1-x0)
			ty := float64(p[1]-y0) / float64(y1-y0)
			good = e[q].ok && within(bilerp(&cv, tx, ty), e[q].v, c.tol, c.codes)
		}
	}
	if good {
		c.leaves = append(c.leaves, smoothLeaf{x0: x0, x1: x1, xe: fillEnd(x1, lastX), y0: y0, y1: y1, ye: fillEnd(y1, lastY), v: cv})
		return nil
	}
	if !split {
		// The corners and checks are pixels of the cell: their exact
		// values are not evaluated again.
		var known [13]knownVal
		copy(known[:], corners[:])
		for q, p := range pts {
			known[4+q] = knownVal{p[0], p[1], e[q].v}
		}
		return c.exact(x0, x1, y0, y1, lastX, lastY, known[:])
	}
	cc, t, b, l, r := e[0], e[1], e[2], e[3], e[4]
	// The quarters' centres ((x0+xm)/2, (y0+ym)/2) … are the checks
	// e[5:9].
	if err := c.refine(x0, xm, y0, ym, false, false, [4]nodeVal{v[0], t, l, cc}, &e[5], nil); err != nil {
		return err
	}
	if err := c.refine(xm, x1, y0, ym, lastX, false, [4]nodeVal{t, v[1], cc, r}, &e[6], nil); err != nil {
		return err
	}
	if err := c.refine(x0, xm, ym, y1, false, lastY, [4]nodeVal{l, cc, v[2], b}, &e[7], nil); err != nil {
		return err
	}
	return c.refine(xm, x1, ym, y1, lastX, lastY, [4]nodeVal{cc, r, b, v[3]}, &e[8], nil)
}

// knownVal is the exact value of pixel (x, y), already evaluated.
type knownVal struct {
	x, y int
	v    [3]float64
}

// within reports whether the interpolated value a is within tol of the
// exact value e relative to e's largest channel, or, with codes above 0,
// each channel that is not within codes steps of its 8-bit sRGB code
// (DiffuseOptions.Codes; code8Step). Without codes there is no absolute
// floor: a frame may be drawn at any scale (a weighted instant of a
// motion-blurred layer, a dim exposure), so no level is safely invisible.
func within(a, e [3]float64, tol, codes float64) bool {
	lim := tol * math.Max(math.Abs(e[0]), math.Max(math.Abs(e[1]), math.Abs(e[2])))
	for k := range a {
		d := math.Abs(a[k] - e[k])
		if !(d <= lim) && !(codes > 0 && d <= codes*code8Step(math.Min(a[k], e[k]))) {
			return false
		}
	}
	return true
}

// code8Step returns a lower bound on the change of a linear value at or
// above v (buffer units, 1 = full scale) that moves its 8-bit sRGB code
// (255·E(v), E the sRGB transfer function, IEC 61966-2-1) by one: 1/(255·
// E′), with E′ = 12.92 on the linear segment (v ≤ 0.0031308) and E′(v) =
// (1.055/2.4)·v^(1/2.4 − 1) above, decreasing, so the step at v bounds it
// at every larger value. Above the segment v is taken down to a power of
// two, 2^⌊log₂ v⌋, whose step is below v's (code8Steps): no power function
// per check.
func code8Step(v float64) float64 {
	if !(v > 0.0031308) {
		return 1 / (255 * 12.92)
	}
	return code8Steps()[math.Float64bits(v)>>52&0x7ff]
}

// code8Steps holds, per float64 exponent field x (2^(x−1023)), the sRGB
// step 2.4/(255·1.055)·2^((x−1023)(1 − 1/2.4)) at that power of two.
var code8Steps = sync.OnceValue(func() *[2048]float64 {
	var t [2048]float64
	for x := range t {
		t[x] = 2.4 / (255 * 1.055) * math.Exp2(float64(x-1023)*(1-1/2.4))
	}
	return &t
})

func bilerp(v *[4][3]float64, tx, ty float64) [3]float64 {
	var o [3]float64
	for k := range o {
		a := v[0][k] + tx*(v[1][k]-v[0][k])
		b := v[2][k] + tx*(v[3][k]-v[2][k])
		o[k] = a + ty*(b-a)
	}
	return o
}

// fillEnd returns the end (exclusive) of the pixels a cell fills along one
// axis.
func fillEnd(a1 int, last bool) int {
	if last {
		return a1 + 1
	}
	return a1
}

// fill draws the rows y0 ≤ y < ye of the band's leaves, row by row, and
// empties the list. Each pixel is that of interpolating its cell alone
// (one addition per pixel, so the order of the cells does not matter).
func (c *smoothCellState) fill(y0, ye int) {
	if c.dst != nil {
		fillLeaves(c.dst, c.w, c.leaves, y0, ye)
	}
	if c.rec != nil {
		c.rec.leaves = append(c.rec.leaves[:0], c.leaves...)
	}
	c.leaves = c.leaves[:0]
}

// fillLeaves adds rows y0 ≤ y < ye of the leaves' interpolation to dst (w
// pixels wide), row by row.
func fillLeaves(dst []float32, w int, leaves []smoothLeaf, y0, ye int) {
	for y := y0; y < ye; y++ {
		row := dst[3*y*w : 3*(y+1)*w]
		for i := range leaves {
			lf := &leaves[i]
			if y < lf.y0 || y >= lf.ye {
				continue
			}
			interpRow(row, lf, y)
		}
	}
}

// interpRow adds row y of leaf lf's bilinear interpolation to row, the
// frame's row y (3·W values).
func interpRow(row []float32, lf *smoothLeaf, y int) {
	v := &lf.v
	ix, iy := 1/float64(lf.x1-lf.x0), 1/float64(lf.y1-lf.y0)
	ty := float64(y-lf.y0) * iy
	var l, d [3]float64
	for k := range l {
		l[k] = v[0][k] + ty*(v[2][k]-v[0][k])
		d[k] = v[1][k] + ty*(v[3][k]-v[1][k]) - l[k]
	}
	row = row[3*lf.x0 : 3*lf.xe]
	// Along the row in float32 (the buffer's precision), the row's
	// coefficients rounded once; eight pixels a step where the CPU has
	// AVX2 (the same values, bit for bit).
	ld := [8]float32{float32(l[0]), float32(l[1]), float32(l[2]), 0, float32(d[0]), float32(d[1]), float32(d[2]), 0}
	fx := float32(ix)
	n0 := 0
	if g := len(row) / 24; g > 0 && haveAVX2 {
		interpRowAVX2(&row[0], g, &ld, fx)
		n0 = 8 * g
	}
	interpRowGo(row, n0, &ld, fx)
}

// interpRowGo adds, for each pixel n ≥ n0 of row (interleaved RGB),
// ld[c] + tx·ld[4+c] to channel c, tx = n·fx, every product and sum
// rounded to float32 (the conversion keeps a compiler from fusing a
// multiply and add, which interpRowAVX2 does not).
func interpRowGo(row []float32, n0 int, ld *[8]float32, fx float32) {
	l0, l1, l2, d0, d1, d2 := ld[0], ld[1], ld[2], ld[4], ld[5], ld[6]
	for n := n0; n < len(row)/3; n++ {
		p := row[3*n : 3*n+3 : 3*n+3]
		tx := float32(n) * fx
		p[0] += l0 + float32(tx*d0)
		p[1] += l1 + float32(tx*d1)
		p[2] += l2 + float32(tx*d2)
	}
}

// exact evaluates every pixel of the cell, taking the values of pixels in
// known (the cell's corners and checks) as they are.
func (c *smoothCellState) exact(x0, x1, y0, y1 int, lastX, lastY bool, known []knownVal) error {
	xe, ye := fillEnd(x1, lastX), fillEnd(y1, lastY)
	for y := y0; y < ye; y++ {
	pixels:
		for x := x0; x < xe; x++ {
			for _, k := range known {
				if k.x == x && k.y == y {
					c.put(x, y, k.v)
					continue pixels
				}
			}
			v, _, err := c.ev(x, y)
			if err != nil {
				return err
			}
			c.put(x, y, v)
		}
	}
	return nil
}

// put adds the exact value v to pixel (x, y).
func (c *smoothCellState) put(x, y int, v [3]float64) {
	if v == [3]float64{} {
		return
	}
	e := exactPix{i: int32(y*c.w + x), v: [3]float32{float32(v[0]), float32(v[1]), float32(v[2])}}
	if c.dst != nil {
		e.add(c.dst)
	}
	if c.rec != nil {
		c.rec.exact = append(c.rec.exact, e)
	}
}

// exactPix is an exactly evaluated pixel: its index and its value as
// added to the buffer.
type exactPix struct {
	i int32
	v [3]float32
}

func (e exactPix) add(dst []float32) {
	j := 3 * int(e.i) // in int: 3i overflows int32 beyond 26 754² pixels
	p := dst[j : j+3 : j+3]
	p[0] += e.v[0]
	p[1] += e.v[1]
	p[2] += e.v[2]
}

// gridRecord is a layer as the adaptive grid drew it: per band of cells
// its interpolated leaves and its exact pixels. Replaying it adds the same
// value to each pixel as drawing did.
type gridRecord struct {
	w, workers int
	bands      []gridBand
	sorted     bool // exact pixels in pixel order (sortExact)
}

// gridBand is one band's part of a gridRecord: rows y0 ≤ y < ye. Every
// pixel of the band is in at most one leaf or exact pixel (the cells' fills
// partition the band), so their order does not matter to the replay.
type gridBand struct {
	y0, ye int
	leaves []smoothLeaf
	exact  []exactPix
}

// band returns the band holding row y, or nil.
func (r *gridRecord) band(y int) *gridBand {
	k, ok := slices.BinarySearchFunc(r.bands, y, func(b gridBand, y int) int {
		switch {
		case y < b.y0:
			return 1
		case y >= b.ye:
			return -1
		}
		return 0
	})
	if !ok {
		return nil
	}
	return &r.bands[k]
}

// sortExact puts every band's exact pixels in pixel order, for exactRow
// (once per record: sorted marks it).
func (r *gridRecord) sortExact() {
	if r.sorted {
		return
	}
	for k := range r.bands {
		slices.SortFunc(r.bands[k].exact, func(a, b exactPix) int { return cmp.Compare(a.i, b.i) })
	}
	r.sorted = true
}

// exactRow returns the band's exact pixels in row y of a w-pixel-wide
// frame; they must be in pixel order (gridRecord.sortExact).
func (b *gridBand) exactRow(y, w int) []exactPix {
	at := func(i int) int {
		k, _ := slices.BinarySearchFunc(b.exact, i, func(e exactPix, i int) int { return cmp.Compare(int(e.i), i) })
		return k
	}
	return b.exact[at(y*w):at((y+1)*w)]
}

// addRow adds row y of the recorded layer to row (3·W values); the exact
// pixels must be sorted (sortExact).
func (r *gridRecord) addRow(row []float32, y int) {
	b := r.band(y)
	if b == nil {
		return
	}
	for _, e := range b.exactRow(y, r.w) {
		p := row[3*(int(e.i)-y*r.w):][:3:3]
		p[0] += e.v[0]
		p[1] += e.v[1]
		p[2] += e.v[2]
	}
	for i := range b.leaves {
		if lf := &b.leaves[i]; y >= lf.y0 && y < lf.ye {
			interpRow(row, lf, y)
		}
	}
}

// bytes returns the record's size.
func (r *gridRecord) bytes() int64 {
	n := int64(0)
	for _, b := range r.bands {
		n += int64(len(b.leaves))*int64(unsafe.Sizeof(smoothLeaf{})) + int64(len(b.exact))*int64(unsafe.Sizeof(exactPix{}))
	}
	return n
}

// replay adds the recorded layer to dst (of the recorded width), bands in
// parallel on workers goroutines (0: the recorded count).
func (r *gridRecord) replay(dst []float32, workers int) {
	if workers <= 0 {
		workers = r.workers
	}
	parallel(workers, len(r.bands), func(k int) {
		b := &r.bands[k]
		for _, e := range b.exact {
			e.add(dst)
		}
		fillLeaves(dst, r.w, b.leaves, b.y0, b.ye)
	})
}

// imageCircle is a fisheye's image circle (camera.Projection.ImageCircle),
// outside which no direction is imaged.
type imageCircle struct {
	cx, cy, r float64
	ok        bool
}

// meets reports whether the rectangle [x0, x1]×[y0, y1] of image
// coordinates reaches inside the circle (always true without a circle).
func (c imageCircle) meets(x0, y0, x1, y1 int) bool {
	if !c.ok {
		return true
	}
	dx := max(float64(x0)-c.cx, 0, c.cx-float64(x1))
	dy := max(float64(y0)-c.cy, 0, c.cy-float64(y1))
	return dx*dx+dy*dy < c.r*c.r
}
