//go:build amd64 && !purego

#include "textflag.h"

// toneShuf spreads each 128-bit lane's first twelve bytes, four pixels'
// R, G, B codes, to four RGBA words (alpha left 0 for VPOR).
DATA toneShuf<>+0(SB)/8, $0x8005040380020100
DATA toneShuf<>+8(SB)/8, $0x800b0a0980080706
DATA toneShuf<>+16(SB)/8, $0x8005040380020100
DATA toneShuf<>+24(SB)/8, $0x800b0a0980080706
GLOBL toneShuf<>(SB), RODATA|NOPTR, $32

// tonePerm gathers the packed codes' dwords so that each lane starts with
// its four pixels' twelve codes: lane 0 codes 0–15, lane 1 codes 12–23.
DATA tonePerm<>+0(SB)/4, $0
DATA tonePerm<>+4(SB)/4, $4
DATA tonePerm<>+8(SB)/4, $1
DATA tonePerm<>+12(SB)/4, $5
DATA tonePerm<>+16(SB)/4, $5
DATA tonePerm<>+20(SB)/4, $2
DATA tonePerm<>+24(SB)/4, $6
DATA tonePerm<>+28(SB)/4, $7
GLOBL tonePerm<>(SB), RODATA|NOPTR, $32

// CODES replaces the eight float32 bits in V with their codes: lo +
// (place(u) ≥ place(thr)) from the table word of bucket k = (max(u,
// code8Low) − code8Low) >> 13, as code8Tab.code8Unit does. Y3, Y5–Y7 are
// scratch; Y8 holds code8Place, Y9 a byte's mask, Y12 −1 (the gather's
// mask, and one to add), Y14 code8Low, R9 the table.
#define CODES(V) \
	VPMAXUD    Y14, V, V; \
	VPSUBD     Y14, V, Y3; \
	VPSRLD     $13, Y3, Y3; \
	VMOVDQA    Y12, Y5; \
	VPGATHERDD Y5, (R9)(Y3*4), Y6; \
	VPAND      Y8, V, V; \
	VPSRLD     $8, Y6, Y7; \
	VPCMPGTD   V, Y7, Y7; \
	VPAND      Y9, Y6, Y6; \
	VPSUBD     Y12, Y6, Y6; \
	VPADDD     Y7, Y6, V

// func toneRowAVX2(src *float32, dst *byte, groups int, ent *uint32, fast, zero uint32) int
//
// Codes groups of eight pixels (24 float32 in, 32 bytes of NRGBA out)
// while every channel's bits of the group are below fast, as
// code8Tab.code8Unit does each (ent: the table's words), and
// returns the number of groups coded: it stops before the first group
// with a channel at or above fast (or negative, or NaN). A group whose
// channels' bits all are below zero (code8Tab.zero) is black without
// the table: most of a frame of space.
TEXT ·toneRowAVX2(SB), NOSPLIT, $0-48
	MOVQ         src+0(FP), SI
	MOVQ         dst+8(FP), DI
	MOVQ         groups+16(FP), CX
	MOVQ         ent+24(FP), R9
	MOVL         zero+36(FP), AX
	DECL         AX
	VMOVD        AX, X4
	VPBROADCASTD X4, Y4                    // zero − 1
	MOVL         fast+32(FP), AX
	DECL         AX
	VMOVD        AX, X15
	VPBROADCASTD X15, Y15                  // fast − 1
	MOVL         $0x39000000, AX
	VMOVD        AX, X14
	VPBROADCASTD X14, Y14                  // code8Low
	MOVL         $0xff000000, AX
	VMOVD        AX, X13
	VPBROADCASTD X13, Y13                  // alpha
	MOVL         $0xff, AX
	VMOVD        AX, X9
	VPBROADCASTD X9, Y9                    // a byte
	MOVL         $0x1fff, AX
	VMOVD        AX, X8
	VPBROADCASTD X8, Y8                    // code8Place
	VPCMPEQD     Y12, Y12, Y12             // −1
	VMOVDQU      toneShuf<>(SB), Y11
	VMOVDQU      tonePerm<>(SB), Y10
	XORQ         DX, DX
	TESTQ        CX, CX
	JLE          done

loop:
	VMOVDQU   0(SI), Y0
	VMOVDQU   32(SI), Y1
	VMOVDQU   64(SI), Y2
	VPMAXUD   Y0, Y1, Y3
	VPMAXUD   Y2, Y3, Y3
	VPMAXUD   Y4, Y3, Y5
	VPCMPEQD  Y4, Y5, Y5   // every lane ≤ zero − 1
	VPMOVMSKB Y5, AX
	CMPL      AX, $0xffffffff
	JEQ       black
	VPMAXUD   Y15, Y3, Y3
	VPCMPEQD  Y15, Y3, Y3  // every lane ≤ fast − 1
	VPMOVMSKB Y3, AX
	CMPL      AX, $0xffffffff
	JNE       done

	CODES(Y0)
	CODES(Y1)
	CODES(Y2)

	// 24 codes in channel order, then four RGBA words per lane.
	VPACKUSDW Y1, Y0, Y3
	VPACKUSDW Y2, Y2, Y5
	VPACKUSWB Y5, Y3, Y3
	VPERMD    Y3, Y10, Y3
	VPSHUFB   Y11, Y3, Y3
	VPOR      Y13, Y3, Y3
	VMOVDQU   Y3, 0(DI)

next:
	ADDQ $96, SI
	ADDQ $32, DI
	INCQ DX
	CMPQ DX, CX
	JLT  loop
	JMP  done

black:
	VMOVDQU Y13, 0(DI)
	JMP     next

done:
	VZEROUPPER
	MOVQ DX, ret+40(FP)
	RET
