package render

import (
	"encoding/binary"
	"fmt"
	"image"
	"math"
	"runtime"

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
		return min1(r), min1(g), min1(b)
	}
	l := lumR*r + lumG*g + lumB*b
	if l > ShoulderKnee {
		if l > math.MaxFloat64 {
			return 1, 1, 1
		}
		const k = ShoulderKnee
		lt := k + (1-k)*(-math.Expm1(-(l-k)/(1-k)))
		f := lt / l
		r, g, b = r*f, g*f, b*f
		l = lt
	}
	mx := r
	if g > mx {
		mx = g
	}
	if b > mx {
		mx = b
	}
	if mx > 1 {
		// Mix toward grey l: c' = l + t(c − l), t so that max(c') = 1;
		// luminance and hue are kept, saturation drops.
		t := (1 - l) / (mx - l)
		r, g, b = l+t*(r-l), l+t*(g-l), l+t*(b-l)
	}
	return min1(r), min1(g), min1(b)
}

// toneIdentity reports whether Tone(m, r, g, b) is (min1(pos(r)),
// min1(pos(g)), min1(pos(b))): always for ToneLinear; for ToneShoulder
// when the luminance is at most ShoulderKnee and no channel exceeds 1.
func toneIdentity(m ToneMode, r, g, b float32) bool {
	if m != ToneShoulder {
		return true
	}
	r64, g64, b64 := pos(float64(r)), pos(float64(g)), pos(float64(b))
	return lumR*r64+lumG*g64+lumB*b64 <= ShoulderKnee && r64 <= 1 && g64 <= 1 && b64 <= 1
}

// pos returns v for v > 0 and 0 otherwise (NaN included).
func pos(v float64) float64 {
	if v > 0 {
		return v
	}
	return 0
}

func min1(v float64) float64 {
	if v < 1 {
		return v
	}
	return 1
}

// encodeTab holds spectrum.EncodeSRGB(s²) at encodeN+1 even steps of
// s = √v over [0, 1]; encode interpolates linearly in s. In s the curve
// is smooth enough (|d²E/ds²| ≤ 25.84 on the linear segment) that the
// error is below h²/8·25.84 = 2·10⁻⁷ (0.013 of a 16-bit code value), and
// the 16 KB table stays in the L1 cache.
const encodeN = 4096

var encodeTab = buildEncode()

func buildEncode() *[encodeN + 2]float32 {
	var t [encodeN + 2]float32
	for i := 0; i <= encodeN; i++ {
		s := float64(i) / encodeN
		t[i] = float32(spectrum.EncodeSRGB(s * s))
	}
	t[encodeN+1] = t[encodeN]
	return &t
}

// encode returns the sRGB encoding of v in [0, 1].
func encode(v float64) float64 {
	x := math.Sqrt(v) * encodeN
	i := int(x)
	if i >= encodeN {
		return float64(encodeTab[encodeN])
	}
	f := x - float64(i)
	a, b := float64(encodeTab[i]), float64(encodeTab[i+1])
	return a + f*(b-a)
}

// ToNRGBA tone-maps the buffer with mode m, sRGB-encodes it
// (IEC 61966-2-1) and rounds to 8 bits, with opaque alpha.
func (b *Buffer) ToNRGBA(m ToneMode) *image.NRGBA { return b.ToNRGBAInto(nil, m) }

// reusable reports whether img can receive a w×h image: its rectangle is
// (0, 0)–(w, h) and its rows are packed.
func reusable(r image.Rectangle, stride, bpp, w, h int) bool {
	return r == image.Rect(0, 0, w, h) && stride == bpp*w
}

// ToNRGBAInto is ToNRGBA writing into dst when dst is a packed image of the
// buffer's size (every pixel is overwritten, so it need not be cleared),
// else into a new image, which it returns. Reusing one image across the
// frames of a flight saves allocating and first touching 4·W·H bytes per
// frame (about 64 MB at 4096²; first-touch page faults cost about 12 µs
// per 4 KiB page on these machines).
func (b *Buffer) ToNRGBAInto(dst *image.NRGBA, m ToneMode) *image.NRGBA {
	return b.toNRGBAInto(dst, m, 0)
}

// toNRGBAInto is ToNRGBAInto on workers goroutines (0: GOMAXPROCS).
func (b *Buffer) toNRGBAInto(dst *image.NRGBA, m ToneMode, workers int) *image.NRGBA {
	return b.toNRGBAMasked(dst, m, workers, nil, nil, false, nil)
}

// circleMask is an image circle of centre (cx, cy) and radius r, pixels,
// with each row's spans (circleSpans): pixels in [in0, in1) have coverage
// above 0, those in [full0, full1) coverage 1.
type circleMask struct {
	cx, cy, r float64
	rows      []struct{ in0, in1, full0, full1 int }
}

// newCircleMask returns the mask of the circle (cx, cy, r) over a w×h
// image.
func newCircleMask(w, h int, cx, cy, r float64) *circleMask {
	m := &circleMask{cx: cx, cy: cy, r: r, rows: make([]struct{ in0, in1, full0, full1 int }, h)}
	circleSpans(w, h, cx, cy, r, func(j, in0, in1, f0, f1 int) {
		m.rows[j].in0, m.rows[j].in1, m.rows[j].full0, m.rows[j].full1 = in0, in1, f0, f1
	})
	return m
}

// toNRGBAMasked is toNRGBAInto with, when mask is not nil, the pixels of
// coverage 0 black without being tone-mapped and the rim's scaled by their
// coverage, in the same pass (TestToNRGBAMaskedOnePass: the image a
// separate mask pass leaves). When done is not nil
// it is called with each row (its 4·W bytes) once the row is final. With
// zero each row of b is zeroed once toned. With layer, each row of b
// first takes the recorded layer's row (gridRecord.addRow, its exact
// pixels sorted), as a replay would add it.
func (b *Buffer) toNRGBAMasked(dst *image.NRGBA, m ToneMode, workers int, mask *circleMask, done func(y int, row []byte), zero bool, layer *gridRecord) *image.NRGBA {
	img := packedNRGBA(dst, b.W, b.H)
	t := newToner(m, mask)
	b.rows(workers, func(y int) {
		dst := img.Pix[y*img.Stride : y*img.Stride+4*b.W]
		src := b.Pix[3*y*b.W : 3*(y+1)*b.W]
		if layer != nil {
			layer.addRow(src, y)
		}
		t.row(src, dst, y)
		if zero {
			clear(src)
		}
		if done != nil {
			done(y, dst)
		}
	})
	return img
}

// packedNRGBA returns dst when it is a packed w×h image (reusable), else a
// new one.
func packedNRGBA(dst *image.NRGBA, w, h int) *image.NRGBA {
	if dst == nil || !reusable(dst.Rect, dst.Stride, 4, w, h) {
		return image.NewNRGBA(image.Rect(0, 0, w, h))
	}
	return dst
}

// toner tone-maps rows of a linear buffer with mode m into 8-bit NRGBA,
// with a fisheye's mask when mask is not nil.
type toner struct {
	tab  *code8Tab
	fast uint32
	m    ToneMode
	mask *circleMask
}

func newToner(m ToneMode, mask *circleMask) toner {
	return toner{tab: code8Table(), fast: toneFastBits(m), m: m, mask: mask}
}

// row tone-maps src, row y's 3·W values, into dst, its 4·W bytes: the
// pixels outside the mask's circle black without being tone-mapped, the
// rim's scaled by their coverage.
func (t *toner) row(src []float32, dst []byte, y int) {
	w := len(src) / 3
	x0, x1 := 0, w
	if t.mask != nil {
		x0, x1 = t.mask.rows[y].in0, t.mask.rows[y].in1
		for x := 0; x < x0; x++ {
			binary.LittleEndian.PutUint32(dst[4*x:4*x+4], 0xff000000)
		}
		for x := x1; x < w; x++ {
			binary.LittleEndian.PutUint32(dst[4*x:4*x+4], 0xff000000)
		}
	}
	x := x0
	if haveAVX2 {
		x = t.rowAVX2(src, dst, x0, x1)
	}
	for ; x < x1; x++ {
		binary.LittleEndian.PutUint32(dst[4*x:4*x+4], t.pixel(src[3*x:3*x+3:3*x+3]))
	}
	if t.mask != nil {
		mk := t.mask.rows[y]
		for x := mk.in0; x < mk.in1; x++ {
			if x == mk.full0 {
				x = max(mk.full1, mk.full0) - 1
				continue
			}
			t.cover(dst, x, y)
		}
	}
}

// pixel is the NRGBA word of the linear pixel s (3 values), unmasked.
func (t *toner) pixel(s []float32) uint32 {
	ur, ug, ub := math.Float32bits(s[0]), math.Float32bits(s[1]), math.Float32bits(s[2])
	switch tab, fast := t.tab, t.fast; {
	case max(ur, ug, ub) < tab.zero:
		// Every channel in [0, 1.5·10⁻⁴): the identity, code 0. Most
		// of a frame of space.
		return 0xff000000
	case ur < fast && ug < fast && ub < fast:
		// Every channel in [0, toneFast): the identity (see
		// toneFastBits), float32 values in [0, 1) coded by table.
		return uint32(tab.code8Unit(ur)) | uint32(tab.code8Unit(ug))<<8 | uint32(tab.code8Unit(ub))<<16 | 0xff000000
	}
	return t.slow(s[0], s[1], s[2])
}

// rowAVX2 codes pixels x0 ≤ x < x1 of row src into dst eight at a time
// (toneRowAVX2, the table path's codes bit for bit), a group with a
// channel past the table path pixel by pixel, and returns the first pixel
// of the last, partial group, which it leaves.
func (t *toner) rowAVX2(src []float32, dst []byte, x0, x1 int) int {
	x := x0
	for x1-x >= 8 {
		x += 8 * toneRowAVX2(&src[3*x], &dst[4*x], (x1-x)/8, &t.tab.ent[0], t.fast, t.tab.zero)
		if x1-x < 8 {
			break
		}
		for e := x + 8; x < e; x++ {
			binary.LittleEndian.PutUint32(dst[4*x:4*x+4], t.pixel(src[3*x:3*x+3:3*x+3]))
		}
	}
	return x
}

// slow is the code of the linear pixel (r, g, b), unmasked, past row's
// fast paths: an opaque NRGBA word, R in the low byte.
func (t *toner) slow(r, g, b float32) uint32 {
	if toneIdentity(t.m, r, g, b) {
		// Tone returns the channels themselves (clipped to [0, 1]),
		// float32 values: their codes by table.
		return uint32(t.tab.code8(r)) | uint32(t.tab.code8(g))<<8 | uint32(t.tab.code8(b))<<16 | 0xff000000
	}
	rr, gg, bb := Tone(t.m, float64(r), float64(g), float64(b))
	return uint32(code8Exact(rr)) | uint32(code8Exact(gg))<<8 | uint32(code8Exact(bb))<<16 | 0xff000000
}

// cover scales pixel x of row y (dst the row's bytes) by its coverage of
// the mask's circle; pixels wholly inside are left alone.
func (t *toner) cover(dst []byte, x, y int) {
	if t.mask == nil {
		return
	}
	mk := t.mask.rows[y]
	if x < mk.in0 || x >= mk.in1 || (x >= mk.full0 && x < mk.full1) {
		return
	}
	c := CircleCoverage(t.mask.cx, t.mask.cy, t.mask.r, x, y)
	p := dst[4*x : 4*x+3 : 4*x+3]
	for k := range p {
		p[k] = uint8(float64(p[k])*c + 0.5)
	}
}

// toneFast is a channel value below which ToneShoulder is the identity
// whatever the other channels are (below it too): the luminance is then
// below (lumR + lumG + lumB)·toneFast = toneFast < ShoulderKnee, with room
// for rounding, and no channel exceeds 1. TestToneFast checks it.
const toneFast = 0.45

// toneFastBits returns the float32 bits below which a pixel whose three
// channels' bits all are is mapped by m as the identity: for ToneShoulder
// those of toneFast, for ToneLinear those of 1. Negative values and NaN
// have larger bits (the sign bit, or the exponent all ones) and take the
// general path.
func toneFastBits(m ToneMode) uint32 {
	if m == ToneShoulder {
		return math.Float32bits(toneFast)
	}
	return code8One
}

// ToNRGBA64 is ToNRGBA with 16 bits per channel.
func (b *Buffer) ToNRGBA64(m ToneMode) *image.NRGBA64 { return b.ToNRGBA64Into(nil, m) }

// ToNRGBA64Into is ToNRGBAInto with 16 bits per channel.
func (b *Buffer) ToNRGBA64Into(dst *image.NRGBA64, m ToneMode) *image.NRGBA64 {
	return b.toNRGBA64Into(dst, m, 0)
}

// toNRGBA64Into is ToNRGBA64Into on workers goroutines (0: GOMAXPROCS).
func (b *Buffer) toNRGBA64Into(dst *image.NRGBA64, m ToneMode, workers int) *image.NRGBA64 {
	img := dst
	if img == nil || !reusable(img.Rect, img.Stride, 8, b.W, b.H) {
		img = image.NewNRGBA64(image.Rect(0, 0, b.W, b.H))
	}
	b.rows(workers, func(y int) {
		src := b.Pix[3*y*b.W : 3*(y+1)*b.W]
		dst := img.Pix[y*img.Stride : y*img.Stride+8*b.W]
		for x := 0; x < b.W; x++ {
			if src[3*x] == 0 && src[3*x+1] == 0 && src[3*x+2] == 0 {
				clear(dst[8*x : 8*x+6])
				dst[8*x+6], dst[8*x+7] = 0xff, 0xff
				continue
			}
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

// rows runs fn for every row on workers goroutines (0:
// runtime.GOMAXPROCS(0)); each pixel is computed independently, so the
// result does not depend on it.
func (b *Buffer) rows(workers int, fn func(y int)) {
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	const band = 16
	parallel(workers, (b.H+band-1)/band, func(k int) {
		for y := k * band; y < min(b.H, (k+1)*band); y++ {
			fn(y)
		}
	})
}
