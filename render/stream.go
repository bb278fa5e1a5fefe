package render

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"runtime"
	"sync/atomic"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/spectrum"
)

// DefaultMemoryBudget is the memory budget of ChunkRows and RenderCacheFile
// when none is given: 1 GiB.
const DefaultMemoryBudget = 1 << 30

// Memory model of the streaming renderer, in bytes. A chunk row costs its
// catalogue columns (37), its splat record (32) and that record's tile
// copies (32 and a little more for stars whose kernel crosses tiles),
// about 105; streamBytesPerRow keeps the 220 measured when rows also held
// the rest values, which leaves headroom for the transform chunk results
// and the Go heap's growth. A frame pixel costs the float32 buffer the
// stream sums into (12, +4 with Doppler); there is no other frame-sized
// buffer.
const (
	streamBytesPerRow   = 220
	streamMinChunkRows  = 1 << 16
	streamMaxChunkRows  = 1 << 21
	streamBytesPerPixel = 12
	streamDopplerPixel  = 4
)

// ChunkRows returns how many stars per chunk RenderStream can take for the
// frame of opt within memoryBudget bytes (0 means DefaultMemoryBudget):
// the budget left after the frame buffers, divided by about 220 bytes per
// row, at least 65 536 rows (a budget smaller than the frame buffers
// cannot be met; the minimum keeps the per-chunk overhead small) and at
// most 2 097 152.
//
// Every chunk adds into each lit tile of the frame once, bringing its 12
// bytes per pixel into cache (0.2 GB for 4096²), so very short chunks are
// slow; beyond about 2·10⁶ rows a chunk's records no longer gain from the
// larger pass and only cost memory (10⁷ stars into a 4096² fisheye, before
// tiles were added straight into the frame: 2.2 s at 5·10⁵ rows, 1.61 s at
// 10⁶, 1.48 s at 2·10⁶, 1.45 s at 4·10⁶, with 8, 11, 17 and 27 bytes per
// star of working memory; BenchmarkScaleFisheye4096 setup, one run of 3
// frames each, this machine).
func ChunkRows(opt Options, memoryBudget int64) int {
	if memoryBudget <= 0 {
		memoryBudget = DefaultMemoryBudget
	}
	px := int64(opt.Projection.Width) * int64(opt.Projection.Height)
	frame := px * streamBytesPerPixel
	if opt.Doppler {
		frame += px * streamDopplerPixel
	}
	rows := (memoryBudget - frame) / streamBytesPerRow
	return int(min(max(rows, streamMinChunkRows), streamMaxChunkRows))
}

// RenderRows returns how many stars of a catalogue held in memory
// RenderInto draws in one pass for the frame of opt within memoryBudget bytes (0
// means DefaultMemoryBudget): the budget left after the frame buffers
// divided by RenderBytesPerRow, at least 65 536. The catalogue's own
// columns are not counted: they are in memory already. Each pass adds
// into every lit tile of the frame once (reading and writing its 12 bytes
// per pixel), so fewer passes are faster: 10⁷ stars into a 4096² fisheye
// take one pass, 1.82–1.91 CPU-s, against 2.02–2.12 in five passes of
// 2²¹ (BenchmarkScaleFisheye4096Reuse, 2 cores, this machine).
func RenderRows(opt Options, memoryBudget int64) int {
	if memoryBudget <= 0 {
		memoryBudget = DefaultMemoryBudget
	}
	px := int64(opt.Projection.Width) * int64(opt.Projection.Height)
	frame := px * streamBytesPerPixel
	if opt.Doppler {
		frame += px * streamDopplerPixel
	}
	k := 2
	if psf, err := NewPSF(opt.FWHM); err == nil {
		k = psf.k
	}
	rows := (memoryBudget - frame) / RenderBytesPerRow(k)
	return int(min(max(rows, streamMinChunkRows), math.MaxInt32))
}

// RenderBytesPerRow is the working memory per catalogue row of one
// in-memory render pass with a PSF window of half-width k pixels: its
// splat record (32 bytes), its tile count (1) and, per tile its window
// touches, a record copy and a tile id (36), the expected number of tiles
// being (1 + 2k/128)² for a star anywhere in a 128-pixel tile (1.063 for
// the default k = 2: 72 bytes). Measured: 67.6 bytes per star at the
// peak heap of a 10⁷-star 4096² fisheye in one pass (63 % of the stars
// drawn; BenchmarkScaleFisheye4096, peak-B/star less the catalogue's 37).
func RenderBytesPerRow(k int) int64 {
	c := 1 + 2*float64(k)/tileSize
	return int64(math.Ceil(33 + 36*c*c))
}

// Chunks returns a chunk source for RenderStream over an in-memory
// catalogue: successive Slices of at most rows stars (rows ≤ 0 means
// catalog.DefaultChunkRows), then io.EOF.
func Chunks(s *catalog.Stars, rows int) func() (*catalog.Stars, error) {
	if rows <= 0 {
		rows = catalog.DefaultChunkRows
	}
	pos := 0
	return func() (*catalog.Stars, error) {
		if s == nil || pos >= s.Len() {
			return nil, io.EOF
		}
		hi := min(pos+rows, s.Len())
		c := s.Slice(pos, hi)
		pos = hi
		return c, nil
	}
}

// RenderCacheFile renders the binary catalogue cache at path (see
// catalog.WriteCache) chunk by chunk within about memoryBudget bytes
// (0 means DefaultMemoryBudget); see RenderStream. A sorted cache is read
// only as deep as the frame needs (RenderChunks).
func RenderCacheFile(path string, opt Options, memoryBudget int64) (*Frame, error) {
	cr, err := catalog.OpenChunks(path, ChunkRows(opt, memoryBudget))
	if err != nil {
		return nil, fmt.Errorf("render: %w", err)
	}
	defer cr.Close()
	return RenderChunks(context.Background(), cr, opt)
}

// RenderStream renders a catalogue delivered in chunks: next returns the
// successive chunks, in catalogue order, and io.EOF after the last one
// (any other error stops the render and is returned). Only one chunk's
// working set is held at a time, plus the frame buffers (12 bytes per
// pixel, 16 with Doppler), which hold the running sums.
//
// The result is bit-identical to Render on the concatenated catalogue,
// whatever the chunk lengths: every star is transformed by the same
// per-star steps and each pixel adds its stars' deposits in catalogue
// order in float32 (chunk after chunk, and within a chunk tile by tile in
// catalogue order); the Doppler channel's sums become means at the end.
// Stats are summed over chunks;
// Brightest rows are catalogue rows (counted over all chunks) and the list
// is merged by (V′, row) as Render orders it. The Frame's Stats.Total is
// the total number of stars seen.
func RenderStream(next func() (*catalog.Stars, error), opt Options) (*Frame, error) {
	return renderStream(nil, next, opt)
}

// RenderStreamInto is RenderStream drawing into dst, whose buffers and
// working memory are reused as RenderInto reuses them.
func RenderStreamInto(dst *Frame, next func() (*catalog.Stars, error), opt Options) error {
	if dst == nil {
		return errors.New("render: RenderStreamInto: nil Frame")
	}
	_, err := renderStream(dst, next, opt)
	return err
}

// renderStream is RenderStream into dst, or into a new frame when dst is
// nil.
func renderStream(dst *Frame, next func() (*catalog.Stars, error), opt Options) (*Frame, error) {
	if next == nil {
		return nil, ErrStars
	}
	opt, psf, workers, err := resolveOptions(opt)
	if err != nil {
		return nil, err
	}
	f, sc, err := startFrame(dst, opt, &psf, workers)
	if err != nil {
		return nil, err
	}
	defer f.release(sc)
	p := &Prepared{}
	g := &sc.g
	var best []StarInfo
	var discs []discStar
	base := 0
	got := false
	for {
		stars, err := next()
		if errors.Is(err, io.EOF) {
			break
		}
		if err != nil {
			return nil, err
		}
		if stars == nil {
			return nil, ErrStars
		}
		got = true
		if err := prepareInto(p, stars, workers, true); err != nil {
			return nil, err
		}
		n := stars.Len()
		f.Stats.Total += n
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
		for c := range chunks {
			r := &chunks[c]
			if r.inside > 0 {
				return nil, insideError(p, r.inside-1, base+r.inside-1, opt.Observer.Position)
			}
			for _, d := range r.discs {
				// Discs are drawn after the last chunk: keep what they need.
				d.gRow = base + d.row
				discs = append(discs, d)
			}
			f.Stats.Drawn += r.n + len(r.discs)
			f.Stats.Culled += r.culled
			f.Stats.OffFrame += r.off
			f.Stats.Invalid += r.invalid
			for _, s := range r.best {
				s.ID = stars.ID[s.Row]
				s.Name = stars.Names[s.Row]
				s.Row += base
				best = append(best, s)
			}
		}
		if opt.Brightest > 0 {
			sortInfos(best)
			if len(best) > opt.Brightest {
				best = best[:opt.Brightest]
			}
		}
		// Bin this chunk's records (catalogue order) into tiles, then add
		// each tile into the frame's sums; tiles are disjoint, so they
		// run in parallel without changing any pixel's order of addition.
		g.binAll(recs, chunks, workers)
		addTiles(&f.Buffer, g, &psf, workers)
		base += n
	}
	if !got {
		return nil, fmt.Errorf("%w: the stream holds no chunk", ErrStars)
	}
	if opt.Brightest < 0 {
		best = nil
	}
	f.Stats.Brightest = best
	finishFrame(&f.Buffer, workers)
	if err := drawDiscs(f, discs, workers); err != nil {
		return nil, err
	}
	return f, nil
}

// prepareBlock is the number of stars Prepare handles per work item.
const prepareBlock = 1 << 16

// prepareInto is Prepare into p, reusing p's slices when they are large
// enough, on up to workers goroutines. Each star's values depend on that
// star alone, so the result does not depend on the split. With direct it
// only validates the stars and leaves the values to the transform.
func prepareInto(p *Prepared, stars *catalog.Stars, workers int, direct bool) error {
	if stars == nil {
		return ErrStars
	}
	n := stars.Len()
	nb := (n + prepareBlock - 1) / prepareBlock
	// Validate in parallel; on failure let the serial Validate name the
	// first bad row.
	var bad atomic.Bool
	bad.Store(!sameLengths(stars))
	parallel(workers, nb, func(c int) {
		if bad.Load() {
			return
		}
		if stars.Slice(c*prepareBlock, min((c+1)*prepareBlock, n)).Validate() != nil {
			bad.Store(true)
		}
	})
	if bad.Load() || nb == 0 {
		if err := stars.Validate(); err != nil {
			return fmt.Errorf("render: %w", err)
		}
	}
	p.Stars = stars
	p.direct = direct
	if direct {
		p.lnV0, p.lnT0, p.ux, p.uy, p.uz = nil, nil, nil, nil, nil
		return nil
	}
	p.lnV0, p.lnT0 = resize(p.lnV0, n), resize(p.lnT0, n)
	p.ux, p.uy, p.uz = resize(p.ux, n), resize(p.uy, n), resize(p.uz, n)
	parallel(workers, nb, func(c int) {
		for i := c * prepareBlock; i < min((c+1)*prepareBlock, n); i++ {
			lnT := lnFast(float64(stars.Teff[i]))
			s := spectrum.Lookup(lnT)
			p.lnV0[i] = s.LnV
			p.lnT0[i] = lnT
			u := unit32(stars.X[i], stars.Y[i], stars.Z[i])
			p.ux[i], p.uy[i], p.uz[i] = u.X, u.Y, u.Z
		}
	})
	return nil
}

// unit32 returns the unit vector along float32 components. Their float64
// squares are exact (24-bit mantissas) and cannot overflow or underflow, so
// √(x²+y²+z²) is as accurate as r3.Norm's nested hypot at a fraction of
// its cost; the zero vector and non-finite input go to r3.Unit.
func unit32(x32, y32, z32 float32) r3.Vec {
	x, y, z := float64(x32), float64(y32), float64(z32)
	s := x*x + y*y + z*z
	if !(s > 0 && s <= math.MaxFloat64) {
		return r3.Unit(r3.Vec{X: x, Y: y, Z: z})
	}
	inv := 1 / math.Sqrt(s)
	return r3.Vec{X: x * inv, Y: y * inv, Z: z * inv}
}

// sameLengths reports whether every column of s present has Len rows, so
// that Slice is safe.
func sameLengths(s *catalog.Stars) bool {
	n := s.Len()
	ok := len(s.ID) == n && len(s.X) == n && len(s.Y) == n && len(s.Z) == n && len(s.Dist) == n &&
		len(s.Vmag) == n && len(s.Teff) == n && len(s.BV) == n && len(s.Flags) == n
	if s.PMRA != nil || s.PMDec != nil {
		ok = ok && len(s.PMRA) == n && len(s.PMDec) == n
	}
	if s.RV != nil {
		ok = ok && len(s.RV) == n
	}
	return ok
}

// resize returns s with length n, reusing its storage when it can.
func resize[T any](s []T, n int) []T {
	if cap(s) >= n {
		return s[:n]
	}
	return make([]T, n)
}

// resolveOptions checks opt and fills in its defaults; Render and
// RenderStream both start with it.
func resolveOptions(opt Options) (Options, PSF, int, error) {
	var psf PSF
	if opt.Workers < 0 {
		return opt, psf, 0, fmt.Errorf("%w: %d", ErrWorkers, opt.Workers)
	}
	if !(opt.Exposure >= MinExposure && opt.Exposure <= MaxExposure) {
		return opt, psf, 0, fmt.Errorf("%w: %v", ErrExposure, opt.Exposure)
	}
	if math.IsNaN(opt.Limit) {
		return opt, psf, 0, ErrLimit
	}
	if !(opt.ExtendedScale >= 0) || math.IsInf(opt.ExtendedScale, 0) {
		return opt, psf, 0, fmt.Errorf("%w: %v", ErrExtended, opt.ExtendedScale)
	}
	if err := opt.Projection.Prepare(); err != nil {
		return opt, psf, 0, fmt.Errorf("render: %w", err)
	}
	if opt.Beaming.FluxExponent() == 0 {
		return opt, psf, 0, fmt.Errorf("%w: %d", ErrBeaming, int(opt.Beaming))
	}
	psf, err := NewPSF(opt.FWHM)
	if err != nil {
		return opt, psf, 0, err
	}
	opt.FWHM = psf.FWHM()
	if opt.Limit == 0 {
		opt.Limit = opt.Exposure + DefaultLimitOffset
	}
	if opt.Brightest == 0 {
		opt.Brightest = DefaultBrightest
	}
	workers := opt.Workers
	if workers == 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	return opt, psf, workers, nil
}

// maxTiles bounds the tiles one record can touch: a window of half-width
// k ≤ 43 px (MaxFWHM) spans at most 2 tiles per axis (3 kept for margin), twice with the
// equirect wrap.
const maxTiles = 2 * 3 * 3

// tilesOf lists the tiles record r touches, in the order grid.bin visits
// them, and returns how many.
func (g *grid) tilesOf(r *splatRec, out *[maxTiles]int32) int {
	k := 0
	ty0, ty1 := g.tileRange(r.y, 0, g.h)
	clip0, clip1, wrap := g.span(r.x)
	seen0, seen1 := 1, 0 // the first pass's tile columns
	for rep := 0; rep < 2; rep++ {
		x := r.x
		if rep == 1 {
			if wrap == 0 {
				break
			}
			x += float64(wrap) * float64(g.w)
		}
		tx0, tx1 := g.tileRange(x, clip0, clip1)
		for ty := ty0; ty <= ty1; ty++ {
			for tx := tx0; tx <= tx1; tx++ {
				if tx >= seen0 && tx <= seen1 {
					// An image narrower than a few tiles: the wrapped
					// kernel falls in a tile the record is already in,
					// whose addTile draws both.
					continue
				}
				if k < maxTiles {
					out[k] = int32(ty*g.tw + tx)
				}
				k++
			}
		}
		seen0, seen1 = tx0, tx1
	}
	return min(k, maxTiles)
}

// binAll bins the drawn records of every transform chunk into tiles, like
// grid.bin's two serial passes but in parallel over chunks: each chunk
// counts its records per tile, a prefix sum in (tile, chunk) order gives
// every chunk its own offsets inside each tile, and each chunk then copies
// its records there. A tile's list thus holds chunk 0's records, then
// chunk 1's, …, each in catalogue order: the same lists as the serial
// passes, whatever the worker count. Storage is kept for the next call.
func (g *grid) binAll(recs []splatRec, chunks []chunkResult, workers int) {
	nt := len(g.start) - 1
	nc := len(chunks)
	if cap(g.fill) < nt*nc {
		g.fill = make([]int32, nt*nc)
	}
	off := g.fill[:nt*nc] // off[c*nt+t]: chunk c's count, then its next slot, in tile t
	clear(off)
	for len(g.ids) < nc {
		g.ids, g.nts = append(g.ids, nil), append(g.nts, nil)
	}
	parallel(workers, nc, func(c int) {
		// Count, and keep each record's tiles for the copy pass.
		var ts [maxTiles]int32
		cnt := off[c*nt : (c+1)*nt]
		lo := c * chunkSize
		ids, nts := g.ids[c][:0], g.nts[c][:0]
		if n := chunks[c].n; cap(nts) < n {
			// Sized once: most records touch one tile, a few (kernels
			// crossing a tile edge) two or four.
			nts, ids = make([]uint8, 0, n), make([]int32, 0, n+n/4)
		}
		for k := lo; k < lo+chunks[c].n; k++ {
			m := g.tilesOf(&recs[k], &ts)
			nts = append(nts, uint8(m))
			for _, t := range ts[:m] {
				cnt[t]++
				ids = append(ids, t)
			}
		}
		g.ids[c], g.nts[c] = ids, nts
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
	if cap(g.recs) < int(run) {
		// Headroom, so that a later stream chunk with a few more tile
		// copies reuses this storage instead of leaving it as garbage.
		g.recs = make([]splatRec, run, int(run)+int(run)/8)
	}
	g.recs = g.recs[:run]
	parallel(workers, nc, func(c int) {
		next := off[c*nt : (c+1)*nt]
		lo := c * chunkSize
		ids, nts := g.ids[c], g.nts[c]
		q := 0
		for k, m := range nts {
			r := &recs[lo+k]
			for _, t := range ids[q : q+int(m)] {
				g.recs[next[t]] = *r
				next[t]++
			}
			q += int(m)
		}
	})
}
