package render

import (
	"math/rand/v2"
	"slices"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/spectrum"
)

// memoCase is one frame of the unresolved layer: the built-in sky seen
// from a moving 192² fisheye whose buffer already holds light (as the
// stars leave it before the layers are added).
type memoCase struct {
	beta      float64
	look      r3.Vec
	fov, tilt float64
	exposure  float64
	white     spectrum.WhitePoint
	tol       float64
	pos       r3.Vec
	sky       UnresolvedSky
	workers   int
}

func (c memoCase) frame(t *testing.T) *Frame {
	t.Helper()
	boost, err := camera.NewBoost(camera.FromGalacticLB(10, 5), c.beta)
	if err != nil {
		t.Fatal(err)
	}
	p := looking(t, camera.Fisheye, 192, 192, c.fov, c.look)
	p.Tilt = c.tilt
	if err := p.Prepare(); err != nil {
		t.Fatal(err)
	}
	f := blankFrame(t, p, camera.Observer{Boost: boost, Position: c.pos})
	f.Scale = ExposureScale(c.exposure)
	f.Options.Color.White = c.white
	f.Options.Workers = c.workers
	r := rand.New(rand.NewPCG(5, 6))
	for i := range f.Pix {
		f.Pix[i] = float32(r.Float64() * 1e-3)
	}
	return f
}

// draw adds c's layer to a new frame, with memo m (nil: none), and returns
// the frame's pixels.
func (c memoCase) draw(t *testing.T, m *DiffuseMemo) []float32 {
	t.Helper()
	f := c.frame(t)
	if err := AddDiffuse(f, c.sky, DiffuseOptions{Memo: m, Tolerance: c.tol}); err != nil {
		t.Fatal(err)
	}
	return f.Pix
}

// A frame whose layer has the inputs of the memo's replays it, bit for bit
// the frame drawn without the memo (for 1 and 3 workers), and so does one
// seen from elsewhere (the layer does not depend on the position); a frame
// that changes any input the layer depends on — the speed, the view's
// direction, field or tilt, the exposure, the white point, the grid's
// tolerance or the sky — is drawn again, and is the frame drawn without
// the memo too.
func TestDiffuseMemoReplay(t *testing.T) {
	u := builtInUnresolved(t)
	base := memoCase{beta: 0.5, look: camera.FromGalacticLB(0, 2), fov: 40, sky: u, workers: 1}
	m := new(DiffuseMemo)
	if got, want := base.draw(t, m), base.draw(t, nil); !slices.Equal(got, want) {
		t.Fatal("the first frame drawn with the memo differs from the frame drawn without")
	}
	if m.Replays() != 0 {
		t.Fatalf("%d replays after one frame", m.Replays())
	}
	same := []memoCase{base, base, base}
	same[1].workers = 3
	same[2].pos = r3.Vec{X: 1.3, Y: -0.2, Z: 4}
	for k, c := range same {
		if got, want := c.draw(t, m), c.draw(t, nil); !slices.Equal(got, want) {
			t.Fatalf("same layer %d: the replayed frame differs from the frame drawn without the memo", k)
		}
		if m.Replays() != k+1 {
			t.Fatalf("same layer %d: %d replays, want %d", k, m.Replays(), k+1)
		}
	}
	other := map[string]func(*memoCase){
		"speed":     func(c *memoCase) { c.beta = 0.49 },
		"direction": func(c *memoCase) { c.look = camera.FromGalacticLB(0.01, 2) },
		"field":     func(c *memoCase) { c.fov = 39.9 },
		"tilt":      func(c *memoCase) { c.tilt = 3 },
		"exposure":  func(c *memoCase) { c.exposure = 0.1 },
		"white":     func(c *memoCase) { c.white = spectrum.WhiteD50 },
		"tolerance": func(c *memoCase) { c.tol = 2e-3 },
		"sky":       func(c *memoCase) { c.sky = &countingSky{UnresolvedSky: u} },
	}
	for name, change := range other {
		if testing.Short() && name != "speed" && name != "direction" && name != "exposure" {
			continue
		}
		c := base
		change(&c)
		n := m.Replays()
		// Twice: the changed layer is drawn, then replayed; then the
		// base layer is drawn again.
		for k := range 2 {
			if got, want := c.draw(t, m), c.draw(t, nil); !slices.Equal(got, want) {
				t.Fatalf("%s, frame %d: the frame differs from the frame drawn without the memo", name, k)
			}
		}
		if m.Replays() != n+1 {
			t.Fatalf("%s: %d replays over two frames, want 1", name, m.Replays()-n)
		}
		if got, want := base.draw(t, m), base.draw(t, nil); !slices.Equal(got, want) || m.Replays() != n+1 {
			t.Fatalf("%s: back to the first layer: equal %v, %d replays, want a new drawing", name, slices.Equal(got, want), m.Replays()-n-1)
		}
	}
}

// A sky that is not comparable (UniformSky holds slices) and an Exact layer
// are not kept, and a record is kept exactly when it is within the limit.
func TestDiffuseMemoNotKept(t *testing.T) {
	u := builtInUnresolved(t)
	uni := UniformSky{T: []float64{5000}, W: []float64{1e-13}}
	m := new(DiffuseMemo)
	for range 2 {
		memoCase{beta: 0.5, look: axisX, fov: 180, sky: uni}.draw(t, m)
		f := memoCase{beta: 0.5, look: axisX, fov: 180, sky: u}.frame(t)
		if err := AddDiffuse(f, u, DiffuseOptions{Memo: m, Exact: true}); err != nil {
			t.Fatal(err)
		}
	}
	if m.Replays() != 0 || m.rec != nil {
		t.Errorf("%d replays, record kept %v: want none", m.Replays(), m.rec != nil)
	}
	// A record is kept exactly when it is within the limit.
	c := memoCase{beta: 0.5, look: camera.FromGalacticLB(0, 2), fov: 180, sky: u}
	rec := new(gridRecord)
	f := c.frame(t)
	d, err := prepareDiffuse(f, u, DiffuseOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if err := d.drawRecord(d.newEval, rec); err != nil {
		t.Fatal(err)
	}
	b := rec.bytes()
	if b > MemoLimit(192, 192) {
		t.Errorf("record %d bytes, above the %d a 192² frame keeps", b, MemoLimit(192, 192))
	}
	defer func(l int64) { memoTestLimit = l }(memoTestLimit)
	for _, limit := range []int64{b - 1, b} {
		memoTestLimit = limit
		m := new(DiffuseMemo)
		c.draw(t, m)
		c.draw(t, m)
		if want := map[bool]int{true: 1, false: 0}[limit >= b]; m.Replays() != want {
			t.Errorf("record %d bytes, limit %d: %d replays, want %d", b, limit, m.Replays(), want)
		}
	}
}

// MemoLimit: 16 bytes per pixel (an exactly evaluated pixel's record) for
// small frames, at most 64 MiB unless 4 bytes per pixel is more.
func TestMemoLimit(t *testing.T) {
	for _, c := range []struct {
		w, h int
		want int64
	}{
		{192, 192, 16 * 192 * 192},
		{1920, 1080, 16 * 1920 * 1080},
		{2048, 2048, 64 << 20},
		{4096, 4096, 4 * 4096 * 4096},
		{8192, 8192, 4 * 8192 * 8192},
	} {
		if have := MemoLimit(c.w, c.h); have != c.want {
			t.Errorf("MemoLimit(%d, %d) = %d, want %d", c.w, c.h, have, c.want)
		}
	}
}

// BenchmarkDiffuseReplay4096 replays a held 4096² fisheye's unresolved
// layer (0.9 c toward the galactic centre) from its memo: the per-pixel
// interpolation of the adaptive grid's cells and the exact pixels' sums,
// all a held flight frame spends on the layer.
func BenchmarkDiffuseReplay4096(b *testing.B) {
	u, f := galacticCentre4096(b)
	m := new(DiffuseMemo)
	if err := AddDiffuse(f, u, DiffuseOptions{Memo: m}); err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	c0 := cpuSeconds()
	b.ResetTimer()
	for b.Loop() {
		if err := AddDiffuse(f, u, DiffuseOptions{Memo: m}); err != nil {
			b.Fatal(err)
		}
	}
	if m.Replays() == 0 {
		b.Fatal("the layer was not replayed")
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(f.W*f.H), "ns/pixel")
	b.ReportMetric((cpuSeconds()-c0)/float64(b.N), "CPU-s/op")
}
