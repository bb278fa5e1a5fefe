package exr

import "math"

// MaxHalf is the largest finite IEEE 754 binary16 value, 65504.
const MaxHalf = 65504

// HalfFromFloat32 rounds f to the nearest IEEE 754-2008 binary16 value
// (ties to even) and returns its bits. Finite values whose magnitude rounds
// above MaxHalf saturate to ±MaxHalf; ±Inf stay infinite and NaN stays a
// (quiet) NaN.
func HalfFromFloat32(f float32) uint16 {
	b := math.Float32bits(f)
	sign := uint16(b>>16) & 0x8000
	exp := int(b>>23) & 0xff
	mant := b & 0x7fffff
	if exp == 0xff {
		if mant != 0 {
			return sign | 0x7e00 | uint16(mant>>13)
		}
		return sign | 0x7c00
	}
	e := exp - 127 + 15
	if e >= 31 {
		return sign | 0x7bff
	}
	if e <= 0 {
		// Subnormal half (or zero): value = m·2^(e−14−10) in units of the
		// smallest subnormal 2⁻²⁴.
		if e < -10 {
			return sign
		}
		m := mant | 0x800000
		shift := uint(14 - e)
		h := m >> shift
		rem := m & (1<<shift - 1)
		mid := uint32(1) << (shift - 1)
		if rem > mid || (rem == mid && h&1 == 1) {
			h++
		}
		return sign | uint16(h)
	}
	h := uint32(e)<<10 | mant>>13
	rem := mant & 0x1fff
	if rem > 0x1000 || (rem == 0x1000 && h&1 == 1) {
		h++ // may carry into the exponent, which is right
	}
	if h >= 0x7c00 {
		return sign | 0x7bff
	}
	return sign | uint16(h)
}

// Float32FromHalf returns the value of the binary16 bits h (exact: every
// half is a float32).
func Float32FromHalf(h uint16) float32 {
	sign := uint32(h&0x8000) << 16
	exp := uint32(h>>10) & 0x1f
	mant := uint32(h & 0x3ff)
	switch {
	case exp == 0x1f:
		return math.Float32frombits(sign | 0x7f800000 | mant<<13)
	case exp == 0:
		if mant == 0 {
			return math.Float32frombits(sign)
		}
		// Subnormal: mant·2⁻²⁴.
		v := float32(mant) * (1.0 / (1 << 24))
		if sign != 0 {
			v = -v
		}
		return v
	}
	return math.Float32frombits(sign | (exp+127-15)<<23 | mant<<13)
}
