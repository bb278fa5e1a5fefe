package main

import (
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/skyframe/skyframe/catalog"
)

// TestStillStreamsLargeCache: a cache file that does not fit in --memory is
// rendered from disk in chunks and gives the PNG, FITS and sidecar
// numbers the in-memory render gives, byte for byte, with star references
// (--look, --label) resolved against the file. Exact equality is the
// contract of render.RenderStream [cp].
func TestStillStreamsLargeCache(t *testing.T) {
	dir := t.TempDir()
	stars := catalog.Synthetic(catalog.SynthOptions{MagLimit: 9.3})
	t.Logf("%d stars", stars.Len())
	if stars.Len() < 2*65536 {
		t.Fatalf("only %d stars: the stream would be one chunk", stars.Len())
	}
	cache := filepath.Join(dir, "sky.skyc")
	fh, err := os.Create(cache)
	if err != nil {
		t.Fatal(err)
	}
	if err := catalog.WriteCache(fh, stars); err != nil {
		t.Fatal(err)
	}
	if err := fh.Close(); err != nil {
		t.Fatal(err)
	}
	render := func(name, memory string) (string, []byte, []byte, map[string]any) {
		png := filepath.Join(dir, name+".png")
		fits := filepath.Join(dir, name+".fits")
		out, errs, code := runCmd(t, "still", "--catalog", cache, "--memory", memory, "--size", "320x180",
			"--speed", "0.7", "--look", "Sollow", "--fov", "90", "--label", "Sollow", "-o", png, "--fits", fits)
		if code != 0 {
			t.Fatalf("--memory %s: exit %d: %s", memory, code, errs)
		}
		p, _ := os.ReadFile(png)
		f, _ := os.ReadFile(fits)
		var side map[string]any
		b, _ := os.ReadFile(filepath.Join(dir, name+".json"))
		if err := json.Unmarshal(b, &side); err != nil {
			t.Fatal(err)
		}
		return out, p, f, side
	}
	memOut, memPNG, memFITS, memSide := render("mem", "1GiB")
	// 24 MiB holds the 320×180 frame and one chunk of about 10⁵ stars,
	// fewer than the catalogue's: it streams. (--memory bounds the whole
	// run, so a budget below the smallest chunk is refused.)
	strOut, strPNG, strFITS, strSide := render("str", "24MiB")
	if strings.Contains(memOut, "from disk") || !strings.Contains(strOut, "from disk") {
		t.Fatalf("stream decision: 1GiB run says %q; 1MiB run says %q", memOut, strOut)
	}
	if len(memPNG) == 0 || !bytes.Equal(memPNG, strPNG) {
		t.Error("PNG differs between the in-memory and streamed renders")
	}
	if len(memFITS) == 0 || !bytes.Equal(memFITS, strFITS) {
		t.Error("FITS differs between the in-memory and streamed renders")
	}
	// A star reference that is not in the file, and --epoch, are refused
	// with exit status 2 and the option named.
	for _, args := range [][]string{{"--look", "No Such Star"}, {"--epoch", "2100"}} {
		a := append([]string{"still", "--catalog", cache, "--memory", "24MiB", "--size", "32x18", "-o", filepath.Join(dir, "bad.png")}, args...)
		_, errs, code := runCmd(t, a...)
		if code != 2 || !strings.Contains(errs, args[0]) {
			t.Errorf("%v: exit %d, %q", args, code, errs)
		}
		if _, err := os.Stat(filepath.Join(dir, "bad.png")); err == nil {
			t.Errorf("%v: wrote an output file", args)
		}
	}
	// A streamed catalogue is not scanned for its depth: the loaded one's
	// sidecar has depth_v and needed_v besides the rest.
	if c, ok := memSide["catalog"].(map[string]any); ok {
		if c["depth_v"] == nil || c["needed_v"] == nil {
			t.Errorf("loaded catalogue: sidecar catalog %v lacks depth_v, needed_v", c)
		}
		delete(c, "depth_v")
		delete(c, "needed_v")
	}
	for _, k := range []string{"catalog", "stars", "brightest", "look", "heading"} {
		a, _ := json.Marshal(memSide[k])
		b, _ := json.Marshal(strSide[k])
		if memSide[k] == nil || !bytes.Equal(a, b) {
			t.Errorf("sidecar %q differs:\n%s\n%s", k, a, b)
		}
	}
}

func TestStillMemoryFlag(t *testing.T) {
	for _, v := range []string{"lots", "0", "-5MiB", ""} {
		_, errs, code := runCmd(t, "still", "--memory", v, "-o", filepath.Join(t.TempDir(), "x.png"))
		if code != 2 || !strings.Contains(errs, "--memory") {
			t.Errorf("--memory %q: exit %d, %q", v, code, errs)
		}
	}
}
