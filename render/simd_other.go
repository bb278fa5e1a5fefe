//go:build !amd64 || purego

package render

// haveAVX2 is false: the rows run in Go alone.
const haveAVX2 = false

// simdBuilt reports whether this build has the AVX2 kernels: not this one.
const simdBuilt = false

// interpRowAVX2 is never called without AVX2 (haveAVX2).
func interpRowAVX2(*float32, int, *[8]float32, float32) { panic("render: interpRowAVX2 without AVX2") }

// toneRowAVX2 is never called without AVX2 (haveAVX2).
func toneRowAVX2(*float32, *byte, int, *uint32, uint32, uint32) int {
	panic("render: toneRowAVX2 without AVX2")
}
