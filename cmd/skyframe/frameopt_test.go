package main

import (
	"bytes"
	"encoding/binary"
	"fmt"
	"image"
	"image/png"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"github.com/spf13/pflag"

	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/flight"
	"github.com/skyframe/skyframe/frameopt"
)

// Every option of still is either a frame option (a plan key with the same
// definition) or listed in frameopt.Elsewhere with the plan's equivalent;
// every frame option is a flag of still. Adding a flag to still any other
// way fails here.
func TestStillFlagsAreFrameOptions(t *testing.T) {
	fs := pflag.NewFlagSet("still", pflag.ContinueOnError)
	var f stillFlags
	f.register(fs)
	var p physicsFlags
	p.register(fs, 0.9)
	elsewhere := map[string]bool{}
	for _, e := range frameopt.Elsewhere {
		elsewhere[e.Flag] = true
	}
	fs.VisitAll(func(fl *pflag.Flag) {
		d, ok := frameopt.Lookup(fl.Name)
		switch {
		case ok && d.Name == fl.Name:
		case elsewhere[fl.Name]:
		default:
			t.Errorf("still --%s is neither a frame option (frameopt.Defs) nor listed in frameopt.Elsewhere", fl.Name)
		}
	})
	for _, d := range frameopt.Defs {
		if fs.Lookup(d.Name) == nil {
			t.Errorf("frame option %s is not a flag of still", d.Name)
		}
	}
	for _, e := range frameopt.Elsewhere {
		if fs.Lookup(e.Flag) == nil {
			t.Errorf("frameopt.Elsewhere lists --%s, which still does not have", e.Flag)
		}
	}
}

func decodePNG(t *testing.T, path string) image.Image {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	img, err := png.Decode(bytes.NewReader(data))
	if err != nil {
		t.Fatal(err)
	}
	return img
}

func pixels(t *testing.T, img image.Image) []byte {
	t.Helper()
	switch m := img.(type) {
	case *image.NRGBA64:
		return m.Pix
	case *image.NRGBA:
		return m.Pix
	case *image.RGBA64:
		return m.Pix
	case *image.RGBA:
		return m.Pix
	}
	t.Fatalf("unexpected image type %T", img)
	return nil
}

// A one-frame plan renders what still renders with the same options, to
// the byte (issue check: depth 16, fwhm 2.5, white d50, limit 9, beaming d4
// and an up, plus a look in each direction spelling). The PNG text chunks
// differ (they name the command and the plan), so the decoded pixels and
// the FITS data are compared. Both draw the built-in sky as deep as the
// frame needs (the flight with its shutter closed, so that its frame's
// instant alone decides the depth, as the still's does).
func TestPlanMatchesStill(t *testing.T) {
	for _, look := range []string{"45,5", "catalogue:45,5", "ahead", "Sollow"} {
		t.Run(look, func(t *testing.T) {
			dir := t.TempDir()
			plan := writePlan(t, dir, fmt.Sprintf(`
[start]
position = [0.5, -0.25, 0.1]
speed = 0.6
ra = 30
dec = 10

[[leg]]
kind = "cruise"
ship_years = 1

[show]
fps = 10
seconds = 0.1

[camera]
size = "160x90"
fov = 50
depth = 16
fwhm = 2.5
white = "d50"
limit = 9
beaming = "d4"
up = "100,40"
look = %q
exposure = 3
shutter = 0

[output]
fits = true
`, look))
			code, _, errs := runIn(t, "flight", plan, "--workers", "1")
			if code != 0 {
				t.Fatalf("flight: exit %d: %s", code, errs)
			}
			p, err := os.ReadFile(plan)
			if err != nil {
				t.Fatal(err)
			}
			pl, err := flight.ParsePlan(p, plan)
			if err != nil {
				t.Fatal(err)
			}
			if pl.NeedsResolver() {
				if err := pl.Bind(nil); err == nil {
					t.Fatal("bound a plan naming a star without a resolver")
				}
				stars := catalog.BuiltIn() // the plan names no catalogue
				if err := pl.Bind(flight.StarsResolver(stars, stars.Find)); err != nil {
					t.Fatal(err)
				}
			}
			fs0, err := pl.FrameState(0)
			if err != nil {
				t.Fatal(err)
			}
			phi := strconv.FormatFloat(fs0.State.Rapidity, 'g', -1, 64)
			out := filepath.Join(dir, "still.png")
			fits := filepath.Join(dir, "still.fits")
			code, _, errs = runIn(t, "still", "--position", "0.5,-0.25,0.1", "--rapidity", phi, "--toward", "30,10",
				"--size", "160x90", "--fov", "50", "--depth", "16", "--fwhm", "2.5", "--white", "d50", "--limit", "9",
				"--beaming", "d4", "--up", "100,40", "--look", look, "--exposure", "3", "-o", out, "--fits", fits)
			if code != 0 {
				t.Fatalf("still: exit %d: %s", code, errs)
			}
			a := decodePNG(t, out)
			b := decodePNG(t, filepath.Join(dir, "out", "frames", "00000.png"))
			if _, ok := b.(*image.RGBA64); !ok {
				t.Errorf("flight frame is %T, want 16-bit", b)
			}
			if !bytes.Equal(pixels(t, a), pixels(t, b)) {
				t.Errorf("flight frame pixels differ from still's")
			}
			fa, _ := os.ReadFile(fits)
			fb, _ := os.ReadFile(filepath.Join(dir, "out", "frames", "00000.fits"))
			if len(fa) != len(fb) || len(fa) < 2880*2 {
				t.Fatalf("FITS sizes %d, %d", len(fa), len(fb))
			}
			// Data unit: after the header (ends with the END card's block).
			ha, hb := headerLen(fa), headerLen(fb)
			// The flight's heading is its trajectory's state at frame 0
			// (a normalised velocity), the still's the direction given:
			// they can differ in the last bit, and so can the camera's
			// attitude (the headers' PC and VELDEC cards). A pixel may
			// then differ by a rounding, never by more than 4 float32
			// ulps.
			if len(fa)-ha != len(fb)-hb {
				t.Fatalf("FITS data sizes %d, %d", len(fa)-ha, len(fb)-hb)
			}
			off := 0
			for i := 0; i+4 <= len(fa)-ha; i += 4 {
				x := int64(int32(binary.BigEndian.Uint32(fa[ha+i:])))
				y := int64(int32(binary.BigEndian.Uint32(fb[hb+i:])))
				if d := x - y; d > 4 || d < -4 {
					t.Fatalf("FITS data word %d: %08x and %08x", i/4, uint32(x), uint32(y))
				}
				if x != y {
					off++
				}
			}
			if off > 0 {
				t.Logf("%d of %d FITS words differ by a rounding", off, (len(fa)-ha)/4)
			}
		})
	}
}

// headerLen is the length of a FITS primary header: blocks up to the one
// holding the END card.
func headerLen(b []byte) int {
	for i := 0; i+80 <= len(b); i += 80 {
		if strings.HasPrefix(string(b[i:i+80]), "END ") {
			return (i/2880 + 1) * 2880
		}
	}
	return len(b)
}

// Plan errors in frame options name the file, line and plan key, never a
// flag.
func TestPlanFrameOptionErrors(t *testing.T) {
	base := "[[leg]]\nkind = \"cruise\"\nship_years = 1\nspeed = 0\n[show]\nseconds = 1\n"
	cases := []struct{ body, want string }{
		{"[camera]\ndepth = 12\n", ":8: camera.depth: 12: want 8 or 16"},
		{"[camera]\nfwhm = 0.0\n", ":8: camera.fwhm: 0: want 0 < FWHM"},
		{"[camera]\nwhite = \"d55\"\n", ":8: camera.white:"},
		{"[camera]\nbeaming = \"d5\"\n", ":8: camera.beaming:"},
		{"[camera]\nup = \"Sollow\"\n", ":8: camera.up:"},
		{"[camera]\nsize = \"64x0\"\n", ":8: camera.size:"},
		{"[overlays]\ngrid_step = 0\n", ":8: overlays.grid_step:"},
		{"[overlays]\nhud = true\n", ":8: overlays.hud: want a string"},
		{"[overlays]\nlabels = \"named\"\n", ":8: overlays.labels: want a whole number"},
		{"[camera]\nfwhmm = 2\n", `:8: camera.fwhmm: unknown key (did you mean "camera.fwhm"?)`},
		{"[[camera.look]]\nat = 0\nfov = 500\n", ":9: camera.look[0].fov:"},
		{"[[camera.look]]\nat = 0\ndepth = 16\n", ":9: camera.look[0].depth: unknown key"},
		{"[[camera.look]]\nat = 2\n[[camera.look]]\nat = 1\n", ":10: camera.look[1].at:"},
		{"[[camera.look]]\nat = 0\nexposure = nan\n", ":9: camera.look[0].exposure: is NaN"},
		{"[camera]\nshutter = 400\n", ":8: camera.shutter: 400: want 0 to 360"},
		{"[camera]\nshutter = -1\n", ":8: camera.shutter: -1: want 0 to 360"},
	}
	for _, c := range cases {
		dir := t.TempDir()
		plan := writePlan(t, dir, base+c.body)
		code, _, errs := runIn(t, "flight", plan, "--dry-run")
		if code != 2 || !strings.Contains(errs, c.want) || strings.Contains(errs, "--") {
			t.Errorf("%q: exit %d, %q; want exit 2 with %q and no flag name", c.body, code, errs, c.want)
		}
		if ents, _ := os.ReadDir(dir); len(ents) != 1 {
			t.Errorf("%q: wrote files", c.body)
		}
	}
}

// --preview and --every render a reduced flight into OUTPUT-preview and
// never touch the real output; bad values exit 2 and write nothing; the
// dry run prints a measured estimate.
func TestFlightPreview(t *testing.T) {
	dir := t.TempDir()
	plan := writePlan(t, dir, voyagePlan(12))
	code, _, errs := runIn(t, "flight", plan, "--preview", "0.5", "--every", "4")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if _, err := os.Stat(filepath.Join(dir, "out")); !os.IsNotExist(err) {
		t.Errorf("a preview created the real output directory (%v)", err)
	}
	ents, err := os.ReadDir(filepath.Join(dir, "out-preview", "frames"))
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, e := range ents {
		names = append(names, e.Name())
	}
	if want := "00000.json 00000.png 00004.json 00004.png 00008.json 00008.png"; strings.Join(names, " ") != want {
		t.Errorf("preview files %v, want %s", names, want)
	}
	img := decodePNG(t, filepath.Join(dir, "out-preview", "frames", "00004.png"))
	if b := img.Bounds(); b.Dx() != 32 || b.Dy() != 18 {
		t.Errorf("preview size %v, want 32x18 (half of 64x36)", b)
	}
	// The preview verifies as itself, and the real run is unaffected.
	if code, _, errs := runIn(t, "flight", plan, "--preview", "0.5", "--every", "4", "--verify"); code != 0 {
		t.Errorf("verify preview: exit %d: %s", code, errs)
	}
	if code, _, _ := runIn(t, "flight", plan, "--verify"); code != 1 {
		t.Errorf("verify of the unrendered real output: exit %d, want 1", code)
	}
	for _, args := range [][]string{{"--preview", "0"}, {"--preview", "1.5"}, {"--preview", "-0.5"}, {"--preview", "NaN"}, {"--every", "0"}, {"--every", "-3"}} {
		d := t.TempDir()
		p := writePlan(t, d, voyagePlan(12))
		code, _, errs := runIn(t, append([]string{"flight", p}, args...)...)
		if code != 2 || !strings.Contains(errs, args[0]) {
			t.Errorf("%v: exit %d, %q; want 2 naming %s", args, code, errs, args[0])
		}
		if ents, _ := os.ReadDir(d); len(ents) != 1 {
			t.Errorf("%v: wrote files", args)
		}
	}
	code, out, errs := runIn(t, "flight", plan, "--dry-run")
	if code != 0 || !strings.Contains(errs, "estimate: frame 6 (64x36) rendered and written in") || !strings.Contains(errs, "12 frames ≈") {
		t.Errorf("dry run: exit %d, stderr %q", code, errs)
	}
	if strings.Contains(out, "estimate") {
		t.Errorf("the estimate went to stdout (the CSV)")
	}
}
