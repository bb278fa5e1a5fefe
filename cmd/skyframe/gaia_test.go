package main

import (
	"bytes"
	"compress/gzip"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/skyframe/skyframe/catalog"
)

// gaiaShard is the catalog package's invented Gaia DR3 shard in the
// archive's ECSV layout (every row made up).
var gaiaShard = filepath.Join("..", "..", "catalog", "testdata", "gaia_dr3_shard.ecsv")

// splitShard writes the shard as three gzipped parts in a directory and
// as one plain file, and returns both.
func splitShard(t *testing.T) (dir, whole string) {
	t.Helper()
	b, err := os.ReadFile(gaiaShard)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.SplitAfter(string(b), "\n")
	h := 0
	for strings.HasPrefix(lines[h], "#") {
		h++
	}
	head, rows := strings.Join(lines[:h+1], ""), lines[h+1:]
	dir = t.TempDir()
	for i, part := range [][]string{rows[:3], rows[3:6], rows[6:]} {
		var buf bytes.Buffer
		zw := gzip.NewWriter(&buf)
		zw.Write([]byte(head + strings.Join(part, "")))
		zw.Close()
		if err := os.WriteFile(filepath.Join(dir, "GaiaSource_00000"+string(rune('0'+i))+".csv.gz"), buf.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	whole = filepath.Join(t.TempDir(), "all.ecsv")
	if err := os.WriteFile(whole, []byte(head+strings.Join(rows, "")), 0o644); err != nil {
		t.Fatal(err)
	}
	return dir, whole
}

// TestPackManyFilesEqualsConcatenation: catalog pack of a directory of
// gzipped ECSV shards, of a glob over them and of the concatenated table
// give the same stars, sorted by V (a version-2 cache), and a --max-v cut
// keeps exactly the stars of the full pack with V ≤ the cut; still reads
// the directory as --catalog.
func TestPackManyFilesEqualsConcatenation(t *testing.T) {
	dir, whole := splitShard(t)
	out := t.TempDir()
	packs := map[string][]string{
		"dir":   {dir},
		"glob":  {filepath.Join(dir, "GaiaSource_*.csv.gz")},
		"whole": {whole},
		"cut":   {dir, "--max-v", "12"},
	}
	got := map[string]*catalog.Stars{}
	for name, args := range packs {
		dst := filepath.Join(out, name+".skyc")
		if _, errs, code := runCmd(t, append(append([]string{"catalog", "pack"}, args...), "-o", dst)...); code != 0 {
			t.Fatalf("pack %s: exit %d: %s", name, code, errs)
		}
		s, _, err := catalog.Open(dst, catalog.ReadOptions{})
		if err != nil {
			t.Fatal(err)
		}
		if b, _ := os.ReadFile(dst); b[7] != 2 {
			t.Errorf("pack %s: cache version %d, want 2 (sorted)", name, b[7])
		}
		s.Source = ""
		got[name] = s
	}
	for _, name := range []string{"dir", "glob"} {
		a, b := got[name], got["whole"]
		if a.Len() != b.Len() {
			t.Fatalf("%s: %d stars, concatenation %d", name, a.Len(), b.Len())
		}
		for i := 0; i < a.Len(); i++ {
			if !sameStar(a.At(i), b.At(i)) {
				t.Errorf("%s row %d: %+v vs %+v", name, i, a.At(i), b.At(i))
			}
		}
	}
	full, cut := got["whole"], got["cut"]
	k := 0
	for i := 0; i < full.Len(); i++ {
		if full.Vmag[i] <= 12 {
			if k >= cut.Len() || !sameStar(full.At(i), cut.At(k)) {
				t.Fatalf("cut: row %d of the full pack missing", i)
			}
			k++
		}
	}
	if k != cut.Len() || k == 0 || k == full.Len() {
		t.Errorf("cut kept %d, want %d (of %d)", cut.Len(), k, full.Len())
	}
	png := filepath.Join(out, "x.png")
	if _, errs, code := runCmd(t, "still", "--size", "32x32", "--catalog", dir, "-o", png); code != 0 {
		t.Fatalf("still --catalog DIR: exit %d: %s", code, errs)
	}
}

// TestPackManyFilesBadInput: a directory holding a file of another format
// or a shard with a bad row fails with status 2 naming that file and line;
// a glob matching nothing says so.
func TestPackManyFilesBadInput(t *testing.T) {
	dir, _ := splitShard(t)
	notes := filepath.Join(dir, "notes.txt")
	os.WriteFile(notes, []byte("Downloaded from the archive.\n"), 0o644)
	code, msg := hostileRun(t, "catalog", "pack", dir, "-o", filepath.Join(t.TempDir(), "c.skyc"))
	if code != exitUsage || !strings.Contains(msg, notes+":1") {
		t.Errorf("other format: status %d, %q; want 2 naming %s:1", code, msg, notes)
	}
	os.Remove(notes)
	bad := filepath.Join(dir, "GaiaSource_000009.csv")
	b, _ := os.ReadFile(gaiaShard)
	os.WriteFile(bad, bytes.Replace(b, []byte(",12.5,0.02,"), []byte(",12.5x,0.02,"), 1), 0o644)
	code, msg = hostileRun(t, "catalog", "pack", dir, "-o", filepath.Join(t.TempDir(), "c.skyc"))
	if code != exitUsage || !strings.Contains(msg, bad+":29") || !strings.Contains(msg, "ra") {
		t.Errorf("bad row: status %d, %q; want 2 naming %s:29, field ra", code, msg, bad)
	}
	pat := filepath.Join(t.TempDir(), "GaiaSource_*.csv.gz")
	code, msg = hostileRun(t, "still", "--size", "16x16", "--catalog", pat, "-o", filepath.Join(t.TempDir(), "x.png"))
	if code != exitUsage || !strings.Contains(msg, "no file matches") || !strings.Contains(msg, pat) {
		t.Errorf("empty glob: status %d, %q", code, msg)
	}
}
