package catalog

import (
	"bytes"
	"compress/gzip"
	"errors"
	"io"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

const fixtures = "../testdata/catalogs"

func fixture(name string) string { return filepath.Join(fixtures, name) }

// wantStar is the expected content of one fixture row. Values come from
// the fixture bytes (see testdata/catalogs/README.md) converted by the
// rule named beside each case.
type wantStar struct {
	id              int64
	name            string
	ra, dec         float64 // degrees
	dist            float64 // pc; +Inf unknown
	vmag, bv, teff  float64
	pmra, pmdec, rv float64
	flags           Flag
}

func checkStar(t *testing.T, s *Stars, i int, w wantStar) {
	t.Helper()
	st := s.At(i)
	same := func(a, b, tol float64) bool {
		if math.IsNaN(b) {
			return math.IsNaN(a)
		}
		if math.IsInf(b, 1) {
			return math.IsInf(a, 1)
		}
		return scalar.EqualWithinAbsOrRel(a, b, tol, tol)
	}
	// float32 storage: directions to ~1e-7 (≈ 2e-5°), values to 1e-6 relative.
	if st.ID != w.id || st.Name != w.name || !same(st.RA, w.ra, 3e-5) || !same(st.Dec, w.dec, 3e-5) ||
		!same(st.Dist, w.dist, 1e-6) || !same(st.Vmag, w.vmag, 1e-6) || !same(st.BV, w.bv, 1e-6) ||
		!same(st.Teff, w.teff, 1e-6) || !same(st.PMRA, w.pmra, 1e-6) || !same(st.PMDec, w.pmdec, 1e-6) ||
		!same(st.RV, w.rv, 1e-6) || st.Flags != w.flags {
		t.Errorf("row %d:\nhave %+v\nwant %+v", i, st, w)
	}
}

func TestFixturesGood(t *testing.T) {
	inf, nan := math.Inf(1), math.NaN()
	cases := []struct {
		file   string
		opt    ReadOptions
		format Format
		epoch  float64
		skips  []Skip
		stars  []wantStar
	}{
		{
			file: "bsc5_good.dat", format: FormatBSC5, epoch: 2000,
			skips: []Skip{{Reason: "no position", Count: 1, FirstLine: 3}, {Reason: "no V magnitude", Count: 1, FirstLine: 4}},
			stars: []wantStar{
				// 12h34m56.7s = 188.73625°, +01°23′45″ = 1.395833° [cp: sexagesimal]; parallax 0.050″ → 20 pc [cp];
				// pm arcsec/yr × 1000 [cp]; Teff by Ballesteros [pub].
				{9201, "7Kap Tst", 188.73625, 1.3958333, 20, 4.56, 0.65, TeffFromBV(0.65), 123, -456, 12, 0},
				{9202, "", 15.514167, -45.101944, inf, 6.10, nan, DefaultTeff, 0, 0, nan, FlagNoDistance | FlagNoColour},
				// Dynamical parallax D+.100 → 10 pc (documented rule); B−V 2.50 clamped [cp].
				{9205, "", 330, -10, 10, 5.00, 2.50, TeffFromBV(2.0), -1, 2, -20, FlagTeffExtrapolated},
			},
		},
		{
			file: "hip_main_good.dat", format: FormatHipparcos, epoch: 1991.25,
			skips: []Skip{{Reason: "no V magnitude", Count: 1, FirstLine: 3}},
			stars: []wantStar{
				// Plx 25.00 mas → 40 pc [cp].
				{130001, "", 123.45678901, -12.3456789, 40, 5.67, 0.48, TeffFromBV(0.48), 100, -50, nan, 0},
				// H8/H9 blank → H3/H4: 01h02m03s = 15.5125°, +04°05′06″ = 4.085° [cp].
				{130002, "", 15.5125, 4.085, inf, 9.10, nan, DefaultTeff, 0, 0, nan, FlagNoDistance | FlagNoColour},
			},
		},
		{
			file: "hip2_good.dat", format: FormatHipparcos2007, epoch: 1991.25,
			skips: []Skip{{Reason: "no Hp magnitude", Count: 1, FirstLine: 2}},
			stars: []wantStar{
				// 1.2345678901 rad = 70.735421°, −0.3456789012 rad = −19.805871° [cp]; Plx 10 mas → 100 pc;
				// V = Hp − 0.134 at B−V 0.674 [pub Bessell 2000 Table 2].
				{130011, "", 70.735421, -19.805871, 100, 7.1234 - 0.134, 0.674, TeffFromBV(0.674), 20, -30, nan, 0},
			},
		},
		{
			file: "gaia_good.csv", format: FormatGaiaCSV, epoch: 2016,
			skips: []Skip{{Reason: "no position", Count: 1, FirstLine: 5}},
			stars: []wantStar{
				// Parallax 5 mas → 200 pc; V from Riello 2021 [mem]; Teff from MB20 [mem].
				{1000000000000000001, "", 10.5, -20.25, 200, 12.21414, nan, 5213.074058750517, 1.5, -2.5, nan, 0},
				// Negative parallax → unknown; teff_gspphot 6000 wins; V with solar BP−RP 0.82 [mem].
				{1000000000000000002, "", 200, 45, inf, 15.15247013232, nan, 6000, 0, 0, -12.5, FlagNoDistance | FlagTeffFromCatalogue},
			},
		},
		{
			file: "generic_good.csv", format: FormatCSV, epoch: 2000,
			opt:   ReadOptions{Columns: ColumnMap{ID: "star", RA: "alpha_h", RAHours: true, Dec: "delta", Vmag: "mag", BV: "colour", Parallax: "plx_mas", Name: "label"}},
			skips: []Skip{{Reason: "no V magnitude", Count: 1, FirstLine: 4}},
			stars: []wantStar{
				// 6 h = 90°; 100 mas → 10 pc [cp].
				{1, "Test One", 90, -10, 10, 3.5, 0.30, TeffFromBV(0.30), 0, 0, nan, 0},
				// CSV quoting: "Quoted, ""Name""" → Quoted, "Name" [pub RFC 4180].
				{2, `Quoted, "Name"`, 277.5, 60, inf, 5.25, nan, DefaultTeff, 0, 0, nan, FlagNoDistance | FlagNoColour},
			},
		},
		{
			file: "generic_good.tsv", format: FormatTSV, epoch: 2000,
			stars: []wantStar{
				// Default column names; dist column in pc; id = data-row number [cp].
				{1, "", 45, 30, 50, 2.0, 1.2, TeffFromBV(1.2), 0, 0, nan, 0},
				{2, "", 90, -30, inf, 7.5, nan, DefaultTeff, 0, 0, nan, FlagNoDistance | FlagNoColour},
			},
		},
	}
	for _, c := range cases {
		t.Run(c.file, func(t *testing.T) {
			s, rep, err := Open(fixture(c.file), c.opt)
			if err != nil {
				t.Fatal(err)
			}
			if rep.Format != c.format || s.Format != c.format.String() || s.Epoch != c.epoch || rep.Epoch != c.epoch {
				t.Errorf("format/epoch: have %v %q %v, want %v %v", rep.Format, s.Format, s.Epoch, c.format, c.epoch)
			}
			if s.Len() != len(c.stars) || rep.Rows != len(c.stars) {
				t.Fatalf("rows: have %d (report %d), want %d", s.Len(), rep.Rows, len(c.stars))
			}
			if len(rep.Skips) != len(c.skips) || rep.Skipped != len(c.skips) {
				t.Errorf("skips: have %+v, want %+v", rep.Skips, c.skips)
			} else {
				for i := range c.skips {
					if rep.Skips[i] != c.skips[i] {
						t.Errorf("skip %d: have %+v, want %+v", i, rep.Skips[i], c.skips[i])
					}
				}
			}
			for i, w := range c.stars {
				checkStar(t, s, i, w)
			}
			var nd, nc int
			for _, w := range c.stars {
				if w.flags&FlagNoDistance != 0 {
					nd++
				}
				if w.flags&FlagNoColour != 0 {
					nc++
				}
			}
			if rep.NoDistance != nd || rep.NoColour != nc {
				t.Errorf("flag counts: have %d/%d, want %d/%d", rep.NoDistance, rep.NoColour, nd, nc)
			}
			// Every fixture reads the same through gzip and through the cache.
			raw, _ := os.ReadFile(fixture(c.file))
			var zb bytes.Buffer
			zw := gzip.NewWriter(&zb)
			zw.Write(raw)
			zw.Close()
			sz, _, err := Read(&zb, c.file, c.opt)
			if err != nil {
				t.Fatal(err)
			}
			sz.Source = s.Source
			if d := diffStars(s, sz); d != "" {
				t.Errorf("gzip: %s", d)
			}
			var cb bytes.Buffer
			if err := WriteCache(&cb, s); err != nil {
				t.Fatal(err)
			}
			sc, rc, err := Read(bytes.NewReader(cb.Bytes()), "x.skyfcat", ReadOptions{})
			if err != nil {
				t.Fatal(err)
			}
			if rc.Format != FormatCache {
				t.Errorf("cache detected as %v", rc.Format)
			}
			if d := diffStars(s, sc); d != "" {
				t.Errorf("cache: %s", d)
			}
		})
	}
}

func TestFixturesBad(t *testing.T) {
	cases := []struct {
		file  string
		opt   ReadOptions
		want  error
		line  int
		field string
	}{
		{"bsc5_bad.dat", ReadOptions{}, ErrNotNumber, 2, "Vmag"},
		{"hip_main_bad.dat", ReadOptions{}, ErrNotNumber, 2, "Plx"},
		{"hip2_bad.dat", ReadOptions{}, ErrNotNumber, 2, "DErad"},
		{"gaia_bad.csv", ReadOptions{}, ErrNotFinite, 3, "bp_rp"},
		{"gaia_rows_bomb.csv", ReadOptions{}, ErrTooManyRows, 1, "rows"},
		{"generic_bad.tsv", ReadOptions{}, ErrNotNumber, 3, "dec"},
		{"generic_good.csv", ReadOptions{Columns: ColumnMap{RA: "alpha"}}, ErrMissingColumn, 1, "alpha"},
		{"generic_good.csv", ReadOptions{}, ErrMissingColumn, 1, "ra"},
		{"bsc5_good.dat", ReadOptions{Format: FormatHipparcos}, ErrFieldCount, 1, ""},
		{"gaia_good.csv", ReadOptions{MaxRows: 1}, ErrTooManyRows, 1, "rows"},
		{"generic_good.tsv", ReadOptions{MaxRows: 1}, ErrTooManyRows, 3, ""},
	}
	for _, c := range cases {
		_, _, err := Open(fixture(c.file), c.opt)
		var pe *ParseError
		if !errors.Is(err, c.want) || !errors.As(err, &pe) || pe.Line != c.line || pe.Field != c.field {
			t.Errorf("%s: have %v, want %v at line %d field %q", c.file, err, c.want, c.line, c.field)
			continue
		}
		msg := err.Error()
		if !strings.HasPrefix(msg, "catalog: "+fixture(c.file)+":") || (c.field != "" && !strings.Contains(msg, "field "+c.field)) {
			t.Errorf("%s: message %q lacks file:line or field", c.file, msg)
		}
	}
}

func TestReadErrors(t *testing.T) {
	gz := func(b []byte) []byte {
		var zb bytes.Buffer
		zw := gzip.NewWriter(&zb)
		zw.Write(b)
		zw.Close()
		return zb.Bytes()
	}
	good, err := os.ReadFile(fixture("gaia_good.csv"))
	if err != nil {
		t.Fatal(err)
	}
	zgood := gz(good)
	corrupt := append([]byte(nil), zgood...)
	corrupt[len(corrupt)-6] ^= 0xff // CRC-32 trailer of the gzip member
	cases := []struct {
		name string
		in   []byte
		want error
	}{
		{"truncated.csv.gz", zgood[:len(zgood)/2], ErrTruncated},
		{"truncated-header.gz", zgood[:5], ErrTruncated},
		{"corrupt.csv.gz", corrupt, ErrCorrupt},
		{"nested.gz", gz(zgood), ErrUnknownFormat},
		{"noise.dat", []byte("hello world\nthis is not a catalogue\n"), ErrUnknownFormat},
		{"empty.dat", nil, ErrNoRows},
		{"header-only.csv", []byte("ra,dec,vmag\n"), ErrNoRows},
		{"inf.csv", []byte("ra,dec,vmag\n1,2,Inf\n"), ErrNotFinite},
		{"nan.csv", []byte("ra,dec,vmag\n1,NaN,3\n"), ErrNotFinite},
		{"overflow.csv", []byte("ra,dec,vmag\n1,2,1e999\n"), ErrNotFinite},
		{"range.csv", []byte("ra,dec,vmag\n1,95,3\n"), ErrOutOfRange},
		{"fields.csv", []byte("ra,dec,vmag\n1,2\n"), ErrFieldCount},
		{"quote.csv", []byte("ra,dec,vmag,name\n1,2,3,\"open\n"), ErrFieldCount},
		{"gaia-missing.csv", []byte("source_id,ra,dec,parallax,phot_g_mean_mag\n1,2,3,4,5\n"), ErrMissingColumn},
		{"hint.csv", []byte("1,2,3\n"), ErrMissingColumn},
		{"declared-float.csv", []byte("# nrows = 1e12\nra,dec,vmag\n1,2,3\n"), ErrTooManyRows},
	}
	for _, c := range cases {
		_, _, err := Read(bytes.NewReader(c.in), c.name, ReadOptions{})
		if !errors.Is(err, c.want) {
			t.Errorf("%s: have %v, want %v", c.name, err, c.want)
		}
	}
	if _, _, err := Open(fixture("does-not-exist.dat"), ReadOptions{}); !errors.Is(err, fs.ErrNotExist) || !strings.HasPrefix(err.Error(), "catalog: ") {
		t.Errorf("missing file: have %v", err)
	}
}

// endless yields a byte forever: a line that never ends.
type endless byte

func (e endless) Read(p []byte) (int, error) {
	for i := range p {
		p[i] = byte(e)
	}
	return len(p), nil
}

func TestHostileInput(t *testing.T) {
	// An endless line (standing for a 2 GB one) stops at MaxLineBytes.
	r := io.MultiReader(strings.NewReader("ra,dec,vmag\n"), endless('7'))
	_, _, err := Read(r, "long.csv", ReadOptions{})
	var pe *ParseError
	if !errors.Is(err, ErrLineTooLong) || !errors.As(err, &pe) || pe.Line != 2 {
		t.Errorf("endless line: have %v, want ErrLineTooLong at line 2", err)
	}
	// Same for a line without any newline from the first byte.
	if _, _, err := Read(endless('x'), "long.dat", ReadOptions{MaxLineBytes: 4096}); !errors.Is(err, ErrLineTooLong) && !errors.Is(err, ErrUnknownFormat) {
		t.Errorf("endless first line: have %v", err)
	}

	// A gzip bomb: bomb.csv.gz inflates 32 KiB into 16 MiB of identical
	// rows, far beyond the 100× ratio limit (see testdata README).
	bomb, err := os.ReadFile(fixture("bomb.csv.gz"))
	if err != nil {
		t.Fatal(err)
	}
	_, _, err = Read(bytes.NewReader(bomb), "bomb.csv.gz", ReadOptions{})
	if !errors.Is(err, ErrDecompressedTooLarge) {
		t.Errorf("gzip bomb (%d bytes): have %v, want ErrDecompressedTooLarge", len(bomb), err)
	}
	// With the ratio limit lifted the same file reads: the limit, not the data, stopped it.
	if !testing.Short() {
		if s, _, err := Read(bytes.NewReader(bomb), "bomb.csv.gz", ReadOptions{MaxCompressionRatio: 1e9}); err != nil || s.Len() < 1e6 {
			t.Errorf("bomb without ratio limit: %v", err)
		}
	}
	// The absolute size limit, independent of ratio.
	_, _, err = Read(bytes.NewReader(bomb), "bomb.csv.gz", ReadOptions{MaxDecompressedBytes: 1 << 20, MaxCompressionRatio: 1e9})
	if !errors.Is(err, ErrDecompressedTooLarge) {
		t.Errorf("size limit: have %v, want ErrDecompressedTooLarge", err)
	}

	// A declared 10⁹ rows is refused without allocating for them.
	var m0, m1 runtime.MemStats
	runtime.ReadMemStats(&m0)
	_, _, err = Open(fixture("gaia_rows_bomb.csv"), ReadOptions{})
	runtime.ReadMemStats(&m1)
	if !errors.Is(err, ErrTooManyRows) {
		t.Errorf("declared rows: have %v", err)
	}
	if d := m1.TotalAlloc - m0.TotalAlloc; d > 8<<20 {
		t.Errorf("declared rows: allocated %d bytes before refusing", d)
	}
}

func TestDelimitedDetails(t *testing.T) {
	// A UTF-8 byte-order mark before the header is ignored [pub: Unicode §23.8].
	s, rep, err := Read(strings.NewReader("\xef\xbb\xbfra;dec;vmag\n1;2;3\n"), "bom.txt", ReadOptions{})
	if err != nil || rep.Format != FormatCSV || s.Len() != 1 {
		t.Fatalf("BOM + semicolons: %v %+v", err, rep)
	}
	// A guessed id column holding names is not used; rows are numbered [cp: documented rule].
	s, _, err = Read(strings.NewReader("id,ra,dec,vmag\nHD 1,1,2,3\nHD 2,4,5,6\n"), "ids.csv", ReadOptions{})
	if err != nil || s.ID[0] != 1 || s.ID[1] != 2 {
		t.Fatalf("guessed non-integer id: %v %v", err, s)
	}
	// The same column mapped explicitly must hold integers.
	_, _, err = Read(strings.NewReader("id,ra,dec,vmag\nHD 1,1,2,3\n"), "ids.csv", ReadOptions{Columns: ColumnMap{ID: "id"}})
	var pe *ParseError
	if !errors.Is(err, ErrNotNumber) || !errors.As(err, &pe) || pe.Line != 2 || pe.Field != "id" {
		t.Errorf("mapped non-integer id: have %v", err)
	}
	// After the first row the guessed column is strict.
	_, _, err = Read(strings.NewReader("id,ra,dec,vmag\n1,1,2,3\nx,4,5,6\n"), "ids.csv", ReadOptions{})
	if !errors.As(err, &pe) || pe.Line != 3 {
		t.Errorf("non-integer id on row 2: have %v", err)
	}
}

func TestEpochPropagation(t *testing.T) {
	// pmDec = 1000 mas/yr over 3600 yr = 1° along the tangent plane: the
	// linear model gives δ = atan(π/180) [cp: tangent-plane geometry].
	in := "ra,dec,vmag,pmra,pmdec\n0,0,1,0,1000\n90,0,1,0,0\n"
	s, rep, err := Read(strings.NewReader(in), "pm.csv", ReadOptions{Epoch: 5600})
	if err != nil {
		t.Fatal(err)
	}
	want := math.Atan(math.Pi/180) * 180 / math.Pi
	if st := s.At(0); !scalar.EqualWithinAbs(st.Dec, want, 1e-5) || !scalar.EqualWithinAbs(st.RA, 0, 1e-6) {
		t.Errorf("propagated: have RA %v Dec %v, want 0, %v", st.RA, st.Dec, want)
	}
	if st := s.At(1); !scalar.EqualWithinAbs(st.RA, 90, 1e-5) || !scalar.EqualWithinAbs(st.Dec, 0, 1e-6) {
		t.Errorf("star without proper motion moved: %v %v", st.RA, st.Dec)
	}
	if s.Epoch != 5600 || !rep.Propagated {
		t.Errorf("epoch: have %v propagated %v", s.Epoch, rep.Propagated)
	}
	// Hipparcos fixture to J2000: 8.75 yr × (100, −50) mas/yr ≈ (0.875″, −0.4375″) [cp].
	h, _, err := Open(fixture("hip_main_good.dat"), ReadOptions{Epoch: 2000})
	if err != nil {
		t.Fatal(err)
	}
	st := h.At(0)
	dra := (st.RA - 123.45678901) * math.Cos(st.Dec*math.Pi/180) * 3.6e6
	ddec := (st.Dec + 12.3456789) * 3.6e6
	if !scalar.EqualWithinAbs(dra, 875, 30) || !scalar.EqualWithinAbs(ddec, -437.5, 30) {
		t.Errorf("Hipparcos → J2000: moved (%.1f, %.1f) mas, want ≈ (875, −437.5) within float32 resolution", dra, ddec)
	}
	if _, _, err := Read(strings.NewReader(in), "pm.csv", ReadOptions{Epoch: math.NaN()}); err == nil {
		t.Error("NaN epoch accepted")
	}
}

func TestFind(t *testing.T) {
	s, _, err := Open(fixture("bsc5_good.dat"), ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		q    string
		row  int
		want bool
	}{
		{"HR 9201", 0, true}, {"hr9202", 1, true}, {"9205", 2, true}, {"  7 kap  TST ", 0, true},
		{"Kap Tst", 0, true}, {"7 Tst", 0, true}, {"HIP 9201", 0, false}, {"HR 1", 0, false},
		{"", 0, false}, {"Lam Tst", 0, false},
	}
	for _, c := range cases {
		i, ok := s.Find(c.q)
		if ok != c.want || (ok && i != c.row) {
			t.Errorf("Find(%q): have %d,%v want %d,%v [cp: fixture rows]", c.q, i, ok, c.row, c.want)
		}
	}
	h, _, err := Open(fixture("hip_main_good.dat"), ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if i, ok := h.Find("HIP 130002"); !ok || i != 1 {
		t.Errorf("Find(HIP 130002): have %d,%v", i, ok)
	}
	if _, ok := h.Find("HR 130002"); ok {
		t.Error("HR prefix matched a Hipparcos catalogue")
	}
}

func TestParseFormat(t *testing.T) {
	for f := FormatAuto; f <= FormatCache; f++ {
		g, err := ParseFormat(f.String())
		if err != nil || g != f {
			t.Errorf("ParseFormat(%q): have %v, %v", f.String(), g, err)
		}
	}
	if _, err := ParseFormat("fits"); err == nil {
		t.Error("ParseFormat(fits) accepted")
	}
}
