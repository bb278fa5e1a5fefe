package rowflate

import (
	"encoding/binary"
	"math/bits"
	"slices"
)

const (
	windowSize = 1 << 15 // the largest distance (RFC 1951 §3.2.5)
	minMatch   = 3
	maxMatch   = 258

	// BlockTokens is how many symbols (literals and matches) end a
	// block: the next, with codes of its own, starts after it.
	BlockTokens = 1 << 16

	// chunkBytes is about how many bytes of lines are gathered before
	// they are matched, so that matches run across line ends.
	chunkBytes = 1 << 16

	matchFlag = 1 << 31
)

// Encoder deflates lines of pixels. Its zero value is not ready: call
// Reset. An Encoder may be reused for any number of streams.
type Encoder struct {
	bpp, line int
	buf       []byte // the line before the pending ones (if any), then the pending lines
	n         int    // bytes in buf
	done      int    // bytes of buf already matched (or history)
	filling   bool   // Line was called and not yet Add or Prime
	tokens    []uint32
	litFreq   [numLit]uint32
	distFreq  [numDist]uint32
	out       bitWriter
	tree      treeScratch
}

const (
	numLit     = 286 // literal/length symbols 0–285
	numDist    = 30
	numCodeLen = 19
	endOfBlock = 256
)

// Reset starts a stream of lines of line bytes each, with bpp bytes a
// pixel (1 ≤ bpp ≤ 8, PNG's largest pixel, which the runs of zeros rely
// on; line ≥ 1, including the PNG filter byte, which is data like any
// other here).
func (e *Encoder) Reset(bpp, line int) {
	if bpp < 1 || bpp > 8 || line < 1 {
		panic("rowflate: Reset with bpp outside 1…8 or line below 1")
	}
	e.bpp, e.line = bpp, line
	k := max(1, chunkBytes/line)
	if need := (k + 1) * line; cap(e.buf) < need {
		e.buf = make([]byte, need)
	}
	e.buf = e.buf[:cap(e.buf)]
	e.n, e.done, e.filling = 0, 0, false
	e.tokens = e.tokens[:0]
	clear(e.litFreq[:])
	clear(e.distFreq[:])
	e.out.reset()
}

// Line returns where the caller writes the next line (its line bytes);
// Add then deflates it, or Prime takes it as the data before the stream.
func (e *Encoder) Line() []byte {
	if e.n+e.line > len(e.buf) {
		e.match()
		// Keep the last line as history for the pixel above.
		copy(e.buf[:e.line], e.buf[e.n-e.line:e.n])
		e.n, e.done = e.line, e.line
	}
	e.filling = true
	return e.buf[e.n : e.n+e.line]
}

// Prime takes the line just written into Line's slice as the line before
// the stream (the previous strip's last line): matches may refer to it,
// and it is not itself encoded. Only before the first Add.
func (e *Encoder) Prime() {
	if !e.filling || e.n != 0 {
		panic("rowflate: Prime without Line, or after Add")
	}
	e.filling = false
	e.n, e.done = e.line, e.line
}

// Add deflates the line just written into Line's slice.
func (e *Encoder) Add() {
	if !e.filling {
		panic("rowflate: Add without Line")
	}
	e.filling = false
	e.n += e.line
}

// Finish deflates what remains and ends the stream: with the final block
// when last, otherwise with a sync flush. The bytes returned are valid
// until the next Reset.
func (e *Encoder) Finish(last bool) []byte {
	e.match()
	e.writeBlock(last)
	if !last {
		// An empty stored block: BFINAL 0, BTYPE 00, then LEN 0 and
		// NLEN 0xffff at a byte boundary (RFC 1951 §3.2.4).
		e.out.bits(0, 3)
		e.out.align()
		e.out.b = append(e.out.b, 0, 0, 0xff, 0xff)
	} else {
		e.out.align()
	}
	return e.out.b
}

// match turns the pending bytes into literals and matches.
func (e *Encoder) match() {
	b := e.buf[:e.n]
	i, end := e.done, e.n
	bpp, line := e.bpp, e.line
	up := line <= windowSize && line != bpp
	for i < end {
		if i >= 8 && i+8 <= end && binary.LittleEndian.Uint64(b[i:]) == 0 && binary.LittleEndian.Uint64(b[i-8:]) == 0 {
			// A run of zeros (most of a frame of space), the pixel
			// before being zero too: matches of it at the most length.
			z := 8 + zeroRun(b[i+8:end])
			full := z / maxMatch
			ds := distSym(uint32(bpp - 1))
			for range full {
				e.tokens = append(e.tokens, matchFlag|(maxMatch-minMatch)<<15|uint32(bpp-1))
			}
			e.litFreq[lengthSym[maxMatch-minMatch]] += uint32(full)
			e.distFreq[ds] += uint32(full)
			i += full * maxMatch
			if r := z - full*maxMatch; r >= minMatch {
				e.tokens = append(e.tokens, matchFlag|uint32(r-minMatch)<<15|uint32(bpp-1))
				e.litFreq[lengthSym[r-minMatch]]++
				e.distFreq[ds]++
				i += r
			}
			if len(e.tokens) >= BlockTokens {
				e.writeBlock(false)
			}
			continue
		}
		room := min(maxMatch, end-i)
		l, d := 0, 0
		if room > minMatch {
			// The first three bytes compared as a word with the next.
			const three = 0xffffff
			cur := binary.LittleEndian.Uint32(b[i:])
			if j := i - bpp; j >= 0 && (cur^binary.LittleEndian.Uint32(b[j:]))&three == 0 {
				l, d = matchLen(b, i, j, room), bpp
			}
			if j := i - line; up && l < room && j >= 0 && (cur^binary.LittleEndian.Uint32(b[j:]))&three == 0 {
				if m := matchLen(b, i, j, room); m > l {
					l, d = m, line
				}
			}
		} else if room == minMatch {
			// The last three bytes of what is pending.
			for _, j := range [2]int{i - bpp, i - line} {
				if j >= 0 && (j == i-bpp || up) && b[i] == b[j] && b[i+1] == b[j+1] && b[i+2] == b[j+2] {
					l, d = minMatch, i-j
					break
				}
			}
		}
		if l >= minMatch {
			l0, d0 := l-minMatch, d-1
			e.tokens = append(e.tokens, matchFlag|uint32(l0)<<15|uint32(d0))
			e.litFreq[lengthSym[l0]]++
			e.distFreq[distSym(uint32(d0))]++
			i += l
		} else {
			e.tokens = append(e.tokens, uint32(b[i]))
			e.litFreq[b[i]]++
			i++
		}
		if len(e.tokens) >= BlockTokens {
			e.writeBlock(false)
		}
	}
	e.done = end
}

// zeroRun returns how many bytes at the start of b are zero, 32 a step.
func zeroRun(b []byte) int {
	n := 0
	for n+32 <= len(b) {
		w := b[n : n+32 : n+32]
		if binary.LittleEndian.Uint64(w)|binary.LittleEndian.Uint64(w[8:])|binary.LittleEndian.Uint64(w[16:])|binary.LittleEndian.Uint64(w[24:]) != 0 {
			break
		}
		n += 32
	}
	for n+8 <= len(b) {
		if x := binary.LittleEndian.Uint64(b[n:]); x != 0 {
			return n + bits.TrailingZeros64(x)>>3
		}
		n += 8
	}
	for n < len(b) && b[n] == 0 {
		n++
	}
	return n
}

// matchLen returns how many bytes from b[i] equal those from b[j] (j < i),
// at most room (i+room ≤ len(b)), eight a step.
func matchLen(b []byte, i, j, room int) int {
	n := 0
	for n+8 <= room {
		if x := binary.LittleEndian.Uint64(b[i+n:]) ^ binary.LittleEndian.Uint64(b[j+n:]); x != 0 {
			return n + bits.TrailingZeros64(x)>>3
		}
		n += 8
	}
	for n < room && b[i+n] == b[j+n] {
		n++
	}
	return n
}

// distSym returns the distance code of a distance minus one (RFC 1951
// §3.2.5): 0–3 for distances 1–4, then two codes per power of two.
func distSym(d0 uint32) int {
	if d0 < 4 {
		return int(d0)
	}
	n := bits.Len32(d0) - 1
	return 2*n + int(d0>>(n-1)&1)
}

// distExtra returns the extra bits of a distance minus one and how many
// there are.
func distExtra(d0 uint32) (uint32, uint) {
	if d0 < 4 {
		return 0, 0
	}
	n := uint(bits.Len32(d0) - 2)
	return d0 & (1<<n - 1), n
}

// lengthSym, lengthBits and lengthExtra give the length code of a match
// length minus 3, its count of extra bits and their value (RFC 1951
// §3.2.5).
var lengthSym, lengthBits, lengthExtra [256]uint16

func init() {
	for l0 := range 256 {
		switch {
		case l0 == 255: // length 258 has a code of its own
			lengthSym[l0] = 285
		case l0 < 8:
			lengthSym[l0] = uint16(257 + l0)
		default:
			n := bits.Len(uint(l0)) - 1 // 3…7
			lengthSym[l0] = uint16(257 + 4*(n-1) + (l0>>(n-2))&3)
			lengthBits[l0] = uint16(n - 2)
			lengthExtra[l0] = uint16(l0 & (1<<(n-2) - 1))
		}
	}
}

// codeLenOrder is the order in which the code-length code's lengths are
// sent (RFC 1951 §3.2.7).
var codeLenOrder = [numCodeLen]int{16, 17, 18, 0, 8, 7, 9, 6, 10, 5, 11, 4, 12, 3, 13, 2, 14, 1, 15}

// writeBlock writes the pending tokens as one block with dynamic Huffman
// codes and clears them.
func (e *Encoder) writeBlock(final bool) {
	e.litFreq[endOfBlock]++
	t := &e.tree
	litLen, distLen := t.litLen[:], t.distLen[:]
	t.lengths(e.litFreq[:], 15, litLen)
	t.lengths(e.distFreq[:], 15, distLen)
	hlit := numLit
	for hlit > 257 && litLen[hlit-1] == 0 {
		hlit--
	}
	hdist := numDist
	for hdist > 1 && distLen[hdist-1] == 0 {
		hdist--
	}

	// The two code lengths' sequences, run-length coded (§3.2.7).
	seq := append(append(t.seq[:0], litLen[:hlit]...), distLen[:hdist]...)
	rle := t.rle[:0]
	var clFreq [numCodeLen]uint32
	for i := 0; i < len(seq); {
		l := seq[i]
		run := 1
		for i+run < len(seq) && seq[i+run] == l {
			run++
		}
		i += run
		if l == 0 {
			for run >= 11 {
				r := min(run, 138)
				rle = append(rle, 18|uint16(r-11)<<8)
				clFreq[18]++
				run -= r
			}
			if run >= 3 {
				rle = append(rle, 17|uint16(run-3)<<8)
				clFreq[17]++
				run = 0
			}
		} else {
			rle = append(rle, uint16(l))
			clFreq[l]++
			run--
			for run >= 3 {
				r := min(run, 6)
				rle = append(rle, 16|uint16(r-3)<<8)
				clFreq[16]++
				run -= r
			}
		}
		for ; run > 0; run-- {
			rle = append(rle, uint16(l))
			clFreq[l]++
		}
	}
	t.seq, t.rle = seq, rle
	var clLen [numCodeLen]uint8
	t.lengths(clFreq[:], 7, clLen[:])
	hclen := numCodeLen
	for hclen > 4 && clLen[codeLenOrder[hclen-1]] == 0 {
		hclen--
	}

	litCode, distCode := t.litCode[:], t.distCode[:]
	var clCode [numCodeLen]uint16
	canonical(litLen, litCode)
	canonical(distLen, distCode)
	canonical(clLen[:], clCode[:])

	w := &e.out
	var bfinal uint64
	if final {
		bfinal = 1
	}
	w.bits(bfinal|2<<1|uint64(hlit-257)<<3|uint64(hdist-1)<<8|uint64(hclen-4)<<13, 17)
	for _, s := range codeLenOrder[:hclen] {
		w.bits(uint64(clLen[s]), 3)
	}
	for _, r := range rle {
		s := r & 0xff
		w.bits(uint64(clCode[s]), uint(clLen[s]))
		switch s {
		case 16:
			w.bits(uint64(r>>8), 2)
		case 17:
			w.bits(uint64(r>>8), 3)
		case 18:
			w.bits(uint64(r>>8), 7)
		}
	}
	// Each token's bits (a match's length code, its extra bits, its
	// distance code and extra bits: at most 48) are or-ed in above the
	// fewer than 8 pending ones and the word stored whole; the whole
	// bytes move on.
	var litEnc, lenEnc [256]uint32 // code (and extra bits) | count << 24
	for c := range 256 {
		litEnc[c] = uint32(litCode[c]) | uint32(litLen[c])<<24
		ls := lengthSym[c]
		lenEnc[c] = (uint32(litCode[ls]) | uint32(lengthExtra[c])<<litLen[ls]) | (uint32(litLen[ls])+uint32(lengthBits[c]))<<24
	}
	w.flushBytes()
	out := slices.Grow(w.b, 6*len(e.tokens)+8)
	pos := len(out)
	out = out[:cap(out)]
	acc, n := w.acc, w.n
	for _, tok := range e.tokens {
		var v uint64
		var nb uint
		if tok&matchFlag == 0 {
			c := litEnc[tok&0xff]
			v, nb = uint64(c&0xffffff), uint(c>>24)
		} else {
			c := lenEnc[tok>>15&0xff]
			d0 := tok & 0x7fff
			ds := distSym(d0)
			x, nx := distExtra(d0)
			nl := uint(c >> 24)
			v = uint64(c&0xffffff) | (uint64(distCode[ds])|uint64(x)<<distLen[ds])<<nl
			nb = nl + uint(distLen[ds]) + nx
		}
		acc |= v << n
		n += nb
		binary.LittleEndian.PutUint64(out[pos:], acc)
		k := n >> 3
		pos += int(k)
		acc >>= k * 8
		n &= 7
	}
	w.b, w.acc, w.n = out[:pos], acc, n
	w.bits(uint64(litCode[endOfBlock]), uint(litLen[endOfBlock]))

	e.tokens = e.tokens[:0]
	clear(e.litFreq[:])
	clear(e.distFreq[:])
}

// canonical assigns the canonical Huffman codes of the lengths (RFC 1951
// §3.2.2), bit-reversed for writing least significant bit first.
func canonical(lens []uint8, codes []uint16) {
	var count [16]uint16
	for _, l := range lens {
		count[l]++
	}
	count[0] = 0
	var next [16]uint16
	code := uint16(0)
	for b := 1; b < 16; b++ {
		code = (code + count[b-1]) << 1
		next[b] = code
	}
	for s, l := range lens {
		if l == 0 {
			codes[s] = 0
			continue
		}
		codes[s] = bits.Reverse16(next[l]) >> (16 - l)
		next[l]++
	}
}

// bitWriter appends bits least significant first (RFC 1951 §3.1.1).
type bitWriter struct {
	acc uint64
	n   uint
	b   []byte
}

func (w *bitWriter) reset() { w.acc, w.n, w.b = 0, 0, w.b[:0] }

// bits appends the low nb bits of v (nb ≤ 32).
func (w *bitWriter) bits(v uint64, nb uint) {
	w.acc |= v << w.n
	w.n += nb
	if w.n >= 32 {
		w.b = binary.LittleEndian.AppendUint32(w.b, uint32(w.acc))
		w.acc >>= 32
		w.n -= 32
	}
}

// flushBytes writes the whole bytes held, leaving fewer than 8 bits.
func (w *bitWriter) flushBytes() {
	for w.n >= 8 {
		w.b = append(w.b, byte(w.acc))
		w.acc >>= 8
		w.n -= 8
	}
}

// align pads with zero bits to a byte boundary and writes what is held.
func (w *bitWriter) align() {
	for w.n > 0 {
		w.b = append(w.b, byte(w.acc))
		w.acc >>= 8
		w.n -= min(w.n, 8)
	}
	w.acc = 0
}
