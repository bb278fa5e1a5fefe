package rowflate

import (
	"cmp"
	"slices"
)

// treeScratch holds a block's code lengths and codes and the working
// storage of the package-merge algorithm, reused block after block.
type treeScratch struct {
	litLen   [numLit]uint8
	distLen  [numDist]uint8
	litCode  [numLit]uint16
	distCode [numDist]uint16
	seq      []uint8
	rle      []uint16

	leaves []pmNode
	nodes  []pmNode
	list   []int32
	prev   []int32
}

// pmNode is an item of the package-merge lists: a leaf (sym ≥ 0) or a
// package of two items of the list before.
type pmNode struct {
	w           uint64
	sym         int32
	left, right int32
}

// lengths sets lens[s] to the code length of symbol s in an optimal prefix
// code for the frequencies freq whose lengths are at most limit (0 for an
// unused symbol): the package-merge algorithm (Larmore and Hirschberg,
// "A fast algorithm for optimal length-limited Huffman codes", J. ACM 37,
// 1990). Fewer than two used symbols get two codes of length 1 (the first
// unused symbols making up the pair), a complete code every inflater
// accepts.
func (t *treeScratch) lengths(freq []uint32, limit int, lens []uint8) {
	clear(lens)
	t.leaves = t.leaves[:0]
	for s, f := range freq {
		if f > 0 {
			t.leaves = append(t.leaves, pmNode{w: uint64(f), sym: int32(s)})
		}
	}
	if len(t.leaves) < 2 {
		for s := range freq {
			if len(t.leaves) == 2 {
				break
			}
			if freq[s] == 0 {
				t.leaves = append(t.leaves, pmNode{w: 1, sym: int32(s)})
			}
		}
		for _, l := range t.leaves {
			lens[l.sym] = 1
		}
		return
	}
	slices.SortFunc(t.leaves, func(a, b pmNode) int {
		if c := cmp.Compare(a.w, b.w); c != 0 {
			return c
		}
		return cmp.Compare(a.sym, b.sym)
	})
	n := len(t.leaves)
	t.nodes = append(t.nodes[:0], t.leaves...)
	t.list = t.list[:0]
	for i := range n {
		t.list = append(t.list, int32(i))
	}
	// Each round merges the leaves with the packages of pairs of the
	// list before; after limit−1 rounds the first 2n−2 items of the list
	// give each symbol's length as the number of times it occurs in them.
	for range limit - 1 {
		t.prev, t.list = t.list, t.prev[:0]
		li, pi := 0, 0
		for li < n || pi+1 < len(t.prev) {
			var pw uint64
			havePkg := pi+1 < len(t.prev)
			if havePkg {
				pw = t.nodes[t.prev[pi]].w + t.nodes[t.prev[pi+1]].w
			}
			if li < n && (!havePkg || t.leaves[li].w <= pw) {
				t.list = append(t.list, int32(li))
				li++
				continue
			}
			t.nodes = append(t.nodes, pmNode{w: pw, sym: -1, left: t.prev[pi], right: t.prev[pi+1]})
			t.list = append(t.list, int32(len(t.nodes)-1))
			pi += 2
		}
		if len(t.list) > 2*n-2 {
			t.list = t.list[:2*n-2] // later items are never taken
		}
	}
	for _, it := range t.list[:2*n-2] {
		t.count(it, lens)
	}
}

// count adds one to the length of every leaf under node i.
func (t *treeScratch) count(i int32, lens []uint8) {
	for {
		nd := &t.nodes[i]
		if nd.sym >= 0 {
			lens[nd.sym]++
			return
		}
		t.count(nd.left, lens)
		i = nd.right
	}
}
