package render

import (
	"errors"
	"math"
	"runtime"
	"sync"
	"sync/atomic"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/internal/keep"
	"github.com/skyframe/skyframe/spectrum"
)

// WhiteTemperature is the temperature, in kelvin, of the reference "white"
// star in the exposure definition: 6504 K, the correlated colour
// temperature of CIE illuminant D65 [cp].
const WhiteTemperature = 6504

// DefaultLimitOffset is how many magnitudes fainter than Exposure the
// default cull limit lies. A star 10 mag below full scale peaks at
// 10^−4 in the linear buffer, under half an 8-bit sRGB code value
// (0.5/255/12.92 = 1.5·10⁻⁴), so culling it changes no 8-bit pixel by
// more than rounding.
const DefaultLimitOffset = 10

// DefaultBrightest is the number of brightest stars Stats lists when
// Options.Brightest is zero.
const DefaultBrightest = 10

// NakedEyeLimit is the faintest V magnitude visible to the unaided eye
// under a dark sky, 6.5 [cp].
const NakedEyeLimit = 6.5

// JustVisible is the 8-bit sRGB code value, out of 255, at which the naked-
// eye preset puts a NakedEyeLimit star's peak pixel: 8, the faintest level
// that stays distinguishable from black on a typical display [cp].
const JustVisible = 8

// ExposureForLimit returns the exposure (see Options.Exposure) at which a
// white star of magnitude limit, centred on a pixel, has a peak pixel of
// JustVisible/255 after sRGB encoding with the default PSF:
//
//	Exposure = limit + 2.5·log10(DecodeSRGB(JustVisible/255)).
//
// DecodeSRGB(8/255) = 8/255/12.92 = 2.428·10⁻³, so the offset is −6.537 mag.
func ExposureForLimit(limit float64) float64 {
	return limit + 2.5*math.Log10(spectrum.DecodeSRGB(JustVisible/255.0))
}

// NakedEyeExposure returns the naked-eye preset, ExposureForLimit(6.5) =
// −0.037 mag: stars of V ≈ 0 reach full scale and V = 6.5 is just visible.
// The zero Options.Exposure is within 0.04 mag of it.
func NakedEyeExposure() float64 { return ExposureForLimit(NakedEyeLimit) }

// Options control one frame. The zero value of every field except
// Projection (which needs a size) selects the documented default.
type Options struct {
	// Projection maps apparent directions (ICRS axes, ship frame) to
	// pixels; it is validated by Render.
	Projection camera.Projection
	// Observer is the ship's position and velocity.
	Observer camera.Observer
	// Beaming selects how a star's flux scales with D (default exact:
	// W′ = W/D²).
	Beaming spectrum.Beaming
	// FWHM of the Gaussian PSF in pixels; 0 means DefaultFWHM.
	FWHM float64
	// Exposure, in V magnitudes: a WhiteTemperature blackbody star of
	// apparent V = Exposure, centred on a pixel, gives a peak pixel of
	// luminance exactly 1 in the linear buffer with the default PSF.
	// The buffer scale is fixed by the default PSF whatever FWHM is, so a
	// wider PSF keeps each star's total light and lowers its peak. The
	// exposure is never adjusted to the frame's content.
	Exposure float64
	// Limit culls stars whose observed V′ is fainter (greater) than it.
	// 0 means Exposure + DefaultLimitOffset; +Inf disables culling.
	Limit float64
	// Color selects the white point of the sRGB conversion.
	Color spectrum.ColorOptions
	// Workers is the number of goroutines; 0 means runtime.GOMAXPROCS(0).
	// The output does not depend on it.
	Workers int
	// Doppler keeps the luminance-weighted Doppler-factor channel.
	Doppler bool
	// Brightest is how many of the brightest drawn stars Stats lists:
	// 0 means DefaultBrightest, negative means none.
	Brightest int
	// ExtendedScale multiplies the light of extended sources — star
	// discs, the CMB and the unresolved starlight, whose value per pixel
	// is their surface brightness times the pixel's solid angle — against
	// point stars; 0 means 1. A reduced preview of a frame, whose pixels
	// each cover 1/s² times the solid angle of the full frame's, sets s²:
	// extended light then keeps the full frame's value per pixel, as point
	// stars keep their peak (the PSF's width is in pixels). Without it a
	// quarter-size preview shows the Milky Way and the Sun's disc 16 times
	// brighter, against the stars, than the frames it previews.
	ExtendedScale float64
}

// The range of Options.Exposure, in V magnitudes: from brighter than the
// Sun seen from Earth (V = −26.7, common practice) to fainter than any
// catalogued star. Outside it the buffer scale (a factor 10^0.4 per
// magnitude) drives bright stars beyond float32 or every star to zero,
// and at about 900 mag the scale itself is +Inf.
const (
	MinExposure = -30.0
	MaxExposure = 40.0
)

// Errors returned by Render for bad options.
var (
	ErrWorkers  = errors.New("render: negative Workers")
	ErrLimit    = errors.New("render: Limit is NaN")
	ErrExposure = errors.New("render: Exposure is outside [MinExposure, MaxExposure]")
	ErrStars    = errors.New("render: no star list")
	ErrBeaming  = errors.New("render: unknown beaming convention")
	ErrExtended = errors.New("render: ExtendedScale is negative, NaN or infinite")
)

// Frame is a rendered image with what went into it.
type Frame struct {
	Buffer
	// Options are the options used, with defaults filled in (FWHM, Limit,
	// Brightest).
	Options Options
	// Scale converts illuminance to buffer units: a star of illuminance
	// E_v (lux) deposits a total luminance of Scale·E_v, spread by the PSF.
	Scale float64
	// Stats counts the stars and lists the brightest ones.
	Stats Stats
	// work is the star path's working memory, kept for the next
	// RenderInto this frame is given to (nil otherwise).
	work *starScratch
	// black marks Pix all 0 (PendingLayer.ClearBuffer), so that the next
	// render into the frame need not clear it.
	black bool
}

// extended returns the buffer scale of extended light (star discs, the
// CMB, the unresolved starlight): Scale times Options.ExtendedScale, or
// Scale when that is 0.
func (f *Frame) extended() float64 {
	if e := f.Options.ExtendedScale; e != 0 {
		return f.Scale * e
	}
	return f.Scale
}

// Prepared holds per-star values that do not depend on the observer, so a
// sequence of frames can skip recomputing them.
type Prepared struct {
	Stars *catalog.Stars
	lnV0  []float64 // LnV at the rest temperature
	lnT0  []float64 // ln of the rest temperature
	// Unit direction in float64, normalised once, in struct-of-arrays
	// form so that a frame seen from the Sun boosts it straight from here.
	ux, uy, uz []float64
	// direct marks a Prepared with validated stars but none of the
	// arrays above: the transform computes the same values block by block
	// (the same functions, so the same bits). A single frame — Render,
	// RenderStream — gains nothing from storing them.
	direct bool
}

// The dilution seen from the Sun at rest, ln W₀ = spectrum.LnWForV(V,
// lnV0), is recomputed per frame from the catalogue column (inside
// spectrum.ObserveBatch), by the same expression every time: that costs
// less than reading 8 more bytes per star from memory.

// Prepare validates stars and computes each star's dilution W from its
// catalogue V magnitude and rest temperature, with the same V passband
// table the observed magnitudes use (spectrum.Lookup), so that at β = 0
// from the Sun the observed V′ equals the catalogue V.
func Prepare(stars *catalog.Stars) (*Prepared, error) {
	// Every star's values depend on that star alone; prepareInto (stream.go)
	// computes them on all CPUs, so the result does not depend on the split.
	p := &Prepared{}
	if err := prepareInto(p, stars, runtime.GOMAXPROCS(0), false); err != nil {
		return nil, err
	}
	return p, nil
}

// PrepareOnce is Prepare for a catalogue drawn at one instant: it
// validates stars but stores none of the rest values (40 bytes a star,
// fresh memory for every new catalogue), which the transform then computes
// block by block with the same functions, so the frames are the same bit
// for bit (TestDirectMatchesPreparedAtSun). A frame of a turning camera,
// whose catalogue changes with the cells in view, draws its catalogue once.
func PrepareOnce(stars *catalog.Stars) (*Prepared, error) {
	p := &Prepared{}
	if err := prepareInto(p, stars, runtime.GOMAXPROCS(0), true); err != nil {
		return nil, err
	}
	return p, nil
}

// chunkSize is the number of stars transformed per work item. It is fixed
// so that the work split does not depend on the worker count.
const chunkSize = 8192

// tileSize is the side of a square accumulation tile in pixels: a tile of
// the frame (196 KB) stays in a core's cache while its records are added,
// and a 5×5 window crosses a tile edge for 6 % of the stars (13 % with
// 64-pixel tiles, whose binning cost 1.6× as much per star).
const tileSize = 128

// splatRec is one star ready to deposit: 32 bytes. Where a cube face
// clips its kernel and whether an equirect kernel wraps are recomputed
// from x (grid.span), not stored.
type splatRec struct {
	x, y float64
	rgb  [3]float32
	d    float32
}

// Render draws stars as seen by opt.Observer through opt.Projection.
//
// A catalogue longer than ChunkRows(opt, DefaultMemoryBudget) is drawn
// by RenderStream in equal chunks of at most that length (RenderRows for
// RenderInto), which bounds the working memory and gives a bit-identical
// frame.
func Render(stars *catalog.Stars, opt Options) (*Frame, error) {
	return renderInto(nil, stars, opt)
}

// RenderInto is Render drawing into dst, which it overwrites (buffer,
// Options, Scale, Stats). dst's buffers are cleared and reused when they
// have the frame's size and a Doppler channel exactly when opt.Doppler
// asks for one, and so is the star path's working memory that dst keeps
// from its previous render; otherwise new ones are allocated. The frame
// is bit-identical to Render's. Drawing the frames of a sequence into one
// Frame touches no new memory after the first (a new 4096² buffer costs
// about 0.6 CPU-s of page faults on first touch here). The zero Frame is
// a valid dst. On error dst's pixels are unspecified.
func RenderInto(dst *Frame, stars *catalog.Stars, opt Options) error {
	if dst == nil {
		return errors.New("render: RenderInto: nil Frame")
	}
	_, err := renderInto(dst, stars, opt)
	return err
}

func renderInto(dst *Frame, stars *catalog.Stars, opt Options) (*Frame, error) {
	// A frame that keeps its working memory (RenderInto) draws in as few
	// passes as the budget allows; a one-off Render in passes of
	// ChunkRows, whose smaller working memory is touched for the first
	// time once and then reused pass after pass (first touch of a 4 KiB
	// page costs about 12 µs here: 0.55 CPU-s for the 190 MB of 2²¹-row
	// passes, 2 CPU-s for the 680 MB of one 10⁷-star pass).
	rows := ChunkRows(opt, DefaultMemoryBudget)
	if dst != nil {
		rows = RenderRows(opt, DefaultMemoryBudget)
	}
	if stars != nil && stars.Len() > rows {
		n := stars.Len()
		passes := (n + rows - 1) / rows
		return renderStream(dst, Chunks(stars, (n+passes-1)/passes), opt)
	}
	p, err := PrepareOnce(stars)
	if err != nil {
		return nil, err
	}
	return p.render(dst, opt)
}

// Render draws the prepared stars; see the package Render.
//
// The work runs in three phases whose floating-point operations do not
// depend on the worker count: stars are transformed in fixed chunks into
// splat records; records are binned, in catalogue order, into
// 128×128-pixel tiles (a star whose kernel crosses tiles goes into each);
// each tile then adds its stars in catalogue order straight into the
// frame (see grid.addTile).
func (p *Prepared) Render(opt Options) (*Frame, error) { return p.render(nil, opt) }

// RenderInto is Render drawing into dst; see the package RenderInto.
func (p *Prepared) RenderInto(dst *Frame, opt Options) error {
	if dst == nil {
		return errors.New("render: RenderInto: nil Frame")
	}
	_, err := p.render(dst, opt)
	return err
}

// render is Render into dst, or into a new frame when dst is nil.
func (p *Prepared) render(dst *Frame, opt Options) (*Frame, error) {
	opt, psf, workers, err := resolveOptions(opt)
	if err != nil {
		return nil, err
	}
	f, sc, err := startFrame(dst, opt, &psf, workers)
	if err != nil {
		return nil, err
	}
	defer f.release(sc)
	n := p.Stars.Len()
	f.Stats.Total = n

	// Phase 1: transform.
	recs := sc.records(n)
	nChunks := (n + chunkSize - 1) / chunkSize
	chunks := sc.results(nChunks)
	parallel(workers, nChunks, func(c int) {
		lo := c * chunkSize
		hi := min(lo+chunkSize, n)
		t := keptTransformer(p, &f.Options, &psf, f.Scale)
		t.run(lo, hi, recs[lo:hi], &chunks[c])
		transformers.Put(t)
	})
	discs, err := p.gather(f, chunks)
	if err != nil {
		return nil, err
	}

	// Phase 2: bin into tiles.
	g := &sc.g
	g.binAll(recs, chunks, workers)

	// Phase 3: accumulate tiles.
	addTiles(&f.Buffer, g, &psf, workers)
	finishFrame(&f.Buffer, workers)
	if err := drawDiscs(f, discs, workers); err != nil {
		return nil, err
	}
	return f, nil
}

// gather merges the transform chunks' results into f's Stats (counts and
// the brightest stars, named) and returns the stars to draw as discs, or
// the error for an observer inside a star.
func (p *Prepared) gather(f *Frame, chunks []chunkResult) ([]discStar, error) {
	opt := &f.Options
	var best []StarInfo
	var discs []discStar
	for c := range chunks {
		r := &chunks[c]
		if r.inside > 0 {
			return nil, insideError(p, r.inside-1, r.inside-1, opt.Observer.Position)
		}
		discs = append(discs, r.discs...)
		f.Stats.Drawn += r.n + len(r.discs)
		f.Stats.Culled += r.culled
		f.Stats.OffFrame += r.off
		f.Stats.Invalid += r.invalid
		best = append(best, r.best...)
	}
	sortInfos(best)
	if opt.Brightest > 0 && len(best) > opt.Brightest {
		best = best[:opt.Brightest]
	}
	if opt.Brightest < 0 {
		best = nil
	}
	for i := range best {
		best[i].Name = p.Stars.Names[best[i].Row]
		best[i].ID = p.Stars.ID[best[i].Row]
	}
	f.Stats.Brightest = best
	return discs, nil
}

// startFrame returns the frame to draw opt into — dst, its buffers
// cleared, when they have the frame's size, else new ones — and the star
// path's working memory: dst's own (kept in dst for the next render), or
// for a new frame one from scratchPool (Frame.release returns it).
func startFrame(dst *Frame, opt Options, psf *PSF, workers int) (*Frame, *starScratch, error) {
	w, h := opt.Projection.Width, opt.Projection.Height
	var f *Frame
	var sc *starScratch
	if dst != nil && dst.W == w && dst.H == h && len(dst.Pix) == 3*w*h &&
		(dst.Doppler != nil) == opt.Doppler && (!opt.Doppler || len(dst.Doppler) == w*h) {
		if !dst.black || dst.Doppler != nil {
			clearBuffer(&dst.Buffer, workers)
		}
		*dst = Frame{Buffer: dst.Buffer, work: dst.work}
		f = dst
	} else {
		buf, err := NewBuffer(w, h, opt.Doppler)
		if err != nil {
			return nil, nil, err
		}
		if dst != nil {
			*dst = Frame{Buffer: *buf, work: dst.work}
			f = dst
		} else {
			f = &Frame{Buffer: *buf}
		}
	}
	f.Options, f.Scale = opt, ExposureScale(opt.Exposure)
	if dst != nil {
		if f.work == nil {
			f.work = &starScratch{}
		}
		sc = f.work
		sc.g.reset(w, h, psf.Radius(), opt.Projection.Kind)
	} else {
		sc = getScratch(w, h, psf.Radius(), opt.Projection.Kind)
	}
	return f, sc, nil
}

// release returns the working memory sc to scratchPool unless f keeps it.
func (f *Frame) release(sc *starScratch) {
	if f.work != sc {
		scratchPool.Put(sc)
	}
}

// clearBuffer zeroes b's values on workers goroutines.
func clearBuffer(b *Buffer, workers int) {
	const part = 1 << 18 // values per work item (1 MiB)
	np, nd := (len(b.Pix)+part-1)/part, (len(b.Doppler)+part-1)/part
	parallel(workers, np+nd, func(i int) {
		s := b.Pix
		if i >= np {
			s, i = b.Doppler, i-np
		}
		clear(s[i*part : min((i+1)*part, len(s))])
	})
}

// ExposureScale returns the buffer units per lux for the given exposure:
// 1/(E_ref · PeakFraction(DefaultFWHM)), where E_ref is the illuminance of
// a WhiteTemperature blackbody of V = exposure.
func ExposureScale(exposure float64) float64 {
	s := spectrum.Lookup(math.Log(WhiteTemperature))
	lnW := spectrum.LnWForV(exposure, s.LnV)
	eRef := math.Exp(lnW + s.LnY)
	psf, _ := NewPSF(DefaultFWHM)
	return 1 / (eRef * psf.PeakFraction())
}

// parallel runs fn(0..n-1) on up to workers goroutines.
func parallel(workers, n int, fn func(int)) {
	if workers > n {
		workers = n
	}
	if workers <= 1 {
		for i := 0; i < n; i++ {
			fn(i)
		}
		return
	}
	var next atomic.Int64
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Go(func() {
			for {
				i := int(next.Add(1)) - 1
				if i >= n {
					return
				}
				fn(i)
			}
		})
	}
	wg.Wait()
}

func newTransformer(p *Prepared, opt *Options, psf *PSF, scale float64) *transformer {
	t := new(transformer)
	t.init(p, opt, psf, scale)
	return t
}

// transformers keeps the chunks' transformers (about 40 kB each, one per
// chunk of a frame) for the next chunks and frames (keptTransformer).
var transformers = keep.List[*transformer]{Max: 8}

// keptTransformer is newTransformer reusing a kept transformer, reset
// whole; the caller puts it back in transformers when done.
func keptTransformer(p *Prepared, opt *Options, psf *PSF, scale float64) *transformer {
	t, ok := transformers.Get()
	if !ok {
		t = new(transformer)
	}
	t.init(p, opt, psf, scale)
	return t
}

// init sets t up for p with opt, psf and scale, everything else zero.
func (t *transformer) init(p *Prepared, opt *Options, psf *PSF, scale float64) {
	*t = transformer{p: p, opt: opt, proj: opt.Projection, psf: psf, lnScale: math.Log(scale),
		beamExp: float64(opt.Beaming.FluxExponent() - 4),
		w:       float64(opt.Projection.Width), h: float64(opt.Projection.Height)}
	t.rFish = math.Min(t.w, t.h) / 2
	t.lnDisc = lnDiscThreshold(&t.proj)
	// ln W′ = ln W + beamExp·ln D and ln ρ′² = ln W − 2 ln D: below
	// lnDisc − 40 neither a disc (any D within e^±10) nor an observer
	// inside the star (ln W ≥ 0) is possible.
	t.lnDiscPre = min(t.lnDisc, 0) - 40
	if psf != nil {
		t.margin = psf.Radius() + 1
	}
}

// chunkResult is what one chunk of stars produced.
type chunkResult struct {
	n, culled, off, invalid int
	best                    []StarInfo
	// discs are the stars drawn as discs (catalogue order); inside is
	// one more than the row of the first star the observer is inside of
	// (0: none).
	discs  []discStar
	inside int
}

// transformer holds one chunk's per-star state.
type transformer struct {
	p       *Prepared
	opt     *Options
	proj    camera.Projection
	psf     *PSF
	lnScale float64
	beamExp float64 // FluxExponent − 4: ln WScale(D) = beamExp·ln D (disc tests)
	w, h    float64 // image size, px
	margin  float64 // PSF radius + 1 px: how far outside the image a star may still light it
	rFish   float64 // fisheye circle radius, px
	// lnDisc is ln of the smallest apparent dilution ρ′² of a disc star;
	// lnDiscPre a bound below every disc's or inside star's ln W′, for
	// a one-comparison test per star.
	lnDisc, lnDiscPre float64
	geom              geomBlock
}

// Per-star outcomes of transformer.see.
const (
	seeOK = iota
	seeCulled
	seeInvalid
)

// blockSize is the number of stars whose geometry and boost are computed
// together, in struct-of-arrays form, before their photometry.
const blockSize = 256

// geomBlock holds one block's pre-boost directions (boosted in place),
// Doppler factors and dilutions.
type geomBlock struct {
	x, y, z, d [blockSize]float64
	lnD        [blockSize]float64 // ln d, filled by geometry
	// lnDil is ln of the dilution (d⊙/r)², 0 where it is 1; unset (and
	// sun true) for an observer at the Sun, where every dilution is 1.
	lnDil [blockSize]float64
	sun   bool
	bad   [blockSize]bool
	// Filled by photometry (spectrum.ObserveBatch): ln T′ and the table
	// sample there, the observed V′ and ln W′.
	lnT, lnY, lnV, cx, cy [blockSize]float64
	vObs, lnW             [blockSize]float64
	// Rest values of a direct Prepared, computed per block.
	ux, uy, uz, lnT0, lnV0 [blockSize]float64
	// Pixel coordinates of the boosted directions (NaN where the
	// projection is undefined), filled by run.
	px, py [blockSize]float64
}

// geometry fills g for stars lo..lo+m−1 with what Observer.See returns —
// the direction from the observer and the dilution (d⊙/r)², boosted by
// ApplyBatch — computed in the same floating-point steps as See, so the
// results are identical (TestGeometryMatchesSee).
func (t *transformer) geometry(lo, m int, g *geomBlock) {
	var ux, uy, uz []float64
	if t.p.direct {
		ux, uy, uz = g.ux[:m], g.uy[:m], g.uz[:m]
		s := t.p.Stars
		cx, cy, cz := s.X[lo:lo+m], s.Y[lo:lo+m], s.Z[lo:lo+m]
		for k := range ux {
			u := unit32(cx[k], cy[k], cz[k])
			ux[k], uy[k], uz[k] = u.X, u.Y, u.Z
		}
	} else {
		ux, uy, uz = t.p.ux[lo:lo+m], t.p.uy[lo:lo+m], t.p.uz[lo:lo+m]
	}
	clear(g.bad[:m])
	p := t.opt.Observer.Position
	g.sun = p == (r3.Vec{})
	if g.sun {
		// From the Sun every star is seen along its catalogue direction.
		t.opt.Observer.Boost.ApplyBatch(ux, uy, uz, g.x[:m], g.y[:m], g.z[:m], g.d[:m])
		lnBatch(g.d[:m], g.lnD[:m])
		return
	}
	clear(g.lnDil[:m])
	cd := t.p.Stars.Dist[lo : lo+m]
	for k := range ux {
		u := r3.Vec{X: ux[k], Y: uy[k], Z: uz[k]}
		dist := float64(cd[k])
		if !(dist > 0) || math.IsInf(dist, 1) {
			g.x[k], g.y[k], g.z[k] = u.X, u.Y, u.Z
			continue
		}
		v := r3.Vec{X: dist*u.X - p.X, Y: dist*u.Y - p.Y, Z: dist*u.Z - p.Z}
		r := math.Sqrt(v.X*v.X + v.Y*v.Y + v.Z*v.Z)
		if r == 0 {
			g.bad[k] = true
			g.x[k], g.y[k], g.z[k] = u.X, u.Y, u.Z
			continue
		}
		if math.IsInf(r, 1) {
			r = r3.Norm(v)
		}
		g.x[k], g.y[k], g.z[k] = v.X/r, v.Y/r, v.Z/r
		q := dist / r
		if dil := q * q; dil != 1 {
			g.lnDil[k] = lnFast(dil)
		}
	}
	t.opt.Observer.Boost.ApplyBatch(g.x[:m], g.y[:m], g.z[:m], g.x[:m], g.y[:m], g.z[:m], g.d[:m])
	lnBatch(g.d[:m], g.lnD[:m])
}

// photometry fills g's photometry for stars lo..lo+m−1, whose geometry is
// already in g, with spectrum.ObserveBatch (the one definition of the
// observed photometry): T′ = D·T₀ and its table sample, ln W′ = ln W₀ +
// ln dilution + ln WScale(D), and V′ = V − 2.5 log10(F′_V/F_V).
func (t *transformer) photometry(lo, m int, g *geomBlock) {
	p := t.p
	var lnT0, lnV0 []float64
	if p.direct {
		lnT0, lnV0 = g.lnT0[:m], g.lnV0[:m]
		restLn(p.Stars.Teff[lo:lo+m], lnT0)
		// lnY, cx and cy are scratch here; the observed sample below
		// overwrites them.
		spectrum.LookupBatch(lnT0, g.lnY[:m], lnV0, g.cx[:m], g.cy[:m])
	} else {
		lnT0, lnV0 = p.lnT0[lo:lo+m], p.lnV0[lo:lo+m]
	}
	var lnDil []float64
	if !g.sun {
		lnDil = g.lnDil[:m]
	}
	spectrum.ObserveBatch(t.opt.Beaming, p.Stars.Vmag[lo:lo+m], lnT0, lnV0, g.lnD[:m], lnDil,
		spectrum.ObservedBatch{V: g.vObs[:m], LnW: g.lnW[:m], LnT: g.lnT[:m],
			LnY: g.lnY[:m], LnV: g.lnV[:m], X: g.cx[:m], Y: g.cy[:m]})
}

// restLn sets out[k] to ln of the rest temperature teff[k], as Prepare
// stores it.
func restLn(teff []float32, out []float64) {
	out = out[:len(teff)]
	for k, T := range teff {
		out[k] = lnFast(float64(T))
	}
}

// see returns the outcome for the star at index k of block g, after
// geometry and photometry: seeOK when it is to be drawn.
func (t *transformer) see(k int, g *geomBlock) int {
	if g.bad[k] || !(g.d[k] > 0) {
		return seeInvalid
	}
	if v := g.vObs[k]; !(v <= t.opt.Limit) {
		if math.IsNaN(v) {
			return seeInvalid
		}
		return seeCulled
	}
	return seeOK
}

func (t *transformer) run(lo, hi int, out []splatRec, res *chunkResult) {
	k := 0
	gb := &t.geom
	for b0 := lo; b0 < hi; b0 += blockSize {
		m := min(blockSize, hi-b0)
		t.geometry(b0, m, gb)
		t.photometry(b0, m, gb)
		t.proj.ForwardBatch(gb.x[:m], gb.y[:m], gb.z[:m], gb.px[:m], gb.py[:m])
		for j := 0; j < m; j++ {
			k += t.star(b0+j, j, gb, &out[k], res)
		}
	}
	res.n = k
}

// star finishes star i (index j of block gb): when the star is drawn it
// fills rec and returns 1, otherwise it counts why not and returns 0.
func (t *transformer) star(i, j int, gb *geomBlock, rec *splatRec, res *chunkResult) int {
	if gb.bad[j] || gb.lnW[j] > t.lnDiscPre {
		if done, k := t.disc(i, j, gb, res); done {
			return k
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
	x, y := gb.px[j], gb.py[j] // NaN where the projection is undefined
	if !(x > -t.margin && x < t.w+t.margin && y > -t.margin && y < t.h+t.margin) {
		res.off++
		return 0
	}
	if t.proj.Kind == camera.Fisheye && (x-t.w/2)*(x-t.w/2)+(y-t.h/2)*(y-t.h/2) > t.rFish*t.rFish {
		res.off++
		return 0
	}
	return t.record(i, j, gb, x, y, rec, res)
}

// record fills rec for star i (index j of block gb), to be drawn at pixel
// (x, y), from its photometry: the colour on the exposure scale and the
// Doppler factor; it lists the star among the brightest and returns 1, or
// counts it invalid and returns 0 when its colour is not finite.
func (t *transformer) record(i, j int, gb *geomBlock, x, y float64, rec *splatRec, res *chunkResult) int {
	n := r3.Vec{X: gb.x[j], Y: gb.y[j], Z: gb.z[j]}
	vObs, cx, cy := gb.vObs[j], gb.cx[j], gb.cy[j]
	xl, yl, zl := tristimulus(gb.lnW[j]+gb.lnY[j]+t.lnScale, cx, cy)
	r, g, b := spectrum.XYZToLinearSRGB(xl, yl, zl, t.opt.Color)
	r, g, b = spectrum.GamutMap(r, g, b, yl)
	if !(finite(r) && finite(g) && finite(b)) {
		res.invalid++
		return 0
	}
	d := gb.d[j]
	*rec = splatRec{x: x, y: y, rgb: [3]float32{float32(r), float32(g), float32(b)}, d: float32(d)}
	if nb := t.opt.Brightest; nb > 0 && (len(res.best) < nb || vObs < res.best[len(res.best)-1].V) {
		ra, dec := camera.RADec(n)
		res.best = insertBest(res.best, StarInfo{Row: i, RA: ra, Dec: dec, V: vObs, D: d,
			T: d * float64(t.p.Stars.Teff[i]), X: x, Y: y}, nb)
	}
	return 1
}

// disc handles the rare star that is near enough to be a disc, or that the
// observer is inside of (at its centre the geometry marks it bad). It
// reports whether the star is dealt with; such a star is never splatted.
func (t *transformer) disc(i, j int, gb *geomBlock, res *chunkResult) (bool, int) {
	lnW := gb.lnW[j] - t.beamExp*gb.lnD[j] // rest dilution at the observer
	if gb.bad[j] || lnW >= 0 {
		if res.inside == 0 {
			res.inside = i + 1
		}
		return true, 0
	}
	if !(lnW-2*gb.lnD[j] > t.lnDisc) || !(gb.d[j] > 0) {
		return false, 0
	}
	n := r3.Vec{X: gb.x[j], Y: gb.y[j], Z: gb.z[j]}
	res.discs = append(res.discs, discStar{row: i, app: n, lnW: lnW, teff: float64(t.p.Stars.Teff[i])})
	// Listed among the brightest when its centre is in the image.
	x, y := gb.px[j], gb.py[j]
	inImage := x >= 0 && x <= t.w && y >= 0 && y <= t.h
	if nb := t.opt.Brightest; nb > 0 && inImage && (len(res.best) < nb || gb.vObs[j] < res.best[len(res.best)-1].V) {
		ra, dec := camera.RADec(n)
		d := gb.d[j]
		res.best = insertBest(res.best, StarInfo{Row: i, RA: ra, Dec: dec, V: gb.vObs[j], D: d,
			T: d * float64(t.p.Stars.Teff[i]), X: x, Y: y}, nb)
	}
	return true, 0
}

// insideError returns the error for the observer inside star row of s.
func insideError(p *Prepared, row, gRow int, pos r3.Vec) error {
	s := p.Stars
	e := &InsideStarError{Row: gRow, ID: s.ID[row], Name: s.Names[row]}
	dist := float64(s.Dist[row])
	u := unit32(s.X[row], s.Y[row], s.Z[row])
	c := r3.Scale(dist, u)
	e.DistP = r3.Norm(r3.Sub(c, pos))
	// R = d⊙·√W₀, W₀ the dilution seen from the Sun.
	lnV0 := spectrum.Lookup(math.Log(float64(s.Teff[row]))).LnV
	lnW0 := spectrum.LnWForV(float64(s.Vmag[row]), lnV0)
	e.RadiusP = dist * math.Exp(lnW0/2)
	return e
}

// tristimulus returns X, Y, Z from ln Y and the chromaticity (x, y):
// Y = e^lnY, X = (x/y)·Y, Z = ((1 − x − y)/y)·Y.
func tristimulus(lnY, x, y float64) (float64, float64, float64) {
	yl := expFast(lnY)
	s := yl / y
	return x * s, yl, (1 - x - y) * s
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// grid bins splat records into tiles with a counting sort (grid.binAll,
// in stream.go); each tile gets its own copy of its records, in catalogue
// order, so phase 3 reads them sequentially.
type grid struct {
	w, h, tw, th int
	radius       float64
	kind         camera.Kind
	start        []int32 // tile t's records are recs[start[t]:start[t+1]]
	fill         []int32
	recs         []splatRec
	ids          [][]int32 // per transform chunk: each record's tiles, in order (binAll)
	nts          [][]uint8 // per transform chunk: each record's tile count
}

func newGrid(w, h int, radius float64, kind camera.Kind) *grid {
	g := &grid{}
	g.reset(w, h, radius, kind)
	return g
}

// reset sets g up for a frame of w×h pixels, keeping its storage.
func (g *grid) reset(w, h int, radius float64, kind camera.Kind) {
	tw, th := (w+tileSize-1)/tileSize, (h+tileSize-1)/tileSize
	g.w, g.h, g.tw, g.th, g.radius, g.kind = w, h, tw, th, radius, kind
	g.start = resize(g.start, tw*th+1)
}

// starScratch is the star path's working memory: the splat records, the
// transform chunks' results and the tile grid. It is kept between frames
// (scratchPool), so a sequence of frames reuses it instead of touching
// fresh pages (each first touch of a 4 KiB page costs a page fault, about
// 12 µs here).
type starScratch struct {
	recs   []splatRec
	chunks []chunkResult
	g      grid
}

var scratchPool sync.Pool // *starScratch

// getScratch returns a starScratch from the pool (or a new one) with its
// grid set up for the frame; put it back with scratchPool.Put.
func getScratch(w, h int, radius float64, kind camera.Kind) *starScratch {
	sc, _ := scratchPool.Get().(*starScratch)
	if sc == nil {
		sc = &starScratch{}
	}
	sc.g.reset(w, h, radius, kind)
	return sc
}

// records returns n splat records' storage.
func (sc *starScratch) records(n int) []splatRec {
	sc.recs = resize(sc.recs, n)
	return sc.recs
}

// results returns n empty chunk results, keeping their lists' storage.
func (sc *starScratch) results(n int) []chunkResult {
	for len(sc.chunks) < n {
		sc.chunks = append(sc.chunks, chunkResult{})
	}
	c := sc.chunks[:n]
	for i := range c {
		c[i] = chunkResult{best: c[i].best[:0], discs: c[i].discs[:0]}
	}
	return c
}

// span returns the image columns [clip0, clip1) a star at column x may
// light and, for an equirect frame, wrap = ±1 when its kernel also lights
// the other edge at x + wrap·W (within the PSF radius + 1 px of an edge;
// the transform keeps stars up to that margin outside the image). A cube
// star lights only its own face, of side h.
func (g *grid) span(x float64) (clip0, clip1, wrap int) {
	switch g.kind {
	case camera.Equirect:
		if m := g.radius + 1; x < m {
			wrap = 1
		} else if x > float64(g.w)-m {
			wrap = -1
		}
	case camera.Cube:
		face := max(0, min(5, int(math.Floor(x/float64(g.h)))))
		return face * g.h, (face + 1) * g.h, 0
	}
	return 0, g.w, wrap
}

// tileRange returns the tile columns [c0, c1] a kernel centred at x
// touches within columns [clip0, clip1), or c0 > c1 when none.
func (g *grid) tileRange(x float64, clip0, clip1 int) (int, int) {
	p0 := max(int(math.Floor(x-g.radius)), clip0)
	p1 := min(int(math.Floor(x+g.radius)), clip1-1)
	if p0 > p1 {
		return 1, 0
	}
	return p0 / tileSize, p1 / tileSize
}

// finishDoppler turns the Doppler sums of image rows [y0, y1) into
// luminance-weighted means: D = Σ w·L·D / L, with L the pixel's luminance
// (0 where the pixel is black).
func finishDoppler(b *Buffer, y0, y1 int) {
	for p := y0 * b.W; p < y1*b.W; p++ {
		l := lumR*float64(b.Pix[3*p]) + lumG*float64(b.Pix[3*p+1]) + lumB*float64(b.Pix[3*p+2])
		if l > 0 {
			b.Doppler[p] = float32(float64(b.Doppler[p]) / l)
		} else {
			b.Doppler[p] = 0
		}
	}
}

// addTiles adds every tile of g into b on workers goroutines (addTile).
// Tiles are disjoint, so they run in parallel without changing any
// pixel's order of addition.
func addTiles(b *Buffer, g *grid, psf *PSF, workers int) {
	parallel(workers, len(g.start)-1, func(ti int) {
		g.addTile(b, ti, psf)
	})
}

// finishFrame completes the Doppler channel once every star is summed.
func finishFrame(b *Buffer, workers int) {
	if b.Doppler == nil {
		return
	}
	parallel(workers, (b.H+tileSize-1)/tileSize, func(band int) {
		finishDoppler(b, band*tileSize, min((band+1)*tileSize, b.H))
	})
}

// addTile adds tile ti's records, in order, straight into the frame's
// running sums in b: b.Pix holds Σ w·rgb and, until finishDoppler,
// b.Doppler holds Σ w·luminance·D. Each deposit is formed in float64 and
// added in float32 (deposit), so each pixel's sum is a sequence of float32
// additions in catalogue order and does not depend on how the catalogue
// was split into passes.
func (g *grid) addTile(b *Buffer, ti int, psf *PSF) {
	list := g.recs[g.start[ti]:g.start[ti+1]]
	if len(list) == 0 {
		return
	}
	ox, oy := (ti%g.tw)*tileSize, (ti/g.tw)*tileSize
	x1, y1 := min(ox+tileSize, g.w), min(oy+tileSize, g.h)
	if len(list) >= pretouchRecs {
		pretouch(b, ox, oy, x1, y1)
	} else {
		pretouchRecords(b, list, tileWindow{x0: ox, y0: oy, x1: x1, y1: y1})
	}
	win := tileWindow{x0: ox, y0: oy, x1: x1, y1: y1}
	var wx, wy [maxTaps]float64
	if t := psf.edges; psf.k == 2 && t != nil && b.Doppler == nil && (g.kind == camera.Fisheye || g.kind == camera.Pinhole) {
		// The default PSF's 5×5 window without a Doppler channel or
		// wrap/face clipping: splat5 for a window inside the tile, the
		// general splat for one that crosses its edge.
		for k := range list {
			if r := &list[k]; !splat5(b, win, r, t) {
				g.splat(b, win, r, psf, &wx, &wy)
			}
		}
		return
	}
	for k := range list {
		g.splat(b, win, &list[k], psf, &wx, &wy)
	}
}

// weights5 is PSF.Weights for a window half-width k = 2 from edge table
// t (4 interior edges), unrolled: the same operations in the same order,
// so the same bits. It returns ⌊c⌋ − 2.
func weights5(t *edgeTable, c float64, w *[5]float64) int {
	fl := math.Floor(c)
	s := (c - fl) * float64(t.phases)
	j := min(int(s), t.phases-1)
	fr := s - float64(j)
	base := j * 4
	val, slope := t.val[base:base+4:base+4], t.slope[base:base+4:base+4]
	e0 := val[0] + fr*slope[0]
	e1 := val[1] + fr*slope[1]
	e2 := val[2] + fr*slope[2]
	e3 := val[3] + fr*slope[3]
	w[0] = e0 - -0.5
	w[1] = e1 - e0
	w[2] = e2 - e1
	w[3] = e3 - e2
	w[4] = 0.5 - e3
	return int(fl) - 2
}

// splat5 adds record r with the 5×5 window of table t into b (no Doppler
// channel, no wrap or face clipping) when the whole window lies inside
// win, and reports whether it did: each pixel gets float32(wx·wy·rgb) per
// channel, as deposit adds it.
func splat5(b *Buffer, win tileWindow, r *splatRec, t *edgeTable) bool {
	var wx, wy [5]float64
	if !(r.x >= float64(win.x0+2) && r.x < float64(win.x1-2) && r.y >= float64(win.y0+2) && r.y < float64(win.y1-2)) {
		return false
	}
	x0 := weights5(t, r.x, &wx)
	y0 := weights5(t, r.y, &wy)
	rgb0, rgb1, rgb2 := float64(r.rgb[0]), float64(r.rgb[1]), float64(r.rgb[2])
	q := 3 * ((y0-win.oy)*b.W + x0 - win.ox)
	for j := range 5 {
		wyj := wy[j]
		row := b.Pix[q : q+15 : q+15]
		for i := range 5 {
			w := wx[i] * wyj
			px := row[3*i : 3*i+3 : 3*i+3]
			px[0] += float32(w * rgb0)
			px[1] += float32(w * rgb1)
			px[2] += float32(w * rgb2)
		}
		q += 3 * b.W
	}
	return true
}

// tileWindow is a rectangle of image pixels [x0, x1)×[y0, y1) that a
// Buffer holds from its pixel (ox, oy): image pixel (i, j) is the
// buffer's (i−ox, j−oy). For the frame itself ox = oy = 0.
type tileWindow struct {
	x0, y0, x1, y1 int
	ox, oy         int
}

// splat adds star record r to the pixels of win that its PSF window
// lights (across the equirect seam, within a cube star's face): each
// deposit float32(wx·wy·rgb), and with a Doppler channel
// float32(wx·wy·luminance·D), formed in float64 and added in float32
// (deposit). It is the splat primitive of the star path; wx and wy are
// scratch.
func (g *grid) splat(b *Buffer, win tileWindow, r *splatRec, psf *PSF, wx, wy *[maxTaps]float64) {
	y0, ny := psf.Weights(r.y, wy[:])
	j0, j1 := max(y0, win.y0), min(y0+ny, win.y1)
	if j0 >= j1 {
		return
	}
	clip0, clip1, wrap := g.span(r.x)
	x := r.x
	for {
		x0, nx := psf.Weights(x, wx[:])
		i0, i1 := max(x0, win.x0, clip0), min(x0+nx, win.x1, clip1)
		if i0 < i1 {
			deposit(b, r, i0-win.ox, i1-win.ox, j0-win.oy, j1-win.oy, wx[i0-x0:i1-x0], wy[j0-y0:j1-y0])
		}
		if wrap == 0 {
			return
		}
		x += float64(wrap) * float64(g.w)
		wrap = 0
	}
}

// tileAcc is one worker's scratch copy of a tile's running sums, for
// callers that sum a tile apart from the frame (streaks).
type tileAcc struct {
	rgb    [tilePix * 3]float32
	dsum   [tilePix]float32
	wx, wy [maxTaps]float64
}

// tilePix is the number of pixels in a tile.
const tilePix = tileSize * tileSize

// accumulate adds the records of list, in order, to a's sums for tile ti
// (which start at a's pixel 0), with the frame's splat primitive.
func (a *tileAcc) accumulate(g *grid, ti int, list []splatRec, psf *PSF, doppler bool) {
	ox, oy := (ti%g.tw)*tileSize, (ti/g.tw)*tileSize
	win := tileWindow{x0: ox, y0: oy, x1: min(ox+tileSize, g.w), y1: min(oy+tileSize, g.h), ox: ox, oy: oy}
	tb := Buffer{W: tileSize, H: tileSize, Pix: a.rgb[:]}
	if doppler {
		tb.Doppler = a.dsum[:]
	}
	for k := range list {
		g.splat(&tb, win, &list[k], psf, &a.wx, &a.wy)
	}
}

// pretouchRecs is the number of records from which addTile first reads
// the tile's rows in order: the reads are independent, so the cache
// misses overlap (and the hardware prefetcher follows each row), where
// the deposits would otherwise wait for them one by one.
const pretouchRecs = 192

// pretouchSink is written, never read: the store keeps pretouch's loads.
//
//lint:ignore U1000 a write-only sink is the point
var pretouchSink float32

// pretouch reads one value per cache line of pixels [x0, x1)×[y0, y1)
// of b.
func pretouch(b *Buffer, x0, y0, x1, y1 int) {
	var s float32
	for j := y0; j < y1; j++ {
		row := b.Pix[3*(j*b.W+x0) : 3*(j*b.W+x1)]
		for i := 0; i < len(row); i += 16 {
			s += row[i]
		}
	}
	if s == 1.5e-45 { // never in practice; keeps the loads
		pretouchSink = s
	}
}

// pretouchRecords reads, for each record of a sparse tile, the first and
// last value of the rows of its 5×5 window inside win: the loads of
// different records are independent, so their cache misses overlap before
// the deposits need the lines.
func pretouchRecords(b *Buffer, list []splatRec, win tileWindow) {
	var s float32
	for k := range list {
		r := &list[k]
		i0, i1 := max(win.x0, int(r.x)-2), min(win.x1, int(r.x)+3)
		j0, j1 := max(win.y0, int(r.y)-2), min(win.y1, int(r.y)+3)
		if i0 >= i1 {
			continue
		}
		for j := j0; j < j1; j++ {
			s += b.Pix[3*(j*b.W+i0)] + b.Pix[3*(j*b.W+i1)-1]
		}
	}
	if s == 1.5e-45 { // never in practice; keeps the loads
		pretouchSink = s
	}
}

// deposit adds record r's light to pixels [i0, i1)×[j0, j1) of b with the
// axis weights wx (for columns i0…) and wy (rows j0…): each pixel gets
// float32(wx·wy·rgb) per channel and, with a Doppler channel,
// float32(wx·wy·luminance·D). The caller clips the window to the pixels
// it owns.
func deposit(b *Buffer, r *splatRec, i0, i1, j0, j1 int, wx, wy []float64) {
	rgb0, rgb1, rgb2 := float64(r.rgb[0]), float64(r.rgb[1]), float64(r.rgb[2])
	n := i1 - i0
	wx = wx[:n]
	for j := j0; j < j1; j++ {
		wyj := wy[j-j0]
		q := j*b.W + i0
		row := b.Pix[3*q : 3*(q+n)]
		for ii, wxi := range wx {
			w := wxi * wyj
			px := row[3*ii : 3*ii+3 : 3*ii+3]
			px[0] += float32(w * rgb0)
			px[1] += float32(w * rgb1)
			px[2] += float32(w * rgb2)
		}
	}
	if b.Doppler == nil {
		return
	}
	lumD := (lumR*rgb0 + lumG*rgb1 + lumB*rgb2) * float64(r.d)
	for j := j0; j < j1; j++ {
		wyj := wy[j-j0]
		q := j*b.W + i0
		ds := b.Doppler[q : q+n]
		for ii, wxi := range wx {
			ds[ii] += float32(wxi * wyj * lumD)
		}
	}
}
