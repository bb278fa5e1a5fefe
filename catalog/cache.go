package catalog

import (
	"encoding/binary"
	"fmt"
	"hash/crc32"
	"io"
	"math"
	"os"
	"slices"
	"sort"
	"strconv"
	"strings"
)

// Binary cache layout, version 1 (all integers little-endian):
//
//	magic    [7]byte "SKYFCAT"
//	version  uint8   = 1
//	columns  uint32  presence bits: 1 proper motion, 2 radial velocity, 4 names
//	rows     uint64  n
//	epoch    float64 Julian epoch of the positions
//	source   uint16 length + bytes;  format uint16 length + bytes
//	ID       n × int64
//	X Y Z Dist Vmag Teff BV   n × float32 each (IEEE 754 bits, NaN kept)
//	Flags    n × uint8
//	PMRA PMDec   n × float32 each, if bit 1
//	RV           n × float32, if bit 2
//	names    if bit 4: uint64 count, then count × (uint64 row, uint16 length, bytes), rows ascending
//	trailer  uint32 CRC-32C (Castagnoli) of every byte before it
//
// A file that fails any check (magic, version, unknown presence bits, row
// count above the limit, name rows out of order or range, checksum,
// truncation) is refused with an error wrapping ErrBadCache, ErrTruncated,
// ErrCorrupt or ErrTooManyRows.
const (
	CacheVersion = 1
	cacheHasPM   = 1
	cacheHasRV   = 2
	cacheHasName = 4
	cacheKnown   = cacheHasPM | cacheHasRV | cacheHasName
	cacheChunk   = 1 << 20 // bytes per I/O chunk
)

var castagnoli = crc32.MakeTable(crc32.Castagnoli)

type cacheWriter struct {
	w   io.Writer
	buf []byte
	crc uint32
	err error
}

func (c *cacheWriter) flush() {
	if c.err != nil || len(c.buf) == 0 {
		c.buf = c.buf[:0]
		return
	}
	c.crc = crc32.Update(c.crc, castagnoli, c.buf)
	_, c.err = c.w.Write(c.buf)
	c.buf = c.buf[:0]
}

func (c *cacheWriter) room(n int) {
	if len(c.buf)+n > cap(c.buf) {
		c.flush()
	}
}

func (c *cacheWriter) u8(v uint8)   { c.room(1); c.buf = append(c.buf, v) }
func (c *cacheWriter) u16(v uint16) { c.room(2); c.buf = binary.LittleEndian.AppendUint16(c.buf, v) }
func (c *cacheWriter) u32(v uint32) { c.room(4); c.buf = binary.LittleEndian.AppendUint32(c.buf, v) }
func (c *cacheWriter) u64(v uint64) { c.room(8); c.buf = binary.LittleEndian.AppendUint64(c.buf, v) }
func (c *cacheWriter) bytes(b []byte) {
	for len(b) > 0 {
		c.room(1)
		k := min(len(b), cap(c.buf)-len(c.buf))
		c.buf = append(c.buf, b[:k]...)
		b = b[k:]
	}
}
func (c *cacheWriter) str(s string) {
	c.u16(uint16(len(s)))
	c.bytes([]byte(s))
}
func (c *cacheWriter) f32s(v []float32) {
	for _, x := range v {
		c.u32(math.Float32bits(x))
	}
}

// WriteCache writes s to w in the binary cache format described above. It
// validates s first and refuses strings longer than 65535 bytes. Stars
// in order of V (see SortByV) are written as a sorted cache, version 2,
// with a magnitude index (see sorted.go); others as version 1.
func WriteCache(w io.Writer, s *Stars) error {
	var idx *MagIndex
	if err := s.Validate(); err == nil && sortedByV(s) {
		idx = buildIndex(s)
	}
	return writeCache(w, s, idx)
}

// writeCache writes s with the magnitude index idx (nil: version 1).
func writeCache(w io.Writer, s *Stars, idx *MagIndex) error {
	if err := s.Validate(); err != nil {
		return err
	}
	if len(s.Source) > math.MaxUint16 || len(s.Format) > math.MaxUint16 {
		return fmt.Errorf("catalog: cache: source or format text longer than %d bytes", math.MaxUint16)
	}
	n := s.Len()
	var bits uint32
	if s.PMRA != nil {
		bits |= cacheHasPM
	}
	if s.RV != nil {
		bits |= cacheHasRV
	}
	rows := make([]int, 0, len(s.Names))
	for i, nm := range s.Names {
		if i < 0 || i >= n {
			return fmt.Errorf("catalog: cache: name %q at row %d of %d", nm, i, n)
		}
		if len(nm) > math.MaxUint16 {
			return fmt.Errorf("catalog: cache: name at row %d longer than %d bytes", i, math.MaxUint16)
		}
		rows = append(rows, i)
	}
	sort.Ints(rows)
	if s.Names != nil {
		bits |= cacheHasName
	}
	version := uint8(CacheVersion)
	if idx != nil {
		version = cacheVersionSorted
	}
	c := &cacheWriter{w: w, buf: make([]byte, 0, cacheChunk)}
	c.bytes(cacheMagic)
	c.u8(version)
	c.u32(bits)
	c.u64(uint64(n))
	c.u64(math.Float64bits(s.Epoch))
	c.str(s.Source)
	c.str(s.Format)
	if idx != nil {
		idx.write(c)
		c.flush()
		c.u32(c.crc) // headcrc
		c.flush()
		c.crc = 0 // columns are covered by the index's checksums
	}
	for _, id := range s.ID {
		c.u64(uint64(id))
	}
	for _, col := range [][]float32{s.X, s.Y, s.Z, s.Dist, s.Vmag, s.Teff, s.BV} {
		c.f32s(col)
	}
	for _, f := range s.Flags {
		c.u8(uint8(f))
	}
	if bits&cacheHasPM != 0 {
		c.f32s(s.PMRA)
		c.f32s(s.PMDec)
	}
	if bits&cacheHasRV != 0 {
		c.f32s(s.RV)
	}
	if idx != nil {
		c.flush()
		c.crc = 0 // the trailer covers the names section only
	}
	if bits&cacheHasName != 0 {
		c.u64(uint64(len(rows)))
		for _, i := range rows {
			c.u64(uint64(i))
			c.str(s.Names[i])
		}
	}
	c.flush()
	if c.err != nil {
		return fmt.Errorf("catalog: cache: %w", c.err)
	}
	var tr [4]byte
	binary.LittleEndian.PutUint32(tr[:], c.crc)
	if _, err := w.Write(tr[:]); err != nil {
		return fmt.Errorf("catalog: cache: %w", err)
	}
	return nil
}

type cacheReader struct {
	r   io.Reader
	buf []byte
	crc uint32
}

// next returns the next k bytes (k ≤ cacheChunk), folded into the CRC.
func (c *cacheReader) next(k int) ([]byte, error) {
	if cap(c.buf) < k {
		c.buf = make([]byte, k, max(k, 4096))
	}
	b := c.buf[:k]
	if _, err := io.ReadFull(c.r, b); err != nil {
		if err == io.EOF || err == io.ErrUnexpectedEOF {
			return nil, fmt.Errorf("%w: cache ends early", ErrTruncated)
		}
		return nil, err
	}
	c.crc = crc32.Update(c.crc, castagnoli, b)
	return b, nil
}

func (c *cacheReader) u16() (uint16, error) {
	b, err := c.next(2)
	if err != nil {
		return 0, err
	}
	return binary.LittleEndian.Uint16(b), nil
}

func (c *cacheReader) u64() (uint64, error) {
	b, err := c.next(8)
	if err != nil {
		return 0, err
	}
	return binary.LittleEndian.Uint64(b), nil
}

func (c *cacheReader) str() (string, error) {
	l, err := c.u16()
	if err != nil {
		return "", err
	}
	b, err := c.next(int(l))
	if err != nil {
		return "", err
	}
	return string(b), nil
}

// cacheHeader is the part of a cache header every version shares: magic
// and version, column bits, row count, epoch, source and format.
type cacheHeader struct {
	version        byte
	bits           uint32
	rows           int
	epoch          float64
	source, format string
}

// header reads and checks the shared header: the magic, a version among
// versions, known column bits, at most maxRows rows and a finite epoch.
func (c *cacheReader) header(maxRows uint64, versions ...byte) (cacheHeader, error) {
	var h cacheHeader
	b, err := c.next(8 + 4 + 8 + 8)
	if err != nil {
		return h, err
	}
	if string(b[:7]) != string(cacheMagic) {
		return h, fmt.Errorf("%w: bad magic %q", ErrBadCache, b[:7])
	}
	h.version = b[7]
	if !slices.Contains(versions, h.version) {
		known := make([]string, len(versions))
		for i, v := range versions {
			known[i] = strconv.Itoa(int(v))
		}
		return h, fmt.Errorf("%w: version %d, this reader knows %s", ErrBadCache, h.version, strings.Join(known, " and "))
	}
	h.bits = binary.LittleEndian.Uint32(b[8:])
	if h.bits&^cacheKnown != 0 {
		return h, fmt.Errorf("%w: unknown column bits %#x", ErrBadCache, h.bits)
	}
	n64 := binary.LittleEndian.Uint64(b[12:])
	if n64 > maxRows {
		return h, fmt.Errorf("%w: header declares %d rows, limit %d", ErrTooManyRows, n64, maxRows)
	}
	h.rows = int(n64)
	h.epoch = math.Float64frombits(binary.LittleEndian.Uint64(b[20:]))
	if math.IsNaN(h.epoch) || math.IsInf(h.epoch, 0) {
		return h, fmt.Errorf("%w: epoch %v", ErrBadCache, h.epoch)
	}
	if h.source, err = c.str(); err != nil {
		return h, err
	}
	if h.format, err = c.str(); err != nil {
		return h, err
	}
	return h, nil
}

// headerSum reads the stored CRC of everything read so far (a sorted
// cache's header and index) and checks it.
func (c *cacheReader) headerSum() error {
	sum := c.crc
	b, err := c.next(4)
	if err != nil {
		return err
	}
	if got := binary.LittleEndian.Uint32(b); got != sum {
		return fmt.Errorf("%w: header checksum %08x, computed %08x", ErrCorrupt, got, sum)
	}
	return nil
}

// grown makes room for k more elements, doubling capacity up to total.
func grown[T any](s []T, k, total int) []T {
	if len(s)+k <= cap(s) {
		return s[:len(s)+k]
	}
	nc := max(2*cap(s), len(s)+k)
	nc = min(nc, total)
	t := make([]T, len(s)+k, nc)
	copy(t, s)
	return t
}

func (c *cacheReader) f32s(n, prealloc int) ([]float32, error) {
	out := make([]float32, 0, prealloc)
	for len(out) < n {
		k := min(n-len(out), cacheChunk/4)
		b, err := c.next(4 * k)
		if err != nil {
			return nil, err
		}
		base := len(out)
		out = grown(out, k, n)
		dst := out[base : base+k]
		src := b[:4*len(dst)]
		for i := range dst {
			dst[i] = math.Float32frombits(binary.LittleEndian.Uint32(src[4*i : 4*i+4]))
		}
	}
	return out, nil
}

// ReadCache reads a binary cache written by WriteCache. The row count may
// not exceed DefaultMaxRows. Stars.Format keeps the original format name.
func ReadCache(r io.Reader) (*Stars, error) {
	s, err := readCacheSized(r, DefaultMaxRows, remaining(r))
	if err != nil {
		return nil, fmt.Errorf("catalog: cache: %w", err)
	}
	var one [1]byte
	if k, _ := r.Read(one[:]); k > 0 {
		return nil, fmt.Errorf("catalog: cache: %w: data after the trailer", ErrCorrupt)
	}
	return s, nil
}

// remaining returns the bytes left in r when it can tell, else -1.
func remaining(r io.Reader) int64 {
	switch v := r.(type) {
	case *ctxReader:
		return remaining(v.r)
	case interface{ Len() int }:
		return int64(v.Len())
	case *os.File:
		fi, err := v.Stat()
		if err != nil || !fi.Mode().IsRegular() {
			return -1
		}
		off, err := v.Seek(0, io.SeekCurrent)
		if err != nil {
			return -1
		}
		return fi.Size() - off
	}
	return -1
}

func readCache(r io.Reader, maxRows int, avail int64) (*Stars, error) {
	s, err := readCacheSized(r, maxRows, avail)
	if err != nil {
		return nil, fmt.Errorf("cache: %w", err)
	}
	return s, nil
}

func readCacheSized(r io.Reader, maxRows int, avail int64) (*Stars, error) {
	c := &cacheReader{r: r}
	h, err := c.header(uint64(maxRows), CacheVersion, cacheVersionSorted)
	if err != nil {
		return nil, err
	}
	version, bits, n := h.version, h.bits, h.rows
	s := &Stars{Epoch: h.epoch, Source: h.source, Format: h.format}
	var idx *MagIndex
	if version == cacheVersionSorted {
		ncols := 9
		if bits&cacheHasPM != 0 {
			ncols += 2
		}
		if bits&cacheHasRV != 0 {
			ncols++
		}
		if idx, err = readIndex(c, n, ncols); err != nil {
			return nil, err
		}
		if err := c.headerSum(); err != nil {
			return nil, err
		}
	}
	per := int64(8 + 7*4 + 1)
	if bits&cacheHasPM != 0 {
		per += 8
	}
	if bits&cacheHasRV != 0 {
		per += 4
	}
	// Allocate everything up front only when the input is known to hold
	// it; otherwise grow as data arrives, so a lying header costs nothing.
	prealloc := min(n, 1<<16)
	if avail >= 0 && avail >= per*int64(n) {
		prealloc = n
	} else if avail >= 0 {
		return nil, fmt.Errorf("%w: %d rows need %d bytes, %d left", ErrTruncated, n, per*int64(n), avail)
	}
	s.ID = make([]int64, 0, prealloc)
	for len(s.ID) < n {
		k := min(n-len(s.ID), cacheChunk/8)
		b, err := c.next(8 * k)
		if err != nil {
			return nil, err
		}
		base := len(s.ID)
		s.ID = grown(s.ID, k, n)
		dst := s.ID[base : base+k]
		for i := range dst {
			dst[i] = int64(binary.LittleEndian.Uint64(b[8*i:]))
		}
	}
	cols := []*[]float32{&s.X, &s.Y, &s.Z, &s.Dist, &s.Vmag, &s.Teff, &s.BV}
	if bits&cacheHasPM != 0 {
		cols = append(cols, &s.PMRA, &s.PMDec)
	}
	if bits&cacheHasRV != 0 {
		cols = append(cols, &s.RV)
	}
	for i, p := range cols {
		if i == 7 {
			// Flags sit between BV and the optional columns.
			if s.Flags, err = c.flags(n, prealloc); err != nil {
				return nil, err
			}
		}
		if *p, err = c.f32s(n, prealloc); err != nil {
			return nil, err
		}
	}
	if len(cols) == 7 {
		if s.Flags, err = c.flags(n, prealloc); err != nil {
			return nil, err
		}
	}
	if idx != nil {
		c.crc = 0 // the trailer covers the names section only
	}
	if bits&cacheHasName != 0 {
		cnt, err := c.u64()
		if err != nil {
			return nil, err
		}
		if cnt > uint64(n) {
			return nil, fmt.Errorf("%w: %d names for %d rows", ErrBadCache, cnt, n)
		}
		s.Names = make(map[int]string, min(int(cnt), 1<<16))
		prev := -1
		for j := uint64(0); j < cnt; j++ {
			row, err := c.u64()
			if err != nil {
				return nil, err
			}
			if row >= uint64(n) || int(row) <= prev {
				return nil, fmt.Errorf("%w: name row %d out of order or range", ErrBadCache, row)
			}
			prev = int(row)
			nm, err := c.str()
			if err != nil {
				return nil, err
			}
			s.Names[int(row)] = CleanName(nm)
		}
	}
	sum := c.crc
	tr := make([]byte, 4)
	if _, err := io.ReadFull(r, tr); err != nil {
		return nil, fmt.Errorf("%w: checksum missing", ErrTruncated)
	}
	if got := binary.LittleEndian.Uint32(tr); got != sum {
		return nil, fmt.Errorf("%w: checksum %08x, computed %08x", ErrCorrupt, got, sum)
	}
	if err := s.Validate(); err != nil {
		return nil, fmt.Errorf("%w: %v", ErrCorrupt, err)
	}
	if idx != nil {
		if err := idx.verify(s); err != nil {
			return nil, err
		}
	}
	return s, nil
}

func (c *cacheReader) flags(n, prealloc int) ([]Flag, error) {
	out := make([]Flag, 0, prealloc)
	for len(out) < n {
		k := min(n-len(out), cacheChunk)
		b, err := c.next(k)
		if err != nil {
			return nil, err
		}
		base := len(out)
		out = grown(out, k, n)
		for i, v := range b {
			out[base+i] = Flag(v)
		}
	}
	return out, nil
}
