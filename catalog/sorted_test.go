package catalog

import (
	"bytes"
	"errors"
	"io"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"
)

// readAllChunks joins every chunk Next delivers.
func readAllChunks(t *testing.T, c *ChunkReader) (*Stars, error) {
	t.Helper()
	out := &Stars{}
	first := true
	for {
		ch, err := c.Next()
		if errors.Is(err, io.EOF) {
			return out, nil
		}
		if err != nil {
			return nil, err
		}
		if first {
			out.Epoch, out.Source, out.Format = ch.Epoch, ch.Source, ch.Format
			first = false
		}
		out.appendAll(ch)
	}
}

// TestSortByVStable: the canonical order is (V, input row): equal V keep
// their input order, and every column and name moves with its row.
func TestSortByVStable(t *testing.T) {
	s := randomStars(rand.New(rand.NewPCG(3, 4)), 500)
	for i := range s.Vmag {
		s.Vmag[i] = float32(int(s.Vmag[i])) // many ties
	}
	u := SortByV(s)
	if err := u.Validate(); err != nil {
		t.Fatal(err)
	}
	pos := map[int64]int{}
	for i, id := range s.ID {
		pos[id] = i
	}
	for j := 1; j < u.Len(); j++ {
		if u.Vmag[j] < u.Vmag[j-1] || u.Vmag[j] == u.Vmag[j-1] && pos[u.ID[j]] < pos[u.ID[j-1]] {
			t.Fatalf("rows %d, %d out of (V, input row) order", j-1, j)
		}
	}
	for j := 0; j < u.Len(); j++ {
		i := pos[u.ID[j]]
		if u.Teff[j] != s.Teff[i] || u.X[j] != s.X[i] || u.Names[j] != s.Names[i] || u.Flags[j] != s.Flags[i] {
			t.Fatalf("row %d does not carry input row %d", j, i)
		}
	}
}

// TestSortedCacheRoundTrip: a sorted catalogue is written as version 2; a
// full read (ReadCache, and chunks of several lengths) gives it back bit
// for bit, and LimitBins(k) delivers exactly the rows of bins 0…k−1, the
// stars brighter than bin k's lower edge.
func TestSortedCacheRoundTrip(t *testing.T) {
	s := SortByV(randomStars(rand.New(rand.NewPCG(5, 6)), 2000))
	p := writeCacheFile(t, s)
	data, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	if data[7] != cacheVersionSorted {
		t.Fatalf("version %d, want %d", data[7], cacheVersionSorted)
	}
	got, err := ReadCache(bytes.NewReader(data))
	if err != nil {
		t.Fatal(err)
	}
	if d := diffStars(s, got); d != "" {
		t.Fatal(d)
	}
	for _, rows := range []int{7, 100, 5000} {
		c, err := OpenChunks(p, rows)
		if err != nil {
			t.Fatal(err)
		}
		x := c.Index()
		if x == nil || x.Offsets[x.Bins()] != int64(s.Len()) {
			t.Fatalf("index %+v", x)
		}
		all, err := readAllChunks(t, c)
		if err != nil {
			t.Fatal(err)
		}
		if d := diffStars(s, all); d != "" {
			t.Fatalf("chunks of %d: %s", rows, d)
		}
		for _, k := range []int{0, 1, x.Bins() / 3, x.Bins() - 1, x.Bins()} {
			if err := c.LimitBins(k); err != nil {
				t.Fatal(err)
			}
			part, err := readAllChunks(t, c)
			if err != nil {
				t.Fatal(err)
			}
			want := 0
			for _, v := range s.Vmag {
				if float64(v) < x.Lower(k) {
					want++
				}
			}
			if part.Len() != want || c.Rows() != want {
				t.Fatalf("chunks of %d, %d bins: %d rows (Rows %d), want %d", rows, k, part.Len(), c.Rows(), want)
			}
			if d := diffStars(s.Slice(0, want), withHeader(part, s)); want > 0 && d != "" {
				t.Fatalf("chunks of %d, %d bins: %s", rows, k, d)
			}
		}
		c.Close()
	}
}

// withHeader gives t the header fields of s (a helper for diffStars).
func withHeader(t, s *Stars) *Stars {
	t.Epoch, t.Source, t.Format = s.Epoch, s.Source, s.Format
	if t.Names == nil && s.Names != nil {
		t.Names = map[int]string{}
	}
	return t
}

// TestSortedCacheRefusesLies: a sorted cache whose index disagrees with
// its rows — a bin boundary moved by one row, a Teff bound or a distance
// bound that its rows break — is refused as corrupt even though every
// checksum matches (the file is written with the lying index), by a full
// read and by a chunk reader, whether the lie is in the rows it reads or
// in those it skips. A flipped column byte fails its bin's checksum.
func TestSortedCacheRefusesLies(t *testing.T) {
	s := SortByV(randomStars(rand.New(rand.NewPCG(9, 10)), 3000))
	good := buildIndex(s)
	k := good.Bins()
	mid := k / 2
	for good.Offsets[mid] == good.Offsets[mid+1] {
		mid++
	}
	lies := map[string]func(x *MagIndex){
		"boundary": func(x *MagIndex) { x.Offsets[mid]++ },
		"teff":     func(x *MagIndex) { x.TMax = x.TMax - 1 },
		"distance": func(x *MagIndex) {
			for b := range x.MinDist {
				x.MinDist[b] *= 1.5
			}
		},
	}
	for name, lie := range lies {
		x := buildIndex(s)
		lie(x)
		x.checksum(s)
		var buf bytes.Buffer
		if err := writeCache(&buf, s, x); err != nil {
			t.Fatal(err)
		}
		if _, err := ReadCache(bytes.NewReader(buf.Bytes())); !errors.Is(err, ErrCorrupt) {
			t.Errorf("%s: ReadCache: %v, want corrupt", name, err)
		}
		p := filepath.Join(t.TempDir(), "lie.skyfcat")
		if err := os.WriteFile(p, buf.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
		for _, bins := range []int{1, k} { // the lie skipped, the lie read
			c, err := OpenChunks(p, 256)
			if err != nil {
				t.Fatal(err)
			}
			err = c.LimitBins(bins)
			if err == nil {
				_, err = readAllChunks(t, c)
			}
			if !errors.Is(err, ErrCorrupt) {
				t.Errorf("%s, %d bins read: %v, want corrupt", name, bins, err)
			}
			c.Close()
		}
	}
	// A flipped byte in the column data.
	p := writeCacheFile(t, s)
	data, _ := os.ReadFile(p)
	data[len(data)/2] ^= 0x10 // in the columns
	if _, err := ReadCache(bytes.NewReader(data)); !errors.Is(err, ErrCorrupt) {
		t.Errorf("flipped byte: ReadCache: %v", err)
	}
	os.WriteFile(p, data, 0o644)
	c, err := OpenChunks(p, 500)
	if err == nil {
		_, err = readAllChunks(t, c)
		c.Close()
	}
	if !errors.Is(err, ErrCorrupt) {
		t.Errorf("flipped byte: chunks: %v", err)
	}
}
