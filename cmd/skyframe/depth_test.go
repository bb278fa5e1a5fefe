package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/skyframe/skyframe/internal/sharedcat"
	"github.com/skyframe/skyframe/render"
)

func readSidecarMap(t *testing.T, path string) map[string]any {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	var m map[string]any
	if err := json.Unmarshal(data, &m); err != nil {
		t.Fatal(err)
	}
	return m
}

// TestStillDepthWarning: the Bright Star Catalogue (complete to V ≈ 6.5,
// Hoffleit & Warren 1991 [mem]) at 0.9 c looking ahead falls far short of
// the frame's bound; still says so on stderr with both magnitudes and
// mentions the unresolved-light option, and the sidecar records both.
func TestStillDepthWarning(t *testing.T) {
	bsc := sharedcat.BSC5(t)
	dir := t.TempDir()
	png := filepath.Join(dir, "a.png")
	_, errs, code := runCmd(t, "still", "--catalog", bsc, "--size", "64x36", "-o", png)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{"warning", "complete to V ≈ 6.5", "catalogue V ≤ 13", "missing", "unresolved"} {
		if !strings.Contains(errs, want) {
			t.Errorf("stderr lacks %q: %s", want, errs)
		}
	}
	side := readSidecarMap(t, filepath.Join(dir, "a.json"))
	c := side["catalog"].(map[string]any)
	if d, n := c["depth_v"].(float64), c["needed_v"].(float64); d != 6.5 || !(n > 13 && n < 14.5) {
		t.Errorf("sidecar depth_v %v, needed_v %v; want 6.5 and the 0.9 c bound (13–14.5)", d, n)
	}
	// At rest the catalogue is deep enough: no warning.
	_, errs, code = runCmd(t, "still", "--catalog", bsc, "--speed", "0", "--limit", "6", "--size", "64x36", "-o", png)
	if code != 0 || strings.Contains(errs, "warning") {
		t.Errorf("at rest with limit 6: exit %d, stderr %q; want no warning", code, errs)
	}
}

// TestStillBuiltInDepth: the default still draws the built-in sky as deep as
// its image can show (no warning), records the depths in the sidecar, and
// bad --sky-depth values are refused with exit 2 naming the flag, writing
// nothing.
func TestStillBuiltInDepth(t *testing.T) {
	dir := t.TempDir()
	png := filepath.Join(dir, "a.png")
	_, errs, code := runCmd(t, "still", "--size", "96x54", "-o", png)
	if code != 0 || strings.Contains(errs, "warning") {
		t.Fatalf("exit %d, stderr %q; want success without a warning", code, errs)
	}
	side := readSidecarMap(t, filepath.Join(dir, "a.json"))
	c := side["catalog"].(map[string]any)
	// Written only as 8-bit PNG, the unresolved layer is drawn to
	// render.EightBitTolerance; with a FITS file, to the default.
	if u, ok := side["unresolved"].(map[string]any); !ok || u["grid_tolerance"] != render.EightBitTolerance {
		t.Errorf("sidecar unresolved %v: want grid_tolerance %g", side["unresolved"], render.EightBitTolerance)
	}
	if _, errs, code := runCmd(t, "still", "--size", "96x54", "-o", png, "--fits", filepath.Join(dir, "a.fits")); code != 0 {
		t.Fatalf("with --fits: exit %d: %s", code, errs)
	}
	if u, ok := readSidecarMap(t, filepath.Join(dir, "a.json"))["unresolved"].(map[string]any); !ok || u["grid_tolerance"] != render.DefaultSmoothTolerance {
		t.Errorf("with --fits: sidecar unresolved %v: want grid_tolerance %g", u, render.DefaultSmoothTolerance)
	}
	// 0.9 c ahead, V′ = 6.5 just visible: about V = 10.4 needed (the coolest
	// built-in stars, B−V = 2, brighten by 3.9 mag at D = 4.36).
	if d := c["depth_v"].(float64); !(d >= 10.2 && d <= 10.6) || c["rows"].(float64) < 2e5 {
		t.Errorf("sidecar catalog %v: want depth_v ≈ 10.4 and a few 10⁵ rows", c)
	}
	// --sky-depth 8 at 0.9 c: short of what the image shows, so a warning.
	_, errs, code = runCmd(t, "still", "--size", "96x54", "--sky-depth", "8", "-o", png)
	if code != 0 || !strings.Contains(errs, "warning: the built-in sky is complete to V ≈ 8.0") {
		t.Errorf("--sky-depth 8: exit %d, stderr %q; want a warning", code, errs)
	}
	bad := filepath.Join(dir, "bad.png")
	for _, args := range [][]string{{"--sky-depth", "nan"}, {"--sky-depth", "20"}, {"--sky-depth", "7"}, {"--sky-depth", "inf"},
		{"--sky-depth", "9", "--catalog", "x.csv"}, {"--unresolved", "maybe"}} {
		_, errs, code := runCmd(t, append([]string{"still", "--size", "32x18", "-o", bad}, args...)...)
		if code != 2 || !strings.Contains(errs, args[0]) {
			t.Errorf("%v: exit %d, %q; want 2 naming %s", args, code, errs, args[0])
		}
		if _, err := os.Stat(bad); err == nil {
			t.Errorf("%v: wrote an output", args)
		}
	}
}

// TestSunInEverySky: seen from 1 pc the Sun (M_V = 4.83 [cp], 5772 K, IAU
// 2015 B3 [pub]) is a V′ ≈ −0.17 star toward the origin, in the built-in sky
// and in a catalogue file; from the origin (inside the solar system) it is
// not listed.
func TestSunInEverySky(t *testing.T) {
	for _, extra := range [][]string{nil, {"--catalog", "../../testdata/catalogs/bsc5_good.dat"}} {
		out, errs, code := runCmd(t, append([]string{"stars", "--position", "1,0,0", "--speed", "0", "--limit", "5"}, extra...)...)
		if code != 0 {
			t.Fatalf("%v: exit %d: %s", extra, code, errs)
		}
		found := false
		for _, line := range strings.Split(out, "\n") {
			f := strings.Split(line, ",")
			if len(f) > 13 && f[1] == "Sun" {
				found = true
				if f[5] != "5772" || !strings.HasPrefix(f[13], "-0.17") || !strings.HasPrefix(f[9], "180") {
					t.Errorf("%v: Sun row %q: want 5772 K, V′ −0.17 at RA 180°", extra, line)
				}
			}
		}
		if !found {
			t.Errorf("%v: no Sun in %q", extra, out)
		}
	}
	out, _, _ := runCmd(t, "stars", "--speed", "0", "--limit", "5")
	if strings.Contains(out, ",Sun,") {
		t.Error("the Sun is listed for an observer at the origin")
	}
}

// TestCensusCompleteness: a BSC5 census (complete to V ≈ 6.5) is marked
// incomplete at 0.9 c in its CSV and warned about; the built-in sky is drawn
// deep enough for every speed.
func TestCensusCompleteness(t *testing.T) {
	bsc := sharedcat.BSC5(t)
	out, errs, code := runCmd(t, "census", "--catalog", bsc, "--speeds", "0,0.9")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	lines := strings.Split(strings.TrimSpace(out), "\n")
	if len(lines) != 3 || !strings.HasSuffix(lines[0], "needed_v,complete") || !strings.HasSuffix(lines[1], ",6.5,true") ||
		!strings.HasSuffix(lines[2], ",false") || !strings.Contains(errs, "β = 0.9") {
		t.Errorf("BSC5 census: %q, stderr %q; want 0 complete, 0.9 incomplete, a warning", out, errs)
	}
	out, errs, code = runCmd(t, "census", "--speeds", "0.99")
	if code != 0 || strings.Contains(errs, "warning") || !strings.HasSuffix(strings.TrimSpace(out), ",true") {
		t.Errorf("built-in census at 0.99 c: exit %d, %q, stderr %q; want complete", code, out, errs)
	}
}
