package render

import (
	"flag"
	"image"
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/internal/golden"
	"github.com/skyframe/skyframe/spectrum"
)

// regen rewrites the golden images instead of comparing with them:
// go test ./render -run Golden -regen
var regen = flag.Bool("regen", false, "rewrite render golden images")

const goldenDir = "../testdata/render"

// handmade is a small invented star list (not from any catalogue) spread
// around +X with a range of temperatures and magnitudes.
func handmade() *catalog.Stars {
	s := &catalog.Stars{Epoch: 2000, Source: "handmade", Format: "in-code"}
	rows := []struct {
		name     string
		ra, dec  float64
		v, t, pc float64
	}{
		{"Alpha", 0, 0, 0.5, 5800, 10},
		{"Beta", 8, 5, 1.2, 3200, math.Inf(1)},
		{"Gamma", 352, -6, 1.8, 12000, 40},
		{"Delta", 15, -12, 2.5, 25000, 200},
		{"Epsilon", 340, 14, 0.0, 9500, 8},
		{"Zeta", 25, 20, 3.1, 4200, 60},
		{"Eta", 330, -20, 2.2, 7000, math.Inf(1)},
		{"Theta", 45, 2, 1.0, 2600, 30},
		{"Iota", 300, 1, 1.5, 40000, 300},
		{"Kappa", 120, 30, 0.8, 6500, 15},
		{"Lambda", 180, -10, 0.3, 5000, 12},
		{"Mu", 4, -2, 4.5, 5500, 25},
	}
	for i, r := range rows {
		fl := catalog.Flag(0)
		if math.IsInf(r.pc, 1) {
			fl = catalog.FlagNoDistance
		}
		s.Append(catalog.Star{ID: int64(i + 1), Name: r.name, RA: r.ra, Dec: r.dec, Dist: r.pc, Vmag: r.v, Teff: r.t,
			BV: math.NaN(), RV: math.NaN(), Flags: fl})
	}
	return s
}

type goldenCase struct {
	name string
	kind camera.Kind
	w, h int
	beta float64
	tone ToneMode
	beam spectrum.Beaming
}

var goldenCases = []goldenCase{
	{"pinhole_rest", camera.Pinhole, 64, 48, 0, ToneShoulder, spectrum.BeamingExact},
	{"pinhole_b05", camera.Pinhole, 64, 48, 0.5, ToneShoulder, spectrum.BeamingExact},
	{"fisheye_b09", camera.Fisheye, 64, 64, 0.9, ToneLinear, spectrum.BeamingExact},
	{"equirect_b07_d4", camera.Equirect, 96, 48, 0.7, ToneShoulder, spectrum.BeamingD4},
}

func (c goldenCase) render(t *testing.T) *image.NRGBA {
	t.Helper()
	o, err := camera.LookAt(axisX, axisZ, 0)
	if err != nil {
		t.Fatal(err)
	}
	fwd := r3.Unit(r3.Vec{X: 1, Y: 0.1, Z: 0.05})
	f, err := Render(handmade(), Options{
		Projection: camera.Projection{Kind: c.kind, Width: c.w, Height: c.h, Orient: o},
		Observer:   observer(t, fwd, c.beta), Beaming: c.beam, FWHM: 1.8, Exposure: 1,
	})
	if err != nil {
		t.Fatal(err)
	}
	if f.Stats.Drawn == 0 {
		t.Fatalf("%s: nothing drawn: %+v", c.name, f.Stats)
	}
	return f.ToNRGBA(c.tone)
}

// Golden images [cp: regression against reviewed renders, regenerated with
// -regen]: per-channel difference at most 2/255, mean below 0.1/255.
func TestGolden(t *testing.T) {
	for _, c := range goldenCases {
		t.Run(c.name, func(t *testing.T) {
			img := c.render(t)
			checkGoldenIn(t, goldenDir, c.name, img)
		})
	}
}

// checkGoldenIn compares img with dir/<name>_golden.png within the package
// tolerance (2/255 per channel, mean 0.1/255), or rewrites it under -regen.
func checkGoldenIn(t *testing.T, dir, name string, img *image.NRGBA) {
	t.Helper()
	golden.Check(t, dir, name, img, *regen, 2, 0.1)
}
