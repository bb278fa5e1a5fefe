package catalog

import (
	"bytes"
	"encoding/binary"
	"errors"
	"testing"
)

// A Parquet file whose trailer claims a footer longer than the file (or than
// MaxParquetFooterBytes) is refused before parquet-go allocates for it. The
// trailer layout (footer length, then "PAR1") is from the Apache Parquet
// format specification.
func TestParquetFooterLengthBounded(t *testing.T) {
	var buf bytes.Buffer
	s := &Stars{}
	s.Append(Star{ID: 1, RA: 10, Dec: 20, Dist: 5, Vmag: 3, Teff: 5772, BV: 0.65})
	s.Append(Star{ID: 2, RA: 11, Dec: -20, Dist: 7, Vmag: 4, Teff: 4000, BV: 1.2})
	if err := WriteParquet(&buf, s); err != nil {
		t.Fatal(err)
	}
	good := buf.Bytes()
	if _, _, err := Read(bytes.NewReader(good), "good.parquet", ReadOptions{}); err != nil {
		t.Fatalf("untouched file: %v", err)
	}
	for _, n := range []uint32{0x7fffffff, uint32(len(good))} {
		bad := append([]byte(nil), good...)
		binary.LittleEndian.PutUint32(bad[len(bad)-8:], n)
		_, _, err := Read(bytes.NewReader(bad), "bad.parquet", ReadOptions{Format: FormatParquet})
		var pe *ParseError
		if !errors.As(err, &pe) || !errors.Is(err, ErrCorrupt) || pe.File != "bad.parquet" {
			t.Errorf("footer length %d: have %v, want a corrupt-input ParseError naming the file", n, err)
		}
	}
}
