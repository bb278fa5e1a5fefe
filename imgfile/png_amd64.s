//go:build amd64 && !purego

#include "textflag.h"

// rgbShuf packs each 128-bit lane's four RGBA pixels into their twelve
// RGB bytes (the lane's last four bytes left 0).
DATA rgbShuf<>+0(SB)/8, $0x0908060504020100
DATA rgbShuf<>+8(SB)/8, $0x808080800e0d0c0a
DATA rgbShuf<>+16(SB)/8, $0x0908060504020100
DATA rgbShuf<>+24(SB)/8, $0x808080800e0d0c0a
GLOBL rgbShuf<>(SB), RODATA|NOPTR, $32

// rgbPerm joins the lanes' twelve bytes into 24.
DATA rgbPerm<>+0(SB)/4, $0
DATA rgbPerm<>+4(SB)/4, $1
DATA rgbPerm<>+8(SB)/4, $2
DATA rgbPerm<>+12(SB)/4, $4
DATA rgbPerm<>+16(SB)/4, $5
DATA rgbPerm<>+20(SB)/4, $6
DATA rgbPerm<>+24(SB)/4, $3
DATA rgbPerm<>+28(SB)/4, $7
GLOBL rgbPerm<>(SB), RODATA|NOPTR, $32

// func rgbaToRGBAVX2(dst, src *byte, groups int) uint32
//
// Copies the RGB bytes of 8·groups RGBA pixels at src to dst, eight
// pixels a step; each step stores 32 bytes, the last 8 of them garbage,
// so dst must have 8 bytes of room past 24·groups. Returns the AND of
// the pixels' 32-bit words: its top byte is 0xff when every alpha is.
TEXT ·rgbaToRGBAVX2(SB), NOSPLIT, $0-28
	MOVQ     dst+0(FP), DI
	MOVQ     src+8(FP), SI
	MOVQ     groups+16(FP), CX
	VMOVDQU  rgbShuf<>(SB), Y1
	VMOVDQU  rgbPerm<>(SB), Y2
	VPCMPEQD Y3, Y3, Y3 // the AND of the words so far: all ones

rgbLoop:
	VMOVDQU 0(SI), Y0
	VPAND   Y0, Y3, Y3
	VPSHUFB Y1, Y0, Y0
	VPERMD  Y0, Y2, Y0
	VMOVDQU Y0, 0(DI)
	ADDQ    $32, SI
	ADDQ    $24, DI
	DECQ    CX
	JNZ     rgbLoop
	VEXTRACTI128 $1, Y3, X4
	VPAND        X4, X3, X3
	VPSHUFD      $0x4e, X3, X4
	VPAND        X4, X3, X3
	VPSHUFD      $0xb1, X3, X4
	VPAND        X4, X3, X3
	VMOVD        X3, AX
	MOVL         AX, ret+24(FP)
	VZEROUPPER
	RET

// adlerWeights are the weights 32, 31, …, 1 of a 32-byte chunk's bytes in
// the Adler-32 sum s2.
DATA adlerWeights<>+0(SB)/8, $0x191a1b1c1d1e1f20
DATA adlerWeights<>+8(SB)/8, $0x1112131415161718
DATA adlerWeights<>+16(SB)/8, $0x090a0b0c0d0e0f10
DATA adlerWeights<>+24(SB)/8, $0x0102030405060708
GLOBL adlerWeights<>(SB), RODATA|NOPTR, $32

// func adler32AVX2(p *byte, chunks int) (sum, prefix, weighted uint64)
//
// Over chunks 32-byte chunks C_0…C_{n−1} at p returns the byte sum Σ C_j,
// the sum of the chunks' prefix sums Σ_m Σ_{j<m} C_j, and Σ_j Σ_i (32−i)·
// b_{j,i}, from which adler32Update forms s1 and s2. chunks ≥ 1 and at
// most adlerChunks, so no 32-bit lane overflows.
TEXT ·adler32AVX2(SB), NOSPLIT, $0-40
	MOVQ         p+0(FP), SI
	MOVQ         chunks+8(FP), CX
	VMOVDQU      adlerWeights<>(SB), Y7
	VPXOR        Y6, Y6, Y6               // zero
	MOVL         $0x00010001, AX
	VMOVD        AX, X5
	VPBROADCASTD X5, Y5                   // 16-bit ones
	VPXOR        Y0, Y0, Y0               // byte sums, 4 × u64
	VPXOR        Y1, Y1, Y1               // prefix sums, 4 × u64
	VPXOR        Y2, Y2, Y2               // weighted sums, 8 × u32

adlerLoop:
	VMOVDQU    0(SI), Y3
	VPADDQ     Y0, Y1, Y1
	VPSADBW    Y6, Y3, Y4
	VPADDQ     Y4, Y0, Y0
	VPMADDUBSW Y7, Y3, Y4
	VPMADDWD   Y5, Y4, Y4
	VPADDD     Y4, Y2, Y2
	ADDQ       $32, SI
	DECQ       CX
	JNZ        adlerLoop

	// Horizontal sums.
	VEXTRACTI128 $1, Y0, X3
	VPADDQ       X3, X0, X0
	VPSHUFD      $0x4e, X0, X3
	VPADDQ       X3, X0, X0
	VMOVQ        X0, AX
	MOVQ         AX, sum+16(FP)
	VEXTRACTI128 $1, Y1, X3
	VPADDQ       X3, X1, X1
	VPSHUFD      $0x4e, X1, X3
	VPADDQ       X3, X1, X1
	VMOVQ        X1, AX
	MOVQ         AX, prefix+24(FP)
	VEXTRACTI128 $1, Y2, X3
	VPADDD       X3, X2, X2
	VPSHUFD      $0x4e, X2, X3
	VPADDD       X3, X2, X2
	VPSHUFD      $0xb1, X2, X3
	VPADDD       X3, X2, X2
	VMOVD        X2, AX
	MOVQ         AX, weighted+32(FP)
	VZEROUPPER
	RET
