package main

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/render"
	"github.com/skyframe/skyframe/spectrum"
)

// skyPlan is a cruise at 0.9 c away from the Sun (RA 180°, Dec 0) from
// 1 au on its −x side, three frames, looking look; catalogue is the
// [catalogue] table's path line ("" for the built-in sky).
func skyPlan(look, catalogue string) string {
	au := catalog.AUParsec
	return fmt.Sprintf(`title = "whole sky"
[catalogue]
%s
[start]
position = [%g, 0, 0]
speed = 0.9
ra = 180
dec = 0

[[leg]]
kind = "cruise"
ship_years = 0.0001

[show]
fps = 10
seconds = 0.3

[[camera.look]]
at = 0
look = %q
`, catalogue, -au, look) + tinyCamera
}

// readSidecar reads frame i's sidecar from a flight's output directory.
func readSidecar(t *testing.T, dir string, i int) render.Sidecar {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(dir, "out", "frames", fmt.Sprintf("%05d.json", i)))
	if err != nil {
		t.Fatal(err)
	}
	var s render.Sidecar
	if err := json.Unmarshal(b, &s); err != nil {
		t.Fatal(err)
	}
	return s
}

// TestFlightWholeSky: a flight's frames draw the built-in sky as deep as
// each needs, with the unresolved layer from that depth on, and the Sun at
// the origin. Looking ahead at 0.9 c the frame draws the stars to V ≈ 10.4
// (as a still does: the coolest stars gain 3.9 mag) and its sidecar
// records depth_v and needed_v; looking behind, 1 au from the Sun, the
// default depth suffices and the brightest star is the Sun, in the
// direction of the origin, at V′ = M_V + 5 log₁₀(r/10 pc) (M_V = 4.83
// [cp]) faded by the Doppler factor behind (D = γ(1 − β) = 0.229: a
// 5772 K blackbody seen at 1324 K, about 13 mag fainter in V).
func TestFlightWholeSky(t *testing.T) {
	dir := t.TempDir()
	code, _, errs := runIn(t, "flight", writePlan(t, dir, skyPlan("ahead", `path = "builtin"`)))
	if code != 0 {
		t.Fatalf("ahead: exit %d: %s", code, errs)
	}
	s := readSidecar(t, dir, 1)
	if s.Catalog.DepthV == nil || math.Abs(*s.Catalog.DepthV-10.4) > 0.15 || s.Catalog.NeededV == nil ||
		s.Unresolved == nil || s.Unresolved.DepthV != *s.Catalog.DepthV || s.Catalog.Rows < 100000 {
		t.Errorf("ahead at 0.9 c: catalog %+v, unresolved %+v; want depth_v ≈ 10.4, the layer from there and ≳ 10⁵ rows", s.Catalog, s.Unresolved)
	}
	if strings.Contains(errs, "warning: the built-in sky") {
		t.Errorf("ahead at 0.9 c: a completeness warning for the built-in sky: %s", errs)
	}
	dir = t.TempDir()
	code, _, errs = runIn(t, "flight", writePlan(t, dir, skyPlan("behind", `path = "builtin"`)))
	if code != 0 {
		t.Fatalf("behind: exit %d: %s", code, errs)
	}
	s = readSidecar(t, dir, 1)
	if s.Catalog.DepthV == nil || *s.Catalog.DepthV != catalog.DefaultSynthMagLimit || s.Unresolved == nil || s.Unresolved.DepthV != catalog.DefaultSynthMagLimit {
		t.Errorf("behind: catalog %+v, unresolved %+v; want the default depth", s.Catalog, s.Unresolved)
	}
	if len(s.Brightest) == 0 || s.Brightest[0].Name != "Sun" || math.Abs(s.Brightest[0].D-0.2294) > 0.001 {
		t.Fatalf("behind: brightest %+v; want the Sun at D 0.229", s.Brightest)
	}
	p := s.PositionPC
	r := math.Sqrt(p[0]*p[0] + p[1]*p[1] + p[2]*p[2])
	want := catalog.SunAbsV + 5*math.Log10(r/10) + render.BrighteningV(catalog.SunTeff, s.Brightest[0].D, spectrum.BeamingExact)
	if v := s.Brightest[0].V; math.Abs(v-want) > 0.01 {
		t.Errorf("behind: the Sun at V′ = %.3f, want %.3f (M_V 4.83 at %.3g au, redshifted to %.0f K)", v, want, r/catalog.AUParsec, s.Brightest[0].T)
	}
	if b := s.Brightest[0]; math.Abs(b.RA) > 1e-3 && math.Abs(b.RA-360) > 1e-3 || math.Abs(b.Dec) > 1e-3 {
		t.Errorf("behind: the Sun at RA %.5f°, Dec %.5f°; want the origin's direction (0°, 0°)", b.RA, b.Dec)
	}
}

// TestFlightCompletenessWarning: a flight through a shallow catalogue at
// 0.9 c warns once, after the run, naming the worst frame, how many frames
// fall short, both magnitudes and the share missing, and each sidecar
// records depth_v and needed_v.
func TestFlightCompletenessWarning(t *testing.T) {
	dir := t.TempDir()
	cat, err := filepath.Abs("../../testdata/catalogs/bsc5_good.dat")
	if err != nil {
		t.Fatal(err)
	}
	code, _, errs := runIn(t, "flight", writePlan(t, dir, skyPlan("ahead", fmt.Sprintf("path = %q", cat))))
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if n := strings.Count(errs, "skyframe flight: warning: the catalogue is complete to V ≈"); n != 1 ||
		!strings.Contains(errs, "the worst of 3 frames that fall short (frames 0–2), shows stars from catalogue V ≤") ||
		!strings.Contains(errs, "% of those stars and") {
		t.Errorf("stderr %q: want one warning naming the worst of 3 frames", errs)
	}
	s := readSidecar(t, dir, 2)
	if s.Catalog.DepthV == nil || s.Catalog.NeededV == nil || !(*s.Catalog.NeededV > *s.Catalog.DepthV) {
		t.Errorf("sidecar catalog %+v: want depth_v below needed_v", s.Catalog)
	}
}

// TestStarsCompletenessWarning: stars warns when its catalogue cannot list
// every star reaching the naked-eye limit at the table's speed, and not at
// rest.
func TestStarsCompletenessWarning(t *testing.T) {
	_, errs, code := runCmd(t, "stars", "--speed", "0.9", "--limit", "3")
	if code != 0 || !strings.Contains(errs, "skyframe stars: warning: the built-in sky is complete to V ≈ 8.0, but a whole-sky list to V′ = 6.5 (the naked-eye limit) shows stars from catalogue V ≤ 10.4") ||
		!strings.Contains(errs, "rows fainter than V′ ≈ 4.1 may lack stars") {
		t.Errorf("0.9 c: exit %d, stderr %q", code, errs)
	}
	_, errs, code = runCmd(t, "stars", "--speeds", "0,0.5,0.9", "--limit", "3")
	if code != 0 || !strings.Contains(errs, "at β = 0.9 (the fastest of --speeds)") {
		t.Errorf("--speeds: exit %d, stderr %q", code, errs)
	}
	_, errs, code = runCmd(t, "stars", "--speed", "0", "--limit", "3")
	if code != 0 || strings.Contains(errs, "warning") {
		t.Errorf("at rest: exit %d, stderr %q; want no warning", code, errs)
	}
}
