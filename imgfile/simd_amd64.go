//go:build amd64 && !purego

package imgfile

import "golang.org/x/sys/cpu"

// haveAVX2 reports whether the AVX2 kernels (rgbaToRGBAVX2,
// adler32AVX2) may run.
var haveAVX2 = cpu.X86.HasAVX2

// rgbaToRGBAVX2 is rgbaToRGB over 8·groups pixels, eight a step
// (png_amd64.s), and returns the AND of their 32-bit words; dst needs 8
// bytes of room past 24·groups.
//
//go:noescape
func rgbaToRGBAVX2(dst, src *byte, groups int) uint32

// adler32AVX2 returns, over chunks (1 to adlerChunks) 32-byte chunks at p,
// the byte sum, the sum of the chunks' prefix sums and the sum of each
// byte times 32 minus its place in its chunk (png_amd64.s).
//
//go:noescape
func adler32AVX2(p *byte, chunks int) (sum, prefix, weighted uint64)
