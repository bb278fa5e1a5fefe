package catalog

import (
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/parquet-go/parquet-go"
)

// Apache Parquet input and output.
//
// A Parquet file (magic "PAR1" at both ends) is read in one of three ways,
// chosen from its schema and metadata:
//
//   - written by WriteParquet (key-value metadata skyframe.layout =
//     "stars-v1"): the Stars columns themselves, restored exactly;
//   - with top-level columns source_id and phot_g_mean_mag: a Gaia table,
//     with the columns and rules of the Gaia CSV reader (FormatGaiaCSV);
//   - otherwise a generic table through ReadOptions.Columns, like CSV.
//
// The last two use the CSV reader's per-row logic (column plan, skip
// reasons, ranges, VFromGaia, TeffFromBPRP, flags), so a table gives the
// same stars in Parquet and in CSV when its values are the same numbers.
// Numbers are taken at their stored precision (a FLOAT column is widened
// from float32); a null is a blank field; a NaN or ±Inf is an error, as in
// CSV; a text (BYTE_ARRAY) column is parsed like a CSV field. Repeated or
// nested columns are not read. In errors, Line is the 1-based data row.
// Report.Lines is the number of rows in the file and Report.DeclaredRows
// the row count of its footer, checked against ReadOptions.MaxRows before
// anything is read.

var parquetMagic = []byte("PAR1")

// Metadata keys of WriteParquet.
const (
	pqLayoutKey   = "skyframe.layout"
	pqLayout      = "stars-v1"
	pqEpochKey    = "skyframe.epoch"
	pqSourceKey   = "skyframe.source"
	pqFormatKey   = "skyframe.format"
	pqColumnsKey  = "skyframe.columns" // presence bits, as in the cache
	pqBatch       = 4096               // values read per column at a time
	pqWriterBatch = 8192
)

// pqStar is one row of the WriteParquet layout.
type pqStar struct {
	ID    int64   `parquet:"id"`
	X     float32 `parquet:"x"`
	Y     float32 `parquet:"y"`
	Z     float32 `parquet:"z"`
	Dist  float32 `parquet:"dist"`
	Vmag  float32 `parquet:"vmag"`
	Teff  float32 `parquet:"teff"`
	BV    float32 `parquet:"bv"`
	Flags int32   `parquet:"flags"`
	PMRA  float32 `parquet:"pmra"`
	PMDec float32 `parquet:"pmdec"`
	RV    float32 `parquet:"rv"`
	Name  string  `parquet:"name,dict"`
}

// WriteParquet writes s to w as an Apache Parquet file that Read and Open
// restore exactly (the same Stars, compared bit for bit): columns id
// (INT64), x, y, z, dist, vmag, teff, bv (FLOAT), flags (INT32), pmra,
// pmdec, rv (FLOAT; zero or NaN when s has no such column, which the
// metadata records), name (dictionary-encoded BYTE_ARRAY, empty when the
// star has none), and key-value metadata skyframe.layout = "stars-v1",
// skyframe.epoch, skyframe.source, skyframe.format and skyframe.columns.
// It validates s first.
func WriteParquet(w io.Writer, s *Stars) (err error) {
	if err := s.Validate(); err != nil {
		return err
	}
	var bits uint32
	if s.PMRA != nil {
		bits |= cacheHasPM
	}
	if s.RV != nil {
		bits |= cacheHasRV
	}
	if s.Names != nil {
		bits |= cacheHasName
	}
	for i := range s.Names {
		if i < 0 || i >= s.Len() {
			return fmt.Errorf("catalog: parquet: name at row %d of %d", i, s.Len())
		}
	}
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("catalog: parquet: writer failed: %v", r)
		}
	}()
	pw := parquet.NewGenericWriter[pqStar](w,
		parquet.KeyValueMetadata(pqLayoutKey, pqLayout),
		parquet.KeyValueMetadata(pqEpochKey, strconv.FormatFloat(s.Epoch, 'g', -1, 64)),
		parquet.KeyValueMetadata(pqSourceKey, s.Source),
		parquet.KeyValueMetadata(pqFormatKey, s.Format),
		parquet.KeyValueMetadata(pqColumnsKey, strconv.FormatUint(uint64(bits), 10)))
	batch := make([]pqStar, 0, pqWriterBatch)
	nan := float32(math.NaN())
	for i := 0; i < s.Len(); i++ {
		r := pqStar{ID: s.ID[i], X: s.X[i], Y: s.Y[i], Z: s.Z[i], Dist: s.Dist[i], Vmag: s.Vmag[i],
			Teff: s.Teff[i], BV: s.BV[i], Flags: int32(s.Flags[i]), RV: nan, Name: s.Names[i]}
		if s.PMRA != nil {
			r.PMRA, r.PMDec = s.PMRA[i], s.PMDec[i]
		}
		if s.RV != nil {
			r.RV = s.RV[i]
		}
		batch = append(batch, r)
		if len(batch) == cap(batch) || i == s.Len()-1 {
			if _, err := pw.Write(batch); err != nil {
				return fmt.Errorf("catalog: parquet: %w", err)
			}
			batch = batch[:0]
		}
	}
	if err := pw.Close(); err != nil {
		return fmt.Errorf("catalog: parquet: %w", err)
	}
	return nil
}

// MaxParquetFooterBytes bounds the metadata footer of a Parquet file. The
// footer of a star table is a few kilobytes; parquet-go allocates whatever
// length the file claims before checking it, so a hostile 8-byte trailer
// could otherwise ask for gigabytes.
const MaxParquetFooterBytes = 64 << 20

// checkParquetFooter validates the file's trailer — the 4-byte little-endian
// footer length and the "PAR1" magic (Apache Parquet format specification,
// "File format") — before the library trusts it.
func checkParquetFooter(ra io.ReaderAt, size int64, name string) error {
	if size < 12 {
		return &ParseError{File: name, Err: fmt.Errorf("%w: parquet: %d bytes is too short for a Parquet file", ErrCorrupt, size)}
	}
	var tail [8]byte
	if _, err := ra.ReadAt(tail[:], size-8); err != nil {
		return &ParseError{File: name, Err: fmt.Errorf("%w: parquet: reading the trailer: %v", ErrCorrupt, err)}
	}
	if string(tail[4:]) != "PAR1" {
		return &ParseError{File: name, Err: fmt.Errorf("%w: parquet: no PAR1 magic at the end of the file", ErrCorrupt)}
	}
	n := int64(binary.LittleEndian.Uint32(tail[:4]))
	if n > size-12 || n > MaxParquetFooterBytes {
		return &ParseError{File: name,
			Err: fmt.Errorf("%w: parquet: footer of %d bytes in a %d-byte file (limit %d)", ErrCorrupt, n, size, int64(MaxParquetFooterBytes))}
	}
	return nil
}

// readParquet reads a Parquet file of size bytes from ra.
func readParquet(ra io.ReaderAt, size int64, name string, opt ReadOptions, rep *Report) (s *Stars, _ *Report, err error) {
	rep.Format = FormatParquet
	defer func() {
		// parquet-go may panic on malformed input; report it as corrupt
		// rather than letting it escape.
		if r := recover(); r != nil {
			s, err = nil, &ParseError{File: name, Err: fmt.Errorf("%w: parquet: %v", ErrCorrupt, r)}
		}
	}()
	if err := checkParquetFooter(ra, size, name); err != nil {
		return nil, rep, err
	}
	f, err := parquet.OpenFile(ra, size)
	if err != nil {
		return nil, rep, &ParseError{File: name, Err: fmt.Errorf("%w: parquet: %v", ErrCorrupt, err)}
	}
	rows := f.NumRows()
	if rows < 0 || rows > int64(opt.MaxRows) {
		return nil, rep, &ParseError{File: name, Field: "rows", Value: strconv.FormatInt(rows, 10),
			Err: fmt.Errorf("%w: file declares %d rows, limit %d", ErrTooManyRows, rows, opt.MaxRows)}
	}
	rep.DeclaredRows = int(rows)
	rep.Lines = int(rows)
	// Top-level leaf columns by name; nested or repeated ones get no name.
	paths := f.Schema().Columns()
	labels := make([]string, len(paths))
	leaves := make([]parquet.LeafColumn, len(paths))
	for i, p := range paths {
		lc, ok := f.Schema().Lookup(p...)
		if !ok || len(p) != 1 || lc.MaxRepetitionLevel > 0 || lc.ColumnIndex != i {
			labels[i] = "\x00" + strings.Join(p, ".") // never matches a role
			continue
		}
		labels[i], leaves[i] = p[0], lc
	}
	if v, _ := f.Lookup(pqLayoutKey); v == pqLayout {
		return readParquetStars(f, labels, name, opt, rep)
	}
	lower := map[string]bool{}
	for _, l := range labels {
		lower[strings.ToLower(l)] = true
	}
	gaia := lower["source_id"] && lower["phot_g_mean_mag"]
	var b *builder
	if gaia {
		b = newBuilder(name, FormatGaiaCSV, opt, rep)
	} else {
		b = newBuilder(name, FormatCSV, opt, rep)
		b.s.Format = FormatParquet.String()
	}
	b.grow(int(rows))
	pl, err := planColumns(b, labels, gaia, 0)
	if err != nil {
		return nil, rep, err
	}
	var used []int
	for _, c := range pl.cols {
		if c >= 0 {
			used = append(used, c)
		}
	}
	row := 0
	vals := make([][]parquet.Value, len(labels))
	err = scanParquet(f, name, used, vals, func(k int) error {
		fr := pqFields{vals: vals}
		for fr.r = 0; fr.r < k; fr.r++ {
			row++
			if err := pl.addRow(b, fr, row, row); err != nil {
				return err
			}
		}
		return nil
	})
	if err != nil {
		return nil, rep, err
	}
	return b.finish()
}

// scanParquet reads the columns used of every row group in batches of
// pqBatch rows into vals[c] and calls fn with the batch length.
func scanParquet(f *parquet.File, name string, used []int, vals [][]parquet.Value, fn func(k int) error) error {
	for _, c := range used {
		if vals[c] == nil {
			vals[c] = make([]parquet.Value, pqBatch)
		}
	}
	for _, rg := range f.RowGroups() {
		chunks := rg.ColumnChunks()
		cols := make([]pqColumn, len(chunks))
		for _, c := range used {
			cols[c].pages = chunks[c].Pages()
		}
		left := rg.NumRows()
		for left > 0 {
			k := int(min(left, pqBatch))
			for _, c := range used {
				m, err := cols[c].read(vals[c][:k])
				if err != nil && !errors.Is(err, io.EOF) {
					return &ParseError{File: name, Err: fmt.Errorf("%w: parquet column %d: %v", ErrCorrupt, c, err)}
				}
				if m != k {
					return &ParseError{File: name, Err: fmt.Errorf("%w: parquet column %d holds %d values where %d rows remain", ErrCorrupt, c, m, left)}
				}
			}
			if err := fn(k); err != nil {
				return err
			}
			left -= int64(k)
		}
		for _, c := range used {
			cols[c].pages.Close()
		}
	}
	return nil
}

// pqColumn reads the values of one column chunk across its pages.
type pqColumn struct {
	pages parquet.Pages
	vr    parquet.ValueReader
}

func (c *pqColumn) read(dst []parquet.Value) (int, error) {
	n := 0
	for n < len(dst) {
		if c.vr == nil {
			p, err := c.pages.ReadPage()
			if err != nil {
				return n, err
			}
			c.vr = p.Values()
		}
		k, err := c.vr.ReadValues(dst[n:])
		n += k
		if errors.Is(err, io.EOF) {
			c.vr = nil
			continue
		}
		if err != nil {
			return n, err
		}
	}
	return n, nil
}

// pqFields is row r of a batch of Parquet values, for rowPlan.addRow.
type pqFields struct {
	vals [][]parquet.Value
	r    int
}

func (p pqFields) num(b *builder, col int, label string, line int, lo, hi float64) (float64, bool, error) {
	v := p.vals[col][p.r]
	if v.IsNull() {
		return math.NaN(), false, nil
	}
	var x float64
	switch v.Kind() {
	case parquet.Float:
		x = float64(v.Float())
	case parquet.Double:
		x = v.Double()
	case parquet.Int32:
		x = float64(v.Int32())
	case parquet.Int64:
		x = float64(v.Int64())
	case parquet.ByteArray, parquet.FixedLenByteArray:
		return b.ranged(v.ByteArray(), label, line, lo, hi)
	default:
		return 0, false, &ParseError{File: b.file, Line: line, Field: label, Value: shortValue([]byte(v.String())),
			Err: fmt.Errorf("%w: parquet %v column", ErrNotNumber, v.Kind())}
	}
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return 0, false, &ParseError{File: b.file, Line: line, Field: label, Value: strconv.FormatFloat(x, 'g', -1, 64), Err: ErrNotFinite}
	}
	if x < lo || x > hi {
		return 0, false, &ParseError{File: b.file, Line: line, Field: label, Value: strconv.FormatFloat(x, 'g', -1, 64),
			Err: fmt.Errorf("%w [%g, %g]", ErrOutOfRange, lo, hi)}
	}
	return x, true, nil
}

func (p pqFields) integer(b *builder, col int, label string, line int) (int64, error) {
	v := p.vals[col][p.r]
	if v.IsNull() {
		return b.integer(nil, label, line)
	}
	switch v.Kind() {
	case parquet.Int32:
		return int64(v.Int32()), nil
	case parquet.Int64:
		return v.Int64(), nil
	case parquet.ByteArray, parquet.FixedLenByteArray:
		return b.integer(v.ByteArray(), label, line)
	case parquet.Double, parquet.Float:
		x := v.Double()
		if v.Kind() == parquet.Float {
			x = float64(v.Float())
		}
		if x == math.Trunc(x) && math.Abs(x) < 1<<53 {
			return int64(x), nil
		}
	}
	return 0, &ParseError{File: b.file, Line: line, Field: label, Value: shortValue([]byte(v.String())), Err: ErrNotNumber}
}

func (p pqFields) text(col int) []byte {
	v := p.vals[col][p.r]
	if v.IsNull() {
		return nil
	}
	if k := v.Kind(); k == parquet.ByteArray || k == parquet.FixedLenByteArray {
		return v.ByteArray()
	}
	return []byte(v.String())
}

// readParquetStars reads the WriteParquet layout.
func readParquetStars(f *parquet.File, labels []string, name string, opt ReadOptions, rep *Report) (*Stars, *Report, error) {
	corrupt := func(format string, a ...any) error {
		return &ParseError{File: name, Err: fmt.Errorf("%w: parquet: "+format, append([]any{ErrCorrupt}, a...)...)}
	}
	meta := func(key string) string { v, _ := f.Lookup(key); return v }
	epoch, err := strconv.ParseFloat(meta(pqEpochKey), 64)
	if err != nil || math.IsNaN(epoch) || math.IsInf(epoch, 0) {
		return nil, rep, corrupt("epoch %q", meta(pqEpochKey))
	}
	bits, err := strconv.ParseUint(meta(pqColumnsKey), 10, 32)
	if err != nil || bits&^cacheKnown != 0 {
		return nil, rep, corrupt("column bits %q", meta(pqColumnsKey))
	}
	index := map[string]int{}
	for i, l := range labels {
		index[l] = i
	}
	want := []string{"id", "x", "y", "z", "dist", "vmag", "teff", "bv", "flags", "pmra", "pmdec", "rv", "name"}
	used := make([]int, len(want))
	for j, nm := range want {
		i, ok := index[nm]
		if !ok {
			return nil, rep, &ParseError{File: name, Field: nm, Err: fmt.Errorf("%w: parquet stars layout", ErrMissingColumn)}
		}
		used[j] = i
	}
	n := rep.DeclaredRows
	s := &Stars{Epoch: epoch, Source: meta(pqSourceKey), Format: meta(pqFormatKey),
		ID: make([]int64, 0, n), Flags: make([]Flag, 0, n)}
	f32 := []*[]float32{&s.X, &s.Y, &s.Z, &s.Dist, &s.Vmag, &s.Teff, &s.BV, &s.PMRA, &s.PMDec, &s.RV}
	f32Col := []int{1, 2, 3, 4, 5, 6, 7, 9, 10, 11} // their places in want
	for _, p := range f32 {
		*p = make([]float32, 0, n)
	}
	if bits&cacheHasName != 0 {
		s.Names = map[int]string{}
	}
	vals := make([][]parquet.Value, len(labels))
	err = scanParquet(f, name, used, vals, func(k int) error {
		for r := 0; r < k; r++ {
			v := vals[used[0]][r]
			if v.Kind() != parquet.Int64 || v.IsNull() {
				return corrupt("id column is %v", v.Kind())
			}
			s.ID = append(s.ID, v.Int64())
			for j, p := range f32 {
				w := f32Col[j]
				v := vals[used[w]][r]
				if v.Kind() != parquet.Float || v.IsNull() {
					return corrupt("column %s is %v", want[w], v.Kind())
				}
				*p = append(*p, v.Float())
			}
			v = vals[used[8]][r]
			if v.Kind() != parquet.Int32 || v.IsNull() || v.Int32() < 0 || v.Int32() > 255 {
				return corrupt("flags value %v", v)
			}
			s.Flags = append(s.Flags, Flag(v.Int32()))
			if s.Names != nil {
				if nm := vals[used[12]][r].ByteArray(); len(nm) > 0 {
					s.Names[len(s.ID)-1] = CleanName(string(nm))
				}
			}
		}
		return nil
	})
	if err != nil {
		return nil, rep, err
	}
	if bits&cacheHasPM == 0 {
		s.PMRA, s.PMDec = nil, nil
	}
	if bits&cacheHasRV == 0 {
		s.RV = nil
	}
	if s.Len() == 0 {
		return nil, rep, &ParseError{File: name, Err: ErrNoRows}
	}
	if err := s.Validate(); err != nil {
		return nil, rep, &ParseError{File: name, Err: fmt.Errorf("%w: %v", ErrCorrupt, err)}
	}
	if opt.Epoch != 0 && opt.Epoch != s.Epoch {
		propagateStars(s, opt.Epoch)
		rep.Propagated = true
	}
	summarise(s, rep)
	return s, rep, nil
}
