package render

import (
	"encoding/binary"
	"math"
	"math/rand/v2"
	"os"
	"slices"
	"testing"
)

// skipWithoutAVX2 skips a test of the AVX2 kernels in a build without them
// (-tags purego, other architectures), and on a CPU without AVX2 outside
// CI; CI runs on machines with AVX2, where they must be tested.
func skipWithoutAVX2(t *testing.T) {
	t.Helper()
	switch {
	case !simdBuilt:
		t.Skip("built without the AVX2 kernels (purego or not amd64): the Go loops run alone")
	case os.Getenv("CI") != "":
		t.Fatal("CI runs on a machine with AVX2: the AVX2 kernels must be tested there")
	default:
		t.Skip("no AVX2 on this CPU: the Go loops run alone")
	}
}

// interpRow's AVX2 steps give the values of its Go loop bit for bit, for
// rows of every length up to 40 pixels (0–5 steps of eight and every
// remainder), random coefficients of both signs over 12 decades and
// random values already in the row, so frames are the same on machines
// with and without AVX2.
func TestInterpRowAVX2(t *testing.T) {
	if !haveAVX2 {
		skipWithoutAVX2(t)
	}
	r := rand.New(rand.NewPCG(1, 2))
	val := func() float32 {
		return float32((r.Float64()*2 - 1) * math.Pow(10, 6*(r.Float64()*2-1)))
	}
	for trial := range 2000 {
		n := trial % 41
		row := make([]float32, 3*n)
		for k := range row {
			row[k] = val()
		}
		var ld [8]float32
		for _, k := range []int{0, 1, 2, 4, 5, 6} {
			ld[k] = val()
		}
		fx := float32(1 / float64(1+r.IntN(64)))
		want := slices.Clone(row)
		interpRowGo(want, 0, &ld, fx)
		if g := n / 8; g > 0 {
			interpRowAVX2(&row[0], g, &ld, fx)
		}
		interpRowGo(row, 8*(n/8), &ld, fx)
		for k := range row {
			if math.Float32bits(row[k]) != math.Float32bits(want[k]) {
				t.Fatalf("trial %d, %d pixels: value %d is %g with AVX2, %g from the Go loop", trial, n, k, row[k], want[k])
			}
		}
	}
}

// BenchmarkInterpRow adds a 32-pixel leaf's row (a top-level cell of a
// 4096² fisheye) to a cached row, per pixel.
func BenchmarkInterpRow(b *testing.B) {
	row := make([]float32, 3*4096)
	lf := smoothLeaf{x0: 64, x1: 96, xe: 96, y0: 0, y1: 32, ye: 32, v: [4][3]float64{{1, 2, 3}, {2, 3, 4}, {3, 4, 5}, {4, 5, 6}}}
	for b.Loop() {
		interpRow(row, &lf, 7)
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/32, "ns/pixel")
}

// The tone map's AVX2 groups give toner.pixel's NRGBA words bit for bit,
// for rows of up to 40 pixels mixing black, dim (the table path), bright
// (past the shoulder's knee), negative, NaN and infinite channels and
// values near every code threshold, in both tone modes.
func TestToneRowAVX2(t *testing.T) {
	if !haveAVX2 {
		skipWithoutAVX2(t)
	}
	r := rand.New(rand.NewPCG(3, 4))
	tab := code8Table()
	val := func() float32 {
		switch r.IntN(40) {
		case 0:
			return -r.Float32()
		case 1:
			return float32(math.NaN())
		case 2:
			return float32(math.Inf(1))
		case 3:
			return 0.45 + r.Float32()*3 // past the fast path
		case 4, 5, 6, 7:
			return 0
		case 8, 9, 10, 11:
			// A threshold of a random bucket, or a value next to it.
			k := r.IntN(len(tab.ent))
			if tab.thr(k) == code8None {
				return math.Float32frombits(code8Low + uint32(k)<<code8Shift)
			}
			return math.Float32frombits(tab.thr(k) - 1 + uint32(r.IntN(3)))
		}
		return float32(math.Pow(10, -6+5.6*r.Float64())) // 10⁻⁶ … 0.4
	}
	for _, m := range []ToneMode{ToneShoulder, ToneLinear} {
		tn := newToner(m, nil)
		for trial := range 3000 {
			n := trial % 41
			src := make([]float32, 3*n)
			for k := range src {
				src[k] = val()
			}
			switch trial % 3 {
			case 0: // mostly dim rows, whose groups all take AVX2
				for k := range src {
					src[k] = float32(math.Pow(10, -6+5.6*r.Float64()))
				}
			case 1: // mostly black (below tab.zero), some groups wholly
				for k := range src {
					src[k] = float32(math.Pow(10, -7+3.4*r.Float64()))
					if r.IntN(50) == 0 {
						src[k] = math.Float32frombits(tab.zero - 1 + uint32(r.IntN(2)))
					}
				}
			}
			got, want := make([]byte, 4*n), make([]byte, 4*n)
			for x := range n {
				binary.LittleEndian.PutUint32(want[4*x:], tn.pixel(src[3*x:3*x+3]))
			}
			x := tn.rowAVX2(src, got, 0, n)
			if n-x >= 8 || x < 0 {
				t.Fatalf("rowAVX2 left pixels %d… of %d", x, n)
			}
			for ; x < n; x++ {
				binary.LittleEndian.PutUint32(got[4*x:], tn.pixel(src[3*x:3*x+3]))
			}
			if !slices.Equal(got, want) {
				for x := range n {
					if !slices.Equal(got[4*x:4*x+4], want[4*x:4*x+4]) {
						t.Fatalf("mode %v, trial %d: pixel %d of %d (%g, %g, %g): AVX2 % x, per pixel % x",
							m, trial, x, n, src[3*x], src[3*x+1], src[3*x+2], got[4*x:4*x+4], want[4*x:4*x+4])
					}
				}
			}
		}
	}
}
