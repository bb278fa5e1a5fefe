package catalog

import (
	"bytes"
	"encoding/csv"
	"errors"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"testing"

	"github.com/parquet-go/parquet-go"
)

// csvToParquet converts a CSV fixture (comment lines dropped) into a
// Parquet table with the same columns: those named in ints as optional
// INT64, those in texts as optional strings, the rest as optional DOUBLE
// holding strconv.ParseFloat of the text; a blank field becomes a null.
func csvToParquet(t *testing.T, csvText string, ints, texts []string) []byte {
	t.Helper()
	var lines []string
	for _, ln := range strings.Split(csvText, "\n") {
		if !strings.HasPrefix(ln, "#") {
			lines = append(lines, ln)
		}
	}
	recs, err := csv.NewReader(strings.NewReader(strings.Join(lines, "\n"))).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	kind := map[string]byte{}
	g := parquet.Group{}
	for _, h := range recs[0] {
		switch {
		case contains(ints, h):
			kind[h], g[h] = 'i', parquet.Optional(parquet.Leaf(parquet.Int64Type))
		case contains(texts, h):
			kind[h], g[h] = 's', parquet.Optional(parquet.String())
		default:
			kind[h], g[h] = 'd', parquet.Optional(parquet.Leaf(parquet.DoubleType))
		}
	}
	schema := parquet.NewSchema("table", g)
	idx := map[string]int{}
	for i, p := range schema.Columns() {
		idx[p[0]] = i
	}
	var buf bytes.Buffer
	w := parquet.NewWriter(&buf, schema)
	for _, rec := range recs[1:] {
		row := make(parquet.Row, len(rec))
		for j, h := range recs[0] {
			c, txt := idx[h], rec[j]
			var v parquet.Value
			switch {
			case txt == "":
				row[c] = parquet.Value{}.Level(0, 0, c)
				continue
			case kind[h] == 'i':
				n, err := strconv.ParseInt(txt, 10, 64)
				if err != nil {
					t.Fatal(err)
				}
				v = parquet.Int64Value(n)
			case kind[h] == 's':
				v = parquet.ByteArrayValue([]byte(txt))
			default:
				x, err := strconv.ParseFloat(txt, 64)
				if err != nil {
					t.Fatal(err)
				}
				v = parquet.DoubleValue(x)
			}
			row[c] = v.Level(0, 1, c)
		}
		if _, err := w.WriteRows([]parquet.Row{row}); err != nil {
			t.Fatal(err)
		}
	}
	if err := w.Close(); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

func contains(list []string, s string) bool {
	for _, x := range list {
		if x == s {
			return true
		}
	}
	return false
}

// TestParquetMatchesCSVAndCache: the Gaia and generic CSV fixtures, turned
// into Parquet tables holding the same numbers, read into the same stars
// (reflect.DeepEqual apart from the Source file name and, for the generic
// table, the Format name) with the same skips; the cache and the Stars
// layout of WriteParquet then restore those stars exactly.
func TestParquetMatchesCSVAndCache(t *testing.T) {
	cases := []struct {
		file        string
		opt         ReadOptions
		ints, texts []string
		skipRow     int // data row of the skipped star: Parquet's FirstLine
	}{
		{"gaia_good.csv", ReadOptions{}, []string{"source_id"}, nil, 3},
		{"generic_good.csv", ReadOptions{Columns: ColumnMap{ID: "star", RA: "alpha_h", RAHours: true, Dec: "delta", Vmag: "mag",
			BV: "colour", Parallax: "plx_mas", Name: "label"}}, []string{"star"}, []string{"label"}, 3},
	}
	for _, c := range cases {
		t.Run(c.file, func(t *testing.T) {
			fromCSV, repCSV, err := Open(fixture(c.file), c.opt)
			if err != nil {
				t.Fatal(err)
			}
			text, err := os.ReadFile(fixture(c.file))
			if err != nil {
				t.Fatal(err)
			}
			pq := csvToParquet(t, string(text), c.ints, c.texts)
			path := filepath.Join(t.TempDir(), "table.parquet")
			if err := os.WriteFile(path, pq, 0o644); err != nil {
				t.Fatal(err)
			}
			// Open reads in place; Read buffers the stream: both must agree.
			fromPQ, rep, err := Open(path, c.opt)
			if err != nil {
				t.Fatal(err)
			}
			viaRead, _, err := Read(bytes.NewReader(pq), path, c.opt)
			if err != nil {
				t.Fatal(err)
			}
			if !deepEqualStars(viaRead, fromPQ) {
				t.Fatal("Read and Open of the same Parquet file differ")
			}
			if rep.Format != FormatParquet {
				t.Errorf("Report.Format: have %v, want parquet", rep.Format)
			}
			// Same reasons and counts; Parquet has no lines, so FirstLine is
			// the data row where CSV gives the file line.
			wantSkips := append([]Skip(nil), repCSV.Skips...)
			for i := range wantSkips {
				wantSkips[i].FirstLine = c.skipRow
			}
			if !reflect.DeepEqual(rep.Skips, wantSkips) || rep.Rows != repCSV.Rows {
				t.Errorf("skips/rows: have %v/%d, want %v/%d", rep.Skips, rep.Rows, wantSkips, repCSV.Rows)
			}
			want := *fromCSV
			want.Source = path
			if c.file == "generic_good.csv" {
				want.Format = "parquet"
			}
			if !deepEqualStars(fromPQ, &want) {
				t.Fatalf("Parquet and CSV stars differ: %s\nhave %+v\nwant %+v", diffStars(fromPQ, &want), fromPQ, &want)
			}
			var cache bytes.Buffer
			if err := WriteCache(&cache, fromPQ); err != nil {
				t.Fatal(err)
			}
			fromCache, err := ReadCache(&cache)
			if err != nil {
				t.Fatal(err)
			}
			if !deepEqualStars(fromCache, fromPQ) {
				t.Fatalf("cache differs: %s", diffStars(fromCache, fromPQ))
			}
			var out bytes.Buffer
			if err := WriteParquet(&out, fromPQ); err != nil {
				t.Fatal(err)
			}
			back, _, err := Read(&out, "stars.parquet", ReadOptions{})
			if err != nil {
				t.Fatal(err)
			}
			if !deepEqualStars(back, fromPQ) {
				t.Fatalf("WriteParquet round trip differs: %s", diffStars(back, fromPQ))
			}
		})
	}
}

// deepEqualStars is reflect.DeepEqual with NaN equal to NaN (DeepEqual
// treats NaN as unequal to itself, and the BV and RV columns hold NaN).
func deepEqualStars(a, b *Stars) bool {
	return diffStars(a, b) == "" && reflect.DeepEqual(nanFree(a), nanFree(b))
}

// nanFree copies s with NaNs replaced by a fixed sentinel.
func nanFree(s *Stars) *Stars {
	c := *s
	fix := func(v []float32) []float32 {
		if v == nil {
			return nil
		}
		out := make([]float32, len(v))
		for i, x := range v {
			if x != x {
				x = -12345
			}
			out[i] = x
		}
		return out
	}
	c.X, c.Y, c.Z, c.Dist, c.Vmag, c.Teff, c.BV = fix(s.X), fix(s.Y), fix(s.Z), fix(s.Dist), fix(s.Vmag), fix(s.Teff), fix(s.BV)
	c.PMRA, c.PMDec, c.RV = fix(s.PMRA), fix(s.PMDec), fix(s.RV)
	return &c
}

// TestWriteParquetRoundTrip: random stars with every optional column,
// NaN colours, infinite distances and names survive WriteParquet → Open
// bit for bit, and so do stars without the optional columns.
func TestWriteParquetRoundTrip(t *testing.T) {
	full := randomStars(rand.New(rand.NewPCG(11, 12)), 20_000)
	bare := &Stars{Epoch: 2000, Source: "bare", Format: "csv"}
	for i := 0; i < 100; i++ {
		bare.Append(Star{ID: int64(i), RA: float64(i), Dec: 1, Dist: math.Inf(1), Vmag: 5, Teff: 5000, BV: math.NaN(),
			RV: math.NaN(), Flags: FlagNoDistance})
	}
	for _, s := range []*Stars{full, bare} {
		p := filepath.Join(t.TempDir(), "s.parquet")
		var b bytes.Buffer
		if err := WriteParquet(&b, s); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(p, b.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
		got, rep, err := Open(p, ReadOptions{})
		if err != nil {
			t.Fatal(err)
		}
		if !deepEqualStars(got, s) {
			t.Fatalf("%s: %s", s.Source, diffStars(got, s))
		}
		if rep.Rows != s.Len() || rep.Format != FormatParquet {
			t.Errorf("report: rows %d format %v, want %d parquet", rep.Rows, rep.Format, s.Len())
		}
	}
}

// TestParquetBadInput: broken files and bad values fail with the
// package's sentinels, naming the row and column like the CSV reader.
func TestParquetBadInput(t *testing.T) {
	good, err := os.ReadFile(fixture("gaia_good.csv"))
	if err != nil {
		t.Fatal(err)
	}
	nanRA := strings.Replace(string(good), "10.5,-20.25", "NaN,-20.25", 1)
	farDec := strings.Replace(string(good), "10.5,-20.25", "10.5,-95", 1)
	noBPRP := "source_id,ra,dec,parallax,phot_g_mean_mag\n1,2,3,4,5\n"
	tests := []struct {
		name  string
		data  []byte
		want  error
		field string
	}{
		{"garbage", []byte("PAR1 this is not a parquet file at all PAR1"), ErrCorrupt, ""},
		{"NaN ra", csvToParquet(t, nanRA, []string{"source_id"}, nil), ErrNotFinite, "ra"},
		{"dec out of range", csvToParquet(t, farDec, []string{"source_id"}, nil), ErrOutOfRange, "dec"},
		{"no bp_rp", csvToParquet(t, noBPRP, []string{"source_id"}, nil), ErrMissingColumn, "bp_rp"},
	}
	for _, tc := range tests {
		_, _, err := Read(bytes.NewReader(tc.data), tc.name+".parquet", ReadOptions{})
		var pe *ParseError
		if !errors.Is(err, tc.want) || !errors.As(err, &pe) || pe.Field != tc.field {
			t.Errorf("%s: have %v, want %v in field %q", tc.name, err, tc.want, tc.field)
		}
	}
	// A row limit below the footer's row count is refused up front.
	pq := csvToParquet(t, string(good), []string{"source_id"}, nil)
	if _, _, err := Read(bytes.NewReader(pq), "x.parquet", ReadOptions{MaxRows: 2}); !errors.Is(err, ErrTooManyRows) {
		t.Errorf("MaxRows 2: have %v, want ErrTooManyRows", err)
	}
	if f, err := ParseFormat("parquet"); err != nil || f != FormatParquet || f.String() != "parquet" {
		t.Errorf("ParseFormat(parquet): have %v, %v", f, err)
	}
}

// BenchmarkOpenParquet1M: Open on a WriteParquet file of 10⁶ stars.
func BenchmarkOpenParquet1M(b *testing.B) {
	p := writeStarsFile(b, "s.parquet", WriteParquet, bigStars(1_000_000))
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		s, _, err := Open(p, ReadOptions{})
		if err != nil || s.Len() != 1_000_000 {
			b.Fatal(err)
		}
	}
}

// BenchmarkOpenChunks1M reads a 10⁶-star cache file in 2¹⁸-row chunks.
func BenchmarkOpenChunks1M(b *testing.B) {
	p := writeStarsFile(b, "c.skyfcat", WriteCache, bigStars(1_000_000))
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		c, err := OpenChunks(p, 1<<18)
		if err != nil {
			b.Fatal(err)
		}
		rows := 0
		for {
			s, err := c.Next()
			if err != nil {
				break
			}
			rows += s.Len()
		}
		c.Close()
		if rows != 1_000_000 {
			b.Fatalf("%d rows", rows)
		}
	}
}
