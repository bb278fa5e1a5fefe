package main

import (
	"net/http"
	"net/http/httptest"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/internal/sharedcat"
	"github.com/skyframe/skyframe/names"
)

// The command line: names from --names and from the fetched copy in the
// user cache; bad names files and bad names exit 2 with a message naming
// the file and line or the candidates, and write nothing.
func TestNamesCLI(t *testing.T) {
	bsc, csn := sharedcat.BSC5(t), sharedcat.IAUCSN(t)
	dir := t.TempDir()
	t.Setenv("XDG_CACHE_HOME", filepath.Join(dir, "cache"))
	t.Setenv("HOME", dir)
	out := filepath.Join(dir, "f.png")
	still := func(extra ...string) (string, string, int) {
		args := append([]string{"still", "--catalog", bsc, "--size", "64x48", "--no-sidecar", "-o", out}, extra...)
		return runCmd(t, args...)
	}
	for _, q := range []string{"Betelgeuse", "alf Ori", "Alpha Orionis", "58 Ori"} {
		if _, errs, code := still("--names", csn, "--toward", q, "--look", q, "--label", q+"=the shoulder"); code != 0 {
			t.Errorf("--toward %q: exit %d: %s", q, code, errs)
		}
	}
	// The labelled frame credits the IAU WGSN in its PNG text.
	if png, err := os.ReadFile(out); err != nil || !strings.Contains(string(png), "star_names\x00"+names.Credit) {
		t.Errorf("PNG metadata lacks the names credit (%v)", err)
	}
	os.Remove(out)
	bad := filepath.Join(dir, "bad.txt")
	good, _ := os.ReadFile(csn)
	lines := strings.SplitAfter(string(good), "\n")
	dup := strings.Join(lines[:20], "") + lines[18] + strings.Join(lines[20:], "")
	for _, c := range []struct {
		name, text string
		want       []string
	}{
		{"duplicate", dup, []string{"bad.txt:21", "duplicate name"}},
		{"bad UTF-8", strings.Replace(string(good), "α", "\xff", 1), []string{"bad.txt:19", "UTF-8"}},
		{"wrong columns", strings.Replace(string(good), " 2016-06-30", "", 1), []string{"bad.txt:19", "not an IAU-CSN row"}},
	} {
		os.WriteFile(bad, []byte(c.text), 0o644)
		_, errs, code := still("--names", bad, "--toward", "Betelgeuse")
		if code != 2 {
			t.Errorf("%s: exit %d, want 2: %s", c.name, code, errs)
		}
		for _, w := range c.want {
			if !strings.Contains(errs, w) {
				t.Errorf("%s: %q does not say %q", c.name, errs, w)
			}
		}
		if _, err := os.Stat(out); err == nil {
			t.Errorf("%s: wrote %s", c.name, out)
		}
	}
	for _, c := range []struct {
		args []string
		want []string
	}{
		{[]string{"--toward", "Betelguese"}, []string{"--toward", "close matches: Betelgeuse", "Alpha Orionis", "RA,DEC"}},
		{[]string{"--look", "alf Cen"}, []string{"--look", "Rigil Kentaurus (α¹ Cen, HR 5459)", "Toliman"}},
		{[]string{"--label", "Barnard's Star"}, []string{"--label", "Barnard's Star", "not in"}},
		{[]string{"--mark-destination", "Lich"}, []string{"--mark-destination", "PSR B1257+12"}},
	} {
		_, errs, code := still(append([]string{"--names", csn}, c.args...)...)
		if code != 2 {
			t.Errorf("%v: exit %d, want 2", c.args, code)
		}
		for _, w := range c.want {
			if !strings.Contains(errs, w) {
				t.Errorf("%v: %q does not say %q", c.args, errs, w)
			}
		}
		if _, err := os.Stat(out); err == nil {
			t.Errorf("%v: wrote %s", c.args, out)
		}
	}
	// Without a table, a proper name is refused and the message says how
	// to get one; after `catalog fetch names` (loopback server) it works
	// with no --names.
	if _, errs, code := still("--toward", "Betelgeuse"); code != 2 || !strings.Contains(errs, "catalog fetch names") {
		t.Errorf("no table: exit %d: %s", code, errs)
	}
	srv := httptest.NewServer(http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		w.Header().Set("Content-Length", strconv.Itoa(len(good)))
		w.Write(good)
	}))
	defer srv.Close()
	stdout, errs, code := runCmd(t, "catalog", "fetch", "names", "--url", srv.URL+"/IAU-CSN.txt")
	if code != 0 || !strings.Contains(errs, "WGSN") || !strings.Contains(errs, "sha256 ") {
		t.Fatalf("fetch: exit %d: %s", code, errs)
	}
	if want := filepath.Join(dir, "cache", "skyframe", "iau-csn.txt"); strings.TrimSpace(stdout) != want {
		t.Errorf("fetched to %q, want %q", stdout, want)
	}
	if _, errs, code := still("--toward", "Betelgeuse"); code != 0 {
		t.Errorf("after fetch: exit %d: %s", code, errs)
	}
	if _, errs, code := still("--names", "none", "--toward", "Betelgeuse"); code != 2 {
		t.Errorf("--names none: exit %d: %s", code, errs)
	}
}

// catalog inspect builtin works and lists the invented names.
func TestInspectBuiltin(t *testing.T) {
	out, errs, code := runCmd(t, "catalog", "inspect", "builtin")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	x := names.NewIndex(catalog.BuiltIn(), nil)
	for _, i := range x.Named() {
		if !strings.Contains(out, x.Proper(i)) {
			t.Errorf("%q not listed", x.Proper(i))
		}
	}
	for _, w := range []string{"format:      synthetic", "Ambrel", "no real star is meant"} {
		if !strings.Contains(out, w) {
			t.Errorf("output lacks %q:\n%s", w, out)
		}
	}
}

// The plan key catalogue.names: a flight starting at a star named by its
// proper name (Rigil Kentaurus, HR 5459, which has a BSC5 parallax) plans
// with the table and is refused without it or with a broken one (exit 2,
// naming the key).
func TestFlightPlanNames(t *testing.T) {
	bsc, csn := sharedcat.BSC5(t), sharedcat.IAUCSN(t)
	dir := t.TempDir()
	t.Setenv("XDG_CACHE_HOME", filepath.Join(dir, "cache"))
	bad := filepath.Join(dir, "bad.txt")
	os.WriteFile(bad, []byte("not a names table\n"), 0o644)
	plan := func(names string) string {
		return writePlan(t, dir, `
[catalogue]
path = "`+bsc+`"
names = "`+names+`"

[start]
star = "Rigil Kentaurus"
speed = 0.5
ra = 0
dec = 0

[[leg]]
kind = "cruise"
ship_years = 1

[show]
fps = 4
seconds = 1
`+tinyCamera)
	}
	if code, _, errs := runIn(t, "flight", plan(csn), "--dry-run"); code != exitOK {
		t.Fatalf("with names: status %d: %s", code, errs)
	}
	if code, _, errs := runIn(t, "flight", plan("none"), "--dry-run"); code != 2 {
		t.Errorf("without names: status %d, want 2: %s", code, errs)
	}
	code, _, errs := runIn(t, "flight", plan(bad), "--dry-run")
	if code != 2 || !strings.Contains(errs, "catalogue.names") || !strings.Contains(errs, "bad.txt") {
		t.Errorf("broken names file: status %d: %s", code, errs)
	}
}
