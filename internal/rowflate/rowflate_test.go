package rowflate

import (
	"bytes"
	"compress/flate"
	"container/heap"
	"io"
	"math/rand/v2"
	"testing"
)

// The streams are checked by inflating them with the standard library's
// compress/flate, an implementation of RFC 1951 independent of this one.

// encode deflates the lines as one stream (or as consecutive strips of
// rowsPer lines, each after the first primed with the line before it, as
// the PNG encoder does) and returns the stream.
func encode(lines [][]byte, bpp, rowsPer int) []byte {
	var e Encoder
	var out []byte
	for s := 0; s < len(lines); s += rowsPer {
		e.Reset(bpp, len(lines[0]))
		if s > 0 {
			copy(e.Line(), lines[s-1])
			e.Prime()
		}
		end := min(len(lines), s+rowsPer)
		for _, l := range lines[s:end] {
			copy(e.Line(), l)
			e.Add()
		}
		out = append(out, e.Finish(end == len(lines))...)
	}
	return out
}

func inflate(t *testing.T, stream []byte) []byte {
	t.Helper()
	got, err := io.ReadAll(flate.NewReader(bytes.NewReader(stream)))
	if err != nil {
		t.Fatalf("inflating: %v", err)
	}
	return got
}

// sky makes h lines of w pixels like a rendered frame: black, a smooth
// band of diffuse light quantised to 8 bits, and single bright pixels.
func sky(rng *rand.Rand, w, h, bpp int) [][]byte {
	lines := make([][]byte, h)
	for y := range lines {
		l := make([]byte, 1+w*bpp)
		for x := range w {
			p := l[1+x*bpp : 1+(x+1)*bpp]
			if d := x - w/2 + y/3; d > -w/5 && d < w/5 {
				v := byte(40 - 40*d*d/(w*w/25))
				for c := range p {
					p[c] = v + byte(c)
				}
			}
			if rng.IntN(50) == 0 {
				for c := range p {
					p[c] = byte(rng.IntN(256))
				}
			}
		}
		lines[y] = l
	}
	return lines
}

func TestRoundTrip(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	noise := func(w, h int) [][]byte {
		lines := make([][]byte, h)
		for y := range lines {
			lines[y] = make([]byte, w)
			for i := range lines[y] {
				lines[y][i] = byte(rng.IntN(256))
			}
		}
		return lines
	}
	zeros := func(w, h int) [][]byte {
		lines := make([][]byte, h)
		for y := range lines {
			lines[y] = make([]byte, w)
		}
		return lines
	}
	cases := []struct {
		name    string
		lines   [][]byte
		bpp     int
		rowsPer int
	}{
		{"sky rgb", sky(rng, 300, 120, 3), 3, 1000},
		{"sky rgb strips", sky(rng, 300, 120, 3), 3, 17},
		{"sky rgba one-line strips", sky(rng, 64, 40, 4), 4, 1},
		{"sky rgb16", sky(rng, 200, 50, 6), 6, 1000},
		{"black", zeros(12289, 40), 3, 1000},
		// Lines past the 32 KiB window: matched a pixel back only.
		{"black wide", zeros(40000, 5), 4, 2},
		{"sky wide", sky(rng, 9000, 6, 4), 4, 1000},
		{"noise", noise(1001, 300), 3, 1000}, // many blocks of BlockTokens
		{"one byte", [][]byte{{7}}, 1, 1},
		{"one pixel lines", [][]byte{{0, 1, 2}, {0, 1, 2}, {0, 1, 3}}, 3, 2},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			stream := encode(c.lines, c.bpp, c.rowsPer)
			want := bytes.Join(c.lines, nil)
			if got := inflate(t, stream); !bytes.Equal(got, want) {
				t.Fatalf("inflated %d bytes differ from the %d given", len(got), len(want))
			}
			if c.name == "noise" && len(stream) > len(want)+len(want)/100 {
				t.Errorf("noise grew from %d to %d bytes (over 1 %%)", len(want), len(stream))
			}
			if c.name == "black" && len(stream) > len(want)/200 {
				t.Errorf("black lines: %d bytes from %d", len(stream), len(want))
			}
		})
	}
}

// A stream ending in a sync flush ends on a byte boundary with the empty
// stored block 00 00 ff ff, and inflates to its data with no error up to
// there (as the PNG encoder's strips before the last do).
func TestSyncFlush(t *testing.T) {
	var e Encoder
	e.Reset(3, 10)
	copy(e.Line(), "0123456789")
	e.Add()
	s := e.Finish(false)
	if !bytes.HasSuffix(s, []byte{0, 0, 0xff, 0xff}) {
		t.Fatalf("stream %x does not end in a sync flush", s)
	}
	r := flate.NewReader(bytes.NewReader(s))
	got := make([]byte, 10)
	if _, err := io.ReadFull(r, got); err != nil || string(got) != "0123456789" {
		t.Fatalf("read %q, %v", got, err)
	}
}

// huffmanCost is the textbook Huffman algorithm (a min-heap of weights):
// the least total of weight × length over all prefix codes, with no limit
// on the lengths.
func huffmanCost(freq []uint32) uint64 {
	h := &u64Heap{}
	for _, f := range freq {
		if f > 0 {
			*h = append(*h, uint64(f))
		}
	}
	heap.Init(h)
	var cost uint64
	for h.Len() > 1 {
		a, b := heap.Pop(h).(uint64), heap.Pop(h).(uint64)
		cost += a + b
		heap.Push(h, a+b)
	}
	return cost
}

type u64Heap []uint64

func (h u64Heap) Len() int           { return len(h) }
func (h u64Heap) Less(i, j int) bool { return h[i] < h[j] }
func (h u64Heap) Swap(i, j int)      { h[i], h[j] = h[j], h[i] }
func (h *u64Heap) Push(x any)        { *h = append(*h, x.(uint64)) }
func (h *u64Heap) Pop() any {
	old := *h
	x := old[len(old)-1]
	*h = old[:len(old)-1]
	return x
}

// The lengths form a complete prefix code (Kraft sum exactly 1) within the
// limit; with a limit that does not bind, their cost is the Huffman
// algorithm's; with one that does, no more than a few per cent above it.
func TestLengths(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	var ts treeScratch
	for trial := range 300 {
		n := 2 + rng.IntN(285)
		freq := make([]uint32, n)
		for s := range freq {
			switch rng.IntN(4) {
			case 0: // unused
			case 1: // geometric: deep unconstrained trees
				freq[s] = 1 << rng.IntN(24)
			default:
				freq[s] = uint32(1 + rng.IntN(1000))
			}
		}
		freq[rng.IntN(n)] = 1
		freq[rng.IntN(n)] = 5
		for _, limit := range []int{7, 15, 40} {
			if 1<<min(limit, 20) < n {
				continue
			}
			lens := make([]uint8, n)
			ts.lengths(freq, limit, lens)
			var kraft float64
			var cost uint64
			for s, l := range lens {
				if int(l) > limit {
					t.Fatalf("trial %d: length %d over the limit %d", trial, l, limit)
				}
				if (l == 0) != (freq[s] == 0) {
					t.Fatalf("trial %d: symbol %d of frequency %d has length %d", trial, s, freq[s], l)
				}
				if l > 0 {
					kraft += 1 / float64(uint64(1)<<l)
					cost += uint64(freq[s]) * uint64(l)
				}
			}
			if kraft != 1 {
				t.Fatalf("trial %d, limit %d: Kraft sum %v", trial, limit, kraft)
			}
			opt := huffmanCost(freq)
			if limit == 40 && cost != opt {
				t.Fatalf("trial %d: cost %d, Huffman's %d", trial, cost, opt)
			}
			if cost < opt {
				t.Fatalf("trial %d, limit %d: cost %d below Huffman's %d", trial, limit, cost, opt)
			}
		}
	}
}

// A block with one symbol or none still gets a complete code of two.
func TestLengthsFewSymbols(t *testing.T) {
	var ts treeScratch
	for _, freq := range [][]uint32{{0, 0, 0}, {0, 9, 0}, {9, 0, 0}} {
		lens := make([]uint8, 3)
		ts.lengths(freq, 15, lens)
		ones := 0
		for s, l := range lens {
			if l == 1 {
				ones++
			} else if l != 0 {
				t.Fatalf("%v: length %d", freq, l)
			}
			if freq[s] > 0 && l != 1 {
				t.Fatalf("%v: the used symbol has length %d", freq, l)
			}
		}
		if ones != 2 {
			t.Fatalf("%v: lengths %v", freq, lens)
		}
	}
}

func FuzzRoundTrip(f *testing.F) {
	f.Add([]byte("aaaaaaaaaaaaaaaaaaaaabcabcabcabc\x00\x00\x00\x00\x00\x00"), uint8(3), uint8(7), uint8(2))
	f.Add(make([]byte, 1000), uint8(4), uint8(40), uint8(3))
	f.Fuzz(func(t *testing.T, data []byte, bpp, line, rowsPer uint8) {
		b, l, r := 1+int(bpp%8), 1+int(line), 1+int(rowsPer%16)
		var lines [][]byte
		for len(data) >= l {
			lines = append(lines, data[:l])
			data = data[l:]
		}
		if len(lines) == 0 {
			return
		}
		got := inflate(t, encode(lines, b, r))
		if want := bytes.Join(lines, nil); !bytes.Equal(got, want) {
			t.Fatalf("inflated %x, want %x", got, want)
		}
	})
}

func BenchmarkEncodeSky(b *testing.B) {
	rng := rand.New(rand.NewPCG(5, 6))
	lines := sky(rng, 4096, 128, 3)
	var e Encoder
	b.SetBytes(int64(len(lines) * len(lines[0])))
	for b.Loop() {
		e.Reset(3, len(lines[0]))
		for _, l := range lines {
			copy(e.Line(), l)
			e.Add()
		}
		e.Finish(true)
	}
}
