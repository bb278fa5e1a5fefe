package catalog

import (
	"bytes"
	"compress/gzip"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"
)

// fuzzLimits bound the work one fuzz input can cause, so that each costs
// microseconds and a short run executes tens of thousands: with 4 MiB of
// decompression allowed, every mutation of a gzip seed (the bomb fixture
// above all) inflated megabytes. Small inputs still reach each limit's code.
var fuzzLimits = ReadOptions{MaxLineBytes: 1 << 12, MaxRows: 1 << 10, MaxDecompressedBytes: 1 << 16}

// FuzzRead: no input, in any forced format, may panic or hang; what reads
// without error is valid and survives the cache.
func FuzzRead(f *testing.F) {
	files, _ := filepath.Glob(filepath.Join(fixtures, "*"))
	for _, p := range files {
		if filepath.Ext(p) == ".md" {
			continue
		}
		b, err := os.ReadFile(p)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b, uint8(0))
		var zb bytes.Buffer
		zw := gzip.NewWriter(&zb)
		zw.Write(b)
		zw.Close()
		f.Add(zb.Bytes(), uint8(0))
	}
	var cb bytes.Buffer
	if err := WriteCache(&cb, randomStars(rand.New(rand.NewPCG(5, 6)), 3)); err != nil {
		f.Fatal(err)
	}
	f.Add(cb.Bytes(), uint8(FormatCache))
	f.Fuzz(func(t *testing.T, data []byte, format uint8) {
		opt := fuzzLimits
		opt.Format = Format(format % uint8(FormatCache+1))
		s, rep, err := Read(bytes.NewReader(data), "fuzz.dat", opt)
		if err != nil {
			return
		}
		if err := s.Validate(); err != nil {
			t.Fatalf("accepted invalid stars: %v", err)
		}
		if rep.Rows != s.Len() {
			t.Fatalf("report rows %d, stars %d", rep.Rows, s.Len())
		}
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

// FuzzReadCache: corrupted caches are refused, never panic.
func FuzzReadCache(f *testing.F) {
	var cb bytes.Buffer
	if err := WriteCache(&cb, randomStars(rand.New(rand.NewPCG(8, 9)), 5)); err != nil {
		f.Fatal(err)
	}
	f.Add(cb.Bytes())
	f.Add([]byte("SKYFCAT\x01"))
	f.Fuzz(func(t *testing.T, data []byte) {
		s, err := ReadCache(bytes.NewReader(data))
		if err == nil {
			if err := s.Validate(); err != nil {
				t.Fatal(err)
			}
		}
	})
}
