package render

import (
	"bytes"
	"image"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"github.com/skyframe/skyframe/camera"
)

// Tone mapping into a reused image gives the same bytes as into a new one,
// whatever the reused image held (every pixel is overwritten, the fisheye
// mask included), and an image of another size or layout is not reused.
func TestToNRGBAIntoReuse(t *testing.T) {
	p := proj(t, camera.Fisheye, 96, 96)
	f, err := Render(randomStars(3000, -1, 9, 5), Options{Projection: p, Exposure: 2})
	if err != nil {
		t.Fatal(err)
	}
	dirty8 := image.NewNRGBA(image.Rect(0, 0, 96, 96))
	dirty16 := image.NewNRGBA64(image.Rect(0, 0, 96, 96))
	for i := range dirty8.Pix {
		dirty8.Pix[i] = 0xab
	}
	for i := range dirty16.Pix {
		dirty16.Pix[i] = 0xcd
	}
	want8, want16 := f.ToNRGBA(ToneShoulder), f.ToNRGBA64(ToneShoulder)
	zero := 0
	for i := 0; i < len(want8.Pix); i += 4 {
		if want8.Pix[i]|want8.Pix[i+1]|want8.Pix[i+2] == 0 {
			zero++
		}
	}
	if zero == 0 || zero == len(want8.Pix)/4 {
		t.Fatalf("%d black pixels of %d: the test wants both black and lit pixels", zero, len(want8.Pix)/4)
	}
	if got := f.ToNRGBAInto(dirty8, ToneShoulder); got != dirty8 || !bytes.Equal(got.Pix, want8.Pix) {
		t.Error("8-bit: the reused image differs from a new one (or was not reused)")
	}
	if got := f.ToNRGBA64Into(dirty16, ToneShoulder); got != dirty16 || !bytes.Equal(got.Pix, want16.Pix) {
		t.Error("16-bit: the reused image differs from a new one (or was not reused)")
	}
	small := image.NewNRGBA(image.Rect(0, 0, 95, 96))
	offset := image.NewNRGBA(image.Rect(1, 0, 97, 96))
	for _, d := range []*image.NRGBA{small, offset} {
		if got := f.ToNRGBAInto(d, ToneShoulder); got == d || !bytes.Equal(got.Pix, want8.Pix) {
			t.Errorf("image %v reused for a 96×96 frame", d.Rect)
		}
	}
}

// BenchmarkToNRGBA4096: tone mapping, sRGB encoding and the circle mask of
// a 4096² fisheye frame of 10⁵ stars, into a new image each time and into
// one reused image.
func BenchmarkToNRGBA4096(b *testing.B) {
	p := proj(b, camera.Fisheye, 4096, 4096)
	f, err := Render(randomStars(100000, -1, 8, 3), Options{Projection: p, Exposure: 1})
	if err != nil {
		b.Fatal(err)
	}
	b.Run("new", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			f.ToNRGBA(ToneShoulder)
		}
		b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(f.W*f.H), "ns/pixel")
	})
	// reused tone-maps g into one image kept across the loop.
	reused := func(g *Frame) func(b *testing.B) {
		return func(b *testing.B) {
			img := g.ToNRGBA(ToneShoulder)
			b.ReportAllocs()
			for b.Loop() {
				g.ToNRGBAInto(img, ToneShoulder)
			}
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(g.W*g.H), "ns/pixel")
		}
	}
	b.Run("reused", reused(f))
	// Every pixel lit, as the unresolved light lights a flight's frame:
	// dim values spread over four decades below full scale.
	lit := *f
	lit.Buffer.Pix = slices.Clone(f.Pix)
	r := rand.New(rand.NewPCG(1, 2))
	for i := range lit.Pix {
		lit.Pix[i] += float32(math.Exp(-9.2 * r.Float64()))
	}
	b.Run("lit", reused(&lit))
	// The same a tenth as bright: every channel below the shoulder's knee,
	// as the unresolved light of a flight frame is.
	dim := lit
	dim.Buffer.Pix = slices.Clone(lit.Pix)
	for i := range dim.Pix {
		dim.Pix[i] *= 0.1
	}
	b.Run("dim", reused(&dim))
}
