package job

import (
	"testing"

	"github.com/skyframe/skyframe/imgfile"
)

// A cruise held on one view (0.5 c, the camera fixed on the ship) draws the
// unresolved layer once: later frames replay it, and their files (PNG,
// FITS, sidecar) are byte-identical to the frames of the same plan drawn
// without the memo. Frames 512² fisheye: their layers are kept too
// (render.MemoLimit), at about 12 bytes per pixel.
func TestFlightDiffuseMemo(t *testing.T) {
	cam := "projection = \"fisheye\"\nsize = \"512x512\""
	with, without := benchLoad(t, cam), benchLoad(t, cam)
	if with.Layers.DiffuseOptions.Memo == nil {
		t.Fatal("the job has no memo for its unresolved layer")
	}
	without.Layers.DiffuseOptions.Memo = nil
	for _, j := range []*Job{with, without} {
		j.Plan.Output.FITS = true
	}
	enc := &imgfile.PNGEncoder{}
	for _, i := range []int{3, 4, 5} {
		for _, j := range []*Job{with, without} {
			if _, err := j.RenderFrame(nil, enc, i); err != nil {
				t.Fatal(err)
			}
		}
		p := with.Files(i)
		for _, name := range []string{p.PNG, p.FITS, p.Sidecar} {
			if !sameFile(t, with.OutDir, without.OutDir, name) {
				t.Errorf("frame %d: %s differs with the memo", i, name)
			}
		}
	}
	if n := with.Layers.DiffuseOptions.Memo.Replays(); n != 2 {
		t.Errorf("%d replays over 3 frames, want 2", n)
	}
}
