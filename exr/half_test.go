package exr

import (
	"math"
	"testing"
)

// IEEE 754-2008 binary16 examples (the standard's encoding; the same values
// are tabulated in common references on half precision, from memory).
func TestHalfKnownValues(t *testing.T) {
	cases := []struct {
		f float32
		h uint16
	}{
		{0, 0x0000},
		{float32(math.Copysign(0, -1)), 0x8000},
		{1, 0x3c00},
		{-2, 0xc000},
		{1 + 1.0/1024, 0x3c01},         // 1 + 2⁻¹⁰, next after 1
		{65504, 0x7bff},                // largest finite
		{1.0 / (1 << 14), 0x0400},      // smallest normal 2⁻¹⁴
		{1.0 / (1 << 24), 0x0001},      // smallest subnormal 2⁻²⁴
		{1023.0 / (1 << 24), 0x03ff},   // largest subnormal
		{0.333251953125, 0x3555},       // nearest half to 1/3
		{float32(1) / 3, 0x3555},       // rounds to it
		{float32(math.Inf(1)), 0x7c00}, // infinity stays infinite
		{float32(math.Inf(-1)), 0xfc00},
	}
	for _, c := range cases {
		if h := HalfFromFloat32(c.f); h != c.h {
			t.Errorf("HalfFromFloat32(%g) = %#04x, want %#04x", c.f, h, c.h)
		}
		if f := Float32FromHalf(c.h); f != c.f && c.f != float32(1)/3 {
			t.Errorf("Float32FromHalf(%#04x) = %g, want %g", c.h, f, c.f)
		}
	}
	if h := HalfFromFloat32(float32(math.NaN())); h&0x7c00 != 0x7c00 || h&0x3ff == 0 {
		t.Errorf("NaN → %#04x, want a NaN", h)
	}
	if !math.IsNaN(float64(Float32FromHalf(0x7e00))) {
		t.Error("0x7e00 is not read as NaN")
	}
}

// Saturation is this package's documented choice: finite values never
// become infinite.
func TestHalfSaturates(t *testing.T) {
	for _, f := range []float32{65520, 1e6, math.MaxFloat32} {
		if h := HalfFromFloat32(f); h != 0x7bff {
			t.Errorf("HalfFromFloat32(%g) = %#04x, want 0x7bff (65504)", f, h)
		}
		if h := HalfFromFloat32(-f); h != 0xfbff {
			t.Errorf("HalfFromFloat32(%g) = %#04x, want 0xfbff", -f, h)
		}
	}
	// Below the half-way point to 65536 it rounds down normally.
	if h := HalfFromFloat32(65519); h != 0x7bff {
		t.Errorf("65519 → %#04x", h)
	}
}

// Every half survives half → float32 → half, and every value half-way
// between two adjacent halves rounds to the one with the even significand
// (IEEE 754-2008 roundTiesToEven), values just off the midpoint to the
// nearer one.
func TestHalfExhaustive(t *testing.T) {
	for h := 0; h < 1<<16; h++ {
		u := uint16(h)
		if u&0x7c00 == 0x7c00 && u&0x3ff != 0 {
			continue // NaN
		}
		f := Float32FromHalf(u)
		if back := HalfFromFloat32(f); back != u {
			t.Fatalf("%#04x → %g → %#04x", u, f, back)
		}
		if u&0x7fff >= 0x7bff {
			continue // no finite successor
		}
		next := u + 1
		if u == 0x8000 {
			continue
		}
		a, b := float64(f), float64(Float32FromHalf(next))
		mid := float32((a + b) / 2) // exact: 12 significant bits
		if float64(mid) != (a+b)/2 {
			t.Fatalf("midpoint of %#04x not exact", u)
		}
		want := u
		if u&1 == 1 {
			want = next
		}
		if got := HalfFromFloat32(mid); got != want {
			t.Fatalf("midpoint %g of %#04x,%#04x → %#04x, want %#04x", mid, u, next, got, want)
		}
		up := math.Nextafter32(mid, float32(math.Copysign(math.Inf(1), b-a)))
		if got := HalfFromFloat32(up); got != next {
			t.Fatalf("just past midpoint %g → %#04x, want %#04x", up, got, next)
		}
		down := math.Nextafter32(mid, float32(a))
		if got := HalfFromFloat32(down); got != u {
			t.Fatalf("just before midpoint %g → %#04x, want %#04x", down, got, u)
		}
	}
}

func BenchmarkHalfFromFloat32(b *testing.B) {
	src := make([]float32, 4096)
	for i := range src {
		src[i] = float32(i) * 0.37
	}
	b.ReportAllocs()
	b.SetBytes(int64(4 * len(src)))
	var s uint16
	for b.Loop() {
		for _, v := range src {
			s += HalfFromFloat32(v)
		}
	}
	_ = s
}
