package render

import (
	"errors"
	"fmt"
	"math"
	"runtime"
	"slices"
	"sync"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/spectrum"
)

// UnresolvedSky is light from stars too faint to be drawn, in the
// catalogue frame, as a sum of diluted blackbodies with fixed temperatures:
// I_λ(n) = Σ_k W_k(n) B_λ(T_k) (W dimensionless).
//
// Implementations must be safe for concurrent calls of Dilutions (each
// caller passes its own w) and deterministic: the same n gives the same
// values. A dilution must be finite and ≥ 0.
type UnresolvedSky interface {
	Temperatures() []float64         // K, ascending, the same for every direction
	Dilutions(n r3.Vec, w []float64) // n: ICRS unit vector; writes len(Temperatures()) values
}

// UniformSky is an UnresolvedSky that is the same in every direction:
// component k has temperature T[k] and dilution W[k]. It is the simplest
// sky to check the layer against (a sphere of uniform radiance) and a
// stand-in for a model.
type UniformSky struct {
	T []float64 // K, ascending
	W []float64 // dilutions, one per temperature
}

// Temperatures returns s.T.
func (s UniformSky) Temperatures() []float64 { return s.T }

// Dilutions copies s.W into w.
func (s UniformSky) Dilutions(_ r3.Vec, w []float64) { copy(w, s.W) }

// ErrDiffuse reports unusable diffuse-layer options, a bad UnresolvedSky or
// a frame the layer cannot be added to.
var ErrDiffuse = errors.New("render: diffuse layer")

// Sampling defaults of the diffuse layer (see AddDiffuse).
const (
	// DefaultDiffuseFootprint is the largest angle, in radians, that one
	// sample of the diffuse layer may span in the catalogue frame: 0.25°,
	// finer than the ≈ 1° structure of an all-sky starlight map.
	DefaultDiffuseFootprint = 0.25 * math.Pi / 180
	// DefaultDiffuseLnD is the largest change of ln D across one sample.
	DefaultDiffuseLnD = 0.05
	// DefaultDiffuseSamples is the largest number of samples per pixel side.
	DefaultDiffuseSamples = 8
)

// DiffuseOptions control AddDiffuse. The zero value samples with the
// defaults above, adds into the frame's own buffer and uses the frame's
// worker count.
type DiffuseOptions struct {
	// Footprint is the largest catalogue-frame angle one sample may span,
	// radians; 0 means DefaultDiffuseFootprint, +Inf turns that criterion
	// off.
	Footprint float64
	// MaxLnD is the largest change of ln D across one sample; 0 means
	// DefaultDiffuseLnD, +Inf turns that criterion off.
	MaxLnD float64
	// MaxSamples caps the samples per pixel side; 0 means
	// DefaultDiffuseSamples, 1 samples every pixel at its centre only.
	MaxSamples int
	// Into, when not nil, receives the layer instead of the frame's buffer:
	// give a black buffer of the frame's size to keep the layer apart (as
	// its own output layer) and add it to the frame with Buffer.Add.
	Into *Buffer
	// Workers is the number of goroutines; 0 means the frame's
	// Options.Workers, and then runtime.GOMAXPROCS(0). The result does not
	// depend on it, bit for bit.
	Workers int
	// Exact evaluates every pixel (slow: hundreds of ns per pixel) instead
	// of interpolating on the adaptive grid of cells.
	Exact bool
	// Tolerance is the largest error the grid may leave where it checks
	// the interpolation, relative to the pixel's largest channel; 0 means
	// DefaultSmoothTolerance. EightBitTolerance suits a frame written
	// only as 8-bit sRGB (with Codes).
	Tolerance float64
	// Codes, when above 0, also passes a check for a channel whose error
	// is within Codes steps of its 8-bit sRGB code: at most Codes times
	// the least change of linear value that moves the code by one, over
	// the span between the exact and the interpolated value (the sRGB
	// curve's slope is largest at the lower end). For a frame written
	// only as 8-bit sRGB (EightBitCodes): where the layer is too dim for
	// its shape to show in the codes, the grid need not follow it. The
	// stars' light adds to the layer, which only lowers the slope, and
	// the tone map's shoulder lowers it too, so the bound holds for the
	// written pixel. 0 checks by Tolerance alone.
	Codes float64
	// BeyondRim continues a fisheye's layer past its image circle, for a
	// frame whose image the circle masks (the tone map leaves the pixels
	// outside it black and scales the rim's by their coverage): a pixel
	// whose centre lies outside the circle takes the value at the
	// direction the projection continued past the circle images there
	// (camera.Projection.InverseBeyond), as one inside does, so the cells
	// that cross the rim are interpolated like any other instead of being
	// split down to 4 pixels and drawn exactly, and the mask cuts the layer
	// at the circle as it cuts the stars. The buffer then holds light
	// outside the circle (up to a cell's width): for frames written only as
	// masked images, not FITS or OpenEXR. It applies where one sample per
	// pixel suffices (else it changes nothing).
	BeyondRim bool
	// Memo, when not nil, keeps the layer for the next frame with the
	// same one, which replays it bit for bit (see DiffuseMemo). Layers
	// averaged over a shutter (AddLinearMotion) do not use it.
	Memo *DiffuseMemo
}

// GridTolerance returns the tolerance the adaptive grid draws with (unless
// o.Exact): o.Tolerance, or DefaultSmoothTolerance when that is 0.
func (o DiffuseOptions) GridTolerance() float64 {
	if o.Tolerance == 0 {
		return DefaultSmoothTolerance
	}
	return o.Tolerance
}

// Add adds o's pixels to b's (same size); the Doppler channel is left as
// it is.
func (b *Buffer) Add(o *Buffer) error {
	if o == nil || o.W != b.W || o.H != b.H || len(o.Pix) != len(b.Pix) {
		return fmt.Errorf("render: Add: buffer sizes differ")
	}
	for i, v := range o.Pix {
		b.Pix[i] += v
	}
	return nil
}

// AddDiffuse adds the unresolved starlight sky, as seen from the frame's
// observer (f.Options.Observer.Boost), to the linear buffer of f (or to
// opt.Into), at its true surface brightness on the stars' photometric
// scale. It belongs to the linear stage, like AddCMB: call it after Render
// and before tone mapping, so the layer is also in the FITS output.
//
// For each sample direction n′ (ship frame) the inverse boost gives the
// catalogue-frame direction n and the Doppler factor D = γ(1 + β n·b̂) of
// light from n. Because I_ν/ν³ is invariant, component k, a blackbody of
// temperature T_k diluted by W_k(n), is seen as a blackbody of temperature
// D·T_k with the same dilution W_k(n): its bolometric surface brightness
// is W_k σ(D T_k)⁴/π, D⁴ times the rest value, with no other factor. Its
// luminance is L_k = W_k·e^LnY(D·T_k)/π (spectrum.Lookup gives the
// illuminance πB per unit dilution, from the same tables as the stars),
// and X, Z follow from the table chromaticity. A pixel of solid angle Ω
// receives Scale·Σ L·Ω, as the CMB layer does, so a uniform layer and
// stars carrying the same illuminance give the same buffer total. The
// observer's position is ignored: the unresolved stars are taken to be
// far away. The beaming convention does not apply (it is a point-source
// convention); the diffuse transform is always exact.
//
// Interpolation. Unless opt.Exact, the layer is evaluated exactly (as
// below) at the corners of cells of up to 32×32 pixels (more where 64
// pixels span at most 1.5°, smoothCellAngle) and interpolated
// bilinearly inside each cell, after checking the interpolation against
// exact values at the cell's centre, edge midpoints and quarter centres
// (the top-level cells' corners and edge midpoints, each shared with the
// neighbours, are evaluated once each, before the cells);
// a cell that misses by more than opt.Tolerance is split, down to 4
// pixels, and then drawn exactly, and so is every cell that touches a
// sub-sampled pixel or a pixel without a direction (a fisheye's rim). Cells never straddle an
// image edge or a cube face. The tests hold every pixel of frames of each
// projection to twice the tolerance of the exact evaluation
// (TestDiffuseGridBound). At 4096² it evaluates about 0.1–0.15 directions per
// pixel instead of one or more.
//
// Sampling. Each pixel is sampled on an s×s grid of sub-pixel centres,
// each weighted by its own solid angle (the projection's Jacobian there;
// equirect rows exactly), with s chosen at the pixel centre so that one
// sample spans at most opt.Footprint in the catalogue frame (the pixel's
// angular size δ′ = √Ω times D, the aberration magnifying by D) and ln D
// changes by at most opt.MaxLnD across it (|∇ ln D| = γβ sin θ′·D per
// radian on the ship's sky), capped at opt.MaxSamples. At rest and at
// ordinary resolutions s = 1; near the edge of the forward beam at high
// speed s rises. Sub-samples outside a fisheye's circle are skipped, so
// rim pixels get their partial share.
//
// The Doppler channel, which describes stars, is not changed. Nothing is
// allocated per pixel; rows run in parallel and the result does not depend
// on the worker count. A negative, NaN or infinite dilution is an error
// (the first one found in row order is reported; with interpolation only
// the directions evaluated are seen) and then the buffer holds the rows
// that were drawn: draw into opt.Into to keep the frame untouched.
func AddDiffuse(f *Frame, sky UnresolvedSky, opt DiffuseOptions) error {
	d, err := prepareDiffuse(f, sky, opt)
	if err != nil {
		return err
	}
	if opt.Memo != nil {
		if key, ok := memoKey(f, sky, opt); ok {
			return opt.Memo.draw(d, key)
		}
	}
	return d.draw(d.newEval)
}

// diffuseDraw is one validated diffuse layer ready to draw: an evaluator
// per worker, the frame's projection, the destination and the grid's
// parameters.
type diffuseDraw struct {
	newEval func() pixelEval
	p       camera.Projection
	dst     *Buffer
	workers int
	tol     float64
	codes   float64 // DiffuseOptions.Codes
	exact   bool
}

// draw adds the layer given by newEval (pixelEval per worker) to d.dst:
// on the adaptive grid, or every pixel exactly.
func (d *diffuseDraw) draw(newEval func() pixelEval) error {
	return d.drawRecord(newEval, nil)
}

// drawRecord is draw, recording the grid's layer in rec when not nil (not
// with exact).
func (d *diffuseDraw) drawRecord(newEval func() pixelEval, rec *gridRecord) error {
	if !d.exact {
		return d.grid().add(d.dst.Pix, newEval, rec)
	}
	w, h := d.dst.W, d.dst.H
	rowErr := make([]error, h)
	parallel(d.workers, h, func(j int) {
		ev := newEval()
		row := d.dst.Pix[3*j*w : 3*(j+1)*w]
		for i := 0; i < w; i++ {
			v, _, err := ev(i, j)
			if err != nil {
				rowErr[j] = err
				return
			}
			if v == [3]float64{} {
				continue
			}
			px := row[3*i : 3*i+3]
			px[0] += float32(v[0])
			px[1] += float32(v[1])
			px[2] += float32(v[2])
		}
	})
	for _, err := range rowErr {
		if err != nil {
			return err
		}
	}
	return nil
}

// grid returns the adaptive grid that draws the layer.
func (d *diffuseDraw) grid() *smoothGrid {
	g := newSmoothGrid(&d.p, d.tol, d.workers)
	g.codes = d.codes
	return &g
}

// prepareDiffuse checks AddDiffuse's arguments and sets up its drawing.
func prepareDiffuse(f *Frame, sky UnresolvedSky, opt DiffuseOptions) (*diffuseDraw, error) {
	if f == nil || sky == nil {
		return nil, fmt.Errorf("%w: nil frame or sky", ErrDiffuse)
	}
	temps := slices.Clone(sky.Temperatures())
	if len(temps) == 0 {
		return nil, fmt.Errorf("%w: the sky has no temperature components", ErrDiffuse)
	}
	for k, t := range temps {
		if !(t > 0) || math.IsInf(t, 0) {
			return nil, fmt.Errorf("%w: temperature %d is %g K, want finite > 0", ErrDiffuse, k, t)
		}
		if k > 0 && !(t > temps[k-1]) {
			return nil, fmt.Errorf("%w: temperatures not ascending (%g K after %g K)", ErrDiffuse, t, temps[k-1])
		}
	}
	fp, mlnD, ms := opt.Footprint, opt.MaxLnD, opt.MaxSamples
	if fp == 0 {
		fp = DefaultDiffuseFootprint
	}
	if mlnD == 0 {
		mlnD = DefaultDiffuseLnD
	}
	if ms == 0 {
		ms = DefaultDiffuseSamples
	}
	if !(fp > 0) || !(mlnD > 0) || ms < 1 || ms > 64 {
		return nil, fmt.Errorf("%w: Footprint %g rad, MaxLnD %g, MaxSamples %d: want > 0, > 0 and 1..64", ErrDiffuse, opt.Footprint, opt.MaxLnD, opt.MaxSamples)
	}
	tol := opt.GridTolerance()
	if !(tol > 0) || math.IsInf(tol, 0) {
		return nil, fmt.Errorf("%w: Tolerance %g, want finite > 0", ErrDiffuse, opt.Tolerance)
	}
	if opt.Workers < 0 {
		return nil, fmt.Errorf("%w: negative Workers %d", ErrDiffuse, opt.Workers)
	}
	if !(opt.Codes >= 0) || math.IsInf(opt.Codes, 0) {
		return nil, fmt.Errorf("%w: Codes %g, want finite ≥ 0", ErrDiffuse, opt.Codes)
	}
	p := f.Options.Projection
	if err := p.Prepare(); err != nil {
		return nil, err
	}
	if p.Width != f.W || p.Height != f.H {
		return nil, fmt.Errorf("%w: projection %d×%d does not match the buffer %d×%d", ErrDiffuse, p.Width, p.Height, f.W, f.H)
	}
	dst := &f.Buffer
	if opt.Into != nil {
		dst = opt.Into
		if dst.W != f.W || dst.H != f.H || len(dst.Pix) != 3*f.W*f.H {
			return nil, fmt.Errorf("%w: Into is %d×%d, the frame %d×%d", ErrDiffuse, dst.W, dst.H, f.W, f.H)
		}
	}
	if k := f.extended(); !(k > 0) || math.IsInf(k, 0) {
		return nil, fmt.Errorf("%w: frame Scale %g × ExtendedScale %g, want finite > 0", ErrDiffuse, f.Scale, f.Options.ExtendedScale)
	}
	sa, err := newPixelSolidAngle(&p)
	if err != nil {
		return nil, fmt.Errorf("%w: %v", ErrDiffuse, err)
	}
	workers := opt.Workers
	if workers == 0 {
		workers = f.Options.Workers
	}
	if workers == 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	lnT := make([]float64, len(temps))
	for k, t := range temps {
		lnT[k] = math.Log(t)
	}
	boost := f.Options.Observer.Boost
	d := diffuseSampler{
		sky: sky, temps: temps, lnT: lnT, shipIn: boost.Inverse(), bdir: boost.Dir(), gb: boost.GammaBeta(),
		sa: &sa, p: &p, fp: fp, mlnD: mlnD, ms: ms,
	}
	d.circle.cx, d.circle.cy, d.circle.r, d.circle.ok = p.ImageCircle()
	// samples never asks for more than one sample per side when even the
	// largest pixel (sa.max bounds every pixel's solid angle) at the
	// largest Doppler factor, D = γ(1 + β), with sin θ′ = 1, stays below
	// both criteria (with room for rounding): then it is not called.
	dMax := math.Sqrt(1+d.gb*d.gb) + d.gb // γ + γβ
	d.one = ms == 1 || math.Sqrt(sa.max())*dMax*max(1/fp, d.gb/mlnD) < 0.999
	d.beyond = opt.BeyondRim && d.one && d.circle.ok
	d.phi = boost.Rapidity()
	k := f.extended() / math.Pi // buffer luminance per (cd/m² · sr)
	color := f.Options.Color
	newEval := func() pixelEval {
		// Scratch per worker: rows run concurrently.
		sc, w := newDiffuseScratch(len(temps)), make([]float64, len(temps))
		return func(i, j int) ([3]float64, bool, error) {
			X, Y, Z, s, err := d.pixel(i, j, sc, w)
			if err != nil || !(Y > 0) {
				return [3]float64{}, s == 1, err
			}
			xl, yl, zl := k*X, k*Y, k*Z
			if math.IsInf(yl, 0) || math.IsInf(xl, 0) || math.IsInf(zl, 0) {
				return [3]float64{}, false, nil
			}
			r, g, b := spectrum.XYZToLinearSRGB(xl, yl, zl, color)
			r, g, b = spectrum.GamutMap(r, g, b, yl)
			return [3]float64{r, g, b}, s == 1, nil
		}
	}
	return &diffuseDraw{newEval: newEval, p: p, dst: dst, workers: workers, tol: tol, codes: opt.Codes, exact: opt.Exact}, nil
}

// DiffuseSeen returns what a ship with the given boost sees of sky in the
// apparent direction np (ship frame, ICRS axes, unit): the catalogue-frame
// direction n the light comes from (inverse aberration), its Doppler
// factor D, and in t and w (each of length len(sky.Temperatures())) the
// observed components, blackbodies of temperature t[k] = D·T_k with the
// unchanged dilution w[k] = W_k(n). This is the exact transform of a
// diffuse source (I_ν/ν³ invariant): the observed bolometric surface
// brightness Σ w[k]σt[k]⁴/π is D⁴ times the rest value. AddDiffuse draws
// exactly this.
func DiffuseSeen(ship camera.Boost, sky UnresolvedSky, np r3.Vec, t, w []float64) (n r3.Vec, D float64) {
	return seenDiffuse(ship.Inverse(), sky, sky.Temperatures(), np, t, w)
}

// seenDiffuse is DiffuseSeen with the inverse boost and the temperatures
// given.
func seenDiffuse(shipIn camera.Boost, sky UnresolvedSky, temps []float64, np r3.Vec, t, w []float64) (n r3.Vec, D float64) {
	n, dInv := shipIn.Apply(np)
	D = 1 / dInv
	sky.Dilutions(n, w)
	for k, tk := range temps {
		t[k] = D * tk
	}
	return n, D
}

// diffuseScratch holds one worker's per-component values.
type diffuseScratch struct {
	lnT, lnY, x, y []float64
}

func newDiffuseScratch(k int) *diffuseScratch {
	return &diffuseScratch{lnT: make([]float64, k), lnY: make([]float64, k),
		x: make([]float64, k), y: make([]float64, k)}
}

// diffuseSampler evaluates the layer's XYZ radiance × solid angle over one
// pixel.
type diffuseSampler struct {
	sky      UnresolvedSky
	temps    []float64
	lnT      []float64    // ln T_k
	shipIn   camera.Boost // ship frame → catalogue frame
	bdir     r3.Vec       // b̂, the direction of motion
	gb       float64      // γβ
	sa       *pixelSolidAngle
	p        *camera.Projection
	fp, mlnD float64
	ms       int
	circle   imageCircle // a fisheye's image circle: no light outside it
	one      bool        // every pixel with a centre direction takes one sample
	beyond   bool        // a fisheye's layer continues past its circle (BeyondRim)
	// colour is the components' photometry against ln D for the boost's
	// rapidity phi, or nil (newLnDTable), found or built on the first
	// evaluation (lnDTableFor): a layer lent or replayed from a memo
	// never needs it.
	colour     *lnDTable
	colourOnce sync.Once
	phi        float64
}

// table returns d.colour, built on the first call.
func (d *diffuseSampler) table() *lnDTable {
	d.colourOnce.Do(func() { d.colour = lnDTableFor(d.lnT, d.phi) })
	return d.colour
}

// samples returns the number of samples per side for the pixel whose centre
// shows np, with Doppler factor D there and solid angle omega.
func (d *diffuseSampler) samples(np r3.Vec, D, omega float64) int {
	if d.ms == 1 {
		return 1
	}
	delta := math.Sqrt(omega) // the pixel's angular size on the ship's sky
	need := delta * D / d.fp
	if d.gb > 0 {
		sinT := r3.Norm(r3.Cross(np, d.bdir))
		need = max(need, delta*d.gb*sinT*D/d.mlnD)
	}
	if !(need > 1) {
		return 1
	}
	if need >= float64(d.ms) {
		return d.ms
	}
	return int(math.Ceil(need))
}

// pixel returns Σ over the samples of Ω_sample·Σ_k W_k e^LnY(D T_k) and
// the matching X and Z, for pixel (i, j), and the samples per side s (0
// for a pixel without light: no direction at its centre and no
// sub-samples).
func (d *diffuseSampler) pixel(i, j int, sc *diffuseScratch, w []float64) (X, Y, Z float64, s int, err error) {
	np, ok := d.p.Inverse(float64(i)+0.5, float64(j)+0.5)
	if !ok && d.beyond {
		np, ok = d.p.InverseBeyond(float64(i)+0.5, float64(j)+0.5)
	}
	s = 1
	// The centre's catalogue direction, Doppler factor and solid angle
	// serve as the single sample when s = 1 (sub(i+½, j+½, 1, np) is
	// at(i, j, np) bit for bit: the same expressions times 1).
	var n0 r3.Vec
	var dInv0, omega0 float64
	if ok {
		n0, dInv0 = d.shipIn.Apply(np)
		omega0 = d.sa.at(i, j, np)
		if !d.one {
			s = d.samples(np, 1/dInv0, omega0)
		}
	} else if d.ms > 1 && d.circle.ok && d.circle.meets(i, j, i+1, j+1) {
		s = d.ms // the rim of a fisheye: some sub-samples may be inside
		if d.one {
			return d.rim(i, j, sc, w)
		}
	} else {
		return 0, 0, 0, 0, nil
	}
	inv := 1 / float64(s)
	for b := 0; b < s; b++ {
		y := float64(j) + (float64(b)+0.5)*inv
		for a := 0; a < s; a++ {
			x := float64(i) + (float64(a)+0.5)*inv
			n, dInv, omega := n0, dInv0, omega0
			if s > 1 {
				if np, ok = d.p.Inverse(x, y); !ok {
					continue
				}
				omega = d.sa.sub(x, y, s, np)
				n, dInv = d.shipIn.Apply(np)
			}
			sx, sy, sz, err := d.radiance(n, dInv, sc, w)
			if err != nil {
				return 0, 0, 0, s, err
			}
			X += omega * sx
			Y += omega * sy
			Z += omega * sz
		}
	}
	return X, Y, Z, s, nil
}

// radiance returns Σ_k W_k(n) e^LnY(D T_k) and the matching X and Z for the
// catalogue-frame direction n seen with Doppler factor D = 1/dInv.
func (d *diffuseSampler) radiance(n r3.Vec, dInv float64, sc *diffuseScratch, w []float64) (sx, sy, sz float64, err error) {
	d.sky.Dilutions(n, w)
	// ln T′_k = ln T_k + ln D, D = 1/dInv: the transform of DiffuseSeen,
	// in logarithms for the tables.
	lnD := -lnFast(dInv)
	if c := d.table(); c != nil {
		if m, t, ok := c.at(lnD); ok {
			return c.radiance(m, t, w, d.temps, n)
		}
	}
	for k, l := range d.lnT {
		sc.lnT[k] = l + lnD
	}
	spectrum.LookupBatch(sc.lnT, sc.lnY, nil, sc.x, sc.y)
	for k, wk := range w {
		if wk == 0 {
			continue
		}
		if !(wk > 0) || math.IsInf(wk, 0) {
			return 0, 0, 0, badDilution(wk, d.temps[k], n)
		}
		yk := wk * expFast(sc.lnY[k])
		cx, cy := sc.x[k], sc.y[k]
		sx += cx / cy * yk
		sy += yk
		sz += (1 - cx - cy) / cy * yk
	}
	return sx, sy, sz, nil
}

// rim returns pixel's value for a pixel of a fisheye's rim whose centre
// lies outside the image circle, where one sample per pixel suffices
// everywhere (d.one): the layer barely changes across a pixel, so it is
// evaluated once, at the centroid of the pixel's s×s sub-sample centres
// inside the circle (inside it too: the disc is convex), and weighted by
// their summed solid angle, the pixel's share of the field. That share is
// what sampling every sub-sample gives; the value differs from it by the
// layer's change across the pixel, which the one-sample criteria bound.
// A rim pixel costs one evaluation instead of up to s².
func (d *diffuseSampler) rim(i, j int, sc *diffuseScratch, w []float64) (X, Y, Z float64, s int, err error) {
	s = d.ms
	inv := 1 / float64(s)
	c := d.circle
	var omega, mx, my float64
	in := 0
	for b := 0; b < s; b++ {
		y := float64(j) + (float64(b)+0.5)*inv
		for a := 0; a < s; a++ {
			x := float64(i) + (float64(a)+0.5)*inv
			if dx, dy := x-c.cx, y-c.cy; dx*dx+dy*dy > c.r*c.r {
				continue
			}
			omega += d.sa.fisheye(x, y)
			mx += x
			my += y
			in++
		}
	}
	if in == 0 {
		return 0, 0, 0, s, nil
	}
	np, ok := d.p.Inverse(mx/float64(in), my/float64(in))
	if !ok {
		return 0, 0, 0, s, nil // only by rounding on the circle itself
	}
	n, dInv := d.shipIn.Apply(np)
	sx, sy, sz, err := d.radiance(n, dInv, sc, w)
	omega *= inv * inv
	return omega * sx, omega * sy, omega * sz, s, err
}

// addDiffuseMean adds to dst (a buffer of f's size) the weighted mean of
// the unresolved layer over instants: at instant k (observer and
// projection at[k]) the layer on f's photometric scale times w[k]. Every
// instant has f's projection kind and size (so the same cells, cube faces
// and fisheye circle). The instants share one adaptive grid: each node is
// evaluated exactly at every instant and the weighted sum is what the
// cells check and interpolate, so the pixels are filled once, and the
// grid's bound (TestDiffuseGridBound) holds for the mean itself against
// the exact per-pixel mean of the instants (TestDiffuseMeanGridBound). A
// node is smooth only where it is smooth at every instant.
func addDiffuseMean(f *Frame, sky UnresolvedSky, opt DiffuseOptions, at []Instant, w []float64, dst *Buffer) error {
	if len(at) == 0 || len(at) != len(w) {
		return fmt.Errorf("%w: %d instants, %d weights", ErrDiffuse, len(at), len(w))
	}
	ds := make([]*diffuseDraw, len(at))
	for k, in := range at {
		g := *f
		g.Options.Observer, g.Options.Projection = in.Observer, in.Projection
		g.Scale = f.Scale * w[k]
		o := opt
		o.Into = dst
		d, err := prepareDiffuse(&g, sky, o)
		if err != nil {
			return err
		}
		if d.p.Kind != ds0Kind(ds, d) || d.p.Width != f.W || d.p.Height != f.H {
			return fmt.Errorf("%w: instant %d is a %v %d×%d, the frame %d×%d", ErrDiffuse, k, d.p.Kind, d.p.Width, d.p.Height, f.W, f.H)
		}
		ds[k] = d
	}
	if len(ds) == 1 {
		return ds[0].draw(ds[0].newEval)
	}
	return ds[0].draw(func() pixelEval {
		evs := make([]pixelEval, len(ds))
		for k, d := range ds {
			evs[k] = d.newEval()
		}
		return func(i, j int) ([3]float64, bool, error) {
			var s [3]float64
			smooth := true
			for _, ev := range evs {
				v, ok, err := ev(i, j)
				if err != nil {
					return [3]float64{}, false, err
				}
				s[0] += v[0]
				s[1] += v[1]
				s[2] += v[2]
				smooth = smooth && ok
			}
			return s, smooth, nil
		}
	})
}

// ds0Kind returns the projection kind of the first prepared instant, or
// d's own when there is none yet.
func ds0Kind(ds []*diffuseDraw, d *diffuseDraw) camera.Kind {
	if ds[0] != nil {
		return ds[0].p.Kind
	}
	return d.p.Kind
}
