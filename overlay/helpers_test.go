package overlay

import (
	"flag"
	"image"
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/internal/golden"
)

// regen rewrites the golden images instead of comparing with them:
// go test ./overlay -run Golden -regen
var regen = flag.Bool("regen", false, "rewrite overlay golden images")

const goldenDir = "../testdata/layers"

var (
	axisX = r3.Vec{X: 1}
	axisZ = r3.Vec{Z: 1}
)

// handmade is a small invented star list (not from any catalogue) spread
// around +X with a range of temperatures and magnitudes (the same as the
// render package's test list).
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

// looking returns a projection looking along dir with +Z up.
func looking(t testing.TB, kind camera.Kind, w, h int, fov float64, dir r3.Vec) camera.Projection {
	t.Helper()
	o, err := camera.LookAt(dir, axisZ, 0)
	if err != nil {
		t.Fatal(err)
	}
	p := camera.Projection{Kind: kind, Width: w, Height: h, FOV: fov, Orient: o}
	if err := p.Prepare(); err != nil {
		t.Fatal(err)
	}
	return p
}

func observer(t testing.TB, dir r3.Vec, beta float64) camera.Observer {
	t.Helper()
	b, err := camera.NewBoost(dir, beta)
	if err != nil {
		t.Fatal(err)
	}
	return camera.Observer{Boost: b}
}

// checkGolden compares img with testdata/layers/<name>_golden.png within
// 2/255 per channel and a mean of 0.1/255, or rewrites it under -regen.
func checkGolden(t *testing.T, name string, img *image.NRGBA) {
	t.Helper()
	golden.Check(t, goldenDir, name, img, *regen, 2, 0.1)
}
