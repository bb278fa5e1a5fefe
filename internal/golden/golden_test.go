package golden

import (
	"image"
	"image/color"
	"strings"
	"testing"
)

// TestCompare: the tolerances bite at exactly one code value past them.
func TestCompare(t *testing.T) {
	a := image.NewNRGBA(image.Rect(0, 0, 10, 10))
	b := image.NewNRGBA(image.Rect(0, 0, 10, 10))
	if msg := Compare(a, b, 0, 0); msg != "" {
		t.Fatalf("equal images: %s", msg)
	}
	b.SetNRGBA(3, 4, color.NRGBA{G: 3, A: 255})
	if msg := Compare(a, b, 3, 1); msg != "" {
		t.Errorf("within tolerance: %s", msg)
	}
	if msg := Compare(a, b, 2, 1); !strings.Contains(msg, "max diff 3/255 at (3,4)") {
		t.Errorf("max: %q", msg)
	}
	// mean = 3 / 300 channel values = 0.01
	if msg := Compare(a, b, 3, 0.0099); !strings.Contains(msg, "mean 0.0100/255") {
		t.Errorf("mean: %q", msg)
	}
	if msg := Compare(a, image.NewNRGBA(image.Rect(0, 0, 9, 10)), 255, 255); !strings.Contains(msg, "bounds") {
		t.Errorf("bounds: %q", msg)
	}
}
