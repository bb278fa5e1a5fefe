package job

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"os"
	"path/filepath"
	"reflect"
	"testing"

	"github.com/skyframe/skyframe/render"
)

// A held view's frames are the same files, byte for byte, with the layer
// left to the tone map (RunOptions.HeldLayer) and without, with and without
// drawing ahead, and their luminances the same; the held frames did lend
// the layer. With FITS files the layer is never left pending.
func TestRunHeldLayer(t *testing.T) {
	cam := "projection = \"fisheye\"\nsize = \"200x200\""
	frames := []int{0, 1, 2, 3, 4, 5}
	var ref *Job
	var refRes RunResult
	for _, o := range []RunOptions{{}, {HeldLayer: true}, {HeldLayer: true, Overlap: true}} {
		j := benchLoad(t, cam)
		j.Frames = frames
		res, err := j.Run(context.Background(), o)
		if err != nil {
			t.Fatal(err)
		}
		if lent := j.Layers.DiffuseOptions.Memo.Lent(); (lent > 0) != o.HeldLayer || o.HeldLayer && lent != len(frames)-1 {
			t.Fatalf("%+v: %d layers lent", o, lent)
		}
		if ref == nil {
			ref, refRes = j, res
			continue
		}
		if !reflect.DeepEqual(res.Lum, refRes.Lum) {
			t.Errorf("%+v: luminances differ", o)
		}
		for _, i := range frames {
			ff := j.Files(i)
			for _, name := range []string{ff.PNG, ff.Sidecar} {
				if !sameFile(t, ref.OutDir, j.OutDir, name) {
					t.Errorf("%+v: frame %d: %s differs", o, i, name)
				}
			}
		}
	}
	j := benchLoad(t, cam)
	j.Frames = frames
	j.Plan.Output.FITS = true
	if j.HeldLayerBytes() != 0 {
		t.Errorf("with FITS: HeldLayerBytes %d", j.HeldLayerBytes())
	}
	if _, err := j.Run(context.Background(), RunOptions{HeldLayer: true}); err != nil {
		t.Fatal(err)
	}
	if lent := j.Layers.DiffuseOptions.Memo.Lent(); lent != 0 {
		t.Errorf("with FITS: %d layers lent", lent)
	}
}

// sameFile reports whether file name (relative) has the same bytes in
// directories a and b; a file that cannot be read stops the test.
func sameFile(t *testing.T, a, b, name string) bool {
	t.Helper()
	x, err := os.ReadFile(filepath.Join(a, name))
	if err != nil {
		t.Fatal(err)
	}
	y, err := os.ReadFile(filepath.Join(b, name))
	if err != nil {
		t.Fatal(err)
	}
	return bytes.Equal(x, y)
}

// A view held, turned and held again: the frames of the second hold are
// those drawn without the held layer, byte for byte (they lend their own
// layer, not the image kept for the first hold).
func TestRunHeldLayerTurn(t *testing.T) {
	cam := "projection = \"fisheye\"\nsize = \"120x120\"\nshutter = 0\n" +
		"[[camera.look]]\nat = 0\nlook = \"0,-10\"\n[[camera.look]]\nat = 0.5\nlook = \"0,-10\"\n" +
		"[[camera.look]]\nat = 1\nlook = \"0,10\"\n[[camera.look]]\nat = 2\nlook = \"0,10\""
	frames := []int{0, 1, 2, 20, 21, 40, 41, 42}
	var dirs [2]string
	for k, o := range []RunOptions{{}, {HeldLayer: true}} {
		j := benchLoad(t, cam)
		j.Frames = frames
		if _, err := j.Run(context.Background(), o); err != nil {
			t.Fatal(err)
		}
		if lent := j.Layers.DiffuseOptions.Memo.Lent(); (lent > 0) != o.HeldLayer {
			t.Fatalf("%+v: %d layers lent", o, lent)
		}
		dirs[k] = j.OutDir
		if k == 0 {
			continue
		}
		for _, i := range frames {
			if name := j.Files(i).PNG; !sameFile(t, dirs[0], dirs[1], name) {
				t.Errorf("frame %d: %s differs with the held layer", i, name)
			}
		}
	}
}

// A run that draws each frame while the previous one is written
// (RunOptions.Overlap) writes the very files of a run that does one frame
// at a time, reports the same luminances and calls Done in frame order;
// interrupted, it stops after a whole frame, leaving no partial files.
func TestRunOverlap(t *testing.T) {
	cam := "size = \"160x90\"\nfov = 70"
	seq, ovl := benchLoad(t, cam), benchLoad(t, cam)
	frames := []int{0, 1, 2, 3, 4, 5}
	for _, j := range []*Job{seq, ovl} {
		j.Frames = frames
		j.Plan.Output.FITS = true
	}
	var order []int
	rs, err := seq.Run(context.Background(), RunOptions{})
	if err != nil {
		t.Fatal(err)
	}
	ro, err := ovl.Run(context.Background(), RunOptions{Overlap: true, Done: func(i int) { order = append(order, i) }})
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(order, frames) {
		t.Errorf("Done called for %v, want %v", order, frames)
	}
	if rs.Rendered != len(frames) || ro.Rendered != len(frames) || !reflect.DeepEqual(rs.Lum, ro.Lum) {
		t.Errorf("rendered %d and %d frames; luminances equal: %v", rs.Rendered, ro.Rendered, reflect.DeepEqual(rs.Lum, ro.Lum))
	}
	for _, i := range frames {
		ff := seq.Files(i)
		for _, name := range []string{ff.PNG, ff.FITS, ff.Sidecar} {
			if !sameFile(t, seq.OutDir, ovl.OutDir, name) {
				t.Errorf("frame %d: %s differs with overlap", i, name)
			}
		}
	}

	// Interrupted after frame 2 is drawn: frames 0–2 are written whole,
	// nothing of 3–5.
	again := benchLoad(t, cam)
	again.Frames = frames
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	res, err := again.Run(ctx, RunOptions{Overlap: true, Done: func(i int) {
		if i == 1 { // frame 2 is drawn by now; it is written before the run stops
			cancel()
		}
	}})
	if !errors.Is(err, ErrInterrupted) || res.Rendered != 3 {
		t.Fatalf("interrupted run: %d frames, error %v; want 3 and ErrInterrupted", res.Rendered, err)
	}
	ents, err := os.ReadDir(filepath.Join(again.OutDir, "frames"))
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, e := range ents {
		names = append(names, e.Name())
	}
	if want := []string{"00000.json", "00000.png", "00001.json", "00001.png", "00002.json", "00002.png"}; !reflect.DeepEqual(names, want) {
		t.Errorf("after the interruption: %v, want %v", names, want)
	}
}

// A flight written only as 8-bit PNG draws its unresolved layer at
// render.EightBitTolerance and render.EightBitCodes (within one code of the
// exact layer, TestDiffuseEightBitTolerance); one that also writes FITS
// keeps the default for its linear file. The sidecar records which.
func TestRunEightBitTolerance(t *testing.T) {
	for _, c := range []struct {
		output      string
		want, codes float64
	}{
		{"", render.EightBitTolerance, render.EightBitCodes},
		{"fits = true", render.DefaultSmoothTolerance, 0},
	} {
		j := benchLoadOutput(t, "projection = \"fisheye\"\nsize = \"64x64\"", c.output)
		if have := j.Layers.DiffuseOptions.GridTolerance(); have != c.want {
			t.Errorf("%q: grid tolerance %g, want %g", c.output, have, c.want)
		}
		j.Frames = []int{0}
		if _, err := j.Run(context.Background(), RunOptions{}); err != nil {
			t.Fatal(err)
		}
		b, err := os.ReadFile(filepath.Join(j.OutDir, j.Files(0).Sidecar))
		if err != nil {
			t.Fatal(err)
		}
		var side render.Sidecar
		if err := json.Unmarshal(b, &side); err != nil {
			t.Fatal(err)
		}
		if side.Unresolved == nil || side.Unresolved.GridTolerance != c.want || side.Unresolved.GridCodes != c.codes {
			t.Errorf("%q: sidecar unresolved %+v, want grid_tolerance %g, grid_codes %g", c.output, side.Unresolved, c.want, c.codes)
		}
	}
}
