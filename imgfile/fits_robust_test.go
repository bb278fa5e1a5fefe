package imgfile

import (
	"bytes"
	"errors"
	"runtime"
	"strings"
	"testing"
)

// A header that declares the largest array ReadFITS accepts (MaxSize² × 16
// planes, 68 GB of float32) over an input that holds no data must be refused
// for its missing data at the cost of the input, not allocate the declared
// array first (which would abort the process).
func TestReadFITSDeclaredSizeNotAllocated(t *testing.T) {
	card := func(s string) string { return s + strings.Repeat(" ", fitsCard-len(s)) }
	head := card("SIMPLE  =                    T") + card("BITPIX  =                  -32") +
		card("NAXIS   =                    3") + card("NAXIS1  =                32768") +
		card("NAXIS2  =                32768") + card("NAXIS3  =                   16") + card("END")
	data := []byte(head + strings.Repeat(" ", fitsBlock-len(head)) + strings.Repeat("\x3f\x80\x00\x00", 1000))
	var m0, m1 runtime.MemStats
	runtime.ReadMemStats(&m0)
	_, err := ReadFITS(bytes.NewReader(data))
	runtime.ReadMemStats(&m1)
	if !errors.Is(err, ErrFITSFormat) || !strings.Contains(err.Error(), "data plane 1 row") {
		t.Errorf("have %v, want %v naming the short data plane and row", err, ErrFITSFormat)
	}
	// The input is 6.9 KB; allow 1 MiB for buffers.
	if d := m1.TotalAlloc - m0.TotalAlloc; d > 1<<20 {
		t.Errorf("allocated %d bytes for a %d-byte input", d, len(data))
	}
}

// The size check still reports the row where the data ends, counted like
// WriteFITS writes them (plane, then FITS row from 1).
func TestReadFITSShortDataRow(t *testing.T) {
	var b bytes.Buffer
	if err := WriteFITS(&b, 4, 3, make([]float32, 4*3*3), nil); err != nil {
		t.Fatal(err)
	}
	// Header block plus plane 1 (3 rows) and 1.5 rows of plane 2.
	cut := fitsBlock + 4*4*3 + 4*4 + 8
	_, err := ReadFITS(bytes.NewReader(b.Bytes()[:cut]))
	if !errors.Is(err, ErrFITSFormat) || !strings.Contains(err.Error(), "data plane 2 row 2") {
		t.Errorf("have %v, want data plane 2 row 2", err)
	}
}
