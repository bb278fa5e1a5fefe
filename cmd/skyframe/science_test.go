package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/skyframe/skyframe/catalog"
)

func runArgs(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(context.Background(), args, &out, &errb)
	return code, out.String(), errb.String()
}

func TestScienceBadInput(t *testing.T) {
	dir := t.TempDir()
	cases := [][]string{
		{"census", "--speeds", ""},
		{"census", "--speeds", "0.5,1"},
		{"census", "--speeds", "-0.1"},
		{"census", "--speeds", "NaN"},
		{"census", "--speeds", "0.3,,0.5"},
		{"census", "--gammas", "0.5"},
		{"census", "--limit-mag", "NaN"},
		{"census", "--from", "0", "--to", "1"},
		{"census", "--from", "0.5", "--to", "0.2"},
		{"census", "--steps", "1"},
		{"census", "--speeds", "0.5", "--from", "0.1"},
		{"census", "--plot", filepath.Join(dir, "x.gif")},
		{"census", "--beaming", "d5"},
		{"curves", "--speeds", "", "--output", dir + "/"},
		{"curves", "--speeds", "0.99,1.5", "--output", dir + "/"},
		{"curves", "--gammas", "0.9", "--output", dir + "/"},
		{"curves", "--speeds", "0.5", "--gammas", "2", "--output", dir + "/"},
		{"curves", "--temps", "3000,-1", "--output", dir + "/"},
		{"curves", "--convention-speed", "1", "--output", dir + "/"},
		{"curves", "--dpi", "0", "--output", dir + "/"},
	}
	for _, args := range cases {
		code, _, errb := runArgs(t, args...)
		if code != exitUsage {
			t.Errorf("%q: exit %d, want %d (stderr %q)", args, code, exitUsage, errb)
		}
		if !strings.Contains(errb, "--") && !strings.Contains(errb, "give") {
			t.Errorf("%q: error %q does not name the flag", args, errb)
		}
	}
	if ents, _ := os.ReadDir(dir); len(ents) != 0 {
		t.Errorf("bad input left files: %v", ents)
	}
}

func TestCensusCommand(t *testing.T) {
	dir := t.TempDir()
	plot := filepath.Join(dir, "c.png")
	code, out, errb := runArgs(t, "census", "--speeds", "0,0.9", "--limit-mag", "5", "--plot", plot)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errb)
	}
	recs, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil || len(recs) != 3 {
		t.Fatalf("CSV: %v, %d records; want header + 2", err, len(recs))
	}
	// β = 0: the built-in sky's own count of V ≤ 5 (V′ = V at rest).
	want := 0
	for _, v := range catalog.BuiltIn().Vmag {
		if v <= 5 {
			want++
		}
	}
	if have, _ := strconv.Atoi(recs[1][2]); have != want {
		t.Errorf("β = 0 visible %d, want %d (direct count)", have, want)
	}
	if st, err := os.Stat(plot); err != nil || st.Size() == 0 {
		t.Errorf("plot not written: %v", err)
	}
	// --from/--to/--steps and --csv FILE.
	csvPath := filepath.Join(dir, "c.csv")
	code, _, errb = runArgs(t, "census", "--from", "0", "--to", "0.5", "--steps", "3", "--csv", csvPath)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errb)
	}
	b, _ := os.ReadFile(csvPath)
	if n := strings.Count(string(b), "\n"); n != 4 {
		t.Errorf("range CSV has %d lines, want 4", n)
	}
}

func TestCurvesCommand(t *testing.T) {
	dir := t.TempDir()
	code, out, errb := runArgs(t, "curves", "--speeds", "0.5,0.9", "--points", "31", "--dpi", "50", "--svg", "--output", dir+"/")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errb)
	}
	for _, name := range []string{"aberration", "doppler", "dv", "brightening", "conventions"} {
		for _, ext := range []string{".png", ".svg"} {
			if _, err := os.Stat(filepath.Join(dir, name+ext)); err != nil {
				t.Errorf("%s%s missing: %v", name, ext, err)
			}
		}
	}
	if !strings.Contains(out, "conventions.csv") {
		t.Errorf("stdout does not list conventions.csv: %q", out)
	}
	code, out, _ = runArgs(t, "curves", "--help")
	if code != exitOK || !strings.Contains(out, "Examples:") || !strings.Contains(out, "Exit status") {
		t.Errorf("--help: exit %d, output lacks examples or exit statuses", code)
	}
}
