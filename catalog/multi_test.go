package catalog

import (
	"bytes"
	"compress/gzip"
	"context"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// shardPath is an invented Gaia DR3 gaia_source shard in the archive's
// ECSV layout (ECSV 1.0, Astropy APE 6: "# %ECSV 1.0", "# ---", a YAML
// header in "# " lines naming delimiter and datatypes, then the column
// names and comma-separated rows; "null" for missing values and quoted
// designations as the archive writes them). Every row is made up.
const shardPath = "testdata/gaia_dr3_shard.ecsv"

// shardParts splits the fixture into its header (through the column-name
// line) and its data lines.
func shardParts(t *testing.T) (head string, rows []string) {
	t.Helper()
	b, err := os.ReadFile(shardPath)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.SplitAfter(string(b), "\n")
	for i, ln := range lines {
		if !strings.HasPrefix(ln, "#") {
			return strings.Join(lines[:i+1], ""), lines[i+1:]
		}
	}
	t.Fatal("fixture has no column-name line")
	return "", nil
}

func writeFile(t *testing.T, path, text string, gz bool) {
	t.Helper()
	data := []byte(text)
	if gz {
		var buf bytes.Buffer
		zw := gzip.NewWriter(&buf)
		zw.Write(data)
		zw.Close()
		data = buf.Bytes()
	}
	if err := os.WriteFile(path, data, 0o644); err != nil {
		t.Fatal(err)
	}
}

// TestGaiaECSVShard reads the shard gzipped, as the archive serves it:
// detected as Gaia (its header is behind 27 lines of YAML), positions at
// J2016.0, the quoted designation not taken for the id (source_id is),
// null fields missing, V from G and BP−RP by Riello et al. (2021).
func TestGaiaECSVShard(t *testing.T) {
	head, rows := shardParts(t)
	p := filepath.Join(t.TempDir(), "GaiaSource_000000-000001.csv.gz")
	writeFile(t, p, head+strings.Join(rows, ""), true)
	s, rep, err := Open(p, ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Format != FormatGaiaCSV || !rep.Compressed || s.Epoch != 2016 {
		t.Fatalf("format %v compressed %v epoch %v; want gaia, gzip, 2016", rep.Format, rep.Compressed, s.Epoch)
	}
	if s.Len() != 7 || rep.Skipped != 1 || rep.Skips[0].Reason != "no G magnitude" || rep.Skips[0].FirstLine != 33 {
		t.Fatalf("%d stars, skips %+v; want 7 and one row without G at line 33", s.Len(), rep.Skips)
	}
	if s.ID[0] != 1000000000000001 || s.ID[6] != 1000000000000008 {
		t.Errorf("ids %d … %d: want the source_id values", s.ID[0], s.ID[6])
	}
	// Row 1: G = 9.75, BP−RP = 0.9: G − V = −0.02704 + 0.01424·0.9 −
	// 0.2156·0.81 + 0.01426·0.729 = −0.179 (Riello et al. 2021, A&A 649,
	// A3, Table C.2 [mem]), so V = 9.929; parallax 4.5 mas: 222.2 pc;
	// teff_gspphot 5600 K taken from the catalogue.
	if v := float64(s.Vmag[0]); math.Abs(v-9.929) > 0.001 {
		t.Errorf("V = %v, want 9.929", v)
	}
	if d := float64(s.Dist[0]); math.Abs(d-1000/4.5) > 1e-3 {
		t.Errorf("distance %v pc, want 222.2", d)
	}
	if s.Teff[0] != 5600 || s.Flags[0]&FlagTeffFromCatalogue == 0 {
		t.Errorf("Teff %v flags %v: want 5600 K from the catalogue", s.Teff[0], s.Flags[0])
	}
	// Row 2: null parallax, proper motion, RV and Teff.
	if s.Flags[1]&FlagNoDistance == 0 || !math.IsInf(float64(s.Dist[1]), 1) || s.PMRA[1] != 0 || !math.IsNaN(float64(s.RV[1])) {
		t.Errorf("row 2: dist %v flags %v pmra %v rv %v: want no distance, no motion", s.Dist[1], s.Flags[1], s.PMRA[1], s.RV[1])
	}
	// Row 3: no BP−RP: the solar colour for G → V and DefaultTeff.
	if s.Flags[2]&FlagNoColour == 0 || s.Teff[2] != DefaultTeff || float64(s.Vmag[2]) != float64(float32(VFromGaia(17.5, SolarBPRP))) {
		t.Errorf("row 3: flags %v Teff %v V %v: want no colour", s.Flags[2], s.Teff[2], s.Vmag[2])
	}
	if s.RV[5] != 35.5 || s.PMDec[3] != -80.5 {
		t.Errorf("rv %v pmdec %v", s.RV[5], s.PMDec[3])
	}
}

// TestOpenFilesEqualsConcatenation: the shard split into three files (one
// plain, two gzip) in a directory, read with OpenFiles on 1 and 3 workers,
// gives the catalogue of the concatenated table, and packing either gives
// the same cache bytes.
func TestOpenFilesEqualsConcatenation(t *testing.T) {
	head, rows := shardParts(t)
	dir := t.TempDir()
	writeFile(t, filepath.Join(dir, "part-a.ecsv"), head+strings.Join(rows[:3], ""), false)
	writeFile(t, filepath.Join(dir, "part-b.ecsv.gz"), head+strings.Join(rows[3:5], ""), true)
	writeFile(t, filepath.Join(dir, "part-c.ecsv.gz"), head+strings.Join(rows[5:], ""), true)
	whole := filepath.Join(t.TempDir(), "all.ecsv")
	writeFile(t, whole, head+strings.Join(rows, ""), false)
	want, wrep, err := Open(whole, ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	paths, err := ExpandInputs([]string{dir})
	if err != nil || len(paths) != 3 || filepath.Base(paths[1]) != "part-b.ecsv.gz" {
		t.Fatalf("ExpandInputs: %v %v", paths, err)
	}
	for _, w := range []int{1, 3} {
		var calls, files int
		got, rep, err := OpenFiles(context.Background(), paths, ReadOptions{}, FilesOptions{Workers: w,
			Progress: func(done, total int64, f, tf int) { calls++; files = f }})
		if err != nil {
			t.Fatal(err)
		}
		if rep.Rows != wrep.Rows || rep.Skipped != wrep.Skipped || len(rep.Files) != 3 || calls == 0 || files != 3 {
			t.Errorf("workers %d: rows %d skipped %d files %d progress %d/%d; want %d, %d, 3", w, rep.Rows, rep.Skipped, len(rep.Files), calls, files, wrep.Rows, wrep.Skipped)
		}
		if sk := rep.Skips[0]; sk.File != paths[1] || sk.FirstLine != 30 {
			t.Errorf("skip %+v: want the row without G named in part-b at line 30", sk)
		}
		got.Source = want.Source
		var a, b bytes.Buffer
		if err := WriteCache(&a, want); err != nil {
			t.Fatal(err)
		}
		if err := WriteCache(&b, got); err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(a.Bytes(), b.Bytes()) {
			t.Errorf("workers %d: packed caches differ (%d and %d bytes)", w, a.Len(), b.Len())
		}
	}
	// A glob over the same files, listed out of order, reads them in name
	// order.
	g, err := ExpandInputs([]string{filepath.Join(dir, "part-[cb]*"), filepath.Join(dir, "part-a.ecsv")})
	if err != nil || len(g) != 3 || filepath.Base(g[0]) != "part-b.ecsv.gz" || filepath.Base(g[2]) != "part-a.ecsv" {
		t.Errorf("glob then file: %v %v", g, err)
	}
}

// TestOpenFilesMagnitudeCut: MaxV drops the fainter stars while reading and
// counts them; the kept stars are those of the full read with V ≤ MaxV.
func TestOpenFilesMagnitudeCut(t *testing.T) {
	full, _, err := Open(shardPath, ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	const cut = 12.0
	s, rep, err := OpenFiles(context.Background(), []string{shardPath}, ReadOptions{MaxV: cut}, FilesOptions{})
	if err != nil {
		t.Fatal(err)
	}
	var want []int64
	for i, v := range full.Vmag {
		if float64(v) <= cut {
			want = append(want, full.ID[i])
		}
	}
	if len(want) == full.Len() || len(want) == 0 {
		t.Fatalf("cut %v keeps %d of %d: the test needs stars on both sides", cut, len(want), full.Len())
	}
	if s.Len() != len(want) {
		t.Fatalf("kept %d, want %d", s.Len(), len(want))
	}
	for i := range want {
		if s.ID[i] != want[i] {
			t.Errorf("row %d: id %d, want %d", i, s.ID[i], want[i])
		}
	}
	cutCount := 0
	for _, sk := range rep.Skips {
		if sk.Reason == skipCut {
			cutCount = sk.Count
		}
	}
	if cutCount != full.Len()-len(want) {
		t.Errorf("%d counted as cut, want %d", cutCount, full.Len()-len(want))
	}
}

// TestOpenFilesBadInput: a file of another format, a corrupt row and a
// truncated gzip shard are each named with their line; a pattern that
// matches nothing says so.
func TestOpenFilesBadInput(t *testing.T) {
	head, rows := shardParts(t)
	cases := []struct {
		name, file, text string
		gz               bool
		line             int
		want             error
	}{
		{"other format", "notes.txt", "Shards downloaded from the archive.\nSee the data model.\n", false, 1, ErrUnknownFormat},
		{"generic table", "extra.csv", "ra,dec,vmag\n10,20,5\n", false, 1, ErrMixedFormats},
		{"bad row", "part-z.ecsv", head + rows[0] + strings.Replace(rows[1], "200.125", "2O0.125", 1), false, 30, ErrNotNumber},
		{"short row", "part-z.ecsv", head + rows[0] + "375316653866487564,\"Gaia DR3 9\",9\n", false, 30, ErrFieldCount},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			writeFile(t, filepath.Join(dir, "part-a.ecsv.gz"), head+strings.Join(rows[:4], ""), true)
			writeFile(t, filepath.Join(dir, "part-b.ecsv.gz"), head+strings.Join(rows[4:], ""), true)
			bad := filepath.Join(dir, c.file)
			writeFile(t, bad, c.text, c.gz)
			paths, err := ExpandInputs([]string{dir})
			if err != nil {
				t.Fatal(err)
			}
			_, _, err = OpenFiles(context.Background(), paths, ReadOptions{}, FilesOptions{Workers: 2})
			var pe *ParseError
			if !errors.As(err, &pe) || pe.File != bad || pe.Line != c.line || !errors.Is(err, c.want) {
				t.Fatalf("got %v; want %v at %s:%d", err, c.want, bad, c.line)
			}
		})
	}
	t.Run("truncated gzip", func(t *testing.T) {
		dir := t.TempDir()
		var buf bytes.Buffer
		zw := gzip.NewWriter(&buf)
		zw.Write([]byte(head + strings.Join(rows, "")))
		zw.Close()
		bad := filepath.Join(dir, "part-b.ecsv.gz")
		if err := os.WriteFile(bad, buf.Bytes()[:buf.Len()-40], 0o644); err != nil {
			t.Fatal(err)
		}
		_, _, err := OpenFiles(context.Background(), []string{shardPath, bad}, ReadOptions{}, FilesOptions{})
		var pe *ParseError
		if !errors.As(err, &pe) || pe.File != bad || !errors.Is(err, ErrTruncated) {
			t.Fatalf("got %v; want a truncated-gzip error naming %s", err, bad)
		}
	})
	t.Run("no match", func(t *testing.T) {
		pat := filepath.Join(t.TempDir(), "GaiaSource_*.csv.gz")
		_, err := ExpandInputs([]string{pat})
		if !errors.Is(err, ErrNoMatch) || !strings.Contains(err.Error(), pat) {
			t.Fatalf("got %v; want ErrNoMatch naming %s", err, pat)
		}
		_, err = ExpandInputs([]string{t.TempDir()})
		if !errors.Is(err, ErrNoMatch) {
			t.Fatalf("empty directory: got %v", err)
		}
	})
}

// TestECSVSpaceDelimited: an ECSV table without a delimiter key is
// space-separated (the ECSV 1.0 default), quoted values may hold spaces.
func TestECSVSpaceDelimited(t *testing.T) {
	text := "# %ECSV 1.0\n# ---\n# datatype:\n# - {name: name, datatype: string}\n# - {name: ra, datatype: float64}\n" +
		"# - {name: dec, datatype: float64}\n# - {name: vmag, datatype: float64}\n# schema: astropy-2.0\n" +
		"name ra dec vmag\n\"Alpha Invented\" 10.5 -20.25 3.5\nBeta 200 45 null\nGamma 1 2 4.5\n"
	s, rep, err := Read(strings.NewReader(text), "table.ecsv", ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Format != FormatCSV || s.Len() != 2 || s.Names[0] != "Alpha Invented" || s.Vmag[1] != 4.5 || rep.Skipped != 1 {
		t.Fatalf("format %v, %d stars, names %v, skipped %d", rep.Format, s.Len(), s.Names, rep.Skipped)
	}
	bad := strings.Replace(text, "# datatype:", "# delimiter: ';'\n# datatype:", 1)
	_, _, err = Read(strings.NewReader(bad), "table.ecsv", ReadOptions{})
	var pe *ParseError
	if !errors.As(err, &pe) || pe.Line != 3 || !errors.Is(err, ErrUnknownFormat) {
		t.Fatalf("delimiter ';': got %v, want an error at line 3", err)
	}
}
