package analysis

import (
	"bytes"
	"flag"
	"image"
	"image/png"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
	"gonum.org/v1/plot/vg"
)

// regen rewrites the golden images: go test ./analysis -run Golden -regen
var regen = flag.Bool("regen", false, "regenerate the golden PNGs in testdata/analysis")

const goldenDir = "../testdata/analysis"

// Tolerances of the golden comparison: a pixel differs when any channel is
// off by more than pixelTol; at most maxDiffFrac of the pixels may differ
// (font rasterisation and floating-point changes move a few edge pixels).
const (
	pixelTol    = 24
	maxDiffFrac = 0.01
)

func goldenFigures(t *testing.T) map[string]struct {
	fig  *Figure
	size Size
} {
	t.Helper()
	// Default figure sizes at low resolution: 480 × 320 px for one panel,
	// 640 px wide for the panel grids.
	small := Size{DPI: 80}
	wide := Size{DPI: 64}
	cs, err := Curves(CurveOptions{Speeds: Betas(0.5, 0.9), Temps: []float64{3000, 30000}, Points: 91})
	if err != nil {
		t.Fatal(err)
	}
	ab, err := AberrationFigure(cs.Aberration)
	if err != nil {
		t.Fatal(err)
	}
	dop, err := DopplerFigure(cs.Doppler)
	if err != nil {
		t.Fatal(err)
	}
	dv, err := DeltaVFigure(cs.DeltaV[1:])
	if err != nil {
		t.Fatal(err)
	}
	br, err := BrighteningFigure(cs.Brightening)
	if err != nil {
		t.Fatal(err)
	}
	cv, err := ConventionsFigure(cs.Conventions)
	if err != nil {
		t.Fatal(err)
	}
	// The census golden uses a seeded test sky, not the built-in one, so it
	// does not move when the synthetic-sky model changes.
	tab, err := Census(randomSky(3000, 11), Betas(0, 0.3, 0.6, 0.9, 0.99), CensusOptions{Heading: r3.Vec{Z: 1}, LimitMag: 6})
	if err != nil {
		t.Fatal(err)
	}
	ce, err := tab.Figure()
	if err != nil {
		t.Fatal(err)
	}
	return map[string]struct {
		fig  *Figure
		size Size
	}{
		"aberration":  {ab, small},
		"doppler":     {dop, small},
		"dv":          {dv, small},
		"brightening": {br, small},
		"conventions": {cv, wide},
		"census":      {ce, wide},
	}
}

func TestGolden(t *testing.T) {
	for name, g := range goldenFigures(t) {
		t.Run(name, func(t *testing.T) {
			var buf bytes.Buffer
			if err := g.fig.WritePNG(&buf, g.size); err != nil {
				t.Fatal(err)
			}
			path := filepath.Join(goldenDir, name+"_golden.png")
			if *regen {
				if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
					t.Fatal(err)
				}
				return
			}
			want, err := os.ReadFile(path)
			if err != nil {
				t.Fatalf("%v (run with -regen to create it)", err)
			}
			frac, err := diffFraction(buf.Bytes(), want)
			if err != nil {
				t.Fatal(err)
			}
			if frac > maxDiffFrac {
				out := filepath.Join(t.TempDir(), name+"_have.png")
				_ = os.WriteFile(out, buf.Bytes(), 0o644)
				t.Errorf("%s: %.3f%% of pixels differ by more than %d (allowed %.1f%%); have written to %s",
					name, 100*frac, pixelTol, 100*maxDiffFrac, out)
			}
		})
	}
}

// diffFraction decodes two PNGs and returns the fraction of pixels whose
// channels differ by more than pixelTol (8-bit). Different sizes are an error.
func diffFraction(have, want []byte) (float64, error) {
	a, err := png.Decode(bytes.NewReader(have))
	if err != nil {
		return 0, err
	}
	b, err := png.Decode(bytes.NewReader(want))
	if err != nil {
		return 0, err
	}
	if a.Bounds() != b.Bounds() {
		return 1, &sizeError{a.Bounds(), b.Bounds()}
	}
	r := a.Bounds()
	n := 0
	for y := r.Min.Y; y < r.Max.Y; y++ {
		for x := r.Min.X; x < r.Max.X; x++ {
			if pixelDiffers(a, b, x, y) {
				n++
			}
		}
	}
	return float64(n) / float64(r.Dx()*r.Dy()), nil
}

type sizeError struct{ have, want image.Rectangle }

func (e *sizeError) Error() string {
	return "golden size differs: have " + e.have.String() + ", want " + e.want.String()
}

func pixelDiffers(a, b image.Image, x, y int) bool {
	r1, g1, b1, a1 := a.At(x, y).RGBA()
	r2, g2, b2, a2 := b.At(x, y).RGBA()
	for _, d := range [][2]uint32{{r1, r2}, {g1, g2}, {b1, b2}, {a1, a2}} {
		v := int(d[0]>>8) - int(d[1]>>8)
		if v > pixelTol || v < -pixelTol {
			return true
		}
	}
	return false
}

func TestGoldenComparisonFails(t *testing.T) {
	// The comparison must be able to fail: a figure against a different
	// figure's golden differs in far more than 1 % of pixels.
	figs := goldenFigures(t)
	var a, b bytes.Buffer
	if err := figs["aberration"].fig.WritePNG(&a, figs["aberration"].size); err != nil {
		t.Fatal(err)
	}
	if err := figs["doppler"].fig.WritePNG(&b, figs["aberration"].size); err != nil {
		t.Fatal(err)
	}
	frac, err := diffFraction(a.Bytes(), b.Bytes())
	if err != nil {
		t.Fatal(err)
	}
	if frac <= maxDiffFrac {
		t.Errorf("aberration vs doppler figure: only %.3f%% of pixels differ", 100*frac)
	}
}

func TestFigureSVGAndSize(t *testing.T) {
	figs := goldenFigures(t)
	f := figs["census"].fig
	var buf bytes.Buffer
	if err := f.WriteSVG(&buf, Size{}); err != nil {
		t.Fatal(err)
	}
	if s := buf.String(); !strings.Contains(s, "<svg") || !strings.Contains(s, "half-count radius") {
		t.Errorf("SVG lacks <svg> or a panel title (%d bytes)", buf.Len())
	}
	buf.Reset()
	if err := f.WritePNG(&buf, Size{Width: 4 * vg.Inch, Height: 3 * vg.Inch, DPI: 50}); err != nil {
		t.Fatal(err)
	}
	img, err := png.Decode(&buf)
	if err != nil {
		t.Fatal(err)
	}
	if b := img.Bounds(); b.Dx() != 200 || b.Dy() != 150 {
		t.Errorf("4×3 in at 50 dpi: %v, want 200×150 px", b)
	}
	if err := f.WritePNG(&buf, Size{DPI: 5}); err == nil {
		t.Error("5 dpi: no error")
	}
	if err := (&Figure{Name: "empty"}).WritePNG(&buf, Size{}); err == nil {
		t.Error("figure without panels: no error")
	}
}
