package golden

import (
	"bytes"
	"fmt"
	"image"
	"image/png"
	"os"
	"path/filepath"
	"testing"
)

// Check compares img with dir/<name>_golden.png within maxDiff per channel
// and a mean absolute difference meanDiff (8-bit units), or rewrites the
// file when regen is true.
func Check(t testing.TB, dir, name string, img *image.NRGBA, regen bool, maxDiff int, meanDiff float64) {
	t.Helper()
	path := filepath.Join(dir, name+"_golden.png")
	if regen {
		var buf bytes.Buffer
		if err := png.Encode(&buf, img); err != nil {
			t.Fatal(err)
		}
		if err := os.MkdirAll(dir, 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	fh, err := os.Open(path)
	if err != nil {
		t.Fatalf("%v (run with -regen to create)", err)
	}
	defer fh.Close()
	want, err := png.Decode(fh)
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	if msg := Compare(img, want, maxDiff, meanDiff); msg != "" {
		t.Errorf("%s differs from %s: %s", name, path, msg)
	}
}

// Compare returns "" when have and want agree within maxDiff per colour
// channel (8-bit units) and mean absolute difference meanDiff, otherwise a
// description of the worst difference.
func Compare(have *image.NRGBA, want image.Image, maxDiff int, meanDiff float64) string {
	if have.Bounds() != want.Bounds() {
		return fmt.Sprintf("bounds %v, want %v", have.Bounds(), want.Bounds())
	}
	var sum float64
	worst, wx, wy, n := 0, 0, 0, 0
	b := have.Bounds()
	for y := b.Min.Y; y < b.Max.Y; y++ {
		for x := b.Min.X; x < b.Max.X; x++ {
			h := have.NRGBAAt(x, y)
			r, g, bl, _ := want.At(x, y).RGBA()
			for _, d := range [3]int{int(h.R) - int(r>>8), int(h.G) - int(g>>8), int(h.B) - int(bl>>8)} {
				if d < 0 {
					d = -d
				}
				sum += float64(d)
				n++
				if d > worst {
					worst, wx, wy = d, x, y
				}
			}
		}
	}
	if n == 0 {
		return ""
	}
	mean := sum / float64(n)
	if worst <= maxDiff && mean <= meanDiff {
		return ""
	}
	return fmt.Sprintf("max diff %d/255 at (%d,%d) (have %v, want %v), mean %.4f/255", worst, wx, wy,
		have.NRGBAAt(wx, wy), want.At(wx, wy), mean)
}
