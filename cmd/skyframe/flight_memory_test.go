package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestFlightMemoryRefusedUpFront (issue 18 item 4, for flights): a flight
// whose largest frame cannot fit in --memory is refused before anything
// renders, with exit status 2 and the figures, and nothing is written. The
// 8192² frame of voyage.toml needs its linear buffer twice (the frame and
// the shutter's sub-frame accumulator: 2 × 8192² × 12 B = 1.6 GB) and room
// for the unresolved layer kept for the next frame (8192² × 4 B = 268 MB;
// render.MemoLimit) besides the 8-bit image (268 MB).
func TestFlightMemoryRefusedUpFront(t *testing.T) {
	src, err := os.ReadFile(filepath.Join("..", "..", "testdata", "plans", "voyage.toml"))
	if err != nil {
		t.Fatal(err)
	}
	text := strings.Replace(strings.Replace(string(src), "width = 640", "width = 8192", 1), "height = 360", "height = 8192", 1)
	if text == string(src) {
		t.Fatal("voyage.toml: no width = 640 / height = 360 to change")
	}
	dir := t.TempDir()
	plan := filepath.Join(dir, "big.toml")
	if err := os.WriteFile(plan, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	code, msg := hostileRun(t, "flight", plan, "--frames", "0", "--out", filepath.Join(dir, "out"))
	hostileExpect(t, code, msg, []string{"--memory 1.0 GiB", "frame buffer 1.9 GB", "image 268 MB", "camera.width"}, dir, "big.toml")

	// The same flight previewed at 64×64 (1/128 of the size) fits in
	// 24 MiB; voyage.toml's own 640×360 does not fit in 4 MiB (buffers
	// 5.5 MB and the kept layer, 16 B per pixel at this size, 3.7 MB:
	// 9.2 MB in all).
	code, msg = hostileRun(t, "flight", plan, "--frames", "0", "--preview", "0.0078125", "--memory", "24MiB", "--out", filepath.Join(dir, "small"))
	if code != 0 {
		t.Fatalf("64×64 preview in 24 MiB: status %d\n%s", code, msg)
	}
	orig := filepath.Join(dir, "orig.toml")
	if err := os.WriteFile(orig, src, 0o644); err != nil {
		t.Fatal(err)
	}
	code, msg = hostileRun(t, "flight", orig, "--frames", "0", "--memory", "4MiB", "--out", filepath.Join(dir, "o"))
	hostileExpect(t, code, msg, []string{"--memory 4.0 MiB", "frame buffer 9.2 MB"}, dir, "big.toml", "orig.toml", "small", "small/frames",
		"small/frames/00000.png", "small/frames/00000.json")
}
