package main

import (
	"image/png"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// The check, through the command: fisheye stills of the built-in
// sky with the HUD and a title, 20 labels, the graticule and the motion
// marker have no lit pixel outside the image circle, untilted and tilted
// by 30° (a domemaster projects nothing there [pub: Dome Master Show File
// Format 1.0, sec. II, fulldome.org]). The HUD's placement in the front
// safe area is checked on the overlay layer alone in package overlay
// (TestDomeOverlaysInsideCircleAndSafeArea).
func TestStillDomeNothingOutsideCircle(t *testing.T) {
	dir := t.TempDir()
	for _, tilt := range []string{"0", "30"} {
		out := filepath.Join(dir, "dome"+tilt+".png")
		_, stderr, code := runCmd(t, "still", "--projection", "fisheye", "--size", "512x512", "--tilt", tilt,
			"--hud", "bottom-left", "--hud-title", "Hesper Wren", "--labels", "20", "--grid", "radec", "--mark-motion",
			"--unity-circle", "-o", out, "--no-sidecar")
		if code != 0 {
			t.Fatalf("tilt %s: exit %d: %s", tilt, code, stderr)
		}
		fh, err := os.Open(out)
		if err != nil {
			t.Fatal(err)
		}
		img, err := png.Decode(fh)
		fh.Close()
		if err != nil {
			t.Fatal(err)
		}
		lit, outside := 0, 0
		for j := 0; j < 512; j++ {
			for i := 0; i < 512; i++ {
				r, g, b, _ := img.At(i, j).RGBA()
				if r+g+b == 0 {
					continue
				}
				lit++
				if math.Hypot(float64(i)+0.5-256, float64(j)+0.5-256) > 256 {
					outside++
				}
			}
		}
		t.Logf("tilt %s: %d lit pixels, %d outside the image circle", tilt, lit, outside)
		if lit < 10000 || outside != 0 {
			t.Errorf("tilt %s: %d lit pixels, %d of them outside the image circle; want many, none outside", tilt, lit, outside)
		}
	}
}

// Bad input: a fisheye HUD with no room in the front safe area is refused
// before anything renders (exit 2, naming --hud and the safe area), and
// no file is written.
func TestStillDomeHUDDoesNotFit(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "small.png")
	_, stderr, code := runCmd(t, "still", "--projection", "fisheye", "--size", "200x200", "--hud", "tl",
		"--hud-title", "Hesper Wren", "--text-size", "24", "-o", out)
	if code != 2 || !strings.Contains(stderr, "--hud") || !strings.Contains(stderr, "safe area") {
		t.Errorf("exit %d, stderr %q; want 2 naming --hud and the safe area", code, stderr)
	}
	if ents, _ := os.ReadDir(dir); len(ents) != 0 {
		t.Errorf("files written: %v", ents)
	}
	// The same display fits a flat frame of that size (it shrinks there).
	if _, stderr, code := runCmd(t, "still", "--size", "200x200", "--hud", "tl", "--hud-title", "Hesper Wren",
		"--text-size", "24", "-o", out); code != 0 {
		t.Errorf("pinhole: exit %d: %s", code, stderr)
	}
}

// The plan key overlays.text_size is checked with the plan's line, and a
// fisheye flight whose HUD has no room in the front safe area is refused
// before any frame renders (exit 2 naming overlays.hud).
func TestFlightDomeOverlayKeys(t *testing.T) {
	plan, err := os.ReadFile("../../testdata/plans/voyage.toml")
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name, old, new, want string
	}{
		{"size0", `hud = "top-left"`, "hud = \"top-left\"\ntext_size = 0", "overlays.text_size"},
		{"sizeneg", `hud = "top-left"`, "hud = \"top-left\"\ntext_size = -3", "overlays.text_size"},
		{"nofit", `projection = "pinhole"
width = 640
height = 360
fov = 70`, `projection = "fisheye"
width = 200
height = 200`, "overlays.hud"},
	} {
		dir := t.TempDir()
		path := filepath.Join(dir, "plan.toml")
		text := strings.Replace(string(plan), c.old, c.new, 1)
		if !strings.Contains(text, c.new) {
			t.Fatalf("%s: plan not changed", c.name)
		}
		if c.name == "nofit" {
			text = strings.Replace(text, `hud = "top-left"`, "hud = \"top-left\"\ntext_size = 24", 1)
		}
		if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		_, stderr, code := runCmd(t, "flight", path, "--frames", "0-0")
		if code != 2 || !strings.Contains(stderr, c.want) {
			t.Errorf("%s: exit %d, stderr %q; want 2 naming %s", c.name, code, stderr, c.want)
		}
		if _, err := os.Stat(filepath.Join(dir, "out")); err == nil {
			t.Errorf("%s: output written", c.name)
		}
	}
}
