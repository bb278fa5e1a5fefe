//go:build amd64 && !purego

package render

import "golang.org/x/sys/cpu"

// haveAVX2 reports whether the AVX2 row kernels (interpRowAVX2,
// toneRowAVX2) may run.
var haveAVX2 = cpu.X86.HasAVX2

// simdBuilt reports whether this build has the AVX2 kernels (amd64 without
// the purego tag).
const simdBuilt = true

// interpRowAVX2 is interpRowGo over the first 8·groups pixels of the row
// at row (groups ≥ 1), eight pixels a step (interp_amd64.s), with ld = l0,
// l1, l2, 0, d0, d1, d2, 0: bit for bit the same values.
//
//go:noescape
func interpRowAVX2(row *float32, groups int, ld *[8]float32, fx float32)

// toneRowAVX2 codes groups of eight pixels of a row as toner.row's table
// path does, bit for bit, while every channel of a group is below fast
// (tone_amd64.s), and returns the number of groups coded; a group whose
// channels all are below zero is black without the table.
//
//go:noescape
func toneRowAVX2(src *float32, dst *byte, groups int, ent *uint32, fast, zero uint32) int
