package render

import (
	"errors"
	"fmt"
)

// MaxSize is the largest width or height a Buffer accepts, in pixels.
const MaxSize = 32768

// ErrSize reports a buffer or frame size outside 1..MaxSize.
var ErrSize = errors.New("render: image size out of range")

// Buffer is a linear, high-dynamic-range RGB image: the renderer
// accumulates flux into it and tone mapping reads it once, at output.
//
// Pix holds linear sRGB values (not gamma-encoded) as float32, three per
// pixel (R, G, B), rows top to bottom (y grows downward), pixels left to
// right: pixel (x, y) starts at Pix[3*(y*W+x)]. A value of 1 is full scale
// as defined by the exposure (see Options.Exposure); values above 1 are kept.
//
// Doppler, when not nil, is an auxiliary channel of W*H float32 values: the
// luminance-weighted mean Doppler factor D of the stars deposited in each
// pixel, Σ(Yᵢ·Dᵢ)/Σ(Yᵢ), where Yᵢ is the luminance star i deposits in that
// pixel. Pixels that received no light hold 0 (never a valid D, since D > 0).
type Buffer struct {
	W, H    int
	Pix     []float32
	Doppler []float32
}

// NewBuffer returns a black buffer of w×h pixels, with a Doppler channel when
// doppler is true.
func NewBuffer(w, h int, doppler bool) (*Buffer, error) {
	if w < 1 || h < 1 || w > MaxSize || h > MaxSize {
		return nil, fmt.Errorf("%w: %d×%d, want 1..%d each", ErrSize, w, h, MaxSize)
	}
	b := &Buffer{W: w, H: h, Pix: make([]float32, 3*w*h)}
	if doppler {
		b.Doppler = make([]float32, w*h)
	}
	return b, nil
}

// At returns the linear RGB value of pixel (x, y). It panics if the pixel is
// outside the buffer, like a slice index.
func (b *Buffer) At(x, y int) (r, g, bl float32) {
	if x < 0 || y < 0 || x >= b.W || y >= b.H {
		panic(fmt.Sprintf("render: pixel (%d,%d) outside %d×%d buffer", x, y, b.W, b.H))
	}
	i := 3 * (y*b.W + x)
	return b.Pix[i], b.Pix[i+1], b.Pix[i+2]
}

// Sum returns the sum over all pixels of each channel, accumulated in
// float64 in pixel order.
func (b *Buffer) Sum() (r, g, bl float64) {
	for i := 0; i+2 < len(b.Pix); i += 3 {
		r += float64(b.Pix[i])
		g += float64(b.Pix[i+1])
		bl += float64(b.Pix[i+2])
	}
	return r, g, bl
}

// Luminance returns the relative luminance of pixel (x, y) in buffer units:
// Y = 0.2126 R + 0.7152 G + 0.0722 B (IEC 61966-2-1 linear sRGB, D65).
func (b *Buffer) Luminance(x, y int) float64 {
	r, g, bl := b.At(x, y)
	return lumR*float64(r) + lumG*float64(g) + lumB*float64(bl)
}

// Rows of the IEC 61966-2-1 sRGB → XYZ matrix giving Y (D65 white).
const (
	lumR = 0.2126
	lumG = 0.7152
	lumB = 0.0722
)
