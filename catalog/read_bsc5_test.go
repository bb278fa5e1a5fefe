package catalog

import (
	"bufio"
	"bytes"
	"compress/gzip"
	"github.com/skyframe/skyframe/internal/sharedcat"
	"math"
	"os"
	"strconv"
	"testing"
)

// sharedBSC5 finds ../shared/catalogs/bsc5.dat by walking up from the
// package directory (sharedcat.BSC5: fails under CI=true when absent, skips
// elsewhere).
func sharedBSC5(t testing.TB) string {
	return sharedcat.BSC5(t)
}

// countBSC5 counts records and V limits by its own simple byte slicing of
// bytes 103–107, independent of the reader.
func countBSC5(t *testing.T, path string) (records, le60, le65 int) {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		ln := sc.Bytes()
		if len(bytes.TrimSpace(ln)) == 0 {
			continue
		}
		records++
		if len(ln) < 107 {
			continue
		}
		v, err := strconv.ParseFloat(string(bytes.TrimSpace(ln[102:107])), 64)
		if err != nil {
			continue
		}
		if v <= 6.0 {
			le60++
		}
		if v <= 6.5 {
			le65++
		}
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	return
}

func TestBSC5RealCatalogue(t *testing.T) {
	path := sharedBSC5(t)
	s, rep, err := Open(path, ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if rep.Format != FormatBSC5 || s.Format != "bsc5" {
		t.Fatalf("format: have %v/%q, want bsc5", rep.Format, s.Format)
	}
	// 9096 records [pub: shared/catalogs/README.md].
	if got := rep.Rows + rep.Skipped; got != 9096 {
		t.Errorf("rows+skipped: have %d, want 9096 (rows %d, skips %+v)", got, rep.Rows, rep.Skips)
	}
	records, le60, le65 := countBSC5(t, path)
	if records != 9096 {
		t.Errorf("independent record count: have %d, want 9096", records)
	}
	// Brightest: HR 2491, V = −1.46, B−V = 0.00 [pub: README beside bsc5.dat].
	bright := 0
	for i := range s.Vmag {
		if s.Vmag[i] < s.Vmag[bright] {
			bright = i
		}
	}
	st := s.At(bright)
	if st.ID != 2491 || math.Abs(st.Vmag+1.46) > 1e-6 || math.Abs(st.BV) > 1e-6 {
		t.Errorf("brightest: have HR %d V=%v B−V=%v, want HR 2491 V=−1.46 B−V=0.00", st.ID, st.Vmag, st.BV)
	}
	if i, ok := s.Find("HR 2491"); !ok || i != bright {
		t.Errorf("Find(HR 2491): have %d,%v want %d,true", i, ok, bright)
	}
	if i, ok := s.Find("alp cma"); !ok || i != bright {
		t.Errorf("Find(alp cma): have %d,%v want %d,true", i, ok, bright)
	}
	var n60, n65 int
	for _, v := range s.Vmag {
		if v <= 6.0 {
			n60++
		}
		if v <= 6.5 {
			n65++
		}
	}
	// Counts from the file itself [cp: independent parse above].
	if n60 != le60 || n65 != le65 {
		t.Errorf("V ≤ 6.0 / 6.5: reader %d/%d, file %d/%d", n60, n65, le60, le65)
	}
	t.Logf("BSC5: %d stars, V≤6.0: %d, V≤6.5: %d, with distance %d, report %+v", s.Len(), n60, n65, rep.Dist.N, rep.Skips)
	// Sirius: parallax +.375" → 2.667 pc [pub: bsc5.dat byte 162–166 of HR 2491].
	if d := s.Dist[bright]; math.Abs(float64(d)-1/0.375) > 1e-4 {
		t.Errorf("Sirius distance: have %v pc, want %v", d, 1/0.375)
	}

	// gzip round trip: the same bytes compressed read to identical stars.
	raw, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var zb bytes.Buffer
	zw := gzip.NewWriter(&zb)
	zw.Write(raw)
	zw.Close()
	sz, rz, err := Read(&zb, "bsc5.dat.gz", ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if !rz.Compressed {
		t.Error("gzip input not reported as compressed")
	}
	sz.Source = s.Source
	if d := diffStars(s, sz); d != "" {
		t.Errorf("gzip round trip: %s", d)
	}
	// cache round trip
	var cb bytes.Buffer
	if err := WriteCache(&cb, s); err != nil {
		t.Fatal(err)
	}
	sc, err := ReadCache(bytes.NewReader(cb.Bytes()))
	if err != nil {
		t.Fatal(err)
	}
	if d := diffStars(s, sc); d != "" {
		t.Errorf("cache round trip: %s", d)
	}
}
