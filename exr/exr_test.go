package exr

import (
	"bytes"
	"encoding/binary"
	"encoding/hex"
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
)

// specSample is the annotated 415-byte sample file of "OpenEXR File
// Layout" (section "Sample File"), transcribed from its hex listing: a 4×3
// scan-line image, channel G (HALF) and Z (FLOAT), no compression.
var specHex = strings.Join([]string{
	"76 2f 31 01 02 00 00 00 63 68 61 6e 6e 65 6c 73",
	"00 63 68 6c 69 73 74 00 25 00 00 00 47 00 01 00",
	"00 00 00 00 00 00 01 00 00 00 01 00 00 00 5a 00",
	"02 00 00 00 00 00 00 00 01 00 00 00 01 00 00 00",
	"00 63 6f 6d 70 72 65 73 73 69 6f 6e 00 63 6f 6d",
	"70 72 65 73 73 69 6f 6e 00 01 00 00 00 00 64 61",
	"74 61 57 69 6e 64 6f 77 00 62 6f 78 32 69 00 10",
	"00 00 00 00 00 00 00 00 00 00 00 03 00 00 00 02",
	"00 00 00 64 69 73 70 6c 61 79 57 69 6e 64 6f 77",
	"00 62 6f 78 32 69 00 10 00 00 00 00 00 00 00 00",
	"00 00 00 03 00 00 00 02 00 00 00 6c 69 6e 65 4f",
	"72 64 65 72 00 6c 69 6e 65 4f 72 64 65 72 00 01",
	"00 00 00 00 70 69 78 65 6c 41 73 70 65 63 74 52",
	"61 74 69 6f 00 66 6c 6f 61 74 00 04 00 00 00 00",
	"00 80 3f 73 63 72 65 65 6e 57 69 6e 64 6f 77 43",
	"65 6e 74 65 72 00 76 32 66 00 08 00 00 00 00 00",
	"00 00 00 00 00 00 73 63 72 65 65 6e 57 69 6e 64",
	"6f 77 57 69 64 74 68 00 66 6c 6f 61 74 00 04 00",
	"00 00 00 00 80 3f 00 3f 01 00 00 00 00 00 00 5f",
	"01 00 00 00 00 00 00 7f 01 00 00 00 00 00 00 00",
	"00 00 00 18 00 00 00 00 00 54 29 d5 35 e8 2d 5c",
	"28 81 3a cf e1 34 3e 8b 0b bb 3d 89 74 f9 3e 01",
	"00 00 00 18 00 00 00 37 38 76 33 74 3b 73 38 7f",
	"ab e8 3e 8a cf 54 3f 5b 6c 11 3f 20 35 50 3d 02",
	"00 00 00 18 00 00 00 23 3a 0a 34 02 3b 5d 3b 38",
	"f3 9a 3c 4d ad 98 3e 1c 14 08 3f 4c f3 03 3f",
}, " ")

func specBytes(t *testing.T) []byte {
	t.Helper()
	b, err := hex.DecodeString(strings.ReplaceAll(specHex, " ", ""))
	if err != nil {
		t.Fatal(err)
	}
	if len(b) != 415 {
		t.Fatalf("transcribed sample has %d bytes, the document says 415", len(b))
	}
	return b
}

// The sample's pixel values, as the bits the listing shows.
var (
	specG = []uint16{0x0000, 0x2954, 0x35d5, 0x2de8, 0x3837, 0x3376, 0x3b74, 0x3873, 0x3a23, 0x340a, 0x3b02, 0x3b5d}
	specZ = []uint32{0x3a81285c, 0x3e34e1cf, 0x3dbb0b8b, 0x3ef97489, 0x3ee8ab7f, 0x3f54cf8a, 0x3f116c5b, 0x3d503520,
		0x3c9af338, 0x3e98ad4d, 0x3f08141c, 0x3f03f34c}
)

func specImage() *Image {
	g := make([]float32, 12)
	z := make([]float32, 12)
	for i := range g {
		g[i] = Float32FromHalf(specG[i])
		z[i] = math.Float32frombits(specZ[i])
	}
	return &Image{Width: 4, Height: 3, Channels: []Channel{
		{Name: "Z", Type: Float, Pix: z}, // out of order on purpose
		{Name: "G", Type: Half, Pix: g},
	}}
}

// Source: "OpenEXR File Layout", Sample File: the encoder rebuilds the
// document's sample byte for byte, and the decoder reads it back.
func TestSpecSampleFile(t *testing.T) {
	want := specBytes(t)
	var buf bytes.Buffer
	e := Encoder{Compression: None}
	if err := e.Encode(&buf, specImage()); err != nil {
		t.Fatal(err)
	}
	if got := buf.Bytes(); !bytes.Equal(got, want) {
		for i := range min(len(got), len(want)) {
			if got[i] != want[i] {
				t.Fatalf("differs from the spec sample at byte %d: %#02x, want %#02x (lengths %d, %d)", i, got[i], want[i], len(got), len(want))
			}
		}
		t.Fatalf("length %d, want %d", len(got), len(want))
	}
	d, err := Decode(bytes.NewReader(want))
	if err != nil {
		t.Fatal(err)
	}
	if d.Width != 4 || d.Height != 3 || len(d.Channels) != 2 || d.Channels[0].Name != "G" || d.Channels[1].Name != "Z" {
		t.Fatalf("decoded %d×%d %v", d.Width, d.Height, d.Channels)
	}
	for i := range specG {
		if h := HalfFromFloat32(d.Channels[0].Pix[i]); h != specG[i] {
			t.Errorf("G[%d] = %#04x, want %#04x", i, h, specG[i])
		}
		if z := math.Float32bits(d.Channels[1].Pix[i]); z != specZ[i] {
			t.Errorf("Z[%d] = %#08x, want %#08x", i, z, specZ[i])
		}
	}
}

func randomImage(r *rand.Rand, w, h int) *Image {
	img := &Image{Width: w, Height: h}
	for _, name := range []string{"R", "G", "B", "stars.R", "doppler.D", "overlay.A"} {
		pix := make([]float32, w*h)
		for i := range pix {
			switch r.IntN(4) {
			case 0: // black sky
			case 1:
				pix[i] = float32(r.ExpFloat64() * 1e-3)
			default:
				pix[i] = float32(r.NormFloat64() * 100)
			}
		}
		typ := Half
		if name == "doppler.D" || name == "G" {
			typ = Float
		}
		img.Channels = append(img.Channels, Channel{Name: name, Type: typ, Pix: pix})
	}
	img.Attributes = []Attribute{
		{"chromaticities", Chromaticities{Red: [2]float32{0.64, 0.33}, Green: [2]float32{0.3, 0.6}, Blue: [2]float32{0.15, 0.06}, White: [2]float32{0.3127, 0.329}}},
		{"framesPerSecond", Rational{N: 30, D: 1}},
		{"envmap", EnvLatLong},
		{"skyframe:beta", 0.9},
		{"skyframe:layers", []string{"stars", "cmb"}},
		{"comments", "a test"},
		{"whiteLuminance", float32(1)},
		{"exposure", int32(3)},
		{"v", V3f{1, 2, 3}},
		{"screenWindowCentre", V2f{1, 2}},
		{"box", Box2i{1, 2, 3, 4}},
		{"a name longer than thirty-one bytes, so the long-name flag is set", "x"},
	}
	return img
}

func stored(c Channel, v float32) float32 {
	if c.Type == Half {
		return Float32FromHalf(HalfFromFloat32(v))
	}
	return v
}

// Encode → Decode returns every channel (as stored: halves rounded) and
// every attribute, for both compressions, sizes that are not multiples of
// the 16-line block, and any worker count (same bytes).
func TestRoundTrip(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	for _, sz := range [][2]int{{1, 1}, {7, 3}, {33, 16}, {40, 17}, {64, 50}} {
		img := randomImage(r, sz[0], sz[1])
		var ref []byte
		for _, comp := range []Compression{ZIP, None} {
			for _, workers := range []int{1, 3} {
				var buf bytes.Buffer
				e := Encoder{Compression: comp, Workers: workers}
				if err := e.Encode(&buf, img); err != nil {
					t.Fatal(err)
				}
				if comp == ZIP {
					if workers == 1 {
						ref = bytes.Clone(buf.Bytes())
					} else if !bytes.Equal(ref, buf.Bytes()) {
						t.Fatalf("%v: output depends on the worker count", sz)
					}
				}
				d, err := Decode(&buf)
				if err != nil {
					t.Fatalf("%v %v: %v", sz, comp, err)
				}
				if int(d.Compression) != int(comp.code()) || d.Width != sz[0] || d.Height != sz[1] {
					t.Fatalf("%v: header %d %d×%d", sz, d.Compression, d.Width, d.Height)
				}
				for _, c := range img.Channels {
					got := d.Channel(c.Name)
					if got == nil || got.Type != c.Type {
						t.Fatalf("%v: channel %s missing or retyped", sz, c.Name)
					}
					for i, v := range c.Pix {
						if w := stored(c, v); math.Float32bits(got.Pix[i]) != math.Float32bits(w) {
							t.Fatalf("%v %v: %s[%d] = %g, want %g", sz, comp, c.Name, i, got.Pix[i], w)
						}
					}
				}
				for _, a := range img.Attributes {
					v, ok := d.Attr(a.Name)
					if !ok {
						t.Fatalf("attribute %s lost", a.Name)
					}
					if s, isVec := a.Value.([]string); isVec {
						if strings.Join(s, "|") != strings.Join(v.([]string), "|") {
							t.Errorf("%s = %v, want %v", a.Name, v, a.Value)
						}
						continue
					}
					if v != a.Value && !(a.Name == "exposure" && v == int32(3)) {
						t.Errorf("%s = %#v, want %#v", a.Name, v, a.Value)
					}
				}
			}
		}
	}
}

// ZIP really compresses a mostly black sky, and the block layout follows
// the document: y of each block a multiple of 16, offsets increasing.
func TestZIPLayout(t *testing.T) {
	w, h := 256, 100
	pix := make([]float32, w*h)
	pix[5*w+7] = 3.5
	img := &Image{Width: w, Height: h, Channels: []Channel{{Name: "Y", Pix: pix}}}
	var buf bytes.Buffer
	if err := Encode(&buf, img); err != nil {
		t.Fatal(err)
	}
	b := buf.Bytes()
	if buf.Len() > w*h*2/20 {
		t.Errorf("ZIP file of a black frame is %d bytes (raw %d)", buf.Len(), w*h*2)
	}
	hdrEnd := bytes.Index(b, []byte("screenWindowWidth\x00float\x00\x04\x00\x00\x00\x00\x00\x80\x3f\x00")) + len("screenWindowWidth\x00float\x00") + 4 + 4 + 1
	nb := (h + 15) / 16
	prev := uint64(0)
	for i := range nb {
		off := binary.LittleEndian.Uint64(b[hdrEnd+8*i:])
		if off <= prev || off >= uint64(len(b)) {
			t.Fatalf("offset %d of block %d", off, i)
		}
		if y := binary.LittleEndian.Uint32(b[off:]); y != uint32(16*i) {
			t.Fatalf("block %d starts at line %d", i, y)
		}
		prev = off
	}
}

func TestEncodeRefuses(t *testing.T) {
	ok := func() *Image {
		return &Image{Width: 2, Height: 2, Channels: []Channel{{Name: "R", Pix: make([]float32, 4)}}}
	}
	cases := map[string]func(*Image){
		"size":          func(m *Image) { m.Width = 0 },
		"no channels":   func(m *Image) { m.Channels = nil },
		"short channel": func(m *Image) { m.Channels[0].Pix = m.Channels[0].Pix[:3] },
		"empty name":    func(m *Image) { m.Channels[0].Name = "" },
		"duplicate": func(m *Image) {
			m.Channels = append(m.Channels, Channel{Name: "R", Pix: make([]float32, 4)})
		},
		"pixel type":     func(m *Image) { m.Channels[0].Type = 7 },
		"required attr":  func(m *Image) { m.Attributes = []Attribute{{"compression", "zip"}} },
		"twice":          func(m *Image) { m.Attributes = []Attribute{{"a", 1.0}, {"a", 2.0}} },
		"value type":     func(m *Image) { m.Attributes = []Attribute{{"a", struct{}{}}} },
		"long name":      func(m *Image) { m.Attributes = []Attribute{{strings.Repeat("x", 256), 1.0}} },
		"NUL in name":    func(m *Image) { m.Channels[0].Name = "a\x00b" },
		"int over range": func(m *Image) { m.Attributes = []Attribute{{"n", 1 << 40}} },
	}
	for name, mod := range cases {
		m := ok()
		mod(m)
		var buf bytes.Buffer
		err := Encode(&buf, m)
		if err == nil {
			t.Errorf("%s: no error", name)
			continue
		}
		if buf.Len() != 0 {
			t.Errorf("%s: %d bytes written before the error", name, buf.Len())
		}
	}
	if err := Encode(&bytes.Buffer{}, nil); !errors.Is(err, ErrImage) {
		t.Errorf("nil image: %v", err)
	}
}

// Damaged files are errors, never panics (every truncation and many
// single-byte changes of a small ZIP file).
func TestDecodeDamaged(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	img := randomImage(r, 9, 20)
	var buf bytes.Buffer
	if err := Encode(&buf, img); err != nil {
		t.Fatal(err)
	}
	good := buf.Bytes()
	for n := range len(good) {
		if _, err := Decode(bytes.NewReader(good[:n])); err == nil {
			t.Fatalf("truncated to %d bytes: no error", n)
		}
	}
	for range 3000 {
		b := bytes.Clone(good)
		b[r.IntN(len(b))] ^= byte(1 + r.IntN(255))
		_, _ = Decode(bytes.NewReader(b))
	}
}

func FuzzDecode(f *testing.F) {
	var buf bytes.Buffer
	_ = Encode(&buf, randomImage(rand.New(rand.NewPCG(5, 6)), 5, 18))
	f.Add(buf.Bytes())
	f.Fuzz(func(t *testing.T, b []byte) {
		d, err := Decode(bytes.NewReader(b))
		if err == nil && (d.Width < 1 || d.Height < 1) {
			t.Fatal("decoded an empty image")
		}
	})
}

// The word-at-a-time predictor equals the byte loop of the definition.
func TestPredict(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 12))
	for n := range 70 {
		b := make([]byte, n)
		for i := range b {
			b[i] = byte(r.UintN(256))
		}
		want := bytes.Clone(b)
		for i := len(want) - 1; i > 0; i-- {
			want[i] = want[i] - want[i-1] + 128
		}
		predict(b)
		if !bytes.Equal(b, want) {
			t.Fatalf("n=%d: %x, want %x", n, b, want)
		}
	}
}
