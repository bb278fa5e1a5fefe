package render

import (
	"encoding/binary"
	"errors"
	"fmt"
	"hash/crc32"
	"image"
	"image/png"
	"io"
	"slices"
	"strings"
	"sync"
	"unicode/utf8"
)

// KV is one metadata entry written into a PNG text chunk: Key becomes the
// chunk keyword, Value its text.
type KV struct {
	Key, Value string
}

// SortedKV turns a map into metadata entries sorted by key, so that output
// built from a map is deterministic.
func SortedKV(m map[string]string) []KV {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	kv := make([]KV, len(keys))
	for i, k := range keys {
		kv[i] = KV{Key: k, Value: m[k]}
	}
	return kv
}

// PNGCompression selects the zlib effort of the PNG encoder.
type PNGCompression int

const (
	// PNGFast is the fastest deflate level (the zero value). Rendered skies
	// are mostly black, and this level keeps a 4096² frame well under a
	// second while compressing the black background nearly as well as the
	// slower levels.
	PNGFast PNGCompression = iota
	// PNGDefault is image/png's default compression.
	PNGDefault
	// PNGBest is the slowest, smallest deflate level.
	PNGBest
	// PNGNone stores the image data uncompressed.
	PNGNone
)

// String returns the lower-case name of the level.
func (c PNGCompression) String() string {
	switch c {
	case PNGFast:
		return "fast"
	case PNGDefault:
		return "default"
	case PNGBest:
		return "best"
	case PNGNone:
		return "none"
	}
	return fmt.Sprintf("PNGCompression(%d)", int(c))
}

func (c PNGCompression) level() (png.CompressionLevel, error) {
	switch c {
	case PNGFast:
		return png.BestSpeed, nil
	case PNGDefault:
		return png.DefaultCompression, nil
	case PNGBest:
		return png.BestCompression, nil
	case PNGNone:
		return png.NoCompression, nil
	}
	return 0, fmt.Errorf("render: unknown PNG compression %d", int(c))
}

// PNGEncoder writes PNG files tagged as sRGB and carrying text metadata.
// Its zero value is ready to use (fast compression).
type PNGEncoder struct {
	// Compression is the deflate effort; the zero value is PNGFast.
	Compression PNGCompression
}

// ErrPNGKeyword reports a metadata key that is not a valid PNG keyword.
var ErrPNGKeyword = errors.New("render: invalid PNG text keyword")

// ErrPNGText reports a metadata value that cannot be stored in a PNG text
// chunk (invalid UTF-8 or a NUL character).
var ErrPNGText = errors.New("render: invalid PNG text value")

// WritePNG encodes img with a zero PNGEncoder: see PNGEncoder.Encode.
func WritePNG(w io.Writer, img image.Image, meta []KV) error {
	var e PNGEncoder
	return e.Encode(w, img, meta)
}

// Encode writes img to w as a PNG datastream. The bit depth follows the
// image type as in image/png: *image.NRGBA (or RGBA) gives 8 bits per
// sample, *image.NRGBA64 (or RGBA64) 16 bits; opaque images are stored
// without an alpha channel.
//
// Right after the IHDR chunk it inserts, in this order (W3C PNG
// Specification, Second Edition = ISO/IEC 15948:2003, §5.6 ordering: all
// before PLTE and IDAT):
//
//   - cHRM with the sRGB primaries and D65 white point, and gAMA = 45455,
//     the fallback values §11.3.3.5 recommends alongside sRGB;
//   - sRGB with rendering intent 0 (perceptual), §11.3.3.5;
//   - one tEXt chunk per metadata entry (§11.3.4.3), in the order given, or
//     an uncompressed iTXt chunk (§11.3.4.5) when the value has characters
//     outside Latin-1.
//
// Keywords must be 1–79 Latin-1 printable characters without leading,
// trailing or doubled spaces (§11.3.4.2); otherwise Encode returns an error
// wrapping ErrPNGKeyword before writing anything. Output is a pure function
// of the inputs.
func (e *PNGEncoder) Encode(w io.Writer, img image.Image, meta []KV) error {
	level, err := e.Compression.level()
	if err != nil {
		return err
	}
	extra, err := pngMetaChunks(meta)
	if err != nil {
		return err
	}
	sw := &spliceWriter{w: w, extra: extra}
	enc := png.Encoder{CompressionLevel: level, BufferPool: pngPool}
	if err := enc.Encode(sw, img); err != nil {
		if sw.err != nil {
			return sw.err
		}
		return fmt.Errorf("render: encoding PNG: %w", err)
	}
	if sw.n < pngHeadLen {
		return errors.New("render: PNG encoder produced a truncated header")
	}
	return nil
}

// pngPool reuses the encoder's zlib state between frames.
var pngPool = &bufferPool{}

type bufferPool struct{ p sync.Pool }

func (b *bufferPool) Get() *png.EncoderBuffer {
	v, _ := b.p.Get().(*png.EncoderBuffer)
	return v
}

func (b *bufferPool) Put(v *png.EncoderBuffer) { b.p.Put(v) }

// pngHeadLen is the signature (8 bytes) plus the IHDR chunk (4 length + 4
// type + 13 data + 4 CRC), PNG spec §5.2 and §11.2.2.
const pngHeadLen = 8 + 4 + 4 + 13 + 4

// spliceWriter passes the encoder's output through, inserting extra right
// after the IHDR chunk.
type spliceWriter struct {
	w     io.Writer
	extra []byte
	head  [pngHeadLen]byte
	n     int // bytes received
	err   error
}

func (s *spliceWriter) Write(p []byte) (int, error) {
	if s.err != nil {
		return 0, s.err
	}
	total := len(p)
	if s.n < pngHeadLen {
		k := copy(s.head[s.n:], p)
		s.n += k
		p = p[k:]
		if s.n < pngHeadLen {
			return total, nil
		}
		if string(s.head[8:16]) != "\x00\x00\x00\x0dIHDR" {
			s.err = errors.New("render: PNG encoder did not start with IHDR")
			return 0, s.err
		}
		if _, err := s.w.Write(s.head[:]); err != nil {
			s.err = fmt.Errorf("render: writing PNG: %w", err)
			return 0, s.err
		}
		if _, err := s.w.Write(s.extra); err != nil {
			s.err = fmt.Errorf("render: writing PNG: %w", err)
			return 0, s.err
		}
		if len(p) == 0 {
			return total, nil
		}
	}
	s.n += len(p)
	if _, err := s.w.Write(p); err != nil {
		s.err = fmt.Errorf("render: writing PNG: %w", err)
		return 0, s.err
	}
	return total, nil
}

// appendChunk appends one chunk: 4-byte big-endian data length, 4-byte type,
// data, and the CRC-32 (ISO 3309, as in hash/crc32.IEEE) of type and data
// (PNG spec §5.3, §5.5).
func appendChunk(b []byte, typ string, data []byte) []byte {
	b = binary.BigEndian.AppendUint32(b, uint32(len(data)))
	start := len(b)
	b = append(b, typ...)
	b = append(b, data...)
	return binary.BigEndian.AppendUint32(b, crc32.ChecksumIEEE(b[start:]))
}

// sRGB fallback values, PNG spec §11.3.3.5: gAMA 45455 and cHRM with the
// ITU-R BT.709 primaries and D65 white, each ×100000.
var srgbCHRM = [8]uint32{31270, 32900, 64000, 33000, 30000, 60000, 15000, 6000}

const srgbGAMA = 45455

func pngMetaChunks(meta []KV) ([]byte, error) {
	var b []byte
	var chrm []byte
	for _, v := range srgbCHRM {
		chrm = binary.BigEndian.AppendUint32(chrm, v)
	}
	b = appendChunk(b, "cHRM", chrm)
	b = appendChunk(b, "gAMA", binary.BigEndian.AppendUint32(nil, srgbGAMA))
	b = appendChunk(b, "sRGB", []byte{0})
	for _, kv := range meta {
		key, err := pngKeyword(kv.Key)
		if err != nil {
			return nil, err
		}
		if !utf8.ValidString(kv.Value) || strings.IndexByte(kv.Value, 0) >= 0 {
			return nil, fmt.Errorf("%w for key %q: value %q is not NUL-free UTF-8", ErrPNGText, kv.Key, kv.Value)
		}
		if text, ok := latin1(kv.Value); ok {
			data := append(append(key, 0), text...)
			b = appendChunk(b, "tEXt", data)
			continue
		}
		// iTXt: keyword, NUL, compression flag 0, method 0, empty language
		// tag, NUL, empty translated keyword, NUL, UTF-8 text (§11.3.4.5).
		data := append(key, 0, 0, 0, 0, 0)
		data = append(data, kv.Value...)
		b = appendChunk(b, "iTXt", data)
	}
	return b, nil
}

// pngKeyword converts a keyword to Latin-1 and checks §11.3.4.2: 1–79
// bytes of printable Latin-1 (32–126, 161–255), no leading, trailing or
// consecutive spaces.
func pngKeyword(k string) ([]byte, error) {
	bad := func(why string) error {
		return fmt.Errorf("%w %q: %s", ErrPNGKeyword, k, why)
	}
	if !utf8.ValidString(k) {
		return nil, bad("not valid UTF-8")
	}
	out := make([]byte, 0, len(k))
	for _, r := range k {
		switch {
		case r >= 32 && r <= 126, r >= 161 && r <= 255:
			out = append(out, byte(r))
		default:
			return nil, bad(fmt.Sprintf("character %U is not printable Latin-1", r))
		}
	}
	switch {
	case len(out) == 0:
		return nil, bad("empty")
	case len(out) > 79:
		return nil, bad(fmt.Sprintf("%d bytes, more than 79", len(out)))
	case out[0] == ' ' || out[len(out)-1] == ' ':
		return nil, bad("leading or trailing space")
	case strings.Contains(string(out), "  "):
		return nil, bad("consecutive spaces")
	}
	return out, nil
}

// latin1 converts s to ISO 8859-1 if every rune fits in one byte.
func latin1(s string) ([]byte, bool) {
	out := make([]byte, 0, len(s))
	for _, r := range s {
		if r > 255 {
			return nil, false
		}
		out = append(out, byte(r))
	}
	return out, true
}
