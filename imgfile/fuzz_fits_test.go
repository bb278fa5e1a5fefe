package imgfile

import (
	"bytes"
	"strings"
	"testing"
)

// FuzzReadFITS: ReadFITS and ReadFITSHeader must return an error, never
// panic, hang or allocate without bound, on any input; an image read back
// has the size its header declares. Seeds: WriteFITS output (2-D and cube,
// with cards) and a header declaring a huge array with no data.
func FuzzReadFITS(f *testing.F) {
	for _, c := range []struct {
		w, h, ch int
		cards    []Card
	}{
		{3, 2, 1, nil},
		{2, 2, 3, []Card{{Key: "OBJECT", Value: "fuzz"}, {Key: "EXPTIME", Value: 1.5}, {Key: "COMMENT", Comment: strings.Repeat("long ", 30)}}},
	} {
		pix := make([]float32, c.w*c.h*c.ch)
		for i := range pix {
			pix[i] = float32(i) / 7
		}
		var b bytes.Buffer
		if err := WriteFITS(&b, c.w, c.h, pix, c.cards); err != nil {
			f.Fatal(err)
		}
		f.Add(b.Bytes())
	}
	card := func(s string) string { return s + strings.Repeat(" ", 80-len(s)) }
	huge := card("SIMPLE  =                    T") + card("BITPIX  =                  -32") + card("NAXIS   =                    2") +
		card("NAXIS1  =           1000000000") + card("NAXIS2  =           1000000000") + card("END")
	f.Add([]byte(huge + strings.Repeat(" ", 2880-len(huge))))
	f.Fuzz(func(t *testing.T, data []byte) {
		if _, err := ReadFITSHeader(bytes.NewReader(data)); err != nil {
			if !strings.HasPrefix(err.Error(), "imgfile: ") {
				t.Fatalf("error without the package prefix: %v", err)
			}
		}
		img, err := ReadFITS(bytes.NewReader(data))
		if err != nil {
			if !strings.HasPrefix(err.Error(), "imgfile: ") {
				t.Fatalf("error without the package prefix: %v", err)
			}
			return
		}
		if img.Width < 1 || img.Height < 1 || img.Channels < 1 || len(img.Pix) != img.Width*img.Height*img.Channels {
			t.Fatalf("%d×%d×%d image with %d values", img.Width, img.Height, img.Channels, len(img.Pix))
		}
		// The data really came from the input: 4 bytes per value.
		if 4*len(img.Pix) > len(data) {
			t.Fatalf("%d values from %d bytes", len(img.Pix), len(data))
		}
	})
}
