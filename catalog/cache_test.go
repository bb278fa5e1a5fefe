package catalog

import (
	"bytes"
	"encoding/binary"
	"errors"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"

	"pgregory.net/rapid"
)

// randomStars builds n stars with every optional column, NaN colours and
// names, from a seeded generator.
func randomStars(rng *rand.Rand, n int) *Stars {
	s := &Stars{Epoch: 2016, Source: "random", Format: "gaia"}
	for i := 0; i < n; i++ {
		st := Star{ID: rng.Int64(), RA: 360 * rng.Float64(), Dec: 180*rng.Float64() - 90,
			Dist: 1 + 1000*rng.Float64(), Vmag: 15*rng.Float64() - 1, BV: 2 * rng.Float64(),
			PMRA: rng.NormFloat64() * 100, PMDec: rng.NormFloat64() * 100, RV: rng.NormFloat64() * 30}
		if i%3 == 0 {
			st.BV = math.NaN()
			st.Flags |= FlagNoColour
		}
		if i%4 == 0 {
			st.Dist = math.Inf(1)
			st.Flags |= FlagNoDistance
		}
		if i%5 == 0 {
			st.RV = math.NaN()
		}
		if i%7 == 0 {
			st.Name = "Star " + string(rune('A'+i%26))
		}
		st.Teff, _ = starColour(math.NaN(), st.BV, math.NaN())
		s.Append(st)
	}
	return s
}

func TestCacheRoundTrip(t *testing.T) {
	s := randomStars(rand.New(rand.NewPCG(1, 2)), 1000)
	var b bytes.Buffer
	if err := WriteCache(&b, s); err != nil {
		t.Fatal(err)
	}
	got, err := ReadCache(&b)
	if err != nil {
		t.Fatal(err)
	}
	if d := diffStars(s, got); d != "" {
		t.Fatal(d)
	}
	// Through a file, where the reader can size its allocation up front.
	p := filepath.Join(t.TempDir(), "c.skyfcat")
	f, err := os.Create(p)
	if err != nil {
		t.Fatal(err)
	}
	if err := WriteCache(f, s); err != nil {
		t.Fatal(err)
	}
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}
	f, err = os.Open(p)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	got, err = ReadCache(f)
	if err != nil {
		t.Fatal(err)
	}
	if d := diffStars(s, got); d != "" {
		t.Fatal(d)
	}
	// Open detects the cache by its magic.
	got, rep, err := Open(p, ReadOptions{})
	if err != nil || rep.Format != FormatCache {
		t.Fatalf("Open(cache): %v, %v", err, rep)
	}
	if d := diffStars(s, got); d != "" {
		t.Fatal(d)
	}
}

// TestCacheRoundTripProperty: any valid catalogue survives the cache bit
// for bit [cp: invariant of issue 9].
func TestCacheRoundTripProperty(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		n := rapid.IntRange(1, 40).Draw(t, "n")
		seed := rapid.Uint64().Draw(t, "seed")
		s := randomStars(rand.New(rand.NewPCG(seed, 7)), n)
		if !rapid.Bool().Draw(t, "pm") {
			s.PMRA, s.PMDec = nil, nil
		}
		if !rapid.Bool().Draw(t, "rv") {
			s.RV = nil
		}
		if !rapid.Bool().Draw(t, "names") {
			s.Names = nil
		}
		s.Source = rapid.String().Draw(t, "source")
		var b bytes.Buffer
		if err := WriteCache(&b, s); err != nil {
			t.Fatal(err)
		}
		got, err := ReadCache(&b)
		if err != nil {
			t.Fatal(err)
		}
		if d := diffStars(s, got); d != "" {
			t.Fatal(d)
		}
	})
}

func TestCacheBroken(t *testing.T) {
	s := randomStars(rand.New(rand.NewPCG(3, 4)), 20)
	var b bytes.Buffer
	if err := WriteCache(&b, s); err != nil {
		t.Fatal(err)
	}
	good := b.Bytes()
	edit := func(f func(c []byte) []byte) []byte { return f(append([]byte(nil), good...)) }
	cases := []struct {
		name string
		in   []byte
		want error
	}{
		{"magic", edit(func(c []byte) []byte { c[0] = 'X'; return c }), ErrBadCache},
		{"version", edit(func(c []byte) []byte { c[7] = 99; return c }), ErrBadCache},
		{"bits", edit(func(c []byte) []byte { c[8] |= 0x80; return c }), ErrBadCache},
		{"rows", edit(func(c []byte) []byte { binary.LittleEndian.PutUint64(c[12:], 1<<40); return c }), ErrTooManyRows},
		{"body", edit(func(c []byte) []byte { c[len(c)/2] ^= 1; return c }), ErrCorrupt},
		{"checksum", edit(func(c []byte) []byte { c[len(c)-1] ^= 1; return c }), ErrCorrupt},
		{"trailing", append(append([]byte(nil), good...), 0), ErrCorrupt},
		{"lying count", edit(func(c []byte) []byte { binary.LittleEndian.PutUint64(c[12:], 1e7); return c }), ErrTruncated},
	}
	for _, c := range cases {
		_, err := ReadCache(bytes.NewReader(c.in))
		if !errors.Is(err, c.want) {
			t.Errorf("%s: have %v, want %v", c.name, err, c.want)
		}
	}
	// Every truncation fails cleanly, through both entry points.
	for k := 0; k < len(good); k++ {
		if _, err := ReadCache(bytes.NewReader(good[:k])); err == nil {
			t.Fatalf("prefix %d of %d accepted", k, len(good))
		}
		if k > 8 {
			if _, _, err := Read(bytes.NewReader(good[:k]), "c", ReadOptions{}); err == nil {
				t.Fatalf("Read: prefix %d of %d accepted", k, len(good))
			}
		}
	}
}
