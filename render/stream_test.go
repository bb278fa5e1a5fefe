package render

import (
	"errors"
	"io"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/catalog"
)

// sameFrame fails unless two frames have bit-identical pixels, Doppler
// channels and Stats.
func sameFrame(t *testing.T, have, want *Frame) {
	t.Helper()
	if len(have.Pix) != len(want.Pix) {
		t.Fatalf("Pix length: have %d, want %d", len(have.Pix), len(want.Pix))
	}
	for i := range want.Pix {
		if math.Float32bits(have.Pix[i]) != math.Float32bits(want.Pix[i]) {
			t.Fatalf("Pix[%d]: have %v, want %v (bits differ)", i, have.Pix[i], want.Pix[i])
		}
	}
	if len(have.Doppler) != len(want.Doppler) {
		t.Fatalf("Doppler length: have %d, want %d", len(have.Doppler), len(want.Doppler))
	}
	for i := range want.Doppler {
		if math.Float32bits(have.Doppler[i]) != math.Float32bits(want.Doppler[i]) {
			t.Fatalf("Doppler[%d]: have %v, want %v", i, have.Doppler[i], want.Doppler[i])
		}
	}
	if !reflect.DeepEqual(have.Stats, want.Stats) {
		t.Fatalf("Stats:\nhave %+v\nwant %+v", have.Stats, want.Stats)
	}
	if have.Scale != want.Scale || !reflect.DeepEqual(have.Options, want.Options) {
		t.Fatalf("Scale/Options differ: have %v %+v, want %v %+v", have.Scale, have.Options, want.Scale, want.Options)
	}
}

// TestRenderStreamMatchesRender: a catalogue streamed in 3 chunks (of
// lengths that are not multiples of the 8192-star transform chunk or of
// each other) renders bit-identically to Render on the whole, for every
// projection (equirect wrap and cube clipping included), with parallax,
// Doppler channel and a brightest list that spans chunks. Exact equality
// is the contract [cp: determinism of IEEE 754 arithmetic in fixed order].
func TestRenderStreamMatchesRender(t *testing.T) {
	n := 30_000
	if testing.Short() {
		n = 12_000
	}
	stars := randomStars(n, -1, 9, 21)
	stars.Names = map[int]string{3: "three", n/2 + 1: "middle", n - 2: "late"}
	obs := observer(t, r3.Unit(r3.Vec{X: 1, Y: 0.3, Z: 0.2}), 0.6)
	obs.Position = r3.Vec{X: 2, Y: -1, Z: 0.5}
	cases := []struct {
		kind camera.Kind
		w, h int
	}{{camera.Fisheye, 300, 300}, {camera.Pinhole, 320, 180}, {camera.Equirect, 400, 200}, {camera.Cube, 600, 100}}
	for _, c := range cases {
		opt := Options{Projection: proj(t, c.kind, c.w, c.h), Observer: obs, Exposure: 3, Doppler: true, Brightest: 25, Workers: 2}
		want, err := Render(stars, opt)
		if err != nil {
			t.Fatal(err)
		}
		if want.Stats.Drawn == 0 {
			t.Fatalf("%v: nothing drawn; the test would prove nothing", c.kind)
		}
		// Render computes the rest values per block; Prepare stores them
		// for a sequence of frames. Both must give the same bits.
		sameFrame(t, renderPrepared(t, Prepare, stars, opt), want)
		// Three chunks of unequal length: 9001, 9001, rest.
		have, err := RenderStream(Chunks(stars, 9001+(n-3*9001)/2), opt)
		if err != nil {
			t.Fatal(err)
		}
		sameFrame(t, have, want)
		// One star per chunk boundary the other way round: many small chunks.
		if !testing.Short() {
			have, err = RenderStream(Chunks(stars, 4097), opt)
			if err != nil {
				t.Fatal(err)
			}
			sameFrame(t, have, want)
		}
	}
}

// TestRenderIntoMatchesRender: one Frame drawn into again and again —
// for every projection, with and without the Doppler channel, in memory,
// prepared and streamed, across a size change and back — holds each time
// the bits Render gives, with the buffer reused whenever its size fits
// [cp: determinism of IEEE 754 arithmetic in fixed order].
func TestRenderIntoMatchesRender(t *testing.T) {
	stars := randomStars(20_000, -1, 9, 23)
	p, err := Prepare(stars)
	if err != nil {
		t.Fatal(err)
	}
	obs := observer(t, r3.Unit(r3.Vec{X: 1, Y: 0.3, Z: 0.2}), 0.6)
	obs.Position = r3.Vec{X: 2, Y: -1, Z: 0.5}
	var dst Frame
	var pix0 *float32
	for i, c := range []struct {
		kind    camera.Kind
		w, h    int
		doppler bool
		how     string
	}{
		{camera.Fisheye, 300, 300, false, "stars"}, {camera.Fisheye, 300, 300, false, "prepared"},
		{camera.Fisheye, 300, 300, true, "stream"}, {camera.Equirect, 400, 200, true, "stars"},
		{camera.Equirect, 400, 200, true, "prepared"},
		{camera.Cube, 600, 100, false, "prepared"}, {camera.Pinhole, 320, 180, false, "stream"},
		{camera.Pinhole, 320, 180, false, "prepared"}, {camera.Pinhole, 320, 180, false, "prepared"},
		{camera.Fisheye, 300, 300, false, "stars"},
	} {
		// The exposure changes from case to case, so a reused buffer
		// holds another frame's values until it is cleared.
		opt := Options{Projection: proj(t, c.kind, c.w, c.h), Observer: obs, Exposure: 3 + float64(i%2), Doppler: c.doppler, Workers: 1 + i%3}
		want, err := Render(stars, opt)
		if err != nil {
			t.Fatal(err)
		}
		reuse := len(dst.Pix) == 3*c.w*c.h && (dst.Doppler != nil) == c.doppler
		switch c.how {
		case "stars":
			err = RenderInto(&dst, stars, opt)
		case "prepared":
			err = p.RenderInto(&dst, opt)
		default:
			err = RenderStreamInto(&dst, Chunks(stars, 7001), opt)
		}
		if err != nil {
			t.Fatal(err)
		}
		sameFrame(t, &dst, want)
		if reuse != (pix0 == &dst.Pix[0]) {
			t.Errorf("case %d: buffer reused %v, want %v", i, pix0 == &dst.Pix[0], reuse)
		}
		pix0 = &dst.Pix[0]
	}
	if err := RenderInto(nil, stars, Options{}); err == nil {
		t.Error("RenderInto(nil): no error")
	}
}

// TestDirectMatchesPreparedAtSun: seen from the Sun the transform boosts
// the catalogue directions straight from the columns (stored or computed
// per block), and from elsewhere it moves them to the observer first;
// Prepare's stored rest values and PrepareOnce's computed ones give the
// frame bit for bit either way [cp].
func TestDirectMatchesPreparedAtSun(t *testing.T) {
	stars := randomStars(20_000, -1, 9, 22)
	for _, pos := range []r3.Vec{{}, {X: 0.3, Y: -0.2, Z: 0.1}} {
		obs := observer(t, r3.Unit(r3.Vec{X: -1, Y: 0.5, Z: 0.2}), 0.8)
		obs.Position = pos
		opt := Options{Projection: proj(t, camera.Equirect, 400, 200), Observer: obs, Exposure: 3, Doppler: true, Workers: 2}
		want, err := Render(stars, opt)
		if err != nil {
			t.Fatal(err)
		}
		if want.Stats.Drawn < 1000 {
			t.Fatalf("at %v: only %d stars drawn", pos, want.Stats.Drawn)
		}
		for _, prep := range []func(*catalog.Stars) (*Prepared, error){Prepare, PrepareOnce} {
			sameFrame(t, renderPrepared(t, prep, stars, opt), want)
		}
	}
	if p, _ := Prepare(stars); p.direct {
		t.Error("Prepare: no rest values stored")
	}
	if p, _ := PrepareOnce(stars); !p.direct {
		t.Error("PrepareOnce: rest values stored")
	}
}

// renderPrepared draws stars prepared by prep with opt.
func renderPrepared(t *testing.T, prep func(*catalog.Stars) (*Prepared, error), stars *catalog.Stars, opt Options) *Frame {
	t.Helper()
	p, err := prep(stars)
	if err != nil {
		t.Fatal(err)
	}
	f, err := p.Render(opt)
	if err != nil {
		t.Fatal(err)
	}
	return f
}

// TestRenderCacheFileMatchesRender: streaming from a cache file through
// catalog.OpenChunks with a budget that forces several chunks gives the
// frame Render gives.
func TestRenderCacheFileMatchesRender(t *testing.T) {
	stars := randomStars(150_000, -1, 10, 5)
	path := filepath.Join(t.TempDir(), "stars.skyc")
	fh, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	if err := catalog.WriteCache(fh, stars); err != nil {
		t.Fatal(err)
	}
	if err := fh.Close(); err != nil {
		t.Fatal(err)
	}
	opt := Options{Projection: proj(t, camera.Fisheye, 256, 256), Observer: observer(t, r3.Vec{X: 1}, 0.9), Exposure: 5}
	want, err := Render(stars, opt)
	if err != nil {
		t.Fatal(err)
	}
	budget := int64(256*256*streamBytesPerPixel + 65536*streamBytesPerRow) // → 65 536-row chunks, 3 of them
	if r := ChunkRows(opt, budget); r != 65536 {
		t.Fatalf("ChunkRows: have %d, want 65536", r)
	}
	have, err := RenderCacheFile(path, opt, budget)
	if err != nil {
		t.Fatal(err)
	}
	sameFrame(t, have, want)
}

func TestRenderStreamErrors(t *testing.T) {
	opt := Options{Projection: proj(t, camera.Fisheye, 64, 64)}
	if _, err := RenderStream(nil, opt); !errors.Is(err, ErrStars) {
		t.Errorf("nil source: have %v, want ErrStars", err)
	}
	empty := func() (*catalog.Stars, error) { return nil, io.EOF }
	if _, err := RenderStream(empty, opt); !errors.Is(err, ErrStars) {
		t.Errorf("empty stream: have %v, want ErrStars", err)
	}
	boom := errors.New("disk on fire")
	failing := func() (*catalog.Stars, error) { return nil, boom }
	if _, err := RenderStream(failing, opt); !errors.Is(err, boom) {
		t.Errorf("failing source: have %v, want %v", err, boom)
	}
	bad := opt
	bad.Workers = -1
	if _, err := RenderStream(Chunks(randomStars(10, 0, 5, 1), 4), bad); !errors.Is(err, ErrWorkers) {
		t.Errorf("Workers −1: have %v, want ErrWorkers", err)
	}
}

func TestChunkRows(t *testing.T) {
	opt := Options{Projection: camera.Projection{Width: 4096, Height: 4096}}
	frame := int64(4096 * 4096 * streamBytesPerPixel)
	tests := []struct {
		budget int64
		want   int
	}{
		{frame + 1000*streamBytesPerRow, streamMinChunkRows}, // below the floor
		{frame + 100_000*streamBytesPerRow, 100_000},
		{frame + 1_500_000*streamBytesPerRow, 1_500_000},
		{frame + 3_000_000*streamBytesPerRow, streamMaxChunkRows}, // above the cap
		{0, min(int((DefaultMemoryBudget-frame)/streamBytesPerRow), streamMaxChunkRows)},
		{frame / 2, streamMinChunkRows}, // budget below the frame itself
	}
	small := Options{Projection: camera.Projection{Width: 100, Height: 100}}
	if have, want := ChunkRows(small, 100*100*streamBytesPerPixel+70_000*streamBytesPerRow), 70_000; have != want {
		t.Errorf("ChunkRows 100²: have %d, want %d", have, want)
	}
	for _, tc := range tests {
		if have := ChunkRows(opt, tc.budget); have != tc.want {
			t.Errorf("ChunkRows(budget %d): have %d, want %d", tc.budget, have, tc.want)
		}
	}
}

// TestRenderBytesPerRowCopies checks the tile-copy term of the per-pass
// memory model against the binning itself: stars spread over a frame go
// into (1 + 2k/128)² tiles each on average (the chance that a window of
// 2k+1 pixels crosses a tile edge along one axis is 2k/128 [cp]), within
// 3 % for the default PSF and a wide one; and a 10⁷-star 4096² fisheye
// fits in one pass within the default budget.
func TestRenderBytesPerRowCopies(t *testing.T) {
	stars := randomStars(200_000, -1, 9, 31)
	for _, fwhm := range []float64{0, 20} {
		opt := Options{Projection: proj(t, camera.Fisheye, 2048, 2048), Observer: observer(t, axisY, 0.3), Exposure: 12, FWHM: fwhm}
		ropt, psf, _, err := resolveOptions(opt)
		if err != nil {
			t.Fatal(err)
		}
		p := &Prepared{}
		if err := prepareInto(p, stars, 1, true); err != nil {
			t.Fatal(err)
		}
		n := stars.Len()
		recs := make([]splatRec, n)
		chunks := make([]chunkResult, (n+chunkSize-1)/chunkSize)
		drawn := 0
		for c := range chunks {
			lo, hi := c*chunkSize, min((c+1)*chunkSize, n)
			newTransformer(p, &ropt, &psf, 1).run(lo, hi, recs[lo:hi], &chunks[c])
			drawn += chunks[c].n
		}
		if drawn < n/4 {
			t.Fatalf("FWHM %v: only %d of %d stars drawn", fwhm, drawn, n)
		}
		g := newGrid(2048, 2048, psf.Radius(), camera.Fisheye)
		g.binAll(recs, chunks, 2)
		have := float64(g.start[len(g.start)-1]) / float64(drawn)
		c := 1 + 2*psf.Radius()/tileSize
		t.Logf("FWHM %v (k %v): %.4f tiles per record, model %.4f", fwhm, psf.Radius(), have, c*c)
		if want := c * c; math.Abs(have/want-1) > 0.03 {
			t.Errorf("FWHM %v (k %v): %.4f tiles per record, model %.4f", fwhm, psf.Radius(), have, want)
		}
		if want := int64(math.Ceil(33 + 36*c*c)); RenderBytesPerRow(psf.k) != want {
			t.Errorf("RenderBytesPerRow(%d) = %d, want %d", psf.k, RenderBytesPerRow(psf.k), want)
		}
	}
	opt := Options{Projection: proj(t, camera.Fisheye, 4096, 4096)}
	if r := RenderRows(opt, 0); r < 10_000_000 {
		t.Errorf("RenderRows(4096² fisheye, default budget) = %d, want ≥ 10⁷ (one pass)", r)
	}
}
