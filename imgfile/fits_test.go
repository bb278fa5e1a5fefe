package imgfile

import (
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

func randomPix(n int, seed uint64) []float32 {
	rng := rand.New(rand.NewPCG(seed, 3))
	p := make([]float32, n)
	for i := range p {
		p[i] = float32(rng.NormFloat64() * math.Pow(10, float64(rng.IntN(20)-10)))
	}
	return p
}

func TestWriteFITSLayout(t *testing.T) {
	const w, h = 7, 5
	pix := randomPix(3*w*h, 1)
	var buf bytes.Buffer
	cards := []Card{{"BUNIT", "relative", "test"}, {"COMMENT", nil, "hello"}}
	if err := WriteFITS(&buf, w, h, pix, cards); err != nil {
		t.Fatal(err)
	}
	b := buf.Bytes()
	// FITS 4.0 §3.1 [pub]: the file is a whole number of 2880-byte blocks;
	// here one header block and ceil(4·7·5·3 / 2880) = 1 data block.
	if len(b) != 2*2880 {
		t.Fatalf("file size: have %d, want %d", len(b), 2*2880)
	}
	// Mandatory keywords in fixed format, values right-justified to byte 30
	// (FITS 4.0 §4.4.1.1, §4.2) [pub].
	wantCards := []string{
		"SIMPLE  =                    T",
		"BITPIX  =                  -32",
		"NAXIS   =                    3",
		"NAXIS1  =                    7",
		"NAXIS2  =                    5",
		"NAXIS3  =                    3",
		"BUNIT   = 'relative' / test",
		"COMMENT hello",
		"END",
	}
	for i, want := range wantCards {
		card := string(b[80*i : 80*(i+1)])
		if !strings.HasPrefix(card, want) {
			t.Errorf("card %d: have %q, want prefix %q", i+1, card, want)
		}
		if i < 6 && !strings.HasPrefix(want, card[:30]) {
			t.Errorf("card %d: value not in bytes 11–30: %q", i+1, card)
		}
	}
	// The rest of the header block is ASCII blanks (FITS 4.0 §4.1.1) [pub].
	if rest := b[80*len(wantCards) : 2880]; strings.Trim(string(rest), " ") != "" {
		t.Errorf("header padding is not all blanks")
	}
	data := b[2880:]
	// Big-endian IEEE floats (§5.3), NAXIS1 fastest (§3.3.2) [pub]; the
	// first stored row is the bottom buffer row (our documented y flip).
	at := func(i, j, c int) float32 { // FITS 1-based pixel (i, j), plane c
		k := ((c-1)*h+(j-1))*w + (i - 1)
		return math.Float32frombits(binary.BigEndian.Uint32(data[4*k:]))
	}
	for c := 1; c <= 3; c++ {
		for j := 1; j <= h; j++ {
			for i := 1; i <= w; i++ {
				x, y := i-1, h-j
				want := pix[3*(y*w+x)+c-1]
				if have := at(i, j, c); math.Float32bits(have) != math.Float32bits(want) {
					t.Fatalf("FITS pixel (%d,%d,%d): have %g, want buffer (%d,%d) = %g", i, j, c, have, x, y, want)
				}
			}
		}
	}
	// Data padding is zero bytes (§3.3.2) [pub].
	for k := 4 * 3 * w * h; k < len(data); k++ {
		if data[k] != 0 {
			t.Fatalf("data padding byte %d = %#x, want 0", k, data[k])
		}
	}
}

func TestWriteFITSRoundTrip(t *testing.T) {
	for _, tc := range []struct {
		name     string
		w, h, ch int
	}{
		{"mono 1x1", 1, 1, 1},
		{"mono 13x11", 13, 11, 1},
		{"rgb 33x17", 33, 17, 3},
		{"rgb block edge 24x10", 24, 10, 3}, // 24·10·3·4 = 2880 bytes exactly
	} {
		t.Run(tc.name, func(t *testing.T) {
			pix := randomPix(tc.ch*tc.w*tc.h, uint64(tc.w))
			pix[0] = float32(math.NaN()) // undefined pixel (§5.3) survives
			rng := rand.New(rand.NewPCG(9, 9))
			var cards []Card
			floats := []float64{0, 1, -1, 0.1, 1e-300, -2.5e300, math.Pi, 1 / 3.0, 123456789012.25, math.SmallestNonzeroFloat64}
			for range 20 {
				floats = append(floats, rng.NormFloat64()*math.Pow(10, float64(rng.IntN(40)-20)))
			}
			for i, v := range floats {
				cards = append(cards, Card{"F" + string(rune('A'+i/10)) + string(rune('0'+i%10)), v, "a float"})
			}
			cards = append(cards,
				Card{"STR", "it's a 'quoted' value", "quotes doubled"},
				Card{"EMPTY", "", ""},
				Card{"BOOLT", true, ""},
				Card{"BOOLF", false, "no"},
				Card{"INT", -1234567890123, "int64"},
				Card{"UNDEF", nil, "undefined value"},
				Card{"HISTORY", nil, strings.Repeat("0123456789", 15)},
			)
			var buf bytes.Buffer
			if err := WriteFITS(&buf, tc.w, tc.h, pix, cards); err != nil {
				t.Fatal(err)
			}
			if buf.Len()%2880 != 0 {
				t.Errorf("size %d is not a multiple of 2880", buf.Len())
			}
			img, err := ReadFITS(&buf)
			if err != nil {
				t.Fatal(err)
			}
			if img.Width != tc.w || img.Height != tc.h || img.Channels != tc.ch {
				t.Fatalf("shape: have %d×%d×%d, want %d×%d×%d", img.Width, img.Height, img.Channels, tc.w, tc.h, tc.ch)
			}
			for i := range pix {
				if math.Float32bits(img.Pix[i]) != math.Float32bits(pix[i]) {
					t.Fatalf("pix[%d]: have %g, want %g", i, img.Pix[i], pix[i])
				}
			}
			for _, c := range cards[:len(floats)] {
				have, err := img.Header.Float(c.Key)
				if err != nil || have != c.Value.(float64) {
					t.Errorf("%s: have %v (%v), want exactly %v", c.Key, have, err, c.Value)
				}
			}
			if s, _ := img.Header.String("STR"); s != "it's a 'quoted' value" {
				t.Errorf("STR: have %q", s)
			}
			if s, err := img.Header.String("EMPTY"); s != "" || err != nil {
				t.Errorf("EMPTY: have %q, %v", s, err)
			}
			if c, _ := img.Header.Get("BOOLT"); c.Value != true {
				t.Errorf("BOOLT: have %v", c.Value)
			}
			if c, _ := img.Header.Get("BOOLF"); c.Value != false || c.Comment != "no" {
				t.Errorf("BOOLF: have %v / %q", c.Value, c.Comment)
			}
			if v, _ := img.Header.Int("INT"); v != -1234567890123 {
				t.Errorf("INT: have %d", v)
			}
			if c, ok := img.Header.Get("UNDEF"); !ok || c.Value != nil {
				t.Errorf("UNDEF: have %v %v", c.Value, ok)
			}
			var hist string
			for _, c := range img.Header {
				if c.Key == "HISTORY" {
					hist += c.Comment
				}
			}
			if hist != strings.Repeat("0123456789", 15) {
				t.Errorf("HISTORY split: have %q", hist)
			}
		})
	}
}

func TestWriteFITSErrors(t *testing.T) {
	pix := make([]float32, 3*4*4)
	for _, tc := range []struct {
		name string
		card Card
	}{
		{"lower-case key", Card{"bunit", "x", ""}},
		{"9-char key", Card{"ABCDEFGHI", 1, ""}},
		{"reserved", Card{"NAXIS", 2, ""}},
		{"END", Card{"END", nil, ""}},
		{"NaN", Card{"X", math.NaN(), ""}},
		{"Inf", Card{"X", math.Inf(1), ""}},
		{"non-ASCII string", Card{"X", "β", ""}},
		{"string too long", Card{"X", strings.Repeat("a", 69), ""}},
		{"unsupported type", Card{"X", []int{1}, ""}},
		{"commentary with value", Card{"COMMENT", 1, ""}},
		{"control char in comment", Card{"X", 1, "a\tb"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			var buf bytes.Buffer
			err := WriteFITS(&buf, 4, 4, pix, []Card{tc.card})
			if !errors.Is(err, ErrFITSCard) {
				t.Errorf("error: have %v, want %v", err, ErrFITSCard)
			}
			if buf.Len() != 0 {
				t.Errorf("wrote %d bytes before failing", buf.Len())
			}
		})
	}
	// The longest string that fits: 68 characters (bytes 11–80) [pub §4.2.1.1].
	if err := WriteFITS(io.Discard, 4, 4, pix, []Card{{"X", strings.Repeat("a", 68), "dropped comment"}}); err != nil {
		t.Errorf("68-character string: %v", err)
	}
	if err := WriteFITS(io.Discard, 4, 4, pix, []Card{{"A", 1, ""}, {"A", 2, ""}}); !errors.Is(err, ErrFITSCard) {
		t.Errorf("duplicate key: have %v, want %v", err, ErrFITSCard)
	}
	if err := WriteFITS(io.Discard, 4, 4, pix[:5], nil); err == nil {
		t.Error("wrong pixel count: no error")
	}
	if err := WriteFITS(io.Discard, 0, 4, nil, nil); !errors.Is(err, ErrSize) {
		t.Errorf("zero width: have %v, want %v", err, ErrSize)
	}
	if err := WriteFITS(&failWriter{left: 3000}, 4, 4, pix, nil); !errors.Is(err, errDiskFull) {
		t.Errorf("failing writer: have %v, want %v", err, errDiskFull)
	}
}

func TestReadFITSErrors(t *testing.T) {
	var good bytes.Buffer
	if err := WriteFITS(&good, 3, 3, make([]float32, 9), nil); err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name string
		b    []byte
	}{
		{"empty", nil},
		{"short block", good.Bytes()[:100]},
		{"not SIMPLE", append([]byte("XIMPLE  "), good.Bytes()[8:]...)},
		{"truncated data", good.Bytes()[:2880+10]},
	} {
		if _, err := ReadFITS(bytes.NewReader(tc.b)); !errors.Is(err, ErrFITSFormat) {
			t.Errorf("%s: have %v, want %v", tc.name, err, ErrFITSFormat)
		}
	}
}

func TestFITSMetaCards(t *testing.T) {
	m := FITSMeta{
		Object: "Vega", Creator: "skyframe test", Date: "2026-12-01T10:00:00.5",
		Beta: 0.9, Gamma: 2.294157338705618, MotionRA: 279.23, MotionDec: 38.78,
		Position: [3]float64{1, -2, 3}, Exposure: 2, Limit: 12, FWHM: 1.5,
		Beaming: "exact", Projection: "fisheye", FOV: 180, Tilt: 30,
		Catalog: "BSC5", Stars: 9000, ScalePerLux: 123456.75, ExtendedScale: 0.0625, White: "d65", Layers: []string{"stars", "cmb"},
	}
	cards, err := m.Cards()
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := WriteFITS(&buf, 2, 2, make([]float32, 12), cards); err != nil {
		t.Fatal(err)
	}
	h, err := ReadFITSHeader(&buf)
	if err != nil {
		t.Fatal(err)
	}
	for key, want := range map[string]float64{
		"BETA": 0.9, "GAMMA": 2.294157338705618, "VELRA": 279.23, "VELDEC": 38.78,
		"OBSX": 1, "OBSY": -2, "OBSZ": 3, "EXPOSURE": 2, "MAGLIM": 12, "PSFFWHM": 1.5,
		"FOV": 180, "TILT": 30, "NSTARS": 9000, "LUXSCALE": 123456.75, "EXTSCALE": 0.0625,
	} {
		if have, err := h.Float(key); err != nil || have != want {
			t.Errorf("%s: have %v (%v), want %v", key, have, err, want)
		}
	}
	for key, want := range map[string]string{
		"OBJECT": "Vega", "CREATOR": "skyframe test", "DATE": "2026-12-01T10:00:00.5",
		"BUNIT": "", "BEAMING": "exact", "PROJ": "fisheye", "CATALOG": "BSC5",
		"WHITEPT": "d65", "LAYERS": "stars,cmb",
	} {
		if have, err := h.String(key); err != nil || have != want {
			t.Errorf("%s: have %q (%v), want %q", key, have, err, want)
		}
	}
	// The zero value writes no date and no motion.
	zc, err := FITSMeta{}.Cards()
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range zc {
		if c.Key == "DATE" || c.Key == "BETA" || c.Key == "VELRA" || c.Key == "EXTSCALE" {
			t.Errorf("zero FITSMeta wrote %s", c.Key)
		}
	}
	// A full-size frame's extended scale of 1 is not written either.
	one, err := FITSMeta{ExtendedScale: 1}.Cards()
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range one {
		if c.Key == "EXTSCALE" {
			t.Error("ExtendedScale 1 wrote EXTSCALE")
		}
	}
	for _, bad := range []string{"1.12.2026", "2026-12-01 10:00", "2026-12-01T10:00"} {
		if _, err := (FITSMeta{Date: bad}).Cards(); !errors.Is(err, ErrFITSCard) {
			t.Errorf("date %q: have %v, want %v", bad, err, ErrFITSCard)
		}
	}
	if _, err := (FITSMeta{Object: "Größe"}).Cards(); !errors.Is(err, ErrFITSCard) {
		t.Errorf("non-ASCII OBJECT: have %v, want %v", err, ErrFITSCard)
	}
}

func BenchmarkWriteFITS(b *testing.B) {
	size := 4096
	if testing.Short() {
		size = 512
	}
	pix := randomPix(3*size*size, 1)
	b.SetBytes(int64(4 * len(pix)))
	b.ReportAllocs()
	for b.Loop() {
		if err := WriteFITS(io.Discard, size, size, pix, []Card{{"BUNIT", "relative", ""}}); err != nil {
			b.Fatal(err)
		}
	}
}

// A 2×2 RGB frame: the header's first cards, 80 bytes each, and the file
// size, two 2880-byte blocks.
func ExampleWriteFITS() {
	pix := make([]float32, 3*2*2)
	var buf bytes.Buffer
	err := WriteFITS(&buf, 2, 2, pix, []Card{
		{"BUNIT", "relative", "linear sRGB"},
		{"GAMMA", 7.088812050083354, "Lorentz factor"},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	b := buf.Bytes()
	for i := range 9 {
		fmt.Println(strings.TrimRight(string(b[80*i:80*(i+1)]), " "))
	}
	fmt.Println(len(b))
	// Output:
	// SIMPLE  =                    T / conforms to FITS Standard 4.0
	// BITPIX  =                  -32 / IEEE 754 single precision
	// NAXIS   =                    3
	// NAXIS1  =                    2 / [pixel] x, left to right
	// NAXIS2  =                    2 / [pixel] y, bottom to top
	// NAXIS3  =                    3 / planes: linear sRGB R, G, B
	// BUNIT   = 'relative' / linear sRGB
	// GAMMA   =    7.088812050083354 / Lorentz factor
	// END
	// 5760
}
