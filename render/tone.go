package render

import (
	"fmt"
	"image"
	"math"
	"runtime"
	"sync"

	"github.com/skyframe/skyframe/spectrum"
)

// ToneMode selects how linear buffer values above full scale are brought
// into the displayable range [0, 1] before sRGB encoding.
type ToneMode int

const (
	// ToneLinear clips each channel to [0, 1]: pixel values stay
	// proportional to flux up to full scale (for measurement).
	ToneLinear ToneMode = iota
	// ToneShoulder keeps values up to ShoulderKnee unchanged and rolls
	// luminance above it smoothly toward 1, scaling R, G and B by the same
	// factor so the hue holds; a channel still above 1 is then brought to 1
	// by mixing toward grey of the same luminance (for pictures).
	ToneShoulder
)

// ShoulderKnee is the luminance below which ToneShoulder is the identity.
// Above it, L ↦ k + (1−k)(1 − exp(−(L−k)/(1−k))), continuous with slope 1
// at the knee and tending to 1.
const ShoulderKnee = 0.5

var toneNames = [...]string{ToneLinear: "linear", ToneShoulder: "shoulder"}

// String returns the mode's name as ParseTone accepts it.
func (m ToneMode) String() string {
	if m >= 0 && int(m) < len(toneNames) {
		return toneNames[m]
	}
	return fmt.Sprintf("ToneMode(%d)", int(m))
}

// ParseTone returns the mode named s ("linear" or "shoulder").
func ParseTone(s string) (ToneMode, error) {
	for m, n := range toneNames {
		if n == s {
			return ToneMode(m), nil
		}
	}
	return 0, fmt.Errorf("render: unknown tone mode %q, want linear or shoulder", s)
}

// Tone maps one linear pixel into [0, 1]³ with mode m. Negative and NaN
// channels become 0.
func Tone(m ToneMode, r, g, b float64) (float64, float64, float64) {
	r, g, b = pos(r), pos(g), pos(b)
	if m != ToneShoulder {
		return math.Min(r, 1), math.Min(g, 1), math.Min(b, 1)
	}
	l := lumR*r + lumG*g + lumB*b
	if l > ShoulderKnee {
		const k = ShoulderKnee
		lt := k + (1-k)*(-math.Expm1(-(l-k)/(1-k)))
		if math.IsInf(l, 1) {
			return 1, 1, 1
		}
		f := lt / l
		r, g, b = r*f, g*f, b*f
		l = lt
	}
	if mx := math.Max(r, math.Max(g, b)); mx > 1 {
		// Mix toward grey l: c' = l + t(c − l), t so that max(c') = 1;
		// luminance and hue are kept, saturation drops.
		t := (1 - l) / (mx - l)
		r, g, b = l+t*(r-l), l+t*(g-l), l+t*(b-l)
	}
	return math.Min(r, 1), math.Min(g, 1), math.Min(b, 1)
}

func pos(v float64) float64 {
	if v > 0 {
		return v
	}
	return 0
}

// encodeTable holds spectrum.EncodeSRGB sampled at encodeN+1 even steps
// over [0, 1]; encode interpolates linearly between samples. The error is
// below 10⁻⁷ (0.01 of a 16-bit code value) everywhere.
const encodeN = 1 << 16

var (
	encodeOnce sync.Once
	encodeTab  []float32
)

func encode(v float64) float64 {
	encodeOnce.Do(func() {
		encodeTab = make([]float32, encodeN+2)
		for i := 0; i <= encodeN; i++ {
			encodeTab[i] = float32(spectrum.EncodeSRGB(float64(i) / encodeN))
		}
		encodeTab[encodeN+1] = encodeTab[encodeN]
	})
	x := v * encodeN
	i := int(x)
	f := x - float64(i)
	return float64(encodeTab[i]) + f*float64(encodeTab[i+1]-encodeTab[i])
}

// ToNRGBA tone-maps the buffer with mode m, sRGB-encodes it
// (IEC 61966-2-1) and rounds to 8 bits, with opaque alpha.
func (b *Buffer) ToNRGBA(m ToneMode) *image.NRGBA {
	img := image.NewNRGBA(image.Rect(0, 0, b.W, b.H))
	b.rows(func(y int) {
		src := b.Pix[3*y*b.W : 3*(y+1)*b.W]
		dst := img.Pix[y*img.Stride : y*img.Stride+4*b.W]
		for x := 0; x < b.W; x++ {
			r, g, bl := Tone(m, float64(src[3*x]), float64(src[3*x+1]), float64(src[3*x+2]))
			dst[4*x] = uint8(encode(r)*255 + 0.5)
			dst[4*x+1] = uint8(encode(g)*255 + 0.5)
			dst[4*x+2] = uint8(encode(bl)*255 + 0.5)
			dst[4*x+3] = 255
		}
	})
	return img
}

// ToNRGBA64 is ToNRGBA with 16 bits per channel.
func (b *Buffer) ToNRGBA64(m ToneMode) *image.NRGBA64 {
	img := image.NewNRGBA64(image.Rect(0, 0, b.W, b.H))
	b.rows(func(y int) {
		src := b.Pix[3*y*b.W : 3*(y+1)*b.W]
		dst := img.Pix[y*img.Stride : y*img.Stride+8*b.W]
		for x := 0; x < b.W; x++ {
			r, g, bl := Tone(m, float64(src[3*x]), float64(src[3*x+1]), float64(src[3*x+2]))
			put16(dst[8*x:], encode(r))
			put16(dst[8*x+2:], encode(g))
			put16(dst[8*x+4:], encode(bl))
			dst[8*x+6], dst[8*x+7] = 0xff, 0xff
		}
	})
	return img
}

func put16(p []byte, v float64) {
	u := uint16(v*65535 + 0.5)
	p[0], p[1] = byte(u>>8), byte(u)
}

// rows runs fn for every row on runtime.GOMAXPROCS(0) goroutines; each
// pixel is computed independently, so the result does not depend on it.
func (b *Buffer) rows(fn func(y int)) {
	workers := runtime.GOMAXPROCS(0)
	const band = 16
	parallel(workers, (b.H+band-1)/band, func(k int) {
		for y := k * band; y < min(b.H, (k+1)*band); y++ {
			fn(y)
		}
	})
}
