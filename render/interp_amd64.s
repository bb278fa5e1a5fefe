//go:build amd64 && !purego

#include "textflag.h"

// Lane patterns of eight pixels' 24 interleaved RGB values as three
// vectors A, B, C of eight float32: each lane's channel (the index into
// l0 l1 l2 or d0 d1 d2, for VPERMPS) and its pixel within the eight.
DATA interpPat<>+0(SB)/4, $0
DATA interpPat<>+4(SB)/4, $1
DATA interpPat<>+8(SB)/4, $2
DATA interpPat<>+12(SB)/4, $0
DATA interpPat<>+16(SB)/4, $1
DATA interpPat<>+20(SB)/4, $2
DATA interpPat<>+24(SB)/4, $0
DATA interpPat<>+28(SB)/4, $1
DATA interpPat<>+32(SB)/4, $2
DATA interpPat<>+36(SB)/4, $0
DATA interpPat<>+40(SB)/4, $1
DATA interpPat<>+44(SB)/4, $2
DATA interpPat<>+48(SB)/4, $0
DATA interpPat<>+52(SB)/4, $1
DATA interpPat<>+56(SB)/4, $2
DATA interpPat<>+60(SB)/4, $0
DATA interpPat<>+64(SB)/4, $1
DATA interpPat<>+68(SB)/4, $2
DATA interpPat<>+72(SB)/4, $0
DATA interpPat<>+76(SB)/4, $1
DATA interpPat<>+80(SB)/4, $2
DATA interpPat<>+84(SB)/4, $0
DATA interpPat<>+88(SB)/4, $1
DATA interpPat<>+92(SB)/4, $2
DATA interpPat<>+96(SB)/4, $0
DATA interpPat<>+100(SB)/4, $0
DATA interpPat<>+104(SB)/4, $0
DATA interpPat<>+108(SB)/4, $1
DATA interpPat<>+112(SB)/4, $1
DATA interpPat<>+116(SB)/4, $1
DATA interpPat<>+120(SB)/4, $2
DATA interpPat<>+124(SB)/4, $2
DATA interpPat<>+128(SB)/4, $2
DATA interpPat<>+132(SB)/4, $3
DATA interpPat<>+136(SB)/4, $3
DATA interpPat<>+140(SB)/4, $3
DATA interpPat<>+144(SB)/4, $4
DATA interpPat<>+148(SB)/4, $4
DATA interpPat<>+152(SB)/4, $4
DATA interpPat<>+156(SB)/4, $5
DATA interpPat<>+160(SB)/4, $5
DATA interpPat<>+164(SB)/4, $5
DATA interpPat<>+168(SB)/4, $6
DATA interpPat<>+172(SB)/4, $6
DATA interpPat<>+176(SB)/4, $6
DATA interpPat<>+180(SB)/4, $7
DATA interpPat<>+184(SB)/4, $7
DATA interpPat<>+188(SB)/4, $7
GLOBL interpPat<>(SB), RODATA|NOPTR, $192

// STEP adds to the eight values at OFF(DI) l + tx·d, tx = n·fx: N holds
// the lanes' pixels n (int32), L and D the lanes' l and d, Y15 fx, and T
// is scratch; every product and sum rounded to float32.
#define STEP(N, L, D, OFF, T) \
	VCVTDQ2PS N, T; \
	VMULPS    Y15, T, T; \
	VMULPS    D, T, T; \
	VADDPS    L, T, T; \
	VADDPS    OFF(DI), T, T; \
	VMOVUPS   T, OFF(DI)

// func interpRowAVX2(row *float32, groups int, ld *[8]float32, fx float32)
//
// For n in [0, 8·groups) and c in 0..2:
// row[3n+c] += ld[c] + float32(float32(float32(n)·fx)·ld[4+c]),
// each product and sum rounded to float32 as interpRowGo rounds them.
TEXT ·interpRowAVX2(SB), NOSPLIT, $0-28
	MOVQ         row+0(FP), DI
	MOVQ         groups+8(FP), CX
	MOVQ         ld+16(FP), SI
	VBROADCASTSS fx+24(FP), Y15
	VMOVUPS      0(SI), X0                 // l0 l1 l2 0
	VMOVUPS      16(SI), X1                // d0 d1 d2 0
	VMOVDQU      interpPat<>+0(SB), Y2
	VPERMPS      Y0, Y2, Y3                // l in pattern A
	VPERMPS      Y1, Y2, Y6                // d in pattern A
	VMOVDQU      interpPat<>+32(SB), Y2
	VPERMPS      Y0, Y2, Y4                // B
	VPERMPS      Y1, Y2, Y7
	VMOVDQU      interpPat<>+64(SB), Y2
	VPERMPS      Y0, Y2, Y5                // C
	VPERMPS      Y1, Y2, Y8
	VMOVDQU      interpPat<>+96(SB), Y9    // the lanes' pixels n, A
	VMOVDQU      interpPat<>+128(SB), Y10  // B
	VMOVDQU      interpPat<>+160(SB), Y11  // C
	MOVL         $8, AX
	VMOVD        AX, X12
	VPBROADCASTD X12, Y12

loop:
	STEP(Y9, Y3, Y6, 0, Y13)
	STEP(Y10, Y4, Y7, 32, Y14)
	STEP(Y11, Y5, Y8, 64, Y13)
	VPADDD    Y12, Y9, Y9
	VPADDD    Y12, Y10, Y10
	VPADDD    Y12, Y11, Y11
	ADDQ      $96, DI
	DECQ      CX
	JNZ       loop
	VZEROUPPER
	RET
