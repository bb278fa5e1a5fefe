package catalog

import (
	"bytes"
	"encoding/binary"
	"errors"
	"hash/crc32"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"
)

// writeCacheFile writes s to a cache file in a temporary directory.
func writeCacheFile(t *testing.T, s *Stars) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), "c.skyfcat")
	var b bytes.Buffer
	if err := WriteCache(&b, s); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(p, b.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// concat appends the rows of b to a (a test helper, not on a hot path).
func concat(a, b *Stars) *Stars {
	for i := 0; i < b.Len(); i++ {
		st := b.At(i)
		st.Name = b.Names[i]
		a.Append(st)
		// Append recomputes the direction from RA/Dec: keep the stored bits.
		k := a.Len() - 1
		a.X[k], a.Y[k], a.Z[k] = b.X[i], b.Y[i], b.Z[i]
	}
	return a
}

// TestOpenChunksRoundTrip: reading a cache in chunks of several lengths
// and joining them gives exactly what ReadCache gives, with names
// re-indexed per chunk, and io.EOF after the last chunk.
func TestOpenChunksRoundTrip(t *testing.T) {
	s := randomStars(rand.New(rand.NewPCG(3, 4)), 2500)
	p := writeCacheFile(t, s)
	for _, rows := range []int{1, 999, 1000, 2499, 2500, 10_000} {
		c, err := OpenChunks(p, rows)
		if err != nil {
			t.Fatal(err)
		}
		if c.Len() != s.Len() {
			t.Fatalf("Len: have %d, want %d", c.Len(), s.Len())
		}
		all := &Stars{Epoch: s.Epoch, Source: s.Source, Format: s.Format, Names: map[int]string{}}
		chunks := 0
		for {
			ch, err := c.Next()
			if err == io.EOF {
				break
			}
			if err != nil {
				t.Fatal(err)
			}
			if ch.Len() > rows {
				t.Fatalf("chunk of %d rows, asked for ≤ %d", ch.Len(), rows)
			}
			chunks++
			concat(all, ch)
		}
		if want := (s.Len() + rows - 1) / rows; chunks != want {
			t.Errorf("rows %d: %d chunks, want %d", rows, chunks, want)
		}
		if d := diffStars(all, s); d != "" {
			t.Fatalf("rows %d: %s", rows, d)
		}
		if err := c.Close(); err != nil {
			t.Fatal(err)
		}
		if _, err := c.Next(); err == nil {
			t.Error("Next after Close: no error")
		}
	}
}

func TestSliceSharesAndReindexes(t *testing.T) {
	s := randomStars(rand.New(rand.NewPCG(5, 6)), 50)
	v := s.Slice(7, 22)
	if v.Len() != 15 || v.ID[0] != s.ID[7] || v.Names[0] != s.Names[7] || v.Names[14] != s.Names[21] {
		t.Fatalf("Slice(7, 22): len %d, ID[0] %d (want %d), names %v", v.Len(), v.ID[0], s.ID[7], v.Names)
	}
	v.Append(Star{ID: -1, Dist: 1, Vmag: 1, Teff: 5000})
	if s.ID[22] == -1 {
		t.Error("appending to a slice wrote into the parent")
	}
}

// TestOpenChunksRefusesDamage: a flipped byte fails the checksum, a cut
// file is truncated, a bad magic is not a cache.
func TestOpenChunksRefusesDamage(t *testing.T) {
	s := randomStars(rand.New(rand.NewPCG(7, 8)), 300)
	p := writeCacheFile(t, s)
	good, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name string
		data []byte
		want error
	}{
		{"flipped byte", func() []byte { b := bytes.Clone(good); b[len(b)/2] ^= 1; return b }(), ErrCorrupt},
		{"cut", good[:len(good)-100], ErrCorrupt}, // the trailer is now column data: checksum fails
		{"tiny", good[:3], ErrTruncated},
		{"bad magic", func() []byte { b := bytes.Clone(good); b[0] = 'X'; return fixCRC(b) }(), ErrBadCache},
		{"extra bytes", fixCRC(append(bytes.Clone(good[:len(good)-4]), 0, 0, 0, 0, 0)), ErrCorrupt},
	}
	for _, tc := range tests {
		q := filepath.Join(t.TempDir(), "bad")
		if err := os.WriteFile(q, tc.data, 0o644); err != nil {
			t.Fatal(err)
		}
		if _, err := OpenChunks(q, 100); !errors.Is(err, tc.want) {
			t.Errorf("%s: have %v, want %v", tc.name, err, tc.want)
		}
	}
}

// fixCRC rewrites the trailer of a cache image so its checksum matches.
func fixCRC(b []byte) []byte {
	body := b[:len(b)-4]
	return binary.LittleEndian.AppendUint32(bytes.Clone(body), crc32.Checksum(body, castagnoli))
}

// TestAppendRow: rows copied with AppendRow keep every column bit for bit
// (the built-in sky has names, distances and proper motions), in the order
// appended, and names follow their rows.
func TestAppendRow(t *testing.T) {
	src := BuiltIn()
	rows := []int{7, 0, src.Len() - 1}
	for i := range src.Names {
		rows = append(rows, i)
		break
	}
	var dst Stars
	for _, i := range rows {
		dst.AppendRow(src, i)
	}
	if err := dst.Validate(); err != nil {
		t.Fatal(err)
	}
	bits := math.Float32bits
	for k, i := range rows {
		if dst.ID[k] != src.ID[i] || bits(dst.X[k]) != bits(src.X[i]) || bits(dst.Y[k]) != bits(src.Y[i]) ||
			bits(dst.Z[k]) != bits(src.Z[i]) || bits(dst.Dist[k]) != bits(src.Dist[i]) || bits(dst.Vmag[k]) != bits(src.Vmag[i]) ||
			bits(dst.Teff[k]) != bits(src.Teff[i]) || bits(dst.BV[k]) != bits(src.BV[i]) || dst.Flags[k] != src.Flags[i] {
			t.Errorf("row %d (source row %d) differs: %+v vs %+v", k, i, dst.At(k), src.At(i))
		}
		if (src.PMRA != nil) && (dst.PMRA[k] != src.PMRA[i] || dst.PMDec[k] != src.PMDec[i]) {
			t.Errorf("row %d: proper motion differs", k)
		}
		if dst.Names[k] != src.Names[i] {
			t.Errorf("row %d: name %q, want %q", k, dst.Names[k], src.Names[i])
		}
	}
}

func TestIsCacheFile(t *testing.T) {
	dir := t.TempDir()
	cache := filepath.Join(dir, "s.skyc")
	fh, err := os.Create(cache)
	if err != nil {
		t.Fatal(err)
	}
	if err := WriteCache(fh, BuiltIn().Slice(0, 100)); err != nil {
		t.Fatal(err)
	}
	fh.Close()
	text := filepath.Join(dir, "s.csv")
	if err := os.WriteFile(text, []byte("ra,dec,vmag\n1,2,3\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	short := filepath.Join(dir, "short")
	if err := os.WriteFile(short, []byte("SKY"), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		path string
		want bool
	}{{cache, true}, {text, false}, {short, false}} {
		if have, err := IsCacheFile(c.path); err != nil || have != c.want {
			t.Errorf("IsCacheFile(%s) = %v, %v; want %v", filepath.Base(c.path), have, err, c.want)
		}
	}
	if _, err := IsCacheFile(filepath.Join(dir, "missing")); err == nil {
		t.Error("missing file: no error")
	}
}
