package render

import (
	"slices"
	"testing"

	"github.com/skyframe/skyframe/camera"
)

const layersGoldenDir = "../testdata/layers"

// The CMB layer, forward at the speed where it is 2500 K straight ahead
// [cp: regression against a reviewed render, regenerated with -regen].
func TestLayersGoldenCMB(t *testing.T) {
	b := boostForForwardT(t, 2500)
	f := blankFrame(t, looking(t, camera.Pinhole, 160, 90, 1.5, b.Dir()), camera.Observer{Boost: b})
	if err := (Layers{CMB: true}).AddLinear(f); err != nil {
		t.Fatal(err)
	}
	checkGoldenIn(t, layersGoldenDir, "cmb", f.ToNRGBA(ToneShoulder))
}

// The zero Layers adds no light.
func TestLayersZero(t *testing.T) {
	f := blankFrame(t, looking(t, camera.Pinhole, 8, 8, 0, axisX), camera.Observer{})
	if err := (Layers{}).AddLinear(f); err != nil {
		t.Fatal(err)
	}
	if r, g, b := f.Sum(); r+g+b != 0 {
		t.Error("zero Layers added light")
	}
}

// AddLinearKept leaves the frame bit-identical to AddLinear and returns
// contributions that are the stars before and exactly what each layer
// added (their float32 sum in Names order is the frame).
func TestAddLinearKept(t *testing.T) {
	b := boostForForwardT(t, 2500)
	p := looking(t, camera.Pinhole, 40, 24, 1.5, b.Dir())
	l := Layers{CMB: true, Unresolved: UniformSky{T: []float64{5000}, W: []float64{1e-13}}}
	ref := blankFrame(t, p, camera.Observer{Boost: b})
	psf, err := NewPSF(1.5)
	if err != nil {
		t.Fatal(err)
	}
	ref.splat(10.3, 7.7, [3]float64{1, 0.5, 0.25}, 1.2, &psf)
	f := blankFrame(t, p, camera.Observer{Boost: b})
	f.splat(10.3, 7.7, [3]float64{1, 0.5, 0.25}, 1.2, &psf)
	stars := slices.Clone(f.Pix)
	if err := l.AddLinear(ref); err != nil {
		t.Fatal(err)
	}
	kept, err := l.AddLinearKept(f)
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(f.Pix, ref.Pix) {
		t.Fatal("AddLinearKept changed the frame's bits")
	}
	names := l.Names()
	if len(kept) != 3 || !slices.Equal(names, []string{"stars", "cmb", "unresolved"}) {
		t.Fatalf("%d contributions, names %v", len(kept), names)
	}
	for i, c := range kept {
		if c.Name != names[i] {
			t.Errorf("contribution %d is %s, want %s", i, c.Name, names[i])
		}
	}
	if !slices.Equal(kept[0].Pix, stars) {
		t.Error("stars contribution is not the buffer before the layers")
	}
	for i := range f.Pix {
		if s := kept[0].Pix[i] + kept[1].Pix[i] + kept[2].Pix[i]; s != f.Pix[i] {
			t.Fatalf("pixel value %d: contributions sum to %g, frame %g", i, s, f.Pix[i])
		}
	}
	if kept[1].Pix[3*(12*40+20)+1] <= 0 || kept[2].Pix[3*(12*40+20)+1] <= 0 {
		t.Error("a layer added no light at the centre")
	}
}
