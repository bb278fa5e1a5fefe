package imgfile

import (
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"hash/adler32"
	"hash/crc32"
	"image"
	"image/color"
	"image/png"
	"io"
	"math/rand/v2"
	"strings"
	"testing"
)

type pngChunk struct {
	typ  string
	data []byte
}

// parsePNGChunks splits a PNG datastream into chunks, checking the
// signature and every CRC (W3C PNG Specification 2nd ed. §5.2, §5.3, §5.5)
// [pub].
func parsePNGChunks(t *testing.T, b []byte) []pngChunk {
	t.Helper()
	const sig = "\x89PNG\r\n\x1a\n" // §5.2 [pub]
	if !bytes.HasPrefix(b, []byte(sig)) {
		t.Fatalf("missing PNG signature: % x", b[:min(8, len(b))])
	}
	b = b[8:]
	var out []pngChunk
	for len(b) > 0 {
		if len(b) < 12 {
			t.Fatalf("truncated chunk: %d bytes left", len(b))
		}
		n := int(binary.BigEndian.Uint32(b))
		if len(b) < 12+n {
			t.Fatalf("chunk length %d exceeds remaining %d", n, len(b)-12)
		}
		typ := string(b[4:8])
		have := binary.BigEndian.Uint32(b[8+n:])
		want := crc32.ChecksumIEEE(b[4 : 8+n])
		if have != want {
			t.Errorf("chunk %s CRC: have %08x, want %08x", typ, have, want)
		}
		out = append(out, pngChunk{typ, b[8 : 8+n]})
		b = b[12+n:]
	}
	return out
}

func testNRGBA(w, h int, seed uint64) *image.NRGBA {
	rng := rand.New(rand.NewPCG(seed, 1))
	img := image.NewNRGBA(image.Rect(0, 0, w, h))
	for i := range img.Pix {
		img.Pix[i] = uint8(rng.UintN(256))
	}
	return img
}

func testNRGBA64(w, h int, seed uint64) *image.NRGBA64 {
	rng := rand.New(rand.NewPCG(seed, 2))
	img := image.NewNRGBA64(image.Rect(0, 0, w, h))
	for i := range img.Pix {
		img.Pix[i] = uint8(rng.UintN(256))
	}
	for i := 6; i < len(img.Pix); i += 8 { // opaque, so the encoder drops alpha
		img.Pix[i], img.Pix[i+1] = 0xff, 0xff
	}
	return img
}

func opaque8(m *image.NRGBA) *image.NRGBA {
	for i := 3; i < len(m.Pix); i += 4 {
		m.Pix[i] = 0xff
	}
	return m
}

// lastTranslucent makes every pixel opaque but the last of the last row,
// whose alpha the encoder's eight-byte opacity scan reaches only in its
// tail when the width is odd.
func lastTranslucent(m *image.NRGBA) *image.NRGBA {
	opaque8(m)
	m.Pix[len(m.Pix)-1] = 0xc8
	return m
}

// translucentAt lowers the alpha of pixel (x, y) of m.
func translucentAt(m *image.NRGBA, x, y int) *image.NRGBA {
	m.Pix[y*m.Stride+4*x+3] = 0x80
	return m
}

func alpha16(m *image.NRGBA64) *image.NRGBA64 {
	m.Pix[6], m.Pix[7] = 0x12, 0x34
	return m
}

func testRGBA(w, h int) *image.RGBA {
	m := image.NewRGBA(image.Rect(0, 0, w, h))
	for i := range m.Pix {
		m.Pix[i] = uint8(i * 7)
		if i%4 == 3 {
			m.Pix[i] = 0xff
		}
	}
	return m
}

func testGray16(w, h int) *image.Gray16 {
	m := image.NewGray16(image.Rect(0, 0, w, h))
	for i := range m.Pix {
		m.Pix[i] = uint8(i * 13)
	}
	return m
}

func TestWritePNGRoundTrip(t *testing.T) {
	meta := []KV{
		{"Software", "skyframe"},
		{"beta", "0.9"},
		{"Comment", "Größe naïve"},     // Latin-1 → tEXt
		{"Title", "β = 0.99 γ ≈ 7.09"}, // outside Latin-1 → iTXt
	}
	for _, tc := range []struct {
		name  string
		img   image.Image
		depth byte // IHDR bit depth, §11.2.2 [pub]
		color byte // IHDR colour type, §11.2.2 [pub]: 2 RGB, 6 RGBA, 0 grey
	}{
		{"nrgba8 alpha", testNRGBA(37, 23, 1), 8, 6},
		{"nrgba8 opaque", opaque8(testNRGBA(29, 31, 11)), 8, 2},
		{"nrgba8 opaque one column", opaque8(testNRGBA(1, 7, 14)), 8, 2},
		{"nrgba8 opaque six columns", opaque8(testNRGBA(6, 5, 16)), 8, 2},
		{"nrgba8 opaque seven columns", opaque8(testNRGBA(7, 5, 17)), 8, 2},
		{"nrgba8 last pixel translucent", lastTranslucent(testNRGBA(29, 5, 15)), 8, 6},
		{"nrgba64 opaque", testNRGBA64(19, 41, 2), 16, 2},
		{"nrgba64 alpha", alpha16(testNRGBA64(23, 17, 12)), 16, 6},
		{"nrgba8 many strips", sparseStars(700, 900, false), 8, 2},
		// Opaque but for one pixel in a later strip than the first: the
		// rows' conversion finds it, and the image is encoded again with
		// alpha.
		{"nrgba8 translucent in a later strip", translucentAt(sparseStars(700, 900, false).(*image.NRGBA), 411, 800), 8, 6},
		{"nrgba64 many strips", sparseStars(300, 1000, true), 16, 2},
		{"sub-image", testNRGBA(40, 40, 13).SubImage(image.Rect(3, 5, 31, 29)), 8, 6},
		{"rgba via image/png", image.Image(testRGBA(21, 13)), 8, 2},
		{"gray16 via image/png", testGray16(17, 9), 16, 0},
	} {
		t.Run(tc.name, func(t *testing.T) {
			var buf bytes.Buffer
			if err := WritePNG(&buf, tc.img, meta); err != nil {
				t.Fatal(err)
			}
			dec, err := png.Decode(bytes.NewReader(buf.Bytes()))
			if err != nil {
				t.Fatalf("image/png cannot decode: %v", err)
			}
			b := tc.img.Bounds()
			if dec.Bounds().Size() != b.Size() {
				t.Fatalf("size: have %v, want %v", dec.Bounds().Size(), b.Size())
			}
			for y := b.Min.Y; y < b.Max.Y; y++ {
				for x := b.Min.X; x < b.Max.X; x++ {
					have := color.NRGBA64Model.Convert(dec.At(x-b.Min.X, y-b.Min.Y))
					want := color.NRGBA64Model.Convert(tc.img.At(x, y))
					if have != want {
						t.Fatalf("pixel (%d,%d): have %v, want %v", x, y, have, want)
					}
				}
			}

			ch := parsePNGChunks(t, buf.Bytes())
			if len(ch) < 10 {
				t.Fatalf("only %d chunks", len(ch))
			}
			if ch[0].typ != "IHDR" || ch[0].data[8] != tc.depth || ch[0].data[9] != tc.color {
				t.Fatalf("first chunk %s depth %d colour type %d, want IHDR depth %d colour type %d", ch[0].typ, ch[0].data[8], ch[0].data[9], tc.depth, tc.color)
			}
			// Our chunks follow IHDR directly, before any IDAT (§5.6) [pub].
			wantTypes := []string{"IHDR", "cHRM", "gAMA", "sRGB", "tEXt", "tEXt", "tEXt", "iTXt", "IDAT"}
			if w, h := binary.BigEndian.Uint32(ch[0].data), binary.BigEndian.Uint32(ch[0].data[4:]); int(w) != b.Dx() || int(h) != b.Dy() {
				t.Errorf("IHDR size %d×%d, want %v", w, h, b.Size())
			}
			for i, typ := range wantTypes {
				if ch[i].typ != typ {
					t.Errorf("chunk %d: have %s, want %s", i, ch[i].typ, typ)
				}
			}
			if last := ch[len(ch)-1].typ; last != "IEND" {
				t.Errorf("last chunk: have %s, want IEND", last)
			}
			// §11.3.3.5 [pub]: sRGB is one byte, intent 0 = perceptual;
			// gAMA 45455; cHRM 31270 32900 64000 33000 30000 60000 15000 6000.
			if d := ch[3].data; !bytes.Equal(d, []byte{0}) {
				t.Errorf("sRGB data: have % x, want 00", d)
			}
			if g := binary.BigEndian.Uint32(ch[2].data); g != 45455 {
				t.Errorf("gAMA: have %d, want 45455", g)
			}
			wantCHRM := []uint32{31270, 32900, 64000, 33000, 30000, 60000, 15000, 6000}
			for i, v := range wantCHRM {
				if have := binary.BigEndian.Uint32(ch[1].data[4*i:]); have != v {
					t.Errorf("cHRM[%d]: have %d, want %d", i, have, v)
				}
			}
			// tEXt: keyword NUL Latin-1 text (§11.3.4.3) [pub].
			wantText := []string{"Software\x00skyframe", "beta\x000.9", "Comment\x00Gr\xf6\xdfe na\xefve"}
			for i, w := range wantText {
				if have := string(ch[4+i].data); have != w {
					t.Errorf("tEXt %d: have %q, want %q", i, have, w)
				}
			}
			// iTXt: keyword NUL flag method lang NUL transkey NUL UTF-8 (§11.3.4.5) [pub].
			if have, want := string(ch[7].data), "Title\x00\x00\x00\x00\x00β = 0.99 γ ≈ 7.09"; have != want {
				t.Errorf("iTXt: have %q, want %q", have, want)
			}
		})
	}
}

// TestWritePNGWorkers checks that the parallel encoder's output does not
// depend on the number of workers, and that its Adler-32 combination
// matches hash/adler32 over the concatenation (RFC 1950 §8.2) [pub].
func TestWritePNGWorkers(t *testing.T) {
	defer func(n int) { pngStripBytes = n }(pngStripBytes)
	pngStripBytes = 20000 // 12 rows a strip: 28 strips, ragged last one
	img := sparseStars(517, 333, false)
	var first []byte
	for _, workers := range []int{1, 2, 3, 8} {
		for _, c := range []PNGCompression{PNGFast, PNGDefault, PNGNone} {
			var buf bytes.Buffer
			e := PNGEncoder{Compression: c, Workers: workers}
			if err := e.Encode(&buf, img, nil); err != nil {
				t.Fatal(err)
			}
			if _, err := png.Decode(bytes.NewReader(buf.Bytes())); err != nil {
				t.Fatalf("workers %d %v: %v", workers, c, err)
			}
			if c != PNGFast {
				continue
			}
			if first == nil {
				first = buf.Bytes()
			} else if !bytes.Equal(first, buf.Bytes()) {
				t.Errorf("workers %d: output differs from workers 1", workers)
			}
		}
	}
	// More strips of the set size than pngMaxStrips: longer strips, the
	// same pixels, and no more strips than that.
	pngStripBytes = 3000 // 1.9 rows a strip: 333 strips, cut to 31 of 11 rows
	var buf bytes.Buffer
	if err := (&PNGEncoder{Workers: 3}).Encode(&buf, img, nil); err != nil {
		t.Fatal(err)
	}
	dec, err := png.Decode(bytes.NewReader(buf.Bytes()))
	if err != nil {
		t.Fatal(err)
	}
	for y := range 333 {
		for x := range 517 {
			if have, want := color.NRGBAModel.Convert(dec.At(x, y)), img.At(x, y); have != want {
				t.Fatalf("capped strips: pixel (%d,%d) %v, want %v", x, y, have, want)
			}
		}
	}
	// One IDAT chunk a strip: ⌈333/32⌉ = 11 rows each, so 31.
	idat := 0
	for _, c := range parsePNGChunks(t, buf.Bytes()) {
		if c.typ == "IDAT" {
			idat++
		}
	}
	if idat != 31 {
		t.Errorf("capped strips: %d IDAT chunks, want 31", idat)
	}

	// The largest sums: 3 MiB of 0xff bytes, past the MiB between
	// reductions, from the first sums and from the largest ones (against
	// the combination rule, checked below, since hash/adler32 cannot start
	// from given sums).
	zeros := make([]byte, 3<<20+5)
	if have, want := adler32Update(1, zeros), adler32.Checksum(zeros); have != want {
		t.Fatalf("adler32Update (3 MiB of 0): have %08x, want %08x", have, want)
	}
	ones := bytes.Repeat([]byte{0xff}, 3<<20+5)
	if have, want := adler32Update(1, ones), adler32.Checksum(ones); have != want {
		t.Fatalf("adler32Update (3 MiB of 0xff): have %08x, want %08x", have, want)
	}
	const top = 65520<<16 | 65520
	if have, want := adler32Update(top, ones), adler32Combine(top, adler32.Checksum(ones), int64(len(ones))); have != want {
		t.Fatalf("adler32Update from %08x over 3 MiB of 0xff: have %08x, want %08x", uint32(top), have, want)
	}
	rng := rand.New(rand.NewPCG(5, 5))
	for k := range 50 {
		a := make([]byte, rng.IntN(200000))
		b := make([]byte, rng.IntN(200000))
		fill := func(p []byte) {
			for i := range p {
				p[i] = byte(rng.UintN(256))
				if k%2 == 1 && i%37 < 30 {
					p[i] = 0 // runs of zeros, whole words and not
				}
			}
		}
		fill(a)
		fill(b)
		if have, want := adler32Update(1, a), adler32.Checksum(a); have != want {
			t.Fatalf("adler32Update (%d bytes): have %08x, want hash/adler32's %08x", len(a), have, want)
		}
		if have, want := adler32Update(adler32.Checksum(a), b), adler32.Checksum(append(append([]byte{}, a...), b...)); have != want {
			t.Fatalf("adler32Update (%d + %d bytes): have %08x, want hash/adler32's %08x", len(a), len(b), have, want)
		}
		want := adler32.Checksum(append(append([]byte{}, a...), b...))
		if have := adler32Combine(adler32.Checksum(a), adler32.Checksum(b), int64(len(b))); have != want {
			t.Fatalf("adler32Combine (%d + %d bytes): have %08x, want %08x", len(a), len(b), have, want)
		}
	}
}

func TestWritePNGDeterministic(t *testing.T) {
	img := testNRGBA(64, 64, 3)
	meta := SortedKV(map[string]string{"b": "2", "a": "1", "c": "3"})
	var first []byte
	for i := range 3 {
		var buf bytes.Buffer
		if err := WritePNG(&buf, img, meta); err != nil {
			t.Fatal(err)
		}
		if i == 0 {
			first = buf.Bytes()
			continue
		}
		if !bytes.Equal(buf.Bytes(), first) {
			t.Fatalf("run %d differs from run 0", i)
		}
	}
	ch := parsePNGChunks(t, first)
	for i, want := range []string{"a\x001", "b\x002", "c\x003"} {
		if have := string(ch[4+i].data); have != want {
			t.Errorf("sorted tEXt %d: have %q, want %q", i, have, want)
		}
	}
}

func TestWritePNGBadMeta(t *testing.T) {
	img := testNRGBA(4, 4, 4)
	// Keyword rules of §11.3.4.2 [pub].
	for _, tc := range []struct {
		name string
		kv   KV
		want error
	}{
		{"empty", KV{"", "x"}, ErrPNGKeyword},
		{"80 bytes", KV{strings.Repeat("k", 80), "x"}, ErrPNGKeyword},
		{"leading space", KV{" key", "x"}, ErrPNGKeyword},
		{"trailing space", KV{"key ", "x"}, ErrPNGKeyword},
		{"double space", KV{"a  b", "x"}, ErrPNGKeyword},
		{"NUL in key", KV{"a\x00b", "x"}, ErrPNGKeyword},
		{"control in key", KV{"a\nb", "x"}, ErrPNGKeyword},
		{"non-Latin-1 key", KV{"βeta", "x"}, ErrPNGKeyword},
		{"invalid UTF-8 key", KV{"a\xffb", "x"}, ErrPNGKeyword},
		{"NUL in value", KV{"key", "a\x00b"}, ErrPNGText},
		{"invalid UTF-8 value", KV{"key", "a\xffb"}, ErrPNGText},
	} {
		t.Run(tc.name, func(t *testing.T) {
			var buf bytes.Buffer
			err := WritePNG(&buf, img, []KV{tc.kv})
			if !errors.Is(err, tc.want) {
				t.Fatalf("error: have %v, want %v", err, tc.want)
			}
			if buf.Len() != 0 {
				t.Errorf("wrote %d bytes before failing", buf.Len())
			}
		})
	}
	// 79 bytes is the longest allowed keyword [pub §11.3.4.2].
	if err := WritePNG(io.Discard, img, []KV{{strings.Repeat("k", 79), "x"}}); err != nil {
		t.Errorf("79-byte keyword: %v", err)
	}
	var e PNGEncoder
	e.Compression = PNGCompression(99)
	if err := e.Encode(io.Discard, img, nil); err == nil {
		t.Error("unknown compression: no error")
	}
}

type failWriter struct{ left int }

var errDiskFull = errors.New("disk full")

func (f *failWriter) Write(p []byte) (int, error) {
	if len(p) > f.left {
		n := f.left
		f.left = 0
		return n, errDiskFull
	}
	f.left -= len(p)
	return len(p), nil
}

func TestWritePNGWriterError(t *testing.T) {
	defer func(n int) { pngStripBytes = n }(pngStripBytes)
	pngStripBytes = 4000 // many strips, so failures hit later IDAT chunks too
	for _, img := range []image.Image{testNRGBA(64, 64, 5), testNRGBA64(64, 64, 6), testRGBA(64, 64)} {
		var full countWriter
		if err := WritePNG(&full, img, []KV{{"k", "v"}}); err != nil {
			t.Fatal(err)
		}
		for _, left := range []int{0, 10, 40, 200, int(full) / 3, int(full) - 13, int(full) - 1} {
			err := WritePNG(&failWriter{left: left}, img, []KV{{"k", "v"}})
			if !errors.Is(err, errDiskFull) {
				t.Errorf("%T, fail after %d bytes: have %v, want %v", img, left, err, errDiskFull)
			}
		}
	}
}

func TestPNGCompressionLevels(t *testing.T) {
	img := testNRGBA(32, 32, 6)
	for _, c := range []PNGCompression{PNGFast, PNGDefault, PNGBest, PNGNone} {
		var buf bytes.Buffer
		e := PNGEncoder{Compression: c}
		if err := e.Encode(&buf, img, nil); err != nil {
			t.Fatalf("%v: %v", c, err)
		}
		if _, err := png.Decode(&buf); err != nil {
			t.Errorf("%v: decode: %v", c, err)
		}
	}
}

// sparseStars is a mostly black frame with a few thousand small bright
// blobs, like a rendered star field.
func sparseStars(w, h int, deep bool) image.Image {
	rng := rand.New(rand.NewPCG(7, 7))
	var img8 *image.NRGBA
	var img16 *image.NRGBA64
	if deep {
		img16 = image.NewNRGBA64(image.Rect(0, 0, w, h))
	} else {
		img8 = image.NewNRGBA(image.Rect(0, 0, w, h))
	}
	for i := range w * h {
		x, y := i%w, i/w
		if deep {
			img16.SetNRGBA64(x, y, color.NRGBA64{A: 0xffff})
		} else {
			img8.Pix[4*i+3] = 0xff
		}
	}
	n := w * h / 2000
	for range n {
		cx, cy := rng.IntN(w), rng.IntN(h)
		v := uint16(rng.UintN(65536))
		for dy := -1; dy <= 1; dy++ {
			for dx := -1; dx <= 1; dx++ {
				x, y := cx+dx, cy+dy
				if x < 0 || y < 0 || x >= w || y >= h {
					continue
				}
				c := color.NRGBA64{R: v, G: v / 2, B: v / 3, A: 0xffff}
				if deep {
					img16.SetNRGBA64(x, y, c)
				} else {
					img8.Set(x, y, c)
				}
			}
		}
	}
	if deep {
		return img16
	}
	return img8
}

func benchmarkPNG(b *testing.B, deep bool, c PNGCompression) {
	size := 4096
	if testing.Short() {
		size = 512
	}
	img := sparseStars(size, size, deep)
	e := PNGEncoder{Compression: c}
	var cw countWriter
	bpp := 4
	if deep {
		bpp = 8
	}
	b.SetBytes(int64(size * size * bpp))
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		cw = 0
		if err := e.Encode(&cw, img, []KV{{"Software", "skyframe"}}); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(cw), "file-bytes")
}

type countWriter int64

func (c *countWriter) Write(p []byte) (int, error) { *c += countWriter(len(p)); return len(p), nil }

func BenchmarkWritePNG8(b *testing.B)         { benchmarkPNG(b, false, PNGFast) }
func BenchmarkWritePNG16(b *testing.B)        { benchmarkPNG(b, true, PNGFast) }
func BenchmarkWritePNG8Default(b *testing.B)  { benchmarkPNG(b, false, PNGDefault) }
func BenchmarkWritePNG16Default(b *testing.B) { benchmarkPNG(b, true, PNGDefault) }

// The chunks of a small frame and their data lengths: colour space and
// metadata come right after the header (PNG spec §11.3: cHRM 32 bytes, gAMA
// 4, sRGB 1, tEXt keyword NUL text).
func ExampleWritePNG() {
	img := image.NewNRGBA(image.Rect(0, 0, 4, 3))
	for i := 3; i < len(img.Pix); i += 4 {
		img.Pix[i] = 0xff // opaque: stored as 8-bit RGB
	}
	var buf bytes.Buffer
	if err := WritePNG(&buf, img, SortedKV(map[string]string{"Software": "skyframe", "Beta": "0.9"})); err != nil {
		fmt.Println(err)
		return
	}
	b := buf.Bytes()[8:]
	for len(b) >= 12 {
		n := binary.BigEndian.Uint32(b)
		if string(b[4:8]) == "IDAT" { // compressed size depends on zlib
			fmt.Println("IDAT")
		} else {
			fmt.Printf("%s %d\n", b[4:8], n)
		}
		b = b[12+n:]
	}
	// Output:
	// IHDR 13
	// cHRM 32
	// gAMA 4
	// sRGB 1
	// tEXt 8
	// tEXt 17
	// IDAT
	// IEND 0
}

// rgbaToRGB copies each pixel's R, G, B bytes, for every length up to 70
// pixels (the AVX2 steps of eight, the Go words of four and single
// pixels, and the 8 bytes of room the AVX2 store needs), writing nothing
// past 3n bytes. CI runs it with and without AVX2 (-tags purego).
func TestRGBAToRGB(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 7))
	for n := range 71 {
		src := make([]byte, 4*n)
		for i := range src {
			src[i] = byte(rng.UintN(256))
		}
		dst := make([]byte, 3*n+5)
		for i := range dst {
			dst[i] = 0xa5
		}
		if op := rgbaToRGB(dst[:3*n], src); op != opaqueBytes(src) {
			t.Fatalf("%d random pixels: opaque %v", n, op)
		}
		for i := range n {
			if !bytes.Equal(dst[3*i:3*i+3], src[4*i:4*i+3]) {
				t.Fatalf("%d pixels: pixel %d is % x, want % x", n, i, dst[3*i:3*i+3], src[4*i:4*i+3])
			}
		}
		for i := 3 * n; i < len(dst); i++ {
			if dst[i] != 0xa5 {
				t.Fatalf("%d pixels: byte %d past the output written", n, i)
			}
		}
		// Opaque, then each pixel in turn translucent: the AVX2 steps,
		// the fours and the last ones each report it.
		for i := 3; i < len(src); i += 4 {
			src[i] = 0xff
		}
		if !rgbaToRGB(dst[:3*n], src) {
			t.Fatalf("%d opaque pixels: not opaque", n)
		}
		for i := range n {
			src[4*i+3] = 0xfe
			if rgbaToRGB(dst[:3*n], src) {
				t.Fatalf("%d pixels, pixel %d translucent: opaque", n, i)
			}
			src[4*i+3] = 0xff
		}
	}
}

// opaqueBytes reports whether every alpha byte of RGBA pixels p is 255.
func opaqueBytes(p []byte) bool {
	for i := 3; i < len(p); i += 4 {
		if p[i] != 0xff {
			return false
		}
	}
	return true
}
