package catalog

import (
	"bufio"
	"bytes"
	"compress/flate"
	"compress/gzip"
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
)

// Default limits of ReadOptions. They bound what a hostile file can make the
// reader do: no line is buffered past MaxLineBytes, no gzip stream inflates
// past MaxDecompressedBytes or past MaxCompressionRatio times its
// compressed size, and no table grows past MaxRows.
const (
	DefaultMaxLineBytes         = 1 << 20  // 1 MiB
	DefaultMaxRows              = 100e6    // ≈ 5 GB of Stars columns
	DefaultMaxDecompressedBytes = 32 << 30 // 32 GiB
	// DefaultMaxCompressionRatio bounds decompressed/compressed bytes. Real
	// catalogues compress 3–10×; deflate cannot exceed ≈ 1032×.
	DefaultMaxCompressionRatio = 100
	// ratioAllowance bytes may be inflated before the ratio limit applies,
	// so tiny, highly compressible files stay readable.
	ratioAllowance = 8 << 20
	// preallocCap bounds up-front allocation from a declared row count.
	preallocCap = 1 << 18
	sniffBytes  = 64 << 10
)

// ColumnMap names the columns of a generic CSV/TSV table (matched without
// regard to case or surrounding blanks). An empty name means "use the first
// of the usual names that the header has" (listed per field); a name that
// is given but absent from the header is an error. RA, Dec and Vmag are
// required; everything else is optional.
type ColumnMap struct {
	ID       string  // integer id; default id, hip, hr, source_id; else the data-row number
	RA       string  // degrees (hours with RAHours); default ra, ra_deg, radeg, raj2000, _raj2000, ra_icrs
	Dec      string  // degrees; default dec, de, dec_deg, dedeg, dej2000, _dej2000, de_icrs
	Vmag     string  // Johnson V; default vmag, v, mag, v_mag, phot_v_mean_mag
	BV       string  // B−V; default b-v, bv, b_v, bmv, b-v_mag
	Teff     string  // K; default teff, t_eff, teff_k
	Parallax string  // mas; default parallax, plx
	Dist     string  // pc, used when there is no parallax column; default dist, distance, dist_pc
	Name     string  // designation; default name
	PMRA     string  // mas/yr, μα·cos δ; default pmra, pm_ra
	PMDec    string  // mas/yr; default pmdec, pmde, pm_dec
	RV       string  // km/s; default rv, radial_velocity, radvel
	RAHours  bool    // the RA column is in hours
	Epoch    float64 // Julian epoch of the positions; 0 means 2000.0
}

// ReadOptions controls the readers. The zero value detects the format and
// applies the default limits.
type ReadOptions struct {
	// Format forces a format; FormatAuto (zero) detects it from content.
	Format Format
	// Columns maps the columns of a generic CSV/TSV table.
	Columns ColumnMap
	// MaxLineBytes limits one line (default DefaultMaxLineBytes).
	MaxLineBytes int
	// MaxRows limits the stars kept and any row count the file declares
	// (default DefaultMaxRows).
	MaxRows int
	// MaxDecompressedBytes limits the inflated size of gzip input
	// (default DefaultMaxDecompressedBytes).
	MaxDecompressedBytes int64
	// MaxCompressionRatio limits inflated/compressed size once more than
	// 8 MiB have been inflated (default DefaultMaxCompressionRatio).
	MaxCompressionRatio float64
	// MaxV, when non-zero, is a magnitude cut: stars with catalogue V
	// fainter than it are dropped as they are read (counted among the
	// skipped rows as "fainter than the V cut"). Zero keeps every star.
	MaxV float64
	// allowEmpty lets a read that keeps no star succeed (OpenFiles: a
	// shard whose stars all fall to the V cut).
	allowEmpty bool
	// Epoch, when non-zero, is the Julian epoch (e.g. 2000.0) to which
	// positions are propagated by proper motion with the linear model
	// u(t) = normalise(u₀ + (t − t₀)(μα* ê_α + μδ ê_δ)), ê_α, ê_δ the local
	// east and north unit vectors at u₀. Parallax and radial velocity are
	// not propagated (no perspective acceleration); stars without proper
	// motion keep their position. Zero keeps the catalogue epoch.
	Epoch float64
}

func (o ReadOptions) withDefaults() ReadOptions {
	if o.MaxLineBytes <= 0 {
		o.MaxLineBytes = DefaultMaxLineBytes
	}
	if o.MaxRows <= 0 {
		o.MaxRows = DefaultMaxRows
	}
	if o.MaxDecompressedBytes <= 0 {
		o.MaxDecompressedBytes = DefaultMaxDecompressedBytes
	}
	if !(o.MaxCompressionRatio > 0) {
		o.MaxCompressionRatio = DefaultMaxCompressionRatio
	}
	return o
}

// Range is the span of a column over the stars that have a finite value.
type Range struct {
	Min, Max float64
	N        int // stars with a finite value
}

func (r *Range) add(v float64) {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return
	}
	if r.N == 0 || v < r.Min {
		r.Min = v
	}
	if r.N == 0 || v > r.Max {
		r.Max = v
	}
	r.N++
}

// Skip counts the rows skipped for one reason.
type Skip struct {
	Reason    string // e.g. "no position", "no V magnitude"
	Count     int
	FirstLine int    // 1-based line number of the first such row (0: not known)
	File      string // file of FirstLine when several files were read, else ""
}

// Report summarises one read: what was found, what was kept, what was
// skipped and why.
type Report struct {
	Source       string // file name
	Format       Format // format read (detected or forced)
	Compressed   bool   // the input was gzip
	Lines        int    // lines read, including header, comments and blanks
	Rows         int    // stars kept
	Skipped      int    // data rows skipped (sum of Skips)
	Skips        []Skip // per reason, in order of first occurrence
	DeclaredRows int    // row count declared by the file; -1 if none
	V, BV, Dist  Range  // Johnson V, B−V, distance (pc, finite only)
	// Counts of flags among the kept stars.
	NoDistance, NoColour, TeffFromCatalogue, TeffExtrapolated int
	Epoch                                                     float64 // Julian epoch of the returned positions
	Propagated                                                bool    // positions were moved to ReadOptions.Epoch
	// Files holds each file's own Report when several were read
	// (OpenFiles), in order; nil for one file.
	Files []*Report
}

// Open reads the catalogue in the named file. See Read, and OpenContext
// to make it interruptible.
func Open(path string, opt ReadOptions) (*Stars, *Report, error) {
	return OpenContext(context.Background(), path, opt)
}

// open reads the catalogue in f, through r (f itself or a wrapper of it).
func open(f *os.File, r io.Reader, path string, opt ReadOptions) (*Stars, *Report, error) {
	// Parquet is read through io.ReaderAt: straight from the file, not
	// buffered into memory as Read must.
	var head [4]byte
	if k, _ := f.ReadAt(head[:], 0); !math.IsNaN(opt.Epoch) && math.Abs(opt.Epoch) <= 1e5 && (opt.Format == FormatAuto || opt.Format == FormatParquet) && k == 4 && bytes.Equal(head[:], parquetMagic) {
		if fi, err := f.Stat(); err == nil && fi.Mode().IsRegular() {
			o := opt.withDefaults()
			var ra io.ReaderAt = f
			if cr, ok := r.(*ctxReader); ok {
				ra = ctxReaderAt{ctx: cr.ctx, r: f}
			}
			return readParquet(ra, fi.Size(), path, o, &Report{Source: path, DeclaredRows: -1})
		}
	}
	return Read(r, path, opt)
}

// Read reads a catalogue from r; name (a file name) is used in messages and
// as a format hint. Gzip input is decompressed transparently.
//
// Policy on bad input: a row that lacks a required value (a position, a
// magnitude) is skipped and counted in the Report by reason, with the line
// of its first occurrence. Everything else fails the whole file with a
// *ParseError naming file, line and field: text that is not a number in any
// numeric field, NaN or Inf, values out of their field's range, a wrong
// number of fields, a missing header column, an over-long line, truncated
// or corrupt gzip, a gzip bomb, more rows (or a declared row count) above
// MaxRows, and input without any star. A blank optional field is fine.
func Read(r io.Reader, name string, opt ReadOptions) (*Stars, *Report, error) {
	opt = opt.withDefaults()
	if math.IsNaN(opt.Epoch) || math.IsInf(opt.Epoch, 0) || math.Abs(opt.Epoch) > 1e5 {
		return nil, nil, fmt.Errorf("catalog: epoch %v out of range", opt.Epoch)
	}
	if math.IsNaN(opt.MaxV) {
		return nil, nil, fmt.Errorf("catalog: V cut is NaN")
	}
	rep := &Report{Source: name, DeclaredRows: -1}
	avail := remaining(r) // bytes left in a file or in-memory reader, else -1
	cr := &countingReader{r: r}
	raw := bufio.NewReaderSize(cr, 64<<10)
	var src io.Reader = raw
	if head, _ := raw.Peek(2); len(head) == 2 && head[0] == 0x1f && head[1] == 0x8b {
		zr, err := gzip.NewReader(raw)
		if err != nil {
			return nil, rep, &ParseError{File: name, Err: mapReadErr(err, true)}
		}
		src = &inflateLimiter{r: zr, in: cr, maxOut: opt.MaxDecompressedBytes, ratio: opt.MaxCompressionRatio}
		rep.Compressed = true
	}
	bufSize := opt.MaxLineBytes + 1
	if bufSize < sniffBytes {
		bufSize = sniffBytes
	}
	br := bufio.NewReaderSize(src, bufSize)
	lr := &lineReader{br: br, file: name, max: opt.MaxLineBytes, gz: rep.Compressed}
	if rep.Compressed {
		if head, _ := br.Peek(2); len(head) == 2 && head[0] == 0x1f && head[1] == 0x8b {
			return nil, rep, &ParseError{File: name, Err: fmt.Errorf("%w: gzip inside gzip is not read", ErrUnknownFormat)}
		}
	}
	if head, _ := br.Peek(2); len(head) == 2 && (head[0] == 0xff && head[1] == 0xfe || head[0] == 0xfe && head[1] == 0xff) {
		return nil, rep, &ParseError{File: name, Line: 1, Err: fmt.Errorf("%w: UTF-16 text (byte-order mark % x); save it as UTF-8", ErrUnknownFormat, head)}
	}
	format := opt.Format
	if format == FormatAuto {
		f, err := detectFormat(br, name, rep.Compressed)
		if err != nil {
			return nil, rep, err
		}
		format = f
	}
	rep.Format = format
	if format == FormatCache {
		if rep.Compressed {
			avail = -1
		}
		s, err := readCache(br, opt.MaxRows, avail)
		if err != nil {
			return nil, rep, &ParseError{File: name, Err: err}
		}
		if err := lr.expectEOF(); err != nil {
			return nil, rep, err
		}
		if opt.Epoch != 0 && opt.Epoch != s.Epoch {
			propagateStars(s, opt.Epoch)
			rep.Propagated = true
		}
		summarise(s, rep)
		return s, rep, nil
	}
	if format == FormatParquet {
		// Parquet needs random access: hold the (inflated) input in memory,
		// within the inflation limits. Open reads files in place.
		data, err := io.ReadAll(br)
		if err != nil {
			return nil, rep, &ParseError{File: name, Err: mapReadErr(err, rep.Compressed)}
		}
		return readParquet(bytes.NewReader(data), int64(len(data)), name, opt, rep)
	}
	b := newBuilder(name, format, opt, rep)
	b.detected = opt.Format == FormatAuto
	var err error
	switch format {
	case FormatBSC5:
		err = readBSC5(lr, b)
	case FormatHipparcos:
		err = readHipparcos(lr, b)
	case FormatHipparcos2007:
		err = readHip2(lr, b)
	case FormatGaiaCSV, FormatCSV, FormatTSV:
		err = readDelimited(lr, b, format)
	default:
		err = &ParseError{File: name, Err: fmt.Errorf("%w: %v", ErrUnknownFormat, format)}
	}
	rep.Lines = lr.line
	if err != nil {
		return nil, rep, err
	}
	return b.finish()
}

// countingReader counts the bytes read from the raw (compressed) input.
type countingReader struct {
	r io.Reader
	n int64
}

func (c *countingReader) Read(p []byte) (int, error) {
	n, err := c.r.Read(p)
	c.n += int64(n)
	return n, err
}

// inflateLimiter stops a gzip stream that inflates too far.
type inflateLimiter struct {
	r      io.Reader
	in     *countingReader
	out    int64
	maxOut int64
	ratio  float64
}

func (l *inflateLimiter) Read(p []byte) (int, error) {
	n, err := l.r.Read(p)
	l.out += int64(n)
	if l.out > l.maxOut {
		return n, fmt.Errorf("%w: more than %d bytes", ErrDecompressedTooLarge, l.maxOut)
	}
	if l.out > ratioAllowance && float64(l.out) > l.ratio*float64(l.in.n) {
		return n, fmt.Errorf("%w: compression ratio above %g (%d bytes from %d)", ErrDecompressedTooLarge, l.ratio, l.out, l.in.n)
	}
	return n, err
}

// mapReadErr turns low-level read errors into the package's sentinels.
func mapReadErr(err error, gz bool) error {
	var ce flate.CorruptInputError
	switch {
	case errors.Is(err, ErrDecompressedTooLarge):
		return err
	case errors.Is(err, io.ErrUnexpectedEOF) || (gz && errors.Is(err, io.EOF)):
		if gz {
			return fmt.Errorf("%w: gzip stream ends early", ErrTruncated)
		}
		return fmt.Errorf("%w: %v", ErrTruncated, err)
	case errors.Is(err, gzip.ErrChecksum), errors.Is(err, gzip.ErrHeader), errors.As(err, &ce):
		return fmt.Errorf("%w: gzip: %v", ErrCorrupt, err)
	}
	return err
}

var utf8BOM = []byte("\xef\xbb\xbf")

// lineReader yields lines without their end-of-line bytes, never holding
// more than max bytes of one line.
type lineReader struct {
	br   *bufio.Reader
	file string
	line int // number of the line last returned
	max  int
	gz   bool
	eof  bool
}

func (l *lineReader) next() ([]byte, error) {
	if l.eof {
		return nil, io.EOF
	}
	b, err := l.br.ReadSlice('\n')
	if err == bufio.ErrBufferFull || len(b) > l.max+1 {
		return nil, &ParseError{File: l.file, Line: l.line + 1, Err: fmt.Errorf("%w: more than %d bytes", ErrLineTooLong, l.max)}
	}
	if err != nil {
		if err != io.EOF {
			return nil, &ParseError{File: l.file, Line: l.line + 1, Err: mapReadErr(err, l.gz)}
		}
		l.eof = true
		if len(b) == 0 {
			return nil, io.EOF
		}
	}
	l.line++
	b = bytes.TrimRight(b, "\r\n")
	if l.line == 1 {
		b = bytes.TrimPrefix(b, utf8BOM)
	}
	if len(b) > l.max {
		return nil, &ParseError{File: l.file, Line: l.line, Err: fmt.Errorf("%w: more than %d bytes", ErrLineTooLong, l.max)}
	}
	return b, nil
}

// eachLine calls fn with every non-blank line and its 1-based number until
// the input ends or fn or the reader fails.
func (l *lineReader) eachLine(fn func(line []byte, n int) error) error {
	for {
		line, err := l.next()
		if err == io.EOF {
			return nil
		}
		if err != nil {
			return err
		}
		if isBlank(line) {
			continue
		}
		if err := fn(line, l.line); err != nil {
			return err
		}
	}
}

// expectEOF drains what follows a cache so trailing garbage and truncated
// gzip are noticed.
func (l *lineReader) expectEOF() error {
	var one [1]byte
	n, err := l.br.Read(one[:])
	if n > 0 {
		return &ParseError{File: l.file, Err: fmt.Errorf("%w: data after the cache trailer", ErrCorrupt)}
	}
	if err != nil && err != io.EOF {
		return &ParseError{File: l.file, Err: mapReadErr(err, l.gz)}
	}
	return nil
}

// builder collects stars and skip counts for one read.
type builder struct {
	s         *Stars
	rep       *Report
	opt       ReadOptions
	file      string
	catEpoch  float64
	propagate bool
	detected  bool // the format was detected, not forced
}

func newBuilder(file string, f Format, opt ReadOptions, rep *Report) *builder {
	b := &builder{s: &Stars{Source: file, Format: f.String()}, rep: rep, opt: opt, file: file}
	switch f {
	case FormatHipparcos, FormatHipparcos2007:
		b.setEpoch(1991.25)
	case FormatGaiaCSV:
		b.setEpoch(2016.0)
	case FormatCSV, FormatTSV:
		if opt.Columns.Epoch != 0 {
			b.setEpoch(opt.Columns.Epoch)
		} else {
			b.setEpoch(2000.0)
		}
	default:
		b.setEpoch(2000.0)
	}
	return b
}

func (b *builder) setEpoch(e float64) {
	b.catEpoch = e
	b.s.Epoch = e
	b.propagate = false
	if b.opt.Epoch != 0 && b.opt.Epoch != e {
		b.s.Epoch = b.opt.Epoch
		b.propagate = true
	}
}

// grow preallocates room for n more stars (bounded by preallocCap).
func (b *builder) grow(n int) {
	if n > preallocCap {
		n = preallocCap
	}
	if n <= 0 {
		return
	}
	s := b.s
	s.ID = make([]int64, 0, n)
	s.X, s.Y, s.Z = make([]float32, 0, n), make([]float32, 0, n), make([]float32, 0, n)
	s.Dist, s.Vmag, s.Teff, s.BV = make([]float32, 0, n), make([]float32, 0, n), make([]float32, 0, n), make([]float32, 0, n)
	s.Flags = make([]Flag, 0, n)
}

// declare records a row count the file declares, refusing absurd ones
// before anything is allocated for them.
func (b *builder) declare(n int64, line int) error {
	if n < 0 || n > int64(b.opt.MaxRows) {
		return &ParseError{File: b.file, Line: line, Field: "rows", Value: strconv.FormatInt(n, 10),
			Err: fmt.Errorf("%w: file declares %d rows, limit %d", ErrTooManyRows, n, b.opt.MaxRows)}
	}
	b.rep.DeclaredRows = int(n)
	if b.s.Len() == 0 {
		b.grow(int(n))
	}
	return nil
}

func (b *builder) add(st Star, line int) error {
	if b.s.Len() >= b.opt.MaxRows {
		return &ParseError{File: b.file, Line: line, Err: fmt.Errorf("%w: more than %d", ErrTooManyRows, b.opt.MaxRows)}
	}
	if b.opt.MaxV != 0 && st.Vmag > b.opt.MaxV {
		b.skip(skipCut, line)
		return nil
	}
	if b.propagate && (st.PMRA != 0 || st.PMDec != 0) {
		st.RA, st.Dec = propagateRADec(st.RA, st.Dec, st.PMRA, st.PMDec, b.opt.Epoch-b.catEpoch)
		b.rep.Propagated = true
	}
	b.s.Append(st)
	return nil
}

func (b *builder) skip(reason string, line int) {
	b.rep.Skipped++
	for i := range b.rep.Skips {
		if b.rep.Skips[i].Reason == reason {
			b.rep.Skips[i].Count++
			return
		}
	}
	b.rep.Skips = append(b.rep.Skips, Skip{Reason: reason, Count: 1, FirstLine: line})
}

func (b *builder) finish() (*Stars, *Report, error) {
	if b.s.Len() == 0 && b.opt.allowEmpty {
		summarise(b.s, b.rep)
		return b.s, b.rep, nil
	}
	if b.s.Len() == 0 {
		return nil, b.rep, &ParseError{File: b.file, Err: fmt.Errorf("%w (%d rows skipped)", ErrNoRows, b.rep.Skipped)}
	}
	if err := b.s.Validate(); err != nil {
		return nil, b.rep, fmt.Errorf("catalog: %s: %w", b.file, err)
	}
	summarise(b.s, b.rep)
	return b.s, b.rep, nil
}

// Summary returns the Report of a catalogue that was not read from a file
// (the built-in sky): its source, rows, ranges and flag counts; no lines
// and nothing skipped.
func Summary(s *Stars) *Report {
	rep := &Report{Source: s.Source, DeclaredRows: -1}
	summarise(s, rep)
	return rep
}

// summarise fills the ranges and flag counts of rep from s.
func summarise(s *Stars, rep *Report) {
	rep.Rows = s.Len()
	rep.Epoch = s.Epoch
	rep.V, rep.BV, rep.Dist = Range{}, Range{}, Range{}
	rep.NoDistance, rep.NoColour, rep.TeffFromCatalogue, rep.TeffExtrapolated = 0, 0, 0, 0
	for i := 0; i < s.Len(); i++ {
		rep.V.add(float64(s.Vmag[i]))
		rep.BV.add(float64(s.BV[i]))
		rep.Dist.add(float64(s.Dist[i]))
		f := s.Flags[i]
		if f&FlagNoDistance != 0 {
			rep.NoDistance++
		}
		if f&FlagNoColour != 0 {
			rep.NoColour++
		}
		if f&FlagTeffFromCatalogue != 0 {
			rep.TeffFromCatalogue++
		}
		if f&FlagTeffExtrapolated != 0 {
			rep.TeffExtrapolated++
		}
	}
}

const (
	degToRad = math.Pi / 180
	masToRad = math.Pi / (180 * 3600 * 1000)
)

// propagateRADec moves a position (degrees) by proper motion (mas/yr,
// μα including cos δ) over dt Julian years with the linear model
// documented on ReadOptions.Epoch.
func propagateRADec(ra, dec, pmra, pmdec, dt float64) (float64, float64) {
	sa, ca := math.Sincos(ra * degToRad)
	sd, cd := math.Sincos(dec * degToRad)
	k := dt * masToRad
	x := cd*ca + k*(-pmra*sa-pmdec*sd*ca)
	y := cd*sa + k*(pmra*ca-pmdec*sd*sa)
	z := sd + k*pmdec*cd
	r := math.Sqrt(x*x + y*y + z*z)
	nra := math.Atan2(y, x) / degToRad
	if nra < 0 {
		nra += 360
	}
	return nra, math.Asin(math.Max(-1, math.Min(1, z/r))) / degToRad
}

// propagateStars moves the directions of s to epoch in place (cache input).
func propagateStars(s *Stars, epoch float64) {
	if s.PMRA != nil {
		dt := epoch - s.Epoch
		for i := range s.X {
			if s.PMRA[i] == 0 && s.PMDec[i] == 0 {
				continue
			}
			st := s.At(i)
			ra, dec := propagateRADec(st.RA, st.Dec, st.PMRA, st.PMDec, dt)
			sa, ca := math.Sincos(ra * degToRad)
			sd, cd := math.Sincos(dec * degToRad)
			s.X[i], s.Y[i], s.Z[i] = float32(cd*ca), float32(cd*sa), float32(sd)
		}
	}
	s.Epoch = epoch
}

// --- field helpers ---

// col returns bytes from..to (1-based, inclusive) of a fixed-width line,
// or what exists of them.
func col(line []byte, from, to int) []byte {
	if from > len(line) {
		return nil
	}
	if to > len(line) {
		to = len(line)
	}
	return line[from-1 : to]
}

func isBlank(b []byte) bool { return len(bytes.TrimSpace(b)) == 0 }

// number parses a numeric field. A blank field (or "null") gives ok=false
// and no error; anything else that is not a finite number is an error
// naming line and field.
func (b *builder) number(raw []byte, field string, line int) (v float64, ok bool, err error) {
	t := bytes.TrimSpace(raw)
	if len(t) == 0 || bytes.EqualFold(t, []byte("null")) {
		return math.NaN(), false, nil
	}
	if len(t) > 64 {
		return 0, false, &ParseError{File: b.file, Line: line, Field: field, Value: shortValue(t), Err: ErrNotNumber}
	}
	v, perr := strconv.ParseFloat(string(t), 64)
	if perr != nil && !errors.Is(perr, strconv.ErrRange) {
		return 0, false, &ParseError{File: b.file, Line: line, Field: field, Value: shortValue(t), Err: ErrNotNumber}
	}
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, false, &ParseError{File: b.file, Line: line, Field: field, Value: shortValue(t), Err: ErrNotFinite}
	}
	if !decimalNumber(t) {
		// strconv also takes hexadecimal floats (0x1p-2) and digit
		// separators (0x_1p0), which no catalogue writes.
		return 0, false, &ParseError{File: b.file, Line: line, Field: field, Value: shortValue(t), Err: fmt.Errorf("%w: want a decimal number", ErrNotNumber)}
	}
	return v, true, nil
}

// decimalNumber reports whether t uses only the characters of a decimal
// number with an optional exponent.
func decimalNumber(t []byte) bool {
	for _, c := range t {
		if !(c >= '0' && c <= '9' || c == '.' || c == '+' || c == '-' || c == 'e' || c == 'E') {
			return false
		}
	}
	return true
}

// ranged is number with a [lo, hi] check on present values.
func (b *builder) ranged(raw []byte, field string, line int, lo, hi float64) (float64, bool, error) {
	v, ok, err := b.number(raw, field, line)
	if err != nil || !ok {
		return v, ok, err
	}
	if v < lo || v > hi {
		return 0, false, &ParseError{File: b.file, Line: line, Field: field, Value: shortValue(bytes.TrimSpace(raw)),
			Err: fmt.Errorf("%w [%g, %g]", ErrOutOfRange, lo, hi)}
	}
	return v, true, nil
}

// integer parses a required integer id.
func (b *builder) integer(raw []byte, field string, line int) (int64, error) {
	t := bytes.TrimSpace(raw)
	if len(t) == 0 {
		return 0, &ParseError{File: b.file, Line: line, Field: field, Err: fmt.Errorf("%w: identifier is blank", ErrNotNumber)}
	}
	v, err := strconv.ParseInt(string(t), 10, 64)
	if err != nil {
		return 0, &ParseError{File: b.file, Line: line, Field: field, Value: shortValue(t), Err: ErrNotNumber}
	}
	return v, nil
}

// Value ranges shared by the readers.
const (
	vmagLo, vmagHi = -30, 40 // magnitudes
	bvLo, bvHi     = -5, 10  // colour indices
	pmLim          = 1e5     // mas/yr
	rvLim          = 1e5     // km/s
	teffLo, teffHi = 100, 1e6
)

// distFromParallax returns the distance in pc for a parallax in mas and
// whether it is known (only positive parallaxes give a distance).
func distFromParallax(plxMas float64, ok bool) (float64, Flag) {
	if ok && plxMas > 0 {
		return 1000 / plxMas, 0
	}
	return math.Inf(1), FlagNoDistance
}
