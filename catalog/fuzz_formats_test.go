package catalog

import (
	"bytes"
	"compress/gzip"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// Per-format fuzz targets. FuzzRead lets the fuzzer pick the format; these
// pin it, so that mutations of each fixture reach deep into that one reader
// instead of being turned away by the sniffer. Seeds: the format's fixtures
// (good and bad), plain and gzip-wrapped. Each target must not panic or hang;
// what it accepts must be valid stars, reported as read in that format;
// what it refuses carries the package prefix.

func fuzzFormat(f *testing.F, format Format, names ...string) {
	f.Helper()
	for _, name := range names {
		b, err := os.ReadFile(filepath.Join(fixtures, name))
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
		var zb bytes.Buffer
		zw := gzip.NewWriter(&zb)
		zw.Write(b)
		zw.Close()
		f.Add(zb.Bytes())
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		opt := fuzzLimits
		opt.Format = format
		s, rep, err := Read(bytes.NewReader(data), "fuzz", opt)
		if err != nil {
			// Errors are package-prefixed (the project's error convention).
			if !strings.HasPrefix(err.Error(), "catalog: ") {
				t.Fatalf("error without the package prefix: %v", err)
			}
			return
		}
		if err := s.Validate(); err != nil {
			t.Fatalf("accepted invalid stars: %v", err)
		}
		if rep.Format != format {
			t.Fatalf("forced %v, report says %v", format, rep.Format)
		}
		if rep.Rows != s.Len() || s.Len() == 0 {
			t.Fatalf("report rows %d, stars %d (an accepted read holds at least one star)", rep.Rows, s.Len())
		}
		if rep.Rows > opt.MaxRows {
			t.Fatalf("%d rows kept, limit %d", rep.Rows, opt.MaxRows)
		}
	})
}

func FuzzReadBSC5(f *testing.F) {
	fuzzFormat(f, FormatBSC5, "bsc5_good.dat", "bsc5_bad.dat")
}

func FuzzReadHipparcos(f *testing.F) {
	fuzzFormat(f, FormatHipparcos, "hip_main_good.dat", "hip_main_bad.dat")
}

func FuzzReadHipparcos2007(f *testing.F) {
	fuzzFormat(f, FormatHipparcos2007, "hip2_good.dat", "hip2_bad.dat")
}

func FuzzReadGaia(f *testing.F) {
	fuzzFormat(f, FormatGaiaCSV, "gaia_good.csv", "gaia_bad.csv", "gaia_rows_bomb.csv")
}

func FuzzReadCSV(f *testing.F) {
	fuzzFormat(f, FormatCSV, "generic_good.csv", "gaia_good.csv")
}

func FuzzReadTSV(f *testing.F) {
	fuzzFormat(f, FormatTSV, "generic_good.tsv", "generic_bad.tsv")
}
