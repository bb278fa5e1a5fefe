package catalog

import (
	"encoding/binary"
	"errors"
	"fmt"
	"hash/crc32"
	"io"
	"math"
	"os"
)

// Slice returns rows lo..hi−1 of s as a Stars that shares the column
// storage of s (capacity-limited, so appending to the result never writes
// into s). Names are re-indexed to the slice's rows, and Epoch, Source and
// Format are copied. It panics if the range is out of bounds, like a slice
// expression.
func (s *Stars) Slice(lo, hi int) *Stars {
	t := &Stars{
		ID: s.ID[lo:hi:hi], X: s.X[lo:hi:hi], Y: s.Y[lo:hi:hi], Z: s.Z[lo:hi:hi],
		Dist: s.Dist[lo:hi:hi], Vmag: s.Vmag[lo:hi:hi], Teff: s.Teff[lo:hi:hi], BV: s.BV[lo:hi:hi],
		Flags: s.Flags[lo:hi:hi], Epoch: s.Epoch, Source: s.Source, Format: s.Format,
	}
	if s.PMRA != nil {
		t.PMRA, t.PMDec = s.PMRA[lo:hi:hi], s.PMDec[lo:hi:hi]
	}
	if s.RV != nil {
		t.RV = s.RV[lo:hi:hi]
	}
	if s.Names != nil {
		t.Names = map[int]string{}
		for i, nm := range s.Names {
			if i >= lo && i < hi {
				t.Names[i-lo] = nm
			}
		}
	}
	return t
}

// DefaultChunkRows is the chunk length OpenChunks uses when asked for 0
// rows: 2²⁰ stars, about 37 MB of columns.
const DefaultChunkRows = 1 << 20

// ChunkReader reads a binary cache file (see WriteCache) in successive
// chunks of rows, so a catalogue larger than memory can be processed with a
// bounded working set. The cache is column-major; each chunk is assembled
// with one positioned read (ReadAt) per column, so only the chunk is ever
// held. Not safe for concurrent use.
type ChunkReader struct {
	f        *os.File
	path     string
	n        int // rows in the file
	rows     int // rows per chunk
	pos      int // first row of the next chunk
	bits     uint32
	offID    int64 // file offset of the ID column
	epoch    float64
	source   string
	format   string
	names    map[int]string // all names, by file row
	buf      []byte
	nameRows []int  // rows of names, ascending
	cur      *Stars // the chunk last returned, whose storage Next reuses
	// Sorted caches (version 2): the index, the rows Next delivers
	// (end: all of them, or the bins LimitBins keeps), the first bin
	// not yet checked in full, the running CRC of each column in that
	// bin, and the first bin whose skipped rows were checked.
	idx      *MagIndex
	end      int
	walk     []binWalker // per column
	tailFrom int
}

// OpenChunks opens the cache file at path for reading in chunks of at most
// chunkRows rows (0 means DefaultChunkRows). It checks the header, the file
// size implied by the row count and the CRC-32C trailer before returning,
// the last with one sequential pass over the file that holds no more than
// 1 MiB at a time; a file failing a check is refused with an error wrapping
// ErrBadCache, ErrTruncated, ErrCorrupt or ErrTooManyRows. Names are read
// at open (they are few). Close the reader when done.
func OpenChunks(path string, chunkRows int) (*ChunkReader, error) {
	if chunkRows < 0 {
		return nil, fmt.Errorf("catalog: chunks: negative chunk length %d", chunkRows)
	}
	if chunkRows == 0 {
		chunkRows = DefaultChunkRows
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("catalog: %w", err)
	}
	c, err := openChunks(f, path, chunkRows)
	if err != nil {
		f.Close()
		return nil, &ParseError{File: path, Err: fmt.Errorf("cache: %w", err)}
	}
	return c, nil
}

func openChunks(f *os.File, path string, chunkRows int) (*ChunkReader, error) {
	fi, err := f.Stat()
	if err != nil {
		return nil, err
	}
	if !fi.Mode().IsRegular() {
		return nil, fmt.Errorf("%s is not a regular file: a cache is read in chunks only from a file", path)
	}
	size := fi.Size()
	if size < 4 {
		return nil, fmt.Errorf("%w: %d bytes", ErrTruncated, size)
	}
	var tr [4]byte
	if _, err := f.ReadAt(tr[:], size-4); err != nil {
		return nil, fmt.Errorf("%w: checksum missing", ErrTruncated)
	}
	var ver [8]byte
	if _, err := f.ReadAt(ver[:], 0); err == nil && string(ver[:7]) == string(cacheMagic) && ver[7] == cacheVersionSorted {
		// A sorted cache checks its header and index here, each bin's
		// columns as they are read, and its names below.
		return openSorted(f, path, chunkRows, size, binary.LittleEndian.Uint32(tr[:]))
	}
	// Checksum first, in one sequential pass, so that nothing below reads
	// a corrupt file.
	h := crc32.New(castagnoli)
	if _, err := io.CopyBuffer(h, io.NewSectionReader(f, 0, size-4), make([]byte, cacheChunk)); err != nil {
		return nil, err
	}
	if got, sum := binary.LittleEndian.Uint32(tr[:]), h.Sum32(); got != sum {
		return nil, fmt.Errorf("%w: checksum %08x, computed %08x", ErrCorrupt, got, sum)
	}
	sr := io.NewSectionReader(f, 0, size-4)
	cr := &cacheReader{r: sr}
	hdr, err := cr.header(DefaultMaxRows, CacheVersion)
	if err != nil {
		return nil, err
	}
	c := &ChunkReader{f: f, path: path, rows: chunkRows, bits: hdr.bits, n: hdr.rows, epoch: hdr.epoch, source: hdr.source, format: hdr.format}
	c.offID, _ = sr.Seek(0, io.SeekCurrent)
	c.end = c.n
	return c, c.readNames(size, nil)
}

// readNames checks the file size against the columns and reads the names
// section; with trailer set (sorted caches) its CRC must match it.
func (c *ChunkReader) readNames(size int64, trailer *uint32) error {
	f := c.f
	end := c.colOffset(c.ncols(), 0) // end of the last column
	if end > size-4 {
		return fmt.Errorf("%w: %d rows need %d bytes, file has %d", ErrTruncated, c.n, end+4, size)
	}
	if c.bits&cacheHasName == 0 {
		if end != size-4 {
			return fmt.Errorf("%w: %d bytes after the columns", ErrCorrupt, size-4-end)
		}
		if trailer != nil && *trailer != 0 {
			return fmt.Errorf("%w: names checksum %08x for no names", ErrCorrupt, *trailer)
		}
		return nil
	}
	nr := &cacheReader{r: io.NewSectionReader(f, end, size-4-end)}
	cnt, err := nr.u64()
	if err != nil {
		return err
	}
	if cnt > uint64(c.n) {
		return fmt.Errorf("%w: %d names for %d rows", ErrBadCache, cnt, c.n)
	}
	c.names = make(map[int]string, min(int(cnt), 1<<16))
	prev := -1
	for j := uint64(0); j < cnt; j++ {
		row, err := nr.u64()
		if err != nil {
			return err
		}
		if row >= uint64(c.n) || int(row) <= prev {
			return fmt.Errorf("%w: name row %d out of order or range", ErrBadCache, row)
		}
		prev = int(row)
		nm, err := nr.str()
		if err != nil {
			return err
		}
		c.names[prev] = CleanName(nm)
		c.nameRows = append(c.nameRows, prev)
	}
	var one [1]byte
	if k, _ := nr.r.Read(one[:]); k > 0 {
		return fmt.Errorf("%w: data after the names", ErrCorrupt)
	}
	if trailer != nil && nr.crc != *trailer {
		return fmt.Errorf("%w: names checksum %08x, computed %08x", ErrCorrupt, *trailer, nr.crc)
	}
	return nil
}

// ncols is the number of float32 columns after ID (X…BV, then optional).
func (c *ChunkReader) ncols() int {
	k := 7
	if c.bits&cacheHasPM != 0 {
		k += 2
	}
	if c.bits&cacheHasRV != 0 {
		k++
	}
	return k
}

// colOffset returns the file offset of row `row` of float32 column j
// (0 = X … 6 = BV, 7… optional); Flags sit between BV and the optional
// columns. j = ncols gives the end of the columns.
func (c *ChunkReader) colOffset(j, row int) int64 {
	n := int64(c.n)
	off := c.offID + 8*n + 4*n*int64(j)
	if j >= 7 {
		off += n // the Flags column
	}
	return off + 4*int64(row)
}

// Len returns the number of rows in the file.
func (c *ChunkReader) Len() int { return c.n }

// Next returns the next chunk: rows pos..pos+k−1 of the file with k ≤ the
// chunk length, as a Stars whose Names are indexed by chunk row. The
// chunk's storage is reused by the following call of Next (as
// bufio.Scanner reuses its buffer), so that reading a file allocates one
// chunk, not one per chunk: copy what must outlive it. After the last
// chunk Next returns nil, io.EOF. A chunk with a non-finite value where
// Validate forbids one is refused with ErrCorrupt.
func (c *ChunkReader) Next() (*Stars, error) {
	if c.f == nil {
		return nil, errors.New("catalog: chunks: reader is closed")
	}
	if c.pos >= c.end {
		return nil, io.EOF
	}
	lo := c.pos
	k := min(c.rows, c.end-lo)
	if c.cur == nil {
		c.cur = &Stars{}
	}
	s := c.cur
	*s = Stars{Epoch: c.epoch, Source: c.source, Format: c.format, ID: s.ID, X: s.X, Y: s.Y, Z: s.Z,
		Dist: s.Dist, Vmag: s.Vmag, Teff: s.Teff, BV: s.BV, Flags: s.Flags, PMRA: s.PMRA, PMDec: s.PMDec, RV: s.RV, Names: s.Names}
	b, err := c.read(c.offID+8*int64(lo), 8*k)
	if err != nil {
		return nil, err
	}
	startBin := 0
	if c.idx != nil {
		startBin = c.walk[0].bin
	}
	if err := c.feed(0, b, 8, lo, lo+k); err != nil {
		return nil, err
	}
	s.ID = reuse(s.ID, k)
	for i := range s.ID {
		s.ID[i] = int64(binary.LittleEndian.Uint64(b[8*i:]))
	}
	cols := []*[]float32{&s.X, &s.Y, &s.Z, &s.Dist, &s.Vmag, &s.Teff, &s.BV}
	if c.bits&cacheHasPM != 0 {
		cols = append(cols, &s.PMRA, &s.PMDec)
	}
	if c.bits&cacheHasRV != 0 {
		cols = append(cols, &s.RV)
	}
	for j, p := range cols {
		b, err := c.read(c.colOffset(j, lo), 4*k)
		if err != nil {
			return nil, err
		}
		cj := j + 1 // the index's column number: ID is 0, Flags 8
		if j >= 7 {
			cj++
		}
		if err := c.feed(cj, b, 4, lo, lo+k); err != nil {
			return nil, err
		}
		col := reuse(*p, k)
		for i := range col {
			col[i] = math.Float32frombits(binary.LittleEndian.Uint32(b[4*i:]))
		}
		*p = col
	}
	b, err = c.read(c.colOffset(7, 0)-int64(c.n)+int64(lo), k)
	if err != nil {
		return nil, err
	}
	if err := c.feed(8, b, 1, lo, lo+k); err != nil {
		return nil, err
	}
	s.Flags = reuse(s.Flags, k)
	for i, v := range b {
		s.Flags[i] = Flag(v)
	}
	if c.bits&cacheHasPM == 0 {
		s.PMRA, s.PMDec = nil, nil
	}
	if c.bits&cacheHasRV == 0 {
		s.RV = nil
	}
	s.Names = nil
	if c.names != nil {
		s.Names = map[int]string{}
		for _, r := range c.nameRows {
			if r >= lo && r < lo+k {
				s.Names[r-lo] = c.names[r]
			}
		}
	}
	if err := s.Validate(); err != nil {
		return nil, &ParseError{File: c.path, Err: fmt.Errorf("cache: %w: rows %d…: %v", ErrCorrupt, lo, err)}
	}
	if c.idx != nil {
		b := startBin
		for i := 0; i < k; i++ {
			r := lo + i
			for int64(r) >= c.idx.Offsets[b+1] {
				b++
			}
			if err := c.idx.checkRow(b, r, s.Vmag[i], s.Teff[i], s.Dist[i]); err != nil {
				return nil, &ParseError{File: c.path, Err: fmt.Errorf("cache: %w", err)}
			}
		}
	}
	c.pos += k
	return s, nil
}

// reuse returns v with length k, keeping its storage when large enough.
func reuse[T any](v []T, k int) []T {
	if cap(v) >= k {
		return v[:k]
	}
	return make([]T, k)
}

// read returns k bytes at off in a reused buffer.
func (c *ChunkReader) read(off int64, k int) ([]byte, error) {
	if cap(c.buf) < k {
		c.buf = make([]byte, k)
	}
	b := c.buf[:k]
	if _, err := c.f.ReadAt(b, off); err != nil {
		if err == io.EOF {
			err = fmt.Errorf("%w: cache ends early", ErrTruncated)
		}
		return nil, &ParseError{File: c.path, Err: fmt.Errorf("cache: %w", err)}
	}
	return b, nil
}

// Rewind makes the next call of Next return the first chunk again.
func (c *ChunkReader) Rewind() {
	c.pos = 0
	for j := range c.walk {
		c.walk[j].bin, c.walk[j].crc = 0, 0
	}
}

// Close closes the file.
func (c *ChunkReader) Close() error {
	if c.f == nil {
		return nil
	}
	err := c.f.Close()
	c.f = nil
	return err
}

// AppendRow appends row i of src to s, copying every column value exactly
// (unlike Append, which recomputes the direction from RA/Dec). Optional
// columns are created on first use and back-filled as Append does.
// Source, Format and Epoch of s are left alone.
func (s *Stars) AppendRow(src *Stars, i int) {
	n := s.Len()
	s.ID = append(s.ID, src.ID[i])
	s.X, s.Y, s.Z = append(s.X, src.X[i]), append(s.Y, src.Y[i]), append(s.Z, src.Z[i])
	s.Dist, s.Vmag = append(s.Dist, src.Dist[i]), append(s.Vmag, src.Vmag[i])
	s.Teff, s.BV = append(s.Teff, src.Teff[i]), append(s.BV, src.BV[i])
	s.Flags = append(s.Flags, src.Flags[i])
	if src.PMRA != nil && s.PMRA == nil {
		s.PMRA, s.PMDec = make([]float32, n, n+1), make([]float32, n, n+1)
	}
	if s.PMRA != nil {
		var a, d float32
		if src.PMRA != nil {
			a, d = src.PMRA[i], src.PMDec[i]
		}
		s.PMRA, s.PMDec = append(s.PMRA, a), append(s.PMDec, d)
	}
	if src.RV != nil && s.RV == nil {
		s.RV = make([]float32, n, n+1)
		for k := range s.RV {
			s.RV[k] = float32(math.NaN())
		}
	}
	if s.RV != nil {
		rv := float32(math.NaN())
		if src.RV != nil {
			rv = src.RV[i]
		}
		s.RV = append(s.RV, rv)
	}
	if nm := src.Names[i]; nm != "" {
		if s.Names == nil {
			s.Names = map[int]string{}
		}
		s.Names[n] = nm
	}
}

// IsCacheFile reports whether the file at path begins with the binary
// cache's magic bytes (see WriteCache); it reads only those bytes, so it
// says nothing about whether the rest of the file is sound.
func IsCacheFile(path string) (bool, error) {
	// Only a regular file can be a cache file read in chunks; opening a
	// FIFO would block until a writer appears.
	if fi, err := os.Stat(path); err == nil && !fi.Mode().IsRegular() {
		return false, nil
	}
	f, err := os.Open(path)
	if err != nil {
		return false, fmt.Errorf("catalog: %w", err)
	}
	defer f.Close()
	var b [7]byte
	if _, err := io.ReadFull(f, b[:]); err != nil {
		return false, nil
	}
	return string(b[:]) == string(cacheMagic), nil
}
