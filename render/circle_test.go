package render

import (
	"image"
	"math"
	"math/rand/v2"
	"slices"
	"sync"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
)

// A fisheye frame is black outside its image circle in both encodings (a
// domemaster projects nothing there [pub: Dome Master Show File Format
// 1.0, sec. II, fulldome.org]), even where a star on the rim spreads its
// PSF across it; pixels at least one pixel inside keep their value; the
// linear buffer is not masked; other projections are not masked.
func TestFisheyeMaskedOutsideCircle(t *testing.T) {
	p := proj(t, camera.Fisheye, 64, 64)
	// A bright star 89.5° from the axis toward the upper right (Right is
	// −Y, Up is +Z): its PSF crosses the rim into the frame's corner.
	s := math.Sin(89.5*math.Pi/180) / math.Sqrt2
	rim := r3.Vec{X: math.Cos(89.5 * math.Pi / 180), Y: -s, Z: s}
	f, err := Render(one(rim, -3, 6000), Options{Projection: p, FWHM: 3, Exposure: 1})
	if err != nil {
		t.Fatal(err)
	}
	plain, img, img16 := f.Buffer.ToNRGBA(ToneShoulder), f.ToNRGBA(ToneShoulder), f.ToNRGBA64(ToneShoulder)
	spill, lit := 0, 0
	for j := 0; j < 64; j++ {
		for i := 0; i < 64; i++ {
			d := math.Hypot(float64(i)+0.5-32, float64(j)+0.5-32)
			o := plain.NRGBAAt(i, j)
			c, c16 := img.NRGBAAt(i, j), img16.NRGBA64At(i, j)
			if c.A != 255 || c16.A != 0xffff {
				t.Fatalf("(%d, %d): alpha %d, %d, want opaque", i, j, c.A, c16.A)
			}
			switch {
			case d > 32:
				if o.R+o.G+o.B > 0 {
					spill++
				}
				if c.R+c.G+c.B > 0 || c16.R+c16.G+c16.B > 0 {
					t.Errorf("(%d, %d), %.2f px from the centre: lit %v %v", i, j, d, c, c16)
				}
			case d <= 31:
				if c != o {
					t.Errorf("(%d, %d) inside: have %v, want %v", i, j, c, o)
				}
				if o.R > 0 {
					lit++
				}
			}
		}
	}
	if spill == 0 || lit == 0 {
		t.Fatalf("the test star should light pixels on both sides of the rim (outside %d, inside %d)", spill, lit)
	}
	if r, g, b := f.Sum(); !(r+g+b > 0) {
		t.Error("buffer empty")
	}
	// The coverage ramps over the last pixel inside the rim.
	for _, k := range []struct {
		i    int
		want float64
	}{{0, 0}, {31, 1}, {62, 1}, {63, 0}} {
		// pixel centres at x = 0.5, 31.5, 62.5, 63.5 on the row through
		// the centre (y = 31.5 ≈ centre): distance 31.5, 0.5, 30.5, 31.5.
		if c := CircleCoverage(32, 31.5, 32, k.i, 31); math.Abs(c-math.Max(0, math.Min(1, 32-math.Abs(float64(k.i)+0.5-32)))) > 1e-12 {
			t.Errorf("coverage of pixel %d: %g", k.i, c)
		}
	}
	if c := CircleCoverage(32, 32, 32, 63, 31); !(c > 0 && c < 1) {
		t.Errorf("rim pixel coverage %g, want between 0 and 1", c)
	}
	// Other projections keep every pixel.
	q := proj(t, camera.Pinhole, 32, 18)
	g, err := Render(one(axisX, 0, 6000), Options{Projection: q, FWHM: 3, Exposure: 1})
	if err != nil {
		t.Fatal(err)
	}
	if a, b := g.Buffer.ToNRGBA(ToneShoulder), g.ToNRGBA(ToneShoulder); string(a.Pix) != string(b.Pix) {
		t.Error("pinhole frame masked")
	}
}

// BenchmarkFisheyeToNRGBA: tone mapping, encoding and the circle mask of a
// 2048² fisheye frame, in one pass (pixels outside the circle are not
// tone-mapped), against the same without the mask.
func BenchmarkFisheyeToNRGBA(b *testing.B) {
	p := proj(b, camera.Fisheye, 2048, 2048)
	f, err := Render(randomStars(100000, -1, 8, 3), Options{Projection: p, Exposure: 1})
	if err != nil {
		b.Fatal(err)
	}
	b.Run("masked", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			f.ToNRGBA(ToneShoulder)
		}
	})
	b.Run("unmasked", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			f.Buffer.ToNRGBA(ToneShoulder)
		}
	})
}

// maskNRGBA applies the circle mask to an opaque image after the tone map:
// the reference for toNRGBAMasked, which does both in one pass.
func maskNRGBA(img *image.NRGBA, cx, cy, r float64) {
	maskRows(img.Rect.Dx(), img.Rect.Dy(), cx, cy, r, func(j, i0, i1 int) {
		row := img.Pix[j*img.Stride : j*img.Stride+4*img.Rect.Dx()]
		for i := i0; i < i1; i++ {
			row[4*i], row[4*i+1], row[4*i+2] = 0, 0, 0
		}
	}, func(i, j int, c float64) {
		p := img.Pix[j*img.Stride+4*i : j*img.Stride+4*i+3 : j*img.Stride+4*i+3]
		for k := range p {
			p[k] = uint8(float64(p[k])*c + 0.5)
		}
	})
}

// The one-pass masked tone map equals the tone map followed by the mask,
// byte for byte, for frames lit everywhere (outside the circle too), odd
// and even sizes, circles off centre, both tone modes and 1 or 3 workers.
func TestToNRGBAMaskedOnePass(t *testing.T) {
	r := rand.New(rand.NewPCG(9, 10))
	for _, c := range []struct {
		w, h      int
		cx, cy, r float64
	}{{64, 64, 32, 32, 32}, {63, 41, 31.5, 20.5, 20.5}, {50, 50, 20.3, 27.9, 19.2}, {7, 7, 3.5, 3.5, 0.7}} {
		b, err := NewBuffer(c.w, c.h, false)
		if err != nil {
			t.Fatal(err)
		}
		for i := range b.Pix {
			b.Pix[i] = float32(math.Exp(-6 * r.Float64()))
		}
		for _, m := range []ToneMode{ToneLinear, ToneShoulder} {
			want := b.toNRGBAInto(nil, m, 1)
			maskNRGBA(want, c.cx, c.cy, c.r)
			for _, workers := range []int{1, 3} {
				have := b.toNRGBAMasked(nil, m, workers, newCircleMask(c.w, c.h, c.cx, c.cy, c.r), nil, false, nil)
				if !slices.Equal(have.Pix, want.Pix) {
					t.Errorf("%d×%d circle (%g, %g, %g), %v, %d workers: the one-pass image differs", c.w, c.h, c.cx, c.cy, c.r, m, workers)
				}
			}
		}
	}
}

// ToNRGBARows hands over every row once, with the bytes the image ends
// with (the mask applied), from any number of workers.
func TestToNRGBARows(t *testing.T) {
	p := proj(t, camera.Fisheye, 61, 47)
	f, err := Render(randomStars(3000, -1, 8, 3), Options{Projection: p, Exposure: 1, Workers: 3})
	if err != nil {
		t.Fatal(err)
	}
	var mu sync.Mutex
	got := make([][]byte, f.H)
	img := f.ToNRGBARows(nil, ToneShoulder, func(y int, pix []byte) {
		mu.Lock()
		defer mu.Unlock()
		if got[y] != nil {
			t.Errorf("row %d handed over twice", y)
		}
		got[y] = slices.Clone(pix)
	})
	if want := f.ToNRGBA(ToneShoulder); !slices.Equal(img.Pix, want.Pix) {
		t.Fatal("the image differs from ToNRGBA's")
	}
	for y, row := range got {
		if !slices.Equal(row, img.Pix[y*img.Stride:y*img.Stride+4*f.W]) {
			t.Errorf("row %d: the bytes handed over are not the image's", y)
		}
	}
}
