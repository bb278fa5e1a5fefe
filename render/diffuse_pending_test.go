package render

import (
	"errors"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"github.com/skyframe/skyframe/camera"
)

// pendingCase is a frame whose buffer the stars left mostly black: lit
// pixels scattered over it (faint, bright past the shoulder, on a fisheye's
// rim and outside its circle, in one channel or all three), as a held view of a flight has them.
type pendingCase struct {
	name    string
	kind    camera.Kind
	w, h    int
	fov     float64
	workers int
}

func (c pendingCase) frame(t *testing.T, scale float64) *Frame {
	t.Helper()
	boost, err := camera.NewBoost(camera.FromGalacticLB(10, 5), 0.6)
	if err != nil {
		t.Fatal(err)
	}
	f := blankFrame(t, looking(t, c.kind, c.w, c.h, c.fov, camera.FromGalacticLB(0, 2)), camera.Observer{Boost: boost})
	f.Scale = scale
	f.Options.Workers = c.workers
	r := rand.New(rand.NewPCG(7, 8))
	for range f.W * f.H / 8 {
		i := 3 * r.IntN(f.W*f.H)
		v := r.Float64() * 2e-3
		if r.IntN(10) == 0 {
			v = r.Float64() * 20 // past ShoulderKnee and full scale
		}
		f.Pix[i], f.Pix[i+1], f.Pix[i+2] = float32(v), float32(v*r.Float64()), float32(v*r.Float64())
		if k := r.IntN(4); k < 3 {
			// One channel alone: lit pixels whose only light lies in
			// their first, middle or last value.
			f.Pix[i+(k+1)%3], f.Pix[i+(k+2)%3] = 0, 0
		}
	}
	if cx, cy, rr, ok := f.Options.Projection.ImageCircle(); ok {
		// Every pixel of a row across the rim and outside the circle.
		y := int(cy)
		for x := range f.W {
			if d := float64(x) + 0.5 - cx; d*d > 0.8*rr*rr {
				f.Pix[3*(y*f.W+x)] = 0.3
			}
		}
	}
	return f
}

var pendingCases = []pendingCase{
	{"fisheye192", camera.Fisheye, 192, 192, 180, 1},
	{"fisheye640/3workers", camera.Fisheye, 640, 640, 180, 3},
	{"pinhole900x500", camera.Pinhole, 900, 500, 70, 2},
	{"cube", camera.Cube, 6 * 48, 48, 90, 2},
}

// The image ToNRGBAPending makes with the layer pending is byte for byte
// ToNRGBARows's after the layer is replayed into the buffer, every row
// handed over with the same bytes, for both tone modes; the buffer is left
// as the stars left it, and AddTo then makes it bit for bit the replayed
// one. The records hold both interpolated leaves and exact pixels.
func TestPendingMatchesReplay(t *testing.T) {
	u := builtInUnresolved(t)
	var leaves, exact int
	for _, c := range pendingCases {
		t.Run(c.name, func(t *testing.T) {
			scale := ExposureScale(2)
			m := new(DiffuseMemo)
			opt := DiffuseOptions{Memo: m}
			if err := AddDiffuse(c.frame(t, scale), u, opt); err != nil {
				t.Fatal(err)
			}
			if m.rec == nil {
				t.Fatal("the layer was not kept")
			}
			for _, b := range m.rec.bands {
				leaves += len(b.leaves)
				exact += len(b.exact)
			}
			for _, mode := range []ToneMode{ToneShoulder, ToneLinear} {
				g := c.frame(t, scale)
				if err := AddDiffuse(g, u, opt); err != nil {
					t.Fatal(err)
				}
				wantRows := make([][]byte, g.H)
				want := g.ToNRGBARows(nil, mode, func(y int, pix []byte) { wantRows[y] = slices.Clone(pix) })

				f := c.frame(t, scale)
				stars := slices.Clone(f.Pix)
				p, err := DiffusePending(f, u, opt)
				if err != nil {
					t.Fatal(err)
				}
				if p == nil {
					t.Fatal("the memo's layer was not left pending")
				}
				gotRows := make([][]byte, f.H)
				got, err := f.ToNRGBAPending(nil, mode, p, func(y int, pix []byte) { gotRows[y] = slices.Clone(pix) })
				if err != nil {
					t.Fatal(err)
				}
				if !slices.Equal(got.Pix, want.Pix) {
					n := 0
					for i := range got.Pix {
						if got.Pix[i] != want.Pix[i] {
							n++
						}
					}
					t.Fatalf("%v: %d bytes differ from the replayed frame's image", mode, n)
				}
				for y := range gotRows {
					if !slices.Equal(gotRows[y], wantRows[y]) {
						t.Fatalf("%v: row %d handed over differs", mode, y)
					}
				}
				if !slices.Equal(f.Pix, stars) {
					t.Fatalf("%v: the buffer changed", mode)
				}
				if err := p.AddTo(f); err != nil {
					t.Fatal(err)
				}
				if !slices.Equal(f.Pix, g.Pix) {
					t.Fatalf("%v: AddTo's buffer differs from the replayed one", mode)
				}
				p.Release()
			}
			if m.Replays() != 4 || m.Lent() != 2 || m.users != 0 {
				t.Fatalf("%d replays, %d lent, %d users; want 4, 2, 0", m.Replays(), m.Lent(), m.users)
			}
		})
	}
	if leaves == 0 || exact == 0 {
		t.Fatalf("%d leaves and %d exact pixels recorded: both paths must be checked", leaves, exact)
	}
}

// A pending layer outlives the memo's next layer: the memo draws the new
// one into new storage, and the pending one still gives the replayed
// image. Its tone-mapped image is rebuilt for another tone mode.
func TestPendingHeldAcrossRedraw(t *testing.T) {
	u := builtInUnresolved(t)
	c := pendingCases[0]
	m := new(DiffuseMemo)
	opt := DiffuseOptions{Memo: m}
	scale := ExposureScale(2)
	if err := AddDiffuse(c.frame(t, scale), u, opt); err != nil {
		t.Fatal(err)
	}
	g := c.frame(t, scale)
	if err := AddDiffuse(g, u, opt); err != nil {
		t.Fatal(err)
	}
	f := c.frame(t, scale)
	p, err := DiffusePending(f, u, opt)
	if err != nil || p == nil {
		t.Fatalf("pending %v, %v", p, err)
	}
	defer p.Release()
	if _, err := f.ToNRGBAPending(nil, ToneLinear, p, nil); err != nil {
		t.Fatal(err)
	}
	// Another exposure: another layer, drawn and kept by the memo.
	if err := AddDiffuse(c.frame(t, ExposureScale(3)), u, opt); err != nil {
		t.Fatal(err)
	}
	if m.rec == p.rec {
		t.Fatal("the memo drew into the pending layer's record")
	}
	for _, mode := range []ToneMode{ToneShoulder, ToneLinear} {
		got, err := f.ToNRGBAPending(nil, mode, p, nil)
		if err != nil {
			t.Fatal(err)
		}
		if want := g.ToNRGBA(mode); !slices.Equal(got.Pix, want.Pix) {
			t.Fatalf("%v: the image differs from the replayed frame's after the memo's next layer", mode)
		}
	}
}

// A pending layer is refused for another frame, after AddTo and after
// Release; without a memo the layer is drawn and nothing is pending; when
// the memo holds another layer, the new one is deferred, and lent to the
// next frame.
func TestPendingErrors(t *testing.T) {
	u := builtInUnresolved(t)
	c := pendingCases[0]
	scale := ExposureScale(2)
	f := c.frame(t, scale)
	if p, err := DiffusePending(f, u, DiffuseOptions{}); p != nil || err != nil {
		t.Fatalf("without a memo: %v, %v", p, err)
	}
	m := new(DiffuseMemo)
	opt := DiffuseOptions{Memo: m}
	first, err := DiffusePending(c.frame(t, scale), u, opt)
	if err != nil || first == nil || !first.deferred {
		t.Fatalf("first frame: %v, %v; want a deferred layer", first, err)
	}
	first.Release()
	f = c.frame(t, scale)
	p, err := DiffusePending(f, u, opt)
	if err != nil || p == nil || p.deferred {
		t.Fatalf("pending %v, %v; want the memo's layer lent", p, err)
	}
	if _, err := c.frame(t, scale).ToNRGBAPending(nil, ToneLinear, p, nil); !errors.Is(err, ErrPending) {
		t.Fatalf("another frame: %v", err)
	}
	if err := p.AddTo(f); err != nil {
		t.Fatal(err)
	}
	if err := p.AddTo(f); !errors.Is(err, ErrPending) {
		t.Fatalf("AddTo twice: %v", err)
	}
	p.Release()
	p.Release()
	if m.users != 0 {
		t.Fatalf("%d users after Release", m.users)
	}
	if _, err := f.ToNRGBAPending(nil, ToneLinear, p, nil); !errors.Is(err, ErrPending) {
		t.Fatalf("after Release: %v", err)
	}
	var none *PendingLayer
	none.Release()
}

// BenchmarkToNRGBAPending4096 tone-maps a held 4096² fisheye toward the
// galactic centre at 0.9 c with its unresolved layer pending, the buffer
// lit as the built-in sky's stars light a flight's frame (13.7 % of the
// pixels: 5×5 footprints, most of them faint), against replaying the layer
// and tone-mapping the whole buffer.
func BenchmarkToNRGBAPending4096(b *testing.B) {
	u, f := galacticCentre4096(b)
	m := new(DiffuseMemo)
	opt := DiffuseOptions{Memo: m}
	if err := AddDiffuse(f, u, opt); err != nil {
		b.Fatal(err)
	}
	r := rand.New(rand.NewPCG(9, 10))
	stars := make([]float32, len(f.Pix))
	for range 114_000 {
		x, y := r.IntN(f.W-5), r.IntN(f.H-5)
		v := float32(1e-6 / (r.Float64() + 1e-3))
		for j := range 5 {
			for i := range 5 {
				p := stars[3*((y+j)*f.W+x+i):]
				p[0], p[1], p[2] = p[0]+v, p[1]+v/2, p[2]+v/3
			}
		}
	}
	img := f.ToNRGBA(ToneShoulder)
	copy(f.Pix, stars)
	if p, err := DiffusePending(f, u, opt); err != nil || p == nil {
		b.Fatal(p, err)
	} else if _, err := f.ToNRGBAPending(img, ToneShoulder, p, nil); err != nil { // the layer's image, kept
		b.Fatal(err)
	} else {
		p.Release()
	}
	// The replay adds to the buffer, which is restored each time: "copy"
	// is that part of its figure.
	for _, name := range []string{"copy", "replay", "pending"} {
		copy(f.Pix, stars) // as the replay leaves it: the pending layer reads it only
		b.Run(name, func(b *testing.B) {
			c0 := cpuSeconds()
			for b.Loop() {
				switch name {
				case "copy":
					copy(f.Pix, stars)
					continue
				case "replay":
					copy(f.Pix, stars)
					if err := AddDiffuse(f, u, opt); err != nil {
						b.Fatal(err)
					}
					f.ToNRGBAInto(img, ToneShoulder)
					continue
				}
				p, err := DiffusePending(f, u, opt)
				if err != nil || p == nil {
					b.Fatal(p, err)
				}
				if _, err := f.ToNRGBAPending(img, ToneShoulder, p, nil); err != nil {
					b.Fatal(err)
				}
				p.Release()
			}
			b.ReportMetric((cpuSeconds()-c0)/float64(b.N), "CPU-s/op")
		})
	}
}

// With ClearBuffer the image is the same and the buffer is left black; the
// next render into the frame, which then skips clearing it, is the frame
// rendered afresh, held or not, and AddTo is refused.
func TestPendingClearBuffer(t *testing.T) {
	u := builtInUnresolved(t)
	stars := randomStars(20_000, -1, 9, 23)
	prep, err := Prepare(stars)
	if err != nil {
		t.Fatal(err)
	}
	opt := Options{Projection: proj(t, camera.Fisheye, 300, 300), Observer: observer(t, camera.FromGalacticLB(0, 2), 0.6), Exposure: 1}
	m := new(DiffuseMemo)
	dopt := DiffuseOptions{Memo: m}
	want := func(opt Options) (*Frame, []byte) {
		f, err := prep.Render(opt)
		if err != nil {
			t.Fatal(err)
		}
		if err := AddDiffuse(f, u, dopt); err != nil {
			t.Fatal(err)
		}
		return f, f.ToNRGBA(ToneShoulder).Pix
	}
	o2 := opt
	o2.Exposure = 2
	_, other := want(o2)
	_, held := want(opt) // the layer the memo holds at the first frame
	var dst Frame
	for i := range 5 {
		o, img0 := opt, held
		if i == 2 {
			o, img0 = o2, other // another layer: deferred to the tone map
		}
		deferred := i == 2 || i == 3 // and the first again
		if err := prep.RenderInto(&dst, o); err != nil {
			t.Fatal(err)
		}
		p, err := DiffusePending(&dst, u, dopt)
		if err != nil {
			t.Fatal(err)
		}
		if p == nil || p.deferred != deferred {
			t.Fatalf("frame %d: pending %v, want deferred %v", i, p, deferred)
		}
		p.ClearBuffer = true
		img, err := dst.ToNRGBAPending(nil, ToneShoulder, p, nil)
		if err != nil {
			t.Fatal(err)
		}
		if !slices.Equal(img.Pix, img0) {
			t.Fatalf("frame %d (deferred %v): image differs from the frame rendered afresh", i, deferred)
		}
		if k := slices.IndexFunc(dst.Pix, func(v float32) bool { return math.Float32bits(v) != 0 }); k >= 0 {
			t.Fatalf("frame %d: value %d is %g after ClearBuffer", i, k, dst.Pix[k])
		}
		if err := p.AddTo(&dst); !errors.Is(err, ErrPending) {
			t.Fatalf("AddTo after ClearBuffer: %v", err)
		}
		p.Release()
	}
}

// ToNRGBAClearing gives ToNRGBARows's image and rows and leaves the buffer
// black, and frames rendered into it after (stars and a layer drawn anew
// each time, as a panning flight draws them) are those rendered afresh,
// value for value.
func TestToNRGBAClearing(t *testing.T) {
	u := builtInUnresolved(t)
	stars := randomStars(20_000, -1, 9, 29)
	prep, err := Prepare(stars)
	if err != nil {
		t.Fatal(err)
	}
	var dst Frame
	for i := range 3 {
		opt := Options{Projection: proj(t, camera.Fisheye, 300, 300), Observer: observer(t, camera.FromGalacticLB(float64(20*i), 2), 0.6), Exposure: 1}
		fresh, err := prep.Render(opt)
		if err != nil {
			t.Fatal(err)
		}
		if err := prep.RenderInto(&dst, opt); err != nil {
			t.Fatal(err)
		}
		for _, f := range []*Frame{fresh, &dst} {
			if err := AddDiffuse(f, u, DiffuseOptions{}); err != nil {
				t.Fatal(err)
			}
		}
		if !slices.Equal(dst.Pix, fresh.Pix) {
			t.Fatalf("frame %d, rendered into the buffer left black, differs from the frame rendered afresh", i)
		}
		rows := make([][]byte, dst.H)
		want := fresh.ToNRGBARows(nil, ToneShoulder, nil)
		img := dst.ToNRGBAClearing(nil, ToneShoulder, func(y int, pix []byte) { rows[y] = slices.Clone(pix) })
		if !slices.Equal(img.Pix, want.Pix) {
			t.Fatalf("frame %d: image differs from ToNRGBARows's", i)
		}
		for y, r := range rows {
			if !slices.Equal(r, want.Pix[y*want.Stride:y*want.Stride+4*dst.W]) {
				t.Fatalf("frame %d: row %d handed on differs from the image's", i, y)
			}
		}
		if k := slices.IndexFunc(dst.Pix, func(v float32) bool { return math.Float32bits(v) != 0 }); k >= 0 {
			t.Fatalf("frame %d: value %d is %g after ToNRGBAClearing", i, k, dst.Pix[k])
		}
		if !dst.black {
			t.Fatalf("frame %d: not marked black", i)
		}
	}
}

// A held view after a change of view (another layer drawn into the
// record's storage between them) lends its own layer, not the image built
// for the view before: frames of views A, A, B, B, A, A, each lent when
// its layer is held, are those of AddDiffuse and ToNRGBA.
func TestPendingAfterViewChange(t *testing.T) {
	u := builtInUnresolved(t)
	prep, err := Prepare(randomStars(2000, -1, 9, 23))
	if err != nil {
		t.Fatal(err)
	}
	m := new(DiffuseMemo)
	var dst Frame
	for i, ex := range []float64{1, 1, 2, 2, 1, 1} {
		opt := Options{Projection: proj(t, camera.Fisheye, 200, 200), Observer: observer(t, camera.FromGalacticLB(0, 2), 0.6), Exposure: ex}
		f, err := prep.Render(opt)
		if err != nil {
			t.Fatal(err)
		}
		if err := AddDiffuse(f, u, DiffuseOptions{}); err != nil {
			t.Fatal(err)
		}
		if err := prep.RenderInto(&dst, opt); err != nil {
			t.Fatal(err)
		}
		p, err := DiffusePending(&dst, u, DiffuseOptions{Memo: m})
		if err != nil {
			t.Fatal(err)
		}
		if p == nil || p.deferred != (i%2 == 0) {
			t.Fatalf("frame %d: pending %v, want it deferred on the first frame of each view, lent on the second", i, p)
		}
		img, err := dst.ToNRGBAPending(nil, ToneShoulder, p, nil)
		if err != nil {
			t.Fatal(err)
		}
		if !slices.Equal(img.Pix, f.ToNRGBA(ToneShoulder).Pix) {
			t.Errorf("frame %d (pending %v): image differs from AddDiffuse's", i, p != nil)
		}
		p.Release()
	}
}

// A layer the memo does not hold is deferred: ToNRGBAPending adds it to
// each row as it tone-maps it, giving byte for byte the image and rows of
// the layer drawn into the buffer (AddDiffuse, then ToNRGBARows), for both
// tone modes, and leaves the buffer bit for bit the drawn one (or black,
// with ClearBuffer); the memo keeps it and lends it to the next frame.
func TestDeferredMatchesDrawn(t *testing.T) {
	u := builtInUnresolved(t)
	scale := ExposureScale(2)
	for _, c := range pendingCases {
		for _, mode := range []ToneMode{ToneShoulder, ToneLinear} {
			for _, clearBuf := range []bool{false, true} {
				g := c.frame(t, scale)
				if err := AddDiffuse(g, u, DiffuseOptions{}); err != nil {
					t.Fatal(err)
				}
				wantRows := make([][]byte, g.H)
				want := g.ToNRGBARows(nil, mode, func(y int, pix []byte) { wantRows[y] = slices.Clone(pix) })

				m := new(DiffuseMemo)
				f := c.frame(t, scale)
				p, err := DiffusePending(f, u, DiffuseOptions{Memo: m})
				if err != nil {
					t.Fatal(err)
				}
				if p == nil || !p.deferred {
					t.Fatalf("%s: %v, want a deferred layer", c.name, p)
				}
				p.ClearBuffer = clearBuf
				gotRows := make([][]byte, f.H)
				got, err := f.ToNRGBAPending(nil, mode, p, func(y int, pix []byte) { gotRows[y] = slices.Clone(pix) })
				if err != nil {
					t.Fatal(err)
				}
				if !slices.Equal(got.Pix, want.Pix) {
					t.Fatalf("%s %v: image differs from the drawn frame's", c.name, mode)
				}
				for y := range gotRows {
					if !slices.Equal(gotRows[y], wantRows[y]) {
						t.Fatalf("%s %v: row %d handed over differs", c.name, mode, y)
					}
				}
				if clearBuf {
					if k := slices.IndexFunc(f.Pix, func(v float32) bool { return v != 0 }); k >= 0 || !f.black {
						t.Fatalf("%s: value %d left after ClearBuffer (marked black %v)", c.name, k, f.black)
					}
				} else if !slices.Equal(f.Pix, g.Pix) {
					t.Fatalf("%s %v: buffer differs from the drawn one", c.name, mode)
				}
				if err := p.AddTo(f); !errors.Is(err, ErrPending) {
					t.Fatalf("%s: AddTo after the tone map: %v", c.name, err)
				}
				p.Release()
				if m.users != 0 {
					t.Fatalf("%s: %d users after Release", c.name, m.users)
				}
				next, err := DiffusePending(c.frame(t, scale), u, DiffuseOptions{Memo: m})
				if err != nil || next == nil || next.deferred {
					t.Fatalf("%s: next frame %v, %v; want the kept layer lent", c.name, next, err)
				}
				next.Release()
			}
		}
	}
}
