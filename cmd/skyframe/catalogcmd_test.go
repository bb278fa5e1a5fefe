package main

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"net/http"
	"net/http/httptest"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/skyframe/skyframe/catalog"
)

// fixture is a hand-written BSC5-layout file (testdata/catalogs/README.md).
var fixture = filepath.Join("..", "..", "testdata", "catalogs", "bsc5_good.dat")

// TestCatalogInspectPackRoundTrip: inspect reports what the reader kept, and
// pack writes a cache that loads back to identical stars, sorted by V.
func TestCatalogInspectPackRoundTrip(t *testing.T) {
	want, rep, err := catalog.Open(fixture, catalog.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	out, errs, code := runCmd(t, "catalog", "inspect", fixture)
	if code != 0 {
		t.Fatalf("inspect: exit %d: %s", code, errs)
	}
	for _, s := range []string{"format:      bsc5", "stars kept:", "rows skipped:"} {
		if !strings.Contains(out, s) {
			t.Errorf("inspect output lacks %q:\n%s", s, out)
		}
	}
	if !strings.Contains(out, "stars kept:  "+strconv.Itoa(rep.Rows)) {
		t.Errorf("inspect does not report %d stars kept:\n%s", rep.Rows, out)
	}
	dst := filepath.Join(t.TempDir(), "c.skyc")
	if _, errs, code := runCmd(t, "catalog", "pack", fixture, "-o", dst); code != 0 {
		t.Fatalf("pack: exit %d: %s", code, errs)
	}
	got, _, err := catalog.Open(dst, catalog.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	want = catalog.SortByV(want) // pack writes the canonical order
	if got.Len() != want.Len() {
		t.Fatalf("cache has %d stars, text %d", got.Len(), want.Len())
	}
	for i := 0; i < want.Len(); i++ {
		if !sameStar(got.At(i), want.At(i)) {
			t.Errorf("row %d: cache %+v, text %+v", i, got.At(i), want.At(i))
		}
	}
}

// sameStar compares two rows field by field, NaN equal to NaN.
func sameStar(a, b catalog.Star) bool {
	eq := func(x, y float64) bool { return x == y || (x != x && y != y) }
	return a.ID == b.ID && a.Name == b.Name && eq(a.RA, b.RA) && eq(a.Dec, b.Dec) && eq(a.Dist, b.Dist) &&
		eq(a.Vmag, b.Vmag) && eq(a.Teff, b.Teff) && eq(a.BV, b.BV) && a.Flags == b.Flags && eq(a.RV, b.RV)
}

// TestCatalogFetchLoopback downloads a gzip BSC5-layout file from a loopback
// test server (never the network), verifies it and writes it atomically.
// The file has the published V/50 layout (v50Like) but not its bytes, so
// it is pinned with --sha256 as another edition would be.
func TestCatalogFetchLoopback(t *testing.T) {
	_, gzb := v50Like(t)
	gz := bytes.NewBuffer(gzb)
	sum := sha256.Sum256(gzb)
	srv := httptest.NewServer(http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		if r.URL.Path != "/V/50/catalog.gz" {
			http.NotFound(w, r)
			return
		}
		w.Write(gz.Bytes())
	}))
	defer srv.Close()
	dir := t.TempDir()
	dst := filepath.Join(dir, "bsc5.dat.gz")
	out, errs, code := runCmd(t, "catalog", "fetch", "bsc5", "--url", srv.URL+"/V/50/catalog.gz", "-o", dst, "--sha256", hex.EncodeToString(sum[:]))
	if code != 0 {
		t.Fatalf("fetch: exit %d: %s", code, errs)
	}
	if strings.TrimSpace(out) != dst {
		t.Errorf("fetch printed %q, want the path %q", out, dst)
	}
	if got, _ := os.ReadFile(dst); !bytes.Equal(got, gz.Bytes()) {
		t.Errorf("fetched file differs from what the server sent")
	}
	// A wrong address fails, leaving no file.
	bad := filepath.Join(dir, "missing.dat.gz")
	if _, _, code := runCmd(t, "catalog", "fetch", "bsc5", "--url", srv.URL+"/nothing", "-o", bad); code == 0 {
		t.Errorf("fetch of a 404 succeeded")
	}
	if ents, _ := os.ReadDir(dir); len(ents) != 1 {
		t.Errorf("after a failed fetch the directory holds %d entries, want only the first download", len(ents))
	}
	if _, _, code := runCmd(t, "catalog", "fetch", "nosuch"); code != exitUsage {
		t.Errorf("unknown catalogue: exit %d, want %d", code, exitUsage)
	}
}

// --column and a plan's catalogue.columns go through one parser
// (catalog.ParseColumns / ColumnMap.Set): distance= is dist, and a Gaia
// column is refused with the same message on the command line and in a
// plan (at parse time, with its line).
func TestColumnMapOneParser(t *testing.T) {
	dir := t.TempDir()
	csv := filepath.Join(dir, "t.csv")
	if err := os.WriteFile(csv, []byte("id,ra,dec,V,BV,D\n1,10,20,3,0.6,5\n2,30,-40,4,1.0,12\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, f := range []string{"dist", "distance"} {
		out, errs, code := runCmd(t, "stars", "--catalog", csv, "--column", "vmag=V,bv=BV,"+f+"=D", "--speed", "0")
		if code != exitOK || !strings.Contains(out, ",5,") || !strings.Contains(out, ",12,") {
			t.Errorf("--column %s=D: status %d, distances not read:\n%s%s", f, code, out, errs)
		}
	}
	_, errs, code := runCmd(t, "stars", "--catalog", csv, "--column", "vmag=V,g=G")
	if code != exitUsage || !strings.Contains(errs, catalog.ErrGaiaColumn.Error()) {
		t.Errorf("--column g=G: status %d, %q", code, errs)
	}
	plan := filepath.Join(dir, "plan.toml")
	body := "[catalogue]\npath = \"t.csv\"\n[catalogue.columns]\nvmag = \"V\"\ng = \"G\"\n[[leg]]\nkind = \"cruise\"\nship_years = 1\n[show]\nseconds = 1\n"
	if err := os.WriteFile(plan, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
	_, errs, code = runCmd(t, "flight", plan, "--dry-run")
	if code != exitUsage || !strings.Contains(errs, catalog.ErrGaiaColumn.Error()) || !strings.Contains(errs, "plan.toml:5") {
		t.Errorf("plan catalogue.columns.g: status %d, %q", code, errs)
	}
}
