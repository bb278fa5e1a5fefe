package render

import (
	"math"
	"math/big"
)

// Table-based ln and exp for the per-star loop, within 2 ulp of the math
// package (TestLnFast, TestExpFast), without a
// division. Every path that renders a star uses the same functions, so
// frames from the in-memory and streaming paths stay bit-identical.

// lnSplit is the first mantissa interval, of the 256 [1 + j/256,
// 1 + (j+1)/256), lying above √2: from it on lnFast works with m/2 and
// e + 1, so the reduced mantissa lies in [0.70, 1.42) and ln d near 1 (from
// either side) suffers no cancellation against e·ln 2.
const lnSplit = 106

// lnTab holds, per mantissa interval j, the factor c that lnFast multiplies
// the mantissa m by, L = ln of the reduced mantissa's reference point and
// the exponent increment: for j < lnSplit, c = 1/(1 + j/256) rounded,
// L = −ln c, 0; above, c = 1/(1 + (j+1)/256) rounded (applied to m, so the
// reference point is the interval's upper end halved), L = −ln(2c), 1.
// c = 1 at j = 0 and 2c = 1 at j = 255, so there L = 0 exactly and
// lnFast(1) = 0.
var lnTab = func() (t [256][3]float64) {
	for j := range t {
		if j < lnSplit {
			c := 1 / (1 + float64(j)/256)
			t[j] = [3]float64{c, -math.Log(c), 0}
			continue
		}
		c := 1 / (1 + float64(j+1)/256)
		t[j] = [3]float64{c, -math.Log(2 * c), 1}
	}
	return t
}()

// lnFast returns ln d within 2 ulp of math.Log(d), without a division:
// d = 2^e·m, ln d = e′·ln 2 + L + ln(1 + r), r = m·c − 1 (one fused
// multiply-add), |r| < 1/256, by a degree-7 series (truncation < 1e-20);
// see lnTab for e′, L and c. Zero, negative, subnormal, infinite and NaN d
// go to math.Log.
func lnFast(d float64) float64 {
	if !(d >= 0x1p-1022 && d <= math.MaxFloat64) {
		return math.Log(d)
	}
	b := math.Float64bits(d)
	m := math.Float64frombits(b&(1<<52-1) | 1023<<52)
	c := &lnTab[b>>44&255]
	e := float64(int(b>>52)-1023) + c[2]
	r := math.FMA(m, c[0], -1)
	r2 := r * r
	// ln(1+r) = r − r²/2 + r³/3 − r⁴/4 + r⁵/5 − r⁶/6 + r⁷/7.
	p := (r - r2*(1.0/2-r*(1.0/3))) - r2*r2*((1.0/4-r*(1.0/5))+r2*(1.0/6-r*(1.0/7)))
	const ln2Hi, ln2Lo = 6.93147180369123816490e-01, 1.90821492927058770002e-10
	return e*ln2Hi + (c[1] + (e*ln2Lo + p))
}

// lnBatch sets out[k] = lnFast(d[k]) for k < len(d); out must be at
// least as long as d.
func lnBatch(d, out []float64) {
	out = out[:len(d)]
	for k, v := range d {
		out[k] = lnFast(v)
	}
}

// expTab holds 2^(j/64), j = 0..63, for expFast as a rounded value and
// the remainder (the exact value minus the rounded one, rounded), found by
// Newton's method on y⁶⁴ = 2^j in 128-bit arithmetic.
var expTab = func() (t [64][2]float64) {
	const prec = 128
	for j := range t {
		y := new(big.Float).SetPrec(prec).SetFloat64(math.Exp2(float64(j) / 64))
		target := new(big.Float).SetPrec(prec).SetMantExp(big.NewFloat(1), j)
		for range 3 {
			// y ← y − (y⁶⁴ − 2^j)/(64·y⁶³)
			y63 := new(big.Float).SetPrec(prec).SetInt64(1)
			for range 63 {
				y63.Mul(y63, y)
			}
			y64 := new(big.Float).SetPrec(prec).Mul(y63, y)
			num := y64.Sub(y64, target)
			den := y63.Mul(y63, big.NewFloat(64))
			y.Sub(y, num.Quo(num, den))
		}
		hi, _ := y.Float64()
		lo, _ := new(big.Float).SetPrec(prec).Sub(y, big.NewFloat(hi)).Float64()
		t[j] = [2]float64{hi, lo}
	}
	return t
}()

// expFast returns e^x within 2 ulp of math.Exp(x): x = k·ln2/64 + r with k
// the nearest integer and |r| ≤ ln2/128, e^x = 2^⌊k/64⌋ · 2^((k mod 64)/64)
// · e^r, e^r by a degree-5 series (truncation < 4e-17) and 2^((k mod 64)/64)
// carried to twice float64 precision. expFast(0) = 1 exactly. x outside
// (−708, 709), where the result would be subnormal or overflow, and NaN go
// to math.Exp.
func expFast(x float64) float64 {
	if !(x > -708 && x < 709) {
		return math.Exp(x)
	}
	// Adding 1.5·2⁵² rounds x·64/ln2 to an integer k held in the low
	// mantissa bits: bits = 2⁵¹ + k there.
	const shift = 0x1.8p52
	kf := x*(64/math.Ln2) + shift
	k := int64(math.Float64bits(kf)&(1<<52-1)) - 1<<51
	kf -= shift
	const ln2Hi, ln2Lo = 6.93147180369123816490e-01 / 64, 1.90821492927058770002e-10 / 64
	r := (x - kf*ln2Hi) - kf*ln2Lo
	r2 := r * r
	p := r + r2*((1.0/2+r*(1.0/6))+r2*(1.0/24+r*(1.0/120)))
	t := &expTab[k&63]
	return (t[0] + (t[1] + t[0]*p)) * math.Float64frombits(uint64(k>>6+1023)<<52)
}
