package catalog

import (
	"encoding/binary"
	"fmt"
	"hash/crc32"
	"io"
	"math"
	"os"
	"sync"
)

// binWalker checks one column of a sorted cache bin by bin as its bytes
// arrive in row order: it folds them into the running CRC of the bin they
// belong to and compares each bin's CRC with the index's when the bin is
// complete.
type binWalker struct {
	x      *MagIndex
	col    int // the index's column number
	bin    int // first bin not yet complete
	endBin int // bins from here on are not read
	crc    uint32
}

// feed takes the bytes b of rows lo..hi−1 (size bytes a row).
func (w *binWalker) feed(b []byte, size, lo, hi int) error {
	x := w.x
	k := x.Bins()
	for w.bin < w.endBin && x.Offsets[w.bin] <= int64(hi) {
		s, e := max(int64(lo), x.Offsets[w.bin]), min(int64(hi), x.Offsets[w.bin+1])
		if e > s {
			w.crc = crc32.Update(w.crc, castagnoli, b[(s-int64(lo))*int64(size):(e-int64(lo))*int64(size)])
		}
		if x.Offsets[w.bin+1] > int64(hi) {
			break
		}
		if want := x.crcs[w.col*k+w.bin]; w.crc != want {
			return fmt.Errorf("%w: column %d of magnitude bin %d (rows %d…%d): checksum %08x, computed %08x",
				ErrCorrupt, w.col, w.bin, x.Offsets[w.bin], x.Offsets[w.bin+1]-1, want, w.crc)
		}
		w.crc = 0
		w.bin++
	}
	return nil
}

// feed passes column j's bytes of rows lo..hi−1 to its walker.
func (c *ChunkReader) feed(j int, b []byte, size, lo, hi int) error {
	if c.idx == nil {
		return nil
	}
	if err := c.walk[j].feed(b, size, lo, hi); err != nil {
		return &ParseError{File: c.path, Err: fmt.Errorf("cache: %w", err)}
	}
	return nil
}

// openSorted opens a sorted cache (version 2) for chunked reading: it
// checks the header and index against their CRC and the names against the
// trailer; the columns are checked bin by bin as Next reads them.
func openSorted(f *os.File, path string, chunkRows int, size int64, trailer uint32) (*ChunkReader, error) {
	sr := io.NewSectionReader(f, 0, size-4)
	cr := &cacheReader{r: sr}
	h, err := cr.header(DefaultMaxRows, cacheVersionSorted)
	if err != nil {
		return nil, err
	}
	c := &ChunkReader{f: f, path: path, rows: chunkRows, bits: h.bits, n: h.rows, epoch: h.epoch, source: h.source, format: h.format}
	ncols := c.ncols() + 2 // with ID and Flags
	idx, err := readIndex(cr, c.n, ncols)
	if err != nil {
		return nil, err
	}
	if err := cr.headerSum(); err != nil {
		return nil, err
	}
	c.offID, _ = sr.Seek(0, io.SeekCurrent)
	c.idx, c.end, c.tailFrom = idx, c.n, idx.Bins()
	c.walk = make([]binWalker, ncols)
	for j := range c.walk {
		c.walk[j] = binWalker{x: idx, col: j, endBin: idx.Bins()}
	}
	return c, c.readNames(size, &trailer)
}

// Index returns the magnitude index of a sorted cache (see SortByV and
// WriteCache), or nil for a cache in file order (version 1).
func (c *ChunkReader) Index() *MagIndex { return c.idx }

// Rows returns the number of rows Next delivers from the start: Len, or
// fewer after LimitBins.
func (c *ChunkReader) Rows() int {
	if c.idx == nil {
		return c.n
	}
	return c.end
}

// LimitBins makes Next deliver only the rows of the first bins bins of a
// sorted cache's index (clamped to 0 … K), from the first chunk (it
// rewinds). The rows it leaves out are checked against the index first —
// their V, Teff and distance columns are read (12 bytes a row) and each
// bin's CRCs and each row's bin, Teff and distance compared — so a cache
// whose index does not tell the truth about them is refused (ErrCorrupt).
// A cache without an index (version 1) is read in full whatever bins is.
func (c *ChunkReader) LimitBins(bins int) error {
	if c.f == nil {
		return fmt.Errorf("catalog: chunks: reader is closed")
	}
	c.Rewind()
	if c.idx == nil {
		return nil
	}
	x := c.idx
	bins = min(max(bins, 0), x.Bins())
	c.end = int(x.Offsets[bins])
	for j := range c.walk {
		c.walk[j].endBin = bins
	}
	if bins < c.tailFrom {
		if err := c.checkSkipped(bins, c.tailFrom); err != nil {
			return &ParseError{File: c.path, Err: fmt.Errorf("cache: %w", err)}
		}
		c.tailFrom = bins
	}
	return nil
}

// checkSkipped checks bins from…to−1 through their Dist, V and Teff
// columns (float columns 3, 4 and 5; the index's columns 4, 5 and 6), one
// goroutine a column: each bin's CRC, and every row against the index —
// distance not below its bin's bound, V never decreasing and the first
// and last V of every bin inside it (so every V is), Teff inside the
// bounds.
func (c *ChunkReader) checkSkipped(from, to int) error {
	var errs [3]error
	var wg sync.WaitGroup
	for i := range errs {
		wg.Add(1)
		go func() {
			defer wg.Done()
			errs[i] = c.checkColumn(i, from, to)
		}()
	}
	wg.Wait()
	for _, err := range errs {
		if err != nil {
			return err
		}
	}
	return nil
}

// checkColumn is checkSkipped for one column: 0 Dist, 1 V, 2 Teff.
func (c *ChunkReader) checkColumn(i, from, to int) error {
	x := c.idx
	lo, hi := int(x.Offsets[from]), int(x.Offsets[to])
	w := binWalker{x: x, col: 4 + i, bin: from, endBin: to}
	const piece = 1 << 18
	buf := make([]byte, 4*min(piece, max(hi-lo, 1)))
	b := from
	prev := float32(math.Inf(-1))
	for r0 := lo; ; r0 += piece {
		r1 := min(r0+piece, hi)
		bb := buf[:4*(r1-r0)]
		if _, err := c.f.ReadAt(bb, c.colOffset(3+i, r0)); err != nil {
			if err == io.EOF {
				err = fmt.Errorf("%w: cache ends early", ErrTruncated)
			}
			return err
		}
		if err := w.feed(bb, 4, r0, r1); err != nil {
			return err
		}
		for r := r0; r < r1; r++ {
			v := math.Float32frombits(binary.LittleEndian.Uint32(bb[4*(r-r0):]))
			for int64(r) >= x.Offsets[b+1] {
				b++
			}
			switch i {
			case 0:
				if !(v >= x.MinDist[b]) {
					return fmt.Errorf("%w: index disagrees with rows: row %d is at %v pc, below its bin's bound %v pc", ErrCorrupt, r, v, x.MinDist[b])
				}
			case 1:
				if !(v >= prev) {
					return fmt.Errorf("%w: index disagrees with rows: row %d has V = %v after %v: not sorted", ErrCorrupt, r, v, prev)
				}
				prev = v
				if (int64(r) == x.Offsets[b] || int64(r)+1 == x.Offsets[b+1]) && x.Bin(float64(v)) != b {
					return fmt.Errorf("%w: index disagrees with rows: row %d has V = %v, which is in bin %d, not in its bin %d (%.2f … %.2f)",
						ErrCorrupt, r, v, x.Bin(float64(v)), b, x.Lower(b), x.Lower(b+1))
				}
			case 2:
				if t := float64(v); !(t >= x.TMin && t <= x.TMax) {
					return fmt.Errorf("%w: index disagrees with rows: row %d has Teff = %v K, outside the index's %v … %v K", ErrCorrupt, r, v, x.TMin, x.TMax)
				}
			}
		}
		if r1 == hi {
			return nil
		}
	}
}
