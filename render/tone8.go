package render

import (
	"math"
	"sync"
)

// The 8-bit sRGB code of a buffer value, by table.
//
// code8Exact(v) = uint8(encode(v)·255 + 0.5) for v in [0, 1] is what every
// 8-bit output stores. encode is the interpolated sRGB table above; it is
// non-decreasing in v (TestCode8Exhaustive checks every float32 in [0, 1]),
// so each code c ≥ 1 begins at one float32 threshold. A pixel whose tone
// map is the identity (every channel ≤ 1 and, for ToneShoulder, luminance
// ≤ ShoulderKnee: the diffuse light and dim stars, nearly every lit pixel
// of a frame) holds float32 values, and code8 finds their codes from the
// float32 bits: the value's exponent and top code8Bits mantissa bits pick a
// bucket, which holds the code at its start and, when the next code begins
// inside it, where. No bucket holds two thresholds: the
// code rises by at most 255·dE/dv·v·2⁻¹⁰ ≤ 0.12 across a bucket (the sRGB
// slope times the bucket's width v·2⁻¹⁰), and TestCode8Table checks it.
// code8 equals code8Exact bit for bit without the square root and
// interpolation (a lit 4096² frame tone-maps in half the time).
const (
	code8Bits  = 10             // mantissa bits per bucket index
	code8Shift = 23 - code8Bits // float32 mantissa bits below the index
	code8Low   = 0x39000000     // float32 bits of 2⁻¹³: below, the code is 0
	code8One   = 0x3F800000     // float32 bits of 1
	code8N     = (code8One-code8Low)>>code8Shift + 1
	code8None  = uint32(math.MaxUint32) // no threshold in the bucket
)

// code8Tab holds, per bucket, one word: the code at the bucket's first
// value in the low byte and above it the place in the bucket (the float32
// bits' low code8Shift bits, 1 to 2^code8Shift − 1) where the next code
// begins, or 2^code8Shift if that begins beyond the bucket. One word a
// bucket is one load a channel (one gather for eight, toneRowAVX2).
type code8Tab struct {
	ent [code8N]uint32
	// zero is the float32 bits of the least value whose code is not 0:
	// a pixel whose channels' bits all are below it is black.
	zero uint32
}

// code8Place is the place-in-bucket mask and code8Beyond the place of a
// bucket without a threshold.
const (
	code8Place  = 1<<code8Shift - 1
	code8Beyond = 1 << code8Shift
)

// lo returns bucket k's code at its first value.
func (t *code8Tab) lo(k int) uint8 { return uint8(t.ent[k]) }

// thr returns the float32 bits where bucket k's next code begins, or
// code8None.
func (t *code8Tab) thr(k int) uint32 {
	p := t.ent[k] >> 8
	if p == code8Beyond {
		return code8None
	}
	return uint32(code8Low+k<<code8Shift) + p
}

var code8Table = sync.OnceValue(buildCode8)

// code8Exact is the 8-bit code of v as the tone map writes it.
func code8Exact(v float64) uint8 { return uint8(encode(v)*255 + 0.5) }

func buildCode8() *code8Tab {
	t := new(code8Tab)
	for k := range code8N {
		start := uint32(code8Low + k<<code8Shift)
		end := min(start+1<<code8Shift-1, code8One) // last value of the bucket
		lo := code8Exact(float64(math.Float32frombits(start)))
		t.ent[k] = uint32(lo) | code8Beyond<<8
		if code8Exact(float64(math.Float32frombits(end))) == lo {
			continue
		}
		// The first value above lo: binary search over the bucket's bits.
		a, b := start, end // code(a) = lo < code(b)
		for b-a > 1 {
			m := a + (b-a)/2
			if code8Exact(float64(math.Float32frombits(m))) == lo {
				a = m
			} else {
				b = m
			}
		}
		t.ent[k] = uint32(lo) | (b-start)<<8
	}
	for k := range code8N {
		if t.lo(k) > 0 {
			t.zero = uint32(code8Low + k<<code8Shift)
			break
		}
		if thr := t.thr(k); thr != code8None {
			t.zero = thr
			break
		}
	}
	return t
}

// code8 returns code8Exact(pos(min1(v))) for a float32 v: 0 for v ≤ 0 or
// NaN, 255 for v ≥ 1.
func (t *code8Tab) code8(v float32) uint8 {
	if !(v > 0) {
		return 0
	}
	u := math.Float32bits(v)
	if u >= code8One {
		return 255
	}
	return t.code8Unit(u)
}

// code8Unit is code8 for the bits u of a float32 in [0, 1): values below
// code8Low share bucket 0's start, whose code is 0 and which lies below
// the bucket's threshold (a threshold is above its bucket's start).
func (t *code8Tab) code8Unit(u uint32) uint8 {
	u = max(u, code8Low)
	e := t.ent[(u-code8Low)>>code8Shift]
	// One more than the bucket's first code when u's place in the bucket
	// reaches the threshold's, without a branch: the sign of place(thr) −
	// place(u) − 1, both at most 2^code8Shift.
	return uint8(e) + uint8(((e>>8)-(u&code8Place)-1)>>31)
}
