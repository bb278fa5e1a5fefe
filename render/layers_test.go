package render

import (
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
