package exr

import (
	"math"
	"math/rand/v2"
	"testing"
)

// benchFrame is a 4096² (512² under -short) RGB frame like a rendered sky:
// black but for 3×3 star images on one pixel in 2000 (as the PNG encode
// benchmark in render), plus, with background, a smooth, everywhere
// non-zero field like the CMB layer.
func benchFrame(b *testing.B, background bool) *Image {
	size := 4096
	if testing.Short() {
		size = 512
	}
	rng := rand.New(rand.NewPCG(1, 2))
	img := &Image{Width: size, Height: size}
	pix := [3][]float32{make([]float32, size*size), make([]float32, size*size), make([]float32, size*size)}
	if background {
		for y := range size {
			for x := range size {
				v := float32(1e-4 * (1 + 0.003*math.Sin(float64(x)/300) + 0.003*math.Cos(float64(y)/500)))
				pix[0][y*size+x], pix[1][y*size+x], pix[2][y*size+x] = v*0.8, v, v*1.2
			}
		}
	}
	for range size * size / 2000 {
		cx, cy := rng.IntN(size), rng.IntN(size)
		v := float32(rng.ExpFloat64())
		for dy := -1; dy <= 1; dy++ {
			for dx := -1; dx <= 1; dx++ {
				x, y := cx+dx, cy+dy
				if x < 0 || y < 0 || x >= size || y >= size {
					continue
				}
				pix[0][y*size+x] += v
				pix[1][y*size+x] += v / 2
				pix[2][y*size+x] += v / 3
			}
		}
	}
	for i, n := range []string{"R", "G", "B"} {
		img.Channels = append(img.Channels, Channel{Name: n, Pix: pix[i]})
	}
	return img
}

type countWriter int64

func (c *countWriter) Write(p []byte) (int, error) { *c += countWriter(len(p)); return len(p), nil }

func benchEncode(b *testing.B, img *Image, e Encoder) {
	var cw countWriter
	b.SetBytes(int64(len(img.Channels) * 4 * img.Width * img.Height)) // float32 input
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		cw = 0
		if err := e.Encode(&cw, img); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(cw), "file-bytes")
}

// BenchmarkEncode4096HalfZIP is the figure: a 4096² RGB frame, half,
// ZIP (compare imgfile's BenchmarkWritePNG8/16 and BenchmarkWriteFITS).
func BenchmarkEncode4096HalfZIP(b *testing.B) { benchEncode(b, benchFrame(b, false), Encoder{}) }

// BenchmarkEncode4096HalfZIPBackground has a non-zero background in every
// pixel (as with --cmb), the harder case for ZIP.
func BenchmarkEncode4096HalfZIPBackground(b *testing.B) {
	benchEncode(b, benchFrame(b, true), Encoder{})
}

func BenchmarkEncode4096HalfNone(b *testing.B) {
	benchEncode(b, benchFrame(b, false), Encoder{Compression: None})
}

func BenchmarkEncode4096FloatZIP(b *testing.B) {
	img := benchFrame(b, false)
	for i := range img.Channels {
		img.Channels[i].Type = Float
	}
	benchEncode(b, img, Encoder{})
}
