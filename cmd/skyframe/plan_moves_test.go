package main

import (
	"os"
	"strings"
	"testing"
)

// Bad camera values in a plan (issue 15's bad input) stop a real run, not
// only a dry run: exit 2 naming the plan file, line and key, and nothing
// written next to the plan.
func TestPlanBadInputWritesNothing(t *testing.T) {
	base := "[[leg]]\nkind = \"cruise\"\nship_years = 1\nspeed = 0\n[show]\nseconds = 0.2\nfps = 10\n[camera]\nsize = \"32x18\"\n"
	cases := []struct{ body, want string }{
		{"shutter = 400\n", "plan.toml:10: camera.shutter: 400: want 0 to 360"},
		{"shutter = -0.5\n", "plan.toml:10: camera.shutter: -0.5: want 0 to 360"},
		{"[[camera.look]]\nat = 0.1\n[[camera.look]]\nat = 0\n", "plan.toml:13: camera.look[1].at:"},
		{"[[camera.look]]\nat = 0\nexposure = nan\n", "plan.toml:12: camera.look[0].exposure: is NaN"},
		{"[[camera.look]]\nat = 0\nexposure = -inf\n", "plan.toml:12: camera.look[0].exposure:"},
		{"[[camera.look]]\nat = 0\nexposure = 1e308\n[[camera.look]]\nat = 0.1\nexposure = -1e308\n", "plan.toml:12: camera.look[0].exposure:"},
	}
	for _, c := range cases {
		dir := t.TempDir()
		plan := writePlan(t, dir, base+c.body)
		code, _, errs := runIn(t, "flight", plan)
		if code != 2 || !strings.Contains(errs, c.want) {
			t.Errorf("%q: exit %d, %q; want exit 2 with %q", c.body, code, errs, c.want)
		}
		if ents, _ := os.ReadDir(dir); len(ents) != 1 {
			t.Errorf("%q: wrote %d entries next to the plan", c.body, len(ents)-1)
		}
	}
}

// The dry run warns on stderr for the stretch of a swing above the
// comfort limit (flight's TestCameraMotionColumns has the analytic
// figures: frames 2-19 of a 40° swing in 2 s at 10 fps, up to 29.9°/s),
// and not for a slow one.
func TestDryRunComfortWarning(t *testing.T) {
	plan := func(seconds, dec string) string {
		return `[[leg]]
kind = "cruise"
ship_years = 1
ra = 0
dec = 0
[show]
fps = 10
seconds = ` + seconds + `.1
[camera]
size = "200x100"
fov = 60
shutter = 0
[[camera.look]]
at = 0
look = "0,-` + dec + `"
[[camera.look]]
at = ` + seconds + `
look = "0,` + dec + `"
`
	}
	code, _, errs := runIn(t, "flight", writePlan(t, t.TempDir(), plan("2", "20")), "--dry-run")
	if want := "warning: frames 2-19: camera motion above the comfort limit (up to 29.9°/s, limit 5°/s;"; code != 0 || !strings.Contains(errs, want) {
		t.Errorf("fast swing: exit %d, stderr %q; want %q", code, errs, want)
	}
	code, _, errs = runIn(t, "flight", writePlan(t, t.TempDir(), plan("10", "1")), "--dry-run")
	if code != 0 || strings.Contains(errs, "comfort limit") {
		t.Errorf("slow swing: exit %d, stderr %q; want no comfort warning", code, errs)
	}
}
