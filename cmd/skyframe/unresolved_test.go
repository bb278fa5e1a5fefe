package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/imgfile"
	"github.com/skyframe/skyframe/render"
)

// The unresolved-light layer: on by default for the built-in sky (recorded
// in the sidecar with its depth, and it adds light to the FITS), off with
// --unresolved off; a catalogue file needs a depth; bad values exit 2
// naming the flag and write nothing.
func TestStillUnresolved(t *testing.T) {
	dir := t.TempDir()
	sum := func(name string, args ...string) (float64, render.Sidecar) {
		t.Helper()
		png, fits, side := filepath.Join(dir, name+".png"), filepath.Join(dir, name+".fits"), filepath.Join(dir, name+".json")
		a := append([]string{"still", "--speed", "0", "--size", "96x54", "-o", png, "--fits", fits, "--sidecar", side}, args...)
		if _, errs, code := runCmd(t, a...); code != 0 {
			t.Fatalf("%v: exit %d: %s", args, code, errs)
		}
		f, err := os.Open(fits)
		if err != nil {
			t.Fatal(err)
		}
		defer f.Close()
		img, err := imgfile.ReadFITS(f)
		if err != nil {
			t.Fatal(err)
		}
		total := 0.0
		for _, v := range img.Pix {
			total += float64(v)
		}
		var s render.Sidecar
		raw, err := os.ReadFile(side)
		if err != nil {
			t.Fatal(err)
		}
		if err := json.Unmarshal(raw, &s); err != nil {
			t.Fatal(err)
		}
		return total, s
	}
	on, sOn := sum("on")
	off, sOff := sum("off", "--unresolved", "off")
	if sOn.Unresolved == nil || sOn.Unresolved.DepthV != catalog.DefaultSynthMagLimit || sOn.Unresolved.Components < 1 {
		t.Errorf("default sidecar unresolved = %+v, want depth %g", sOn.Unresolved, catalog.DefaultSynthMagLimit)
	}
	if sOff.Unresolved != nil {
		t.Errorf("--unresolved off: sidecar unresolved = %+v, want none", sOff.Unresolved)
	}
	if !(on > off) {
		t.Errorf("FITS total with the layer %g, without %g: want more light with it", on, off)
	}
	for _, c := range []struct {
		args []string
		flag string
	}{
		{[]string{"--unresolved", "maybe"}, "--unresolved"},
		{[]string{"--unresolved-depth", "NaN"}, "--unresolved-depth"},
		{[]string{"--unresolved-depth", "bright"}, "--unresolved-depth"},
		{[]string{"--unresolved-depth", "99"}, "--unresolved-depth"},
		{[]string{"--catalog", "../../testdata/catalogs/bsc5_good.dat", "--unresolved", "on"}, "--unresolved"},
	} {
		png := filepath.Join(dir, "bad.png")
		_, errs, code := runCmd(t, append([]string{"still", "--size", "32x18", "-o", png, "--no-sidecar"}, c.args...)...)
		if code != exitUsage || !strings.Contains(errs, c.flag) {
			t.Errorf("%v: exit %d, stderr %q; want 2 naming %s", c.args, code, errs, c.flag)
		}
		if _, err := os.Stat(png); err == nil {
			t.Errorf("%v: wrote %s", c.args, png)
		}
	}
}
