package job

import (
	"math"
	"testing"

	"github.com/skyframe/skyframe/flight"
	"github.com/skyframe/skyframe/render"
)

// A quarter-size preview keeps the full frame's surface brightness per
// pixel: its unresolved layer (drawn at ExtendedScale 1/16, the ratio of
// the pixels' solid angles) has the full frame's mean value per pixel
// within 1 %, where drawing it at the preview pixels' own solid angle
// would make it 16 times brighter; its stars keep their light (the star
// layer's total within 1 %: the PSF's width is in pixels, so their peaks
// too); the sidecar says so.
func TestPreviewKeepsSurfaceBrightness(t *testing.T) {
	cam := "projection = \"fisheye\"\nsize = \"512x512\""
	full, prev := benchLoad(t, cam), benchLoad(t, cam)
	prev.Preview(0.25, 1)
	if prev.Frame.Width != 128 || prev.ExtendedScale != 1.0/16 {
		t.Fatalf("preview %d px wide, ExtendedScale %g: want 128, 1/16", prev.Frame.Width, prev.ExtendedScale)
	}
	layers := func(j *Job) (stars, unresolved []float32, f *render.Frame) {
		t.Helper()
		j.Plan.Output.EXR = true
		fs, err := j.Plan.FrameState(1)
		if err != nil {
			t.Fatal(err)
		}
		obs, err := flight.Observer(fs.State)
		if err != nil {
			t.Fatal(err)
		}
		proj, err := j.Projection(fs)
		if err != nil {
			t.Fatal(err)
		}
		jf, _, prep, _, err := j.frameSky(nil, 1, fs, obs, proj)
		if err != nil {
			t.Fatal(err)
		}
		f, _, kept, _, err := jf.RenderLinear(prep, fs, obs, proj)
		if err != nil {
			t.Fatal(err)
		}
		for _, c := range kept {
			switch c.Name {
			case render.LayerStars:
				stars = c.Pix
			case render.LayerUnresolved:
				unresolved = c.Pix
			}
		}
		if stars == nil || unresolved == nil {
			t.Fatalf("kept %d contributions, want the stars and the unresolved layer", len(kept))
		}
		return stars, unresolved, f
	}
	mean := func(p []float32) float64 {
		s := 0.0
		for _, v := range p {
			s += float64(v)
		}
		return s / float64(len(p))
	}
	s0, u0, _ := layers(full)
	s1, u1, f1 := layers(prev)
	if r := mean(u1) / mean(u0); math.Abs(r-1) > 0.01 {
		t.Errorf("unresolved light per pixel: preview/full %.4f, want 1 ± 1 %%", r)
	}
	if r := mean(s1) / (16 * mean(s0)); math.Abs(r-1) > 0.01 { // the same light on 1/16 of the pixels
		t.Errorf("the stars' light: preview/full %.4f, want 1 ± 1 %% (point stars are not extended light)", r)
	}
	if side := f1.Sidecar("skyframe", "test", nil, render.ToneShoulder); side.ExtendedScale != 1.0/16 {
		t.Errorf("sidecar extended_scale %g, want 1/16", side.ExtendedScale)
	}
}
