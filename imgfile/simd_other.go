//go:build !amd64 || purego

package imgfile

// haveAVX2 is false: the PNG rows are converted and summed in Go alone.
const haveAVX2 = false

// rgbaToRGBAVX2 is never called without AVX2 (haveAVX2).
func rgbaToRGBAVX2(*byte, *byte, int) uint32 { panic("imgfile: rgbaToRGBAVX2 without AVX2") }

// adler32AVX2 is never called without AVX2 (haveAVX2).
func adler32AVX2(*byte, int) (uint64, uint64, uint64) { panic("imgfile: adler32AVX2 without AVX2") }
