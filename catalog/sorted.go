package catalog

import (
	"cmp"
	"encoding/binary"
	"fmt"
	"hash/crc32"
	"math"
	"slices"
)

// Sorted caches (version 2). A cache whose stars are in order of catalogue
// V (SortByV) is written as version 2: the version-1 layout with a
// magnitude index between the header strings and the columns,
//
//	step     float64  bin width, mag (MagStep)
//	v0       float64  lower edge of bin 0, mag
//	bins     uint32   K
//	offsets  (K+1) × uint64: rows off[k] … off[k+1]−1 form bin k;
//	         off[0] = 0, off[K] = n, non-decreasing
//	tmin tmax float32: bounds of every row's Teff, K
//	mindist  K × float32: a bound below the distance (pc) of bin k's rows
//	         (+Inf for an empty bin or one of stars without distance)
//	crcs     K × c × uint32: CRC-32C of bin k's bytes of each column, for
//	         the c columns in file order (ID, X … BV, Flags, then PMRA,
//	         PMDec, RV when present), column-major ([column][bin])
//	headcrc  uint32   CRC-32C of every byte from the magic to here
//
// and the trailer is the CRC-32C of the names section only (the bytes
// between the last column and the trailer; 0 when there are none). Row r
// belongs to bin k = ⌊(V_r − v0)/step⌋ (V_r the float32 V widened to
// float64, the division and floor in float64). A reader that wants only the
// stars brighter than some V reads the bins up to the one holding it and
// checks each bin it reads against its CRCs, so the rest of the file is
// never touched — except that the V, Teff and Dist columns of the bins it
// skips are read (12 of 37 bytes a row) to check that the index tells the
// truth about them: a row outside its bin's magnitude range, a Teff
// outside [tmin, tmax], a distance below its bin's mindist or offsets that
// do not partition the rows make the cache corrupt (ErrCorrupt).
//
// The order rule: the canonical order of a catalogue is (V, input row) —
// SortByV is a stable sort — and a sorted cache holds its stars in that
// order. A frame drawn from the first bins of a sorted cache is the frame
// drawn from all of it, bit for bit, because every star it leaves out
// would have been culled (render.NeededDepth bounds how much any star in
// view can brighten) and the renderer sums each pixel's deposits in
// catalogue order, in which the drawn stars keep their relative order.
const (
	// MagStep is the bin width of a sorted cache's magnitude index.
	MagStep = 0.05
	// cacheVersionSorted is the version of a sorted cache.
	cacheVersionSorted = 2
)

// MagIndex is the magnitude index of a sorted cache (see above).
type MagIndex struct {
	Step, V0   float64
	Offsets    []int64   // K+1 row offsets
	TMin, TMax float64   // bounds of Teff over all rows, K
	MinDist    []float32 // per bin, a bound below its rows' distances, pc
	crcs       []uint32  // [column][bin]
}

// Bins returns the number of bins K.
func (x *MagIndex) Bins() int { return len(x.Offsets) - 1 }

// Bin returns the bin of a star of catalogue V: ⌊(V − V0)/Step⌋, which may
// lie outside 0 … K−1.
func (x *MagIndex) Bin(v float64) int {
	b := math.Floor((v - x.V0) / x.Step)
	switch {
	case b < -1 || math.IsNaN(b):
		return -1
	case b > float64(len(x.Offsets)):
		return len(x.Offsets)
	}
	return int(b)
}

// Lower returns the lower magnitude edge of bin k.
func (x *MagIndex) Lower(k int) float64 { return x.V0 + float64(k)*x.Step }

// SortByV returns the stars of s in canonical order: by catalogue V, ties
// in their order in s (a stable sort), every column and name moved with
// its row. s is not changed. WriteCache writes the result as a sorted,
// indexed cache.
func SortByV(s *Stars) *Stars {
	n := s.Len()
	type key struct {
		v float32
		i int32
	}
	if n > math.MaxInt32 {
		panic("catalog: SortByV: too many rows")
	}
	keys := make([]key, n)
	for i := range keys {
		keys[i] = key{s.Vmag[i], int32(i)}
	}
	slices.SortFunc(keys, func(a, b key) int {
		if c := cmp.Compare(a.v, b.v); c != 0 {
			return c
		}
		return cmp.Compare(a.i, b.i)
	})
	t := &Stars{Epoch: s.Epoch, Source: s.Source, Format: s.Format,
		ID: make([]int64, n), X: make([]float32, n), Y: make([]float32, n), Z: make([]float32, n),
		Dist: make([]float32, n), Vmag: make([]float32, n), Teff: make([]float32, n), BV: make([]float32, n),
		Flags: make([]Flag, n)}
	if s.PMRA != nil {
		t.PMRA, t.PMDec = make([]float32, n), make([]float32, n)
	}
	if s.RV != nil {
		t.RV = make([]float32, n)
	}
	var inv map[int]int
	if len(s.Names) > 0 {
		inv = make(map[int]int, len(s.Names))
		t.Names = make(map[int]string, len(s.Names))
	}
	for j, k := range keys {
		i := int(k.i)
		t.ID[j], t.X[j], t.Y[j], t.Z[j] = s.ID[i], s.X[i], s.Y[i], s.Z[i]
		t.Dist[j], t.Vmag[j], t.Teff[j], t.BV[j], t.Flags[j] = s.Dist[i], s.Vmag[i], s.Teff[i], s.BV[i], s.Flags[i]
		if t.PMRA != nil {
			t.PMRA[j], t.PMDec[j] = s.PMRA[i], s.PMDec[i]
		}
		if t.RV != nil {
			t.RV[j] = s.RV[i]
		}
		if inv != nil {
			inv[i] = j
		}
	}
	for i, nm := range s.Names {
		t.Names[inv[i]] = nm
	}
	return t
}

// sortedByV reports whether the V column never decreases.
func sortedByV(s *Stars) bool {
	for i := 1; i < len(s.Vmag); i++ {
		if !(s.Vmag[i] >= s.Vmag[i-1]) {
			return false
		}
	}
	return len(s.Vmag) > 0
}

// cacheColumns returns the columns of s in file order with their element
// sizes, as little-endian encoders of rows lo..hi−1.
func cacheColumns(s *Stars) []func(buf []byte, lo, hi int) []byte {
	f32 := func(c []float32) func([]byte, int, int) []byte {
		return func(b []byte, lo, hi int) []byte {
			for _, v := range c[lo:hi] {
				b = binary.LittleEndian.AppendUint32(b, math.Float32bits(v))
			}
			return b
		}
	}
	cols := []func([]byte, int, int) []byte{func(b []byte, lo, hi int) []byte {
		for _, v := range s.ID[lo:hi] {
			b = binary.LittleEndian.AppendUint64(b, uint64(v))
		}
		return b
	}}
	for _, c := range [][]float32{s.X, s.Y, s.Z, s.Dist, s.Vmag, s.Teff, s.BV} {
		cols = append(cols, f32(c))
	}
	cols = append(cols, func(b []byte, lo, hi int) []byte {
		for _, f := range s.Flags[lo:hi] {
			b = append(b, uint8(f))
		}
		return b
	})
	if s.PMRA != nil {
		cols = append(cols, f32(s.PMRA), f32(s.PMDec))
	}
	if s.RV != nil {
		cols = append(cols, f32(s.RV))
	}
	return cols
}

// buildIndex makes the magnitude index of the sorted stars s.
func buildIndex(s *Stars) *MagIndex {
	n := s.Len()
	x := &MagIndex{Step: MagStep}
	vmin, vmax := float64(s.Vmag[0]), float64(s.Vmag[n-1])
	x.V0 = math.Floor(vmin/MagStep) * MagStep
	for math.Floor((vmin-x.V0)/MagStep) < 0 {
		x.V0 -= MagStep
	}
	k := int(math.Floor((vmax-x.V0)/MagStep)) + 1
	x.Offsets = make([]int64, k+1)
	x.MinDist = make([]float32, k)
	for b := range x.MinDist {
		x.MinDist[b] = float32(math.Inf(1))
	}
	x.TMin, x.TMax = math.Inf(1), math.Inf(-1)
	for i := 0; i < n; i++ {
		b := x.Bin(float64(s.Vmag[i]))
		x.Offsets[b+1] = int64(i + 1)
		x.MinDist[b] = min(x.MinDist[b], s.Dist[i])
		x.TMin, x.TMax = min(x.TMin, float64(s.Teff[i])), max(x.TMax, float64(s.Teff[i]))
	}
	for b := 1; b <= k; b++ {
		x.Offsets[b] = max(x.Offsets[b], x.Offsets[b-1])
	}
	x.checksum(s)
	return x
}

// checksum sets the index's column CRCs from the rows of s.
func (x *MagIndex) checksum(s *Stars) {
	cols := cacheColumns(s)
	k := x.Bins()
	x.crcs = make([]uint32, len(cols)*k)
	var buf []byte
	for j, enc := range cols {
		for b := 0; b < k; b++ {
			buf = enc(buf[:0], int(x.Offsets[b]), int(x.Offsets[b+1]))
			x.crcs[j*k+b] = crc32.Checksum(buf, castagnoli)
		}
	}
}

// writeIndex appends the index section (without headcrc) to c.
func (x *MagIndex) write(c *cacheWriter) {
	c.u64(math.Float64bits(x.Step))
	c.u64(math.Float64bits(x.V0))
	c.u32(uint32(x.Bins()))
	for _, o := range x.Offsets {
		c.u64(uint64(o))
	}
	c.u32(math.Float32bits(float32(x.TMin)))
	c.u32(math.Float32bits(float32(x.TMax)))
	c.f32s(x.MinDist)
	for _, v := range x.crcs {
		c.u32(v)
	}
}

// readIndex reads the index section of a cache of n rows and ncols columns
// from c, checking its structure (the caller checks headcrc).
func readIndex(c *cacheReader, n, ncols int) (*MagIndex, error) {
	h, err := c.next(8 + 8 + 4)
	if err != nil {
		return nil, err
	}
	x := &MagIndex{Step: math.Float64frombits(binary.LittleEndian.Uint64(h)), V0: math.Float64frombits(binary.LittleEndian.Uint64(h[8:]))}
	k := int(binary.LittleEndian.Uint32(h[16:]))
	if x.Step != MagStep || !(math.Abs(x.V0) <= 100) || k < 1 || k > int((vmagHi-vmagLo)/MagStep)+2 {
		return nil, fmt.Errorf("%w: magnitude index: step %v, v0 %v, %d bins", ErrCorrupt, x.Step, x.V0, k)
	}
	x.Offsets = make([]int64, k+1)
	for b := range x.Offsets {
		v, err := c.u64()
		if err != nil {
			return nil, err
		}
		x.Offsets[b] = int64(v)
		if v > uint64(n) || (b > 0 && x.Offsets[b] < x.Offsets[b-1]) || (b == 0 && v != 0) {
			return nil, fmt.Errorf("%w: magnitude index: offset %d of bin %d out of order or range (%d rows)", ErrCorrupt, v, b, n)
		}
	}
	if x.Offsets[k] != int64(n) {
		return nil, fmt.Errorf("%w: magnitude index ends at row %d, the cache has %d", ErrCorrupt, x.Offsets[k], n)
	}
	t, err := c.next(8)
	if err != nil {
		return nil, err
	}
	x.TMin = float64(math.Float32frombits(binary.LittleEndian.Uint32(t)))
	x.TMax = float64(math.Float32frombits(binary.LittleEndian.Uint32(t[4:])))
	if !(x.TMin >= teffLo && x.TMax <= teffHi && x.TMin <= x.TMax) {
		return nil, fmt.Errorf("%w: magnitude index: Teff bounds %v … %v K", ErrCorrupt, x.TMin, x.TMax)
	}
	if x.MinDist, err = c.f32s(k, k); err != nil {
		return nil, err
	}
	for b, d := range x.MinDist {
		if !(d > 0) {
			return nil, fmt.Errorf("%w: magnitude index: bin %d distance bound %v", ErrCorrupt, b, d)
		}
	}
	x.crcs = make([]uint32, ncols*k)
	for i := range x.crcs {
		b, err := c.next(4)
		if err != nil {
			return nil, err
		}
		x.crcs[i] = binary.LittleEndian.Uint32(b)
	}
	return x, nil
}

// checkRow reports a row whose V, Teff or distance disagrees with bin b of
// the index.
func (x *MagIndex) checkRow(b int, row int, v, teff, dist float32) error {
	if got := x.Bin(float64(v)); got != b {
		return fmt.Errorf("%w: index disagrees with rows: row %d has V = %v, which is in bin %d, not in its bin %d (%.2f … %.2f)",
			ErrCorrupt, row, v, got, b, x.Lower(b), x.Lower(b+1))
	}
	if t := float64(teff); !(t >= x.TMin && t <= x.TMax) {
		return fmt.Errorf("%w: index disagrees with rows: row %d has Teff = %v K, outside the index's %v … %v K", ErrCorrupt, row, teff, x.TMin, x.TMax)
	}
	if !(dist >= x.MinDist[b]) {
		return fmt.Errorf("%w: index disagrees with rows: row %d is at %v pc, below its bin's bound %v pc", ErrCorrupt, row, dist, x.MinDist[b])
	}
	return nil
}

// verify checks the whole catalogue s (read in full) against the index:
// every bin's CRCs and every row's bin, Teff and distance.
func (x *MagIndex) verify(s *Stars) error {
	cols := cacheColumns(s)
	k := x.Bins()
	if len(x.crcs) != len(cols)*k {
		return fmt.Errorf("%w: magnitude index has %d column checksums, want %d", ErrCorrupt, len(x.crcs), len(cols)*k)
	}
	var buf []byte
	for j, enc := range cols {
		for b := 0; b < k; b++ {
			buf = enc(buf[:0], int(x.Offsets[b]), int(x.Offsets[b+1]))
			if got := crc32.Checksum(buf, castagnoli); got != x.crcs[j*k+b] {
				return fmt.Errorf("%w: column %d of magnitude bin %d: checksum %08x, computed %08x", ErrCorrupt, j, b, x.crcs[j*k+b], got)
			}
		}
	}
	for b := 0; b < k; b++ {
		for r := x.Offsets[b]; r < x.Offsets[b+1]; r++ {
			if err := x.checkRow(b, int(r), s.Vmag[r], s.Teff[r], s.Dist[r]); err != nil {
				return err
			}
		}
	}
	return nil
}
