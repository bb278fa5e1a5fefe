package main

import (
	"image/color"
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
		args := []string{"still", "--projection", "fisheye", "--size", "512x512", "--tilt", tilt,
			"--hud", "bottom-left", "--hud-title", "Hesper Wren", "--labels", "20", "--grid", "radec", "--mark-motion",
			"--unity-circle", "-o", out, "--no-sidecar"}
		if testing.Short() {
			args = append(args, "--unresolved", "off") // the diffuse layer costs seconds on a loaded machine
		}
		_, stderr, code := runCmd(t, args...)
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
		"--text-size", "24", "--unresolved", "off", "-o", out); code != 0 {
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

// --overlay-layer writes the overlays alone, transparent elsewhere, and
// the sky without them: the sky equals a render without overlays pixel for
// pixel, and the layer composited over it ("over", Porter & Duff 1984)
// gives the frame with the overlays drawn in, within 1/255 (the rounding of
// straight alpha). In a fisheye frame the layer is transparent outside the
// image circle.
func TestStillOverlayLayer(t *testing.T) {
	dir := t.TempDir()
	base := []string{"still", "--projection", "fisheye", "--size", "384x384", "--tilt", "30", "--no-sidecar", "--unresolved", "off"}
	over := []string{"--hud", "bottom-right", "--hud-title", "Hesper Wren", "--labels", "12", "--grid", "radec", "--mark-motion"}
	run := func(name string, args ...string) {
		t.Helper()
		if _, stderr, code := runCmd(t, append(append([]string{}, base...), args...)...); code != 0 {
			t.Fatalf("%s: exit %d: %s", name, code, stderr)
		}
	}
	plain, burnt, sky, layer := filepath.Join(dir, "plain.png"), filepath.Join(dir, "burnt.png"), filepath.Join(dir, "sky.png"), filepath.Join(dir, "layer.png")
	run("plain", "-o", plain)
	run("burnt", append(over, "-o", burnt)...)
	run("layer", append(over, "-o", sky, "--overlay-layer", layer)...)
	pi, bi, si, li := decodePNG(t, plain), decodePNG(t, burnt), decodePNG(t, sky), decodePNG(t, layer)
	transparent, opaque, worst := 0, 0, 0
	for j := 0; j < 384; j++ {
		for i := 0; i < 384; i++ {
			if pi.At(i, j) != si.At(i, j) {
				t.Fatalf("sky (%d, %d): %v, the plain render has %v", i, j, si.At(i, j), pi.At(i, j))
			}
			l := color.NRGBAModel.Convert(li.At(i, j)).(color.NRGBA)
			switch l.A {
			case 0:
				transparent++
			case 255:
				opaque++
			}
			if l.A > 0 && math.Hypot(float64(i)+0.5-192, float64(j)+0.5-192) > 192 {
				t.Fatalf("layer (%d, %d) outside the circle: %v", i, j, l)
			}
			s := color.NRGBAModel.Convert(si.At(i, j)).(color.NRGBA)
			b := color.NRGBAModel.Convert(bi.At(i, j)).(color.NRGBA)
			a := float64(l.A) / 255
			for k, c := range [3][3]uint8{{l.R, s.R, b.R}, {l.G, s.G, b.G}, {l.B, s.B, b.B}} {
				_ = k
				comp := float64(c[0])*a + float64(c[1])*(1-a)
				worst = max(worst, int(math.Abs(comp-float64(c[2]))+0.5))
			}
		}
	}
	t.Logf("layer: %d transparent, %d opaque of %d pixels; composite differs from the burnt-in frame by at most %d/255", transparent, opaque, 384*384, worst)
	if transparent < 384*384/2 || transparent == 384*384 || worst > 1 {
		t.Errorf("layer: %d transparent pixels, composite off by %d/255", transparent, worst)
	}
	// Bad input: the layer path collides with another output; no overlay.
	for _, c := range []struct {
		args []string
		want string
	}{
		{append(over, "-o", sky, "--overlay-layer", sky), "--overlay-layer"},
		{[]string{"-o", sky, "--overlay-layer", layer + "2"}, "no overlay"},
	} {
		if _, stderr, code := runCmd(t, append(append([]string{}, base...), c.args...)...); code != 2 || !strings.Contains(stderr, c.want) {
			t.Errorf("%v: exit %d, %q; want 2 naming %s", c.args, code, stderr, c.want)
		}
	}
}

// A flight with output.overlay_layer writes each frame's overlays alone
// beside the frame (transparent RGBA PNG, named in the sidecar with its
// SHA-256, so --verify checks it) and the frame without them; the layer's
// name differs from every other file of the frame for every naming
// pattern, and a plan that selects no overlay is refused.
func TestFlightOverlayLayer(t *testing.T) {
	plan, err := os.ReadFile("../../testdata/plans/voyage.toml")
	if err != nil {
		t.Fatal(err)
	}
	text := strings.Replace(string(plan), "sidecar = true", "sidecar = true\noverlay_layer = true", 1)
	text = strings.Replace(text, "fits = false", "fits = true", 1)
	text = strings.Replace(text, "width = 640\nheight = 360", "width = 320\nheight = 180", 1)
	for _, pattern := range []string{"frames/{frame:05}.png", "{frame:05}/sky.png"} {
		dir := t.TempDir()
		path := filepath.Join(dir, "plan.toml")
		tx := strings.Replace(text, `frames = "frames/{frame:05}.png"`, `frames = "`+pattern+`"`, 1)
		if err := os.WriteFile(path, []byte(tx), 0o644); err != nil {
			t.Fatal(err)
		}
		if _, stderr, code := runCmd(t, "flight", path, "--frames", "0-1"); code != 0 {
			t.Fatalf("%s: exit %d: %s", pattern, code, stderr)
		}
		var names []string
		filepath.WalkDir(filepath.Join(dir, "out"), func(p string, d os.DirEntry, err error) error {
			if err == nil && !d.IsDir() {
				rel, _ := filepath.Rel(filepath.Join(dir, "out"), p)
				names = append(names, filepath.ToSlash(rel))
			}
			return nil
		})
		if len(names) != 8 {
			t.Fatalf("%s: files %v, want png, fits, json and overlay for 2 frames", pattern, names)
		}
		var layer string
		for _, n := range names {
			if strings.HasSuffix(n, ".overlay.png") && strings.Contains(n, "0000") && !strings.Contains(n, "00001") {
				layer = n
			}
		}
		if layer == "" {
			t.Fatalf("%s: no overlay layer among %v", pattern, names)
		}
		img := decodePNG(t, filepath.Join(dir, "out", layer))
		transparent := 0
		b := img.Bounds()
		for y := b.Min.Y; y < b.Max.Y; y++ {
			for x := b.Min.X; x < b.Max.X; x++ {
				if _, _, _, a := img.At(x, y).RGBA(); a == 0 {
					transparent++
				}
			}
		}
		if transparent == 0 || transparent == b.Dx()*b.Dy() {
			t.Errorf("%s: layer %s has %d transparent pixels of %d", pattern, layer, transparent, b.Dx()*b.Dy())
		}
		if _, stderr, code := runCmd(t, "flight", path, "--frames", "0-1", "--verify"); code != 0 {
			t.Errorf("%s: verify: exit %d: %s", pattern, code, stderr)
		}
		if err := os.WriteFile(filepath.Join(dir, "out", layer), []byte("not a png"), 0o644); err != nil {
			t.Fatal(err)
		}
		if _, _, code := runCmd(t, "flight", path, "--frames", "0-1", "--verify"); code != 1 {
			t.Errorf("%s: verify after damaging the layer: exit %d, want 1", pattern, code)
		}
	}
	dir := t.TempDir()
	path := filepath.Join(dir, "plan.toml")
	none := strings.Replace(strings.Replace(text, `hud = "top-left"`, "", 1), "labels = 10", "", 1)
	if err := os.WriteFile(path, []byte(none), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, stderr, code := runCmd(t, "flight", path, "--frames", "0-0"); code != 2 || !strings.Contains(stderr, "overlay_layer") {
		t.Errorf("no overlay: exit %d, %q; want 2 naming output.overlay_layer", code, stderr)
	}
}
