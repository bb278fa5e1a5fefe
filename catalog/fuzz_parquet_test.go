package catalog

import (
	"bytes"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// FuzzReadParquet: hostile Parquet (a footer declaring huge lengths,
// truncated pages, broken metadata) must be refused, never panic, hang or
// allocate without bound. Seeds: the Stars layout of WriteParquet for the
// fixtures of four formats and for random stars. What reads is valid stars.
func FuzzReadParquet(f *testing.F) {
	for _, name := range []string{"gaia_good.csv", "generic_good.tsv", "bsc5_good.dat", "hip2_good.dat"} {
		s, _, err := Open(filepath.Join(fixtures, name), ReadOptions{})
		if err != nil {
			f.Fatal(err)
		}
		var b bytes.Buffer
		if err := WriteParquet(&b, s); err != nil {
			f.Fatal(err)
		}
		f.Add(b.Bytes())
	}
	var b bytes.Buffer
	if err := WriteParquet(&b, randomStars(rand.New(rand.NewPCG(11, 12)), 4)); err != nil {
		f.Fatal(err)
	}
	f.Add(b.Bytes())
	if _, err := os.Stat(fixtures); err != nil {
		f.Fatal(err)
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		opt := fuzzLimits
		opt.Format = FormatParquet
		s, rep, err := Read(bytes.NewReader(data), "fuzz.parquet", opt)
		if err != nil {
			if !strings.HasPrefix(err.Error(), "catalog: ") {
				t.Fatalf("error without the package prefix: %v", err)
			}
			return
		}
		if err := s.Validate(); err != nil {
			t.Fatalf("accepted invalid stars: %v", err)
		}
		if rep.Rows != s.Len() || rep.Rows > opt.MaxRows {
			t.Fatalf("report rows %d, stars %d, limit %d", rep.Rows, s.Len(), opt.MaxRows)
		}
	})
}
