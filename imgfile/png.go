package imgfile

import (
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"hash/crc32"
	"image"
	"image/png"
	"io"
	"runtime"
	"slices"
	"strings"
	"sync"
	"sync/atomic"
	"unicode/utf8"

	"github.com/klauspost/compress/flate"

	"github.com/skyframe/skyframe/internal/keep"
	"github.com/skyframe/skyframe/internal/rowflate"
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
	// PNGFast is the fastest deflate level (the zero value): package
	// rowflate, matching runs against the pixel before and the pixel
	// above only. Rendered skies are mostly black or smooth, which it
	// compresses nearly as well as the slower levels.
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
	return 0, fmt.Errorf("imgfile: unknown PNG compression %d", int(c))
}

// PNGEncoder writes PNG files tagged as sRGB and carrying text metadata.
// Its zero value is ready to use (fast compression, all CPUs).
type PNGEncoder struct {
	// Compression is the deflate effort; the zero value is PNGFast.
	Compression PNGCompression
	// Workers is the number of goroutines compressing *image.NRGBA and
	// *image.NRGBA64 images; 0 means runtime.GOMAXPROCS(0). The output does
	// not depend on it.
	Workers int
}

// ErrPNGKeyword reports a metadata key that is not a valid PNG keyword.
var ErrPNGKeyword = errors.New("imgfile: invalid PNG text keyword")

// ErrPNGText reports a metadata value that cannot be stored in a PNG text
// chunk (invalid UTF-8 or a NUL character).
var ErrPNGText = errors.New("imgfile: invalid PNG text value")

// WritePNG encodes img with a zero PNGEncoder: see PNGEncoder.Encode.
func WritePNG(w io.Writer, img image.Image, meta []KV) error {
	var e PNGEncoder
	return e.Encode(w, img, meta)
}

// Encode writes img to w as a PNG datastream. *image.NRGBA gives 8 bits
// per sample and *image.NRGBA64 16 bits, without an alpha channel when the
// image is opaque (colour type 2, else 6; PNG spec §11.2.2). These two types
// take a fast path: rows are filtered (§9) and deflated in parallel in
// strips of about 1 MiB, each strip flushed to a byte boundary so that the
// strips concatenate into one zlib stream (RFC 1950/1951) whose Adler-32 is
// combined from the strips'. Strip boundaries depend only on the image
// size, so the output is the same for any Workers. PNGFast and PNGNone use
// filter type None on every row: on star fields (a black sky with small
// blobs) it gave the smallest files, 2–10 % smaller than the adaptive
// choice, at no filtering cost. PNGFast deflates with package rowflate,
// which looks for a repeat only one pixel back and one row up (the row
// above the strip's first row included): nearly all of a frame of space
// is one or the other, and it finds them in about 0.8 of the time
// klauspost/compress/flate's fastest level takes, with files as small (a
// 4096² pan frame: 1.74 MB against 1.82). PNGDefault and PNGBest choose
// each row's filter by the minimum-sum-of-absolute-differences heuristic
// of §12.8, better for smooth images. Other image types go through
// image/png, which picks the depth from the type.
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
	switch m := img.(type) {
	case *image.NRGBA:
		b := m.Bounds()
		return e.encodeStrips(w, b.Dx(), b.Dy(), m.Pix, m.Stride, 8, extra)
	case *image.NRGBA64:
		b := m.Bounds()
		return e.encodeStrips(w, b.Dx(), b.Dy(), m.Pix, m.Stride, 16, extra)
	}
	sw := &spliceWriter{w: w, extra: extra}
	enc := png.Encoder{CompressionLevel: level, BufferPool: pngPool}
	if err := enc.Encode(sw, img); err != nil {
		if sw.err != nil {
			return sw.err
		}
		return fmt.Errorf("imgfile: encoding PNG: %w", err)
	}
	if sw.n < pngHeadLen {
		return errors.New("imgfile: PNG encoder produced a truncated header")
	}
	return nil
}

// pngPool reuses the encoder's zlib state between frames.
var pngPool = &bufferPool{}

type bufferPool struct{ p sync.Pool }

// Get implements png.EncoderBufferPool.
func (b *bufferPool) Get() *png.EncoderBuffer {
	v, _ := b.p.Get().(*png.EncoderBuffer)
	return v
}

// Put implements png.EncoderBufferPool.
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
			s.err = errors.New("imgfile: PNG encoder did not start with IHDR")
			return 0, s.err
		}
		if _, err := s.w.Write(s.head[:]); err != nil {
			s.err = fmt.Errorf("imgfile: writing PNG: %w", err)
			return 0, s.err
		}
		if _, err := s.w.Write(s.extra); err != nil {
			s.err = fmt.Errorf("imgfile: writing PNG: %w", err)
			return 0, s.err
		}
		if len(p) == 0 {
			return total, nil
		}
	}
	s.n += len(p)
	if _, err := s.w.Write(p); err != nil {
		s.err = fmt.Errorf("imgfile: writing PNG: %w", err)
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
		if text, ok := latin1(kv.Value); ok && kv.Key != XMPKeyword {
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

func (c PNGCompression) flateLevel() int {
	switch c {
	case PNGDefault:
		return flate.DefaultCompression
	case PNGBest:
		return flate.BestCompression
	case PNGNone:
		return flate.NoCompression
	}
	return flate.BestSpeed
}

// zlibHeader returns the two zlib header bytes (RFC 1950 §2.2): CM = 8
// (deflate), CINFO = 7 (32 KiB window), FLEVEL from the level, FCHECK
// making the 16-bit value a multiple of 31.
func zlibHeader(level int) [2]byte {
	var flevel byte
	switch level {
	case flate.NoCompression, flate.BestSpeed:
		flevel = 0
	case flate.DefaultCompression:
		flevel = 2
	case flate.BestCompression:
		flevel = 3
	default:
		flevel = 2
	}
	cmf := byte(0x78)
	flg := flevel << 6
	flg += byte(31 - (uint(cmf)<<8|uint(flg))%31)
	return [2]byte{cmf, flg}
}

// adler32Combine returns the Adler-32 (RFC 1950 §8.2) of the concatenation
// A‖B from adler32(A), adler32(B) and len(B): with s1 = 1 + Σ bytes and s2 =
// Σ of the running s1 values, both mod 65521, s1(AB) = s1(A) + s1(B) − 1 and
// s2(AB) = s2(A) + s2(B) + len(B)·(s1(A) − 1).
func adler32Combine(a, b uint32, lenB int64) uint32 {
	const mod = 65521
	a1, a2 := uint64(a&0xffff), uint64(a>>16)
	b1, b2 := uint64(b&0xffff), uint64(b>>16)
	n := uint64(lenB % mod)
	s1 := (a1 + b1 + mod - 1) % mod
	s2 := (a2 + b2 + n*((a1+mod-1)%mod)) % mod
	return uint32(s2<<16 | s1)
}

// pngStrip is one independently deflated run of rows.
type pngStrip struct {
	data  *bytes.Buffer // raw deflate, ending at a byte boundary (from stripBufs)
	adler uint32        // of the filtered bytes
	n     int64         // number of filtered bytes
	err   error
	done  chan struct{}
}

// flateWriters keeps deflate states per PNGCompression (one per worker is
// in use at a time), across garbage collections (package keep).
var flateWriters = [4]keep.List[*flate.Writer]{{Max: 8}, {Max: 8}, {Max: 8}, {Max: 8}}

// runEncoders keeps PNGFast's encoders (one per worker in use at a time).
var runEncoders = keep.List[*rowflate.Encoder]{Max: 8}

// stripBufs keeps the strips' output buffers (all of an image's are in
// use at once when its opacity is checked as it is encoded); growing new
// ones cost a 4096² frame about a tenth of its encode time.
var stripBufs = keep.List[*bytes.Buffer]{Max: pngMaxStrips}

// pngMaxStrips bounds the strips of an image: a larger one is cut into
// longer strips (a 4096² frame into 32 of 128 rows, 1.5 MB each), so that
// stripBufs holds them all.
const pngMaxStrips = 32

// pngStripBytes is the target size of the filtered data deflated as one
// strip: large enough that restarting the deflate dictionary costs nothing
// measurable, small enough to spread a frame over many cores. (A variable
// only so tests can force many strips.)
var pngStripBytes = 1 << 20

func (e *PNGEncoder) encodeStrips(w io.Writer, width, height int, pix []byte, stride, depth int, extra []byte) error {
	if width < 1 || height < 1 {
		return fmt.Errorf("imgfile: encoding PNG: image size %d×%d", width, height)
	}
	// An 8-bit image whose first row is opaque is taken to be opaque and
	// encoded without alpha, each row checked as it is converted
	// (rgbaToRGB): the image is read once, not also in a pass of its own.
	// One with a transparent pixel further on is encoded again with
	// alpha, nothing having been written.
	if depth == 8 && isOpaque(pix, stride, width, 1, depth) {
		err := e.encodeStripsAs(w, width, height, pix, stride, depth, extra, true, true)
		if !errors.Is(err, errTransparent) {
			return err
		}
		return e.encodeStripsAs(w, width, height, pix, stride, depth, extra, false, false)
	}
	opaque := depth == 16 && isOpaque(pix, stride, width, height, depth)
	return e.encodeStripsAs(w, width, height, pix, stride, depth, extra, opaque, false)
}

// errTransparent is encodeStripsAs's error for an image taken to be
// opaque that is not; errAborted marks a strip left undone after another
// strip's error.
var (
	errTransparent = errors.New("imgfile: a transparent pixel")
	errAborted     = errors.New("imgfile: strip not encoded")
)

// encodeStripsAs encodes the image as encodeStrips does, without alpha
// when opaque. With guess, opaque is a guess the rows' conversion checks:
// the strips are all deflated before anything is written, and a
// transparent pixel ends the encoding with errTransparent.
func (e *PNGEncoder) encodeStripsAs(w io.Writer, width, height int, pix []byte, stride, depth int, extra []byte, opaque, guess bool) error {
	srcBpp := 4 * depth / 8
	colorType, bpp := byte(6), srcBpp
	if opaque {
		colorType, bpp = 2, 3*depth/8
	}
	rowBytes := width * bpp
	level := e.Compression.flateLevel()

	var hdr []byte
	hdr = append(hdr, "\x89PNG\r\n\x1a\n"...)
	ihdr := binary.BigEndian.AppendUint32(nil, uint32(width))
	ihdr = binary.BigEndian.AppendUint32(ihdr, uint32(height))
	ihdr = append(ihdr, byte(depth), colorType, 0, 0, 0)
	hdr = appendChunk(hdr, "IHDR", ihdr)
	hdr = append(hdr, extra...)

	rowsPer := max(1, pngStripBytes/(rowBytes+1))
	if height > pngMaxStrips*rowsPer {
		rowsPer = (height + pngMaxStrips - 1) / pngMaxStrips
	}
	nStrips := (height + rowsPer - 1) / rowsPer
	strips := make([]pngStrip, nStrips)
	for i := range strips {
		strips[i].done = make(chan struct{})
	}
	workers := e.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = min(workers, nStrips)
	var next sync.Mutex
	nextStrip := 0
	var abort atomic.Bool // set when writing fails: skip the remaining strips
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			cur := make([]byte, rowBytes)
			prev := make([]byte, rowBytes)
			var filt [5][]byte
			for f := range filt {
				filt[f] = make([]byte, rowBytes+1)
			}
			for {
				next.Lock()
				i := nextStrip
				nextStrip++
				next.Unlock()
				if i >= nStrips {
					return
				}
				s := &strips[i]
				if abort.Load() {
					s.err = errAborted
					close(s.done)
					continue
				}
				y0, y1 := i*rowsPer, min(height, (i+1)*rowsPer)
				s.data, s.adler, s.n, s.err = e.deflateStrip(pix, stride, width, depth, opaque, y0, y1, i == nStrips-1, level, cur, prev, &filt)
				if s.err != nil {
					abort.Store(true) // the error ends the encoding
				}
				close(s.done)
			}
		}()
	}
	defer wg.Wait()
	if guess {
		// Nothing is written until every strip is: a transparent pixel
		// in any of them means encoding again.
		var first error
		for i := range strips {
			<-strips[i].done
			if err := strips[i].err; err != nil && (first == nil || errors.Is(first, errAborted)) {
				first = err
			}
		}
		if first != nil {
			putStrips(strips)
			return first
		}
	}

	// Write the IDAT chunks in order as strips complete (all of them
	// first, with guess).
	var werr error
	zh := zlibHeader(level)
	var total uint32 = 1
	for i := range strips {
		s := &strips[i]
		<-s.done
		if werr != nil {
			continue
		}
		if s.err != nil {
			werr = s.err
			abort.Store(true)
			continue
		}
		if i == 0 {
			if _, err := w.Write(hdr); err != nil {
				werr = fmt.Errorf("imgfile: writing PNG: %w", err)
				abort.Store(true)
				continue
			}
		}
		total = adler32Combine(total, s.adler, s.n)
		var head, tail []byte
		if i == 0 {
			head = zh[:]
		}
		if i == nStrips-1 {
			tail = binary.BigEndian.AppendUint32(nil, total)
		}
		if err := writeChunk(w, "IDAT", head, s.data.Bytes(), tail); err != nil {
			werr = fmt.Errorf("imgfile: writing PNG: %w", err)
			abort.Store(true)
		}
		stripBufs.Put(s.data)
		s.data = nil
	}
	if werr != nil {
		// Every strip is done: the error that ended the encoding, not
		// a strip it skipped.
		putStrips(strips)
		for i := range strips {
			if err := strips[i].err; errors.Is(werr, errAborted) && err != nil && !errors.Is(err, errAborted) {
				werr = err
			}
		}
		return werr
	}
	if _, err := w.Write(appendChunk(nil, "IEND", nil)); err != nil {
		return fmt.Errorf("imgfile: writing PNG: %w", err)
	}
	return nil
}

// putStrips returns the output buffers the strips still hold to
// stripBufs.
func putStrips(strips []pngStrip) {
	for i := range strips {
		if d := strips[i].data; d != nil {
			stripBufs.Put(d)
			strips[i].data = nil
		}
	}
}

// deflateStrip filters rows y0..y1−1 and deflates them, ending with a sync
// flush (or, for the last strip, the final block).
func (e *PNGEncoder) deflateStrip(pix []byte, stride, width, depth int, opaque bool, y0, y1 int, last bool, level int,
	cur, prev []byte, filt *[5][]byte) (*bytes.Buffer, uint32, int64, error) {
	out, ok := stripBufs.Get()
	if !ok {
		out = new(bytes.Buffer)
	}
	out.Reset()
	bpp := len(cur) / width
	transparent := false // a converted row had a pixel that is not opaque
	rowOf := func(y int, dst []byte) {
		src := pix[y*stride:]
		if !opaque {
			copy(dst, src[:len(dst)])
			return
		}
		if depth == 8 {
			if !rgbaToRGB(dst, src) {
				transparent = true
			}
			return
		}
		for i, j := 0, 0; j < len(dst); i, j = i+8, j+6 {
			copy(dst[j:j+6], src[i:i+6])
		}
	}
	ad := uint32(1) // Adler-32 of nothing
	var n int64
	if e.Compression == PNGFast {
		// Rows unfiltered (filter type None), each converted straight
		// into the encoder's line, matched against the pixel before and
		// the pixel above (the previous strip's last row for the first).
		enc, ok := runEncoders.Get()
		if !ok {
			enc = new(rowflate.Encoder)
		}
		defer runEncoders.Put(enc)
		enc.Reset(bpp, len(cur)+1)
		if y0 > 0 {
			line := enc.Line()
			line[0] = 0
			rowOf(y0-1, line[1:])
			enc.Prime()
		}
		for y := y0; y < y1; y++ {
			line := enc.Line()
			line[0] = 0
			rowOf(y, line[1:])
			if transparent {
				return nil, 0, 0, errTransparent
			}
			ad = adler32Update(ad, line)
			n += int64(len(line))
			enc.Add()
		}
		out.Write(enc.Finish(last))
		return out, ad, n, nil
	}

	pool := &flateWriters[e.Compression]
	fw, ok := pool.Get()
	if !ok {
		var err error
		if fw, err = flate.NewWriter(out, level); err != nil {
			return nil, 0, 0, fmt.Errorf("imgfile: encoding PNG: %w", err)
		}
	} else {
		fw.Reset(out)
	}
	defer pool.Put(fw)
	// Stored data is not filtered either (filter type None): each row
	// goes straight into its line, after the filter byte.
	none := e.Compression == PNGNone
	if y0 > 0 && !none {
		rowOf(y0-1, prev)
	} else {
		clear(prev)
	}
	for y := y0; y < y1; y++ {
		var line []byte
		if none {
			line = filt[0]
			line[0] = 0
			rowOf(y, line[1:])
		} else {
			rowOf(y, cur)
			line = filterRow(cur, prev, bpp, filt)
		}
		if transparent {
			return nil, 0, 0, errTransparent
		}
		ad = adler32Update(ad, line)
		n += int64(len(line))
		if _, err := fw.Write(line); err != nil {
			return nil, 0, 0, fmt.Errorf("imgfile: encoding PNG: %w", err)
		}
		cur, prev = prev, cur
	}
	var err error
	if last {
		err = fw.Close()
	} else {
		err = fw.Flush()
	}
	if err != nil {
		return nil, 0, 0, fmt.Errorf("imgfile: encoding PNG: %w", err)
	}
	return out, ad, n, nil
}

// adler32Update returns the Adler-32 (RFC 1950 §8.2) of the bytes summed
// into adler followed by p, as hash/adler32 computes it, eight bytes a step:
// over bytes b₀…b₇, s2 gains 8·s1 + Σ(8−i)·bᵢ and s1 gains Σbᵢ, the two
// sums formed in 16-bit lanes of one 64-bit word (the even and the odd
// bytes; every lane stays below 2¹⁶) and gathered into the top lane by a
// multiplication. The sums are reduced modulo 65521 every MiB, before a
// uint64 can overflow.
func adler32Update(adler uint32, p []byte) uint32 {
	const mod = 65521
	const lanes = 0x00ff00ff00ff00ff
	s1, s2 := uint64(adler&0xffff), uint64(adler>>16)
	if haveAVX2 {
		// Chunks of 32 bytes, up to adlerChunks a call: over N = 32n
		// bytes s1 gains their sum and s2 gains N·s1 plus Σ (N − t)·b_t,
		// which is 32 times the sum of the chunks' prefix sums plus each
		// byte times 32 minus its place in its chunk.
		for len(p) >= 32 {
			n := min(len(p)/32, adlerChunks)
			sum, prefix, weighted := adler32AVX2(&p[0], n)
			s2 = (s2 + uint64(32*n)*s1 + 32*prefix + weighted) % mod
			s1 = (s1 + sum) % mod
			p = p[32*n:]
		}
	}
	for len(p) > 0 {
		chunk := p[:min(len(p), 1<<20)]
		p = p[len(chunk):]
		for ; len(chunk) >= 8; chunk = chunk[8:] {
			x := binary.LittleEndian.Uint64(chunk)
			if x == 0 {
				// Eight zero bytes (most of a frame of space): s1 stays.
				s2 += 8 * s1
				continue
			}
			even, odd := x&lanes, x>>8&lanes
			s2 += 8*s1 + (even*0x0008000600040002)>>48 + (odd*0x0007000500030001)>>48
			s1 += ((even + odd) * 0x0001000100010001) >> 48
		}
		for _, b := range chunk {
			s1 += uint64(b)
			s2 += s1
		}
		s1 %= mod
		s2 %= mod
	}
	return uint32(s2<<16 | s1)
}

// adlerChunks bounds the 32-byte chunks of one adler32AVX2 call: its
// weighted sum (at most 134 640 a chunk) stays below 2³² and s2's update
// far below 2⁶⁴.
const adlerChunks = 1024

// rgbaToRGB copies the RGB bytes of len(dst)/3 RGBA pixels of src into
// dst and reports whether every one of them is opaque (alpha 255): eight
// pixels a step with AVX2 (while 8 bytes of dst remain past the step's
// 24), then four at a time as two 64-bit words in and a 64- and a 32-bit
// word out, then one by one.
func rgbaToRGB(dst, src []byte) bool {
	n := len(dst) / 3
	src = src[:4*n]
	const rgb = 0x00ffffff
	k := 0
	all := uint64(1<<64 - 1)                 // the AND of the words read
	if g := (n - 3) / 8; haveAVX2 && g > 0 { // 24g + 8 ≤ 3n
		a := uint64(rgbaToRGBAVX2(&dst[0], &src[0], g))
		all &= a | a<<32
		k = 8 * g
	}
	for ; k+4 <= n; k += 4 {
		s := src[4*k : 4*k+16 : 4*k+16]
		a, b := binary.LittleEndian.Uint64(s[:8]), binary.LittleEndian.Uint64(s[8:])
		all &= a & b
		p0, p1, p2, p3 := a&rgb, a>>32&rgb, b&rgb, b>>32&rgb
		d := dst[3*k : 3*k+12 : 3*k+12]
		binary.LittleEndian.PutUint64(d[:8], p0|p1<<24|p2<<48)
		binary.LittleEndian.PutUint32(d[8:], uint32(p2>>16|p3<<8))
	}
	for ; k < n; k++ {
		dst[3*k], dst[3*k+1], dst[3*k+2] = src[4*k], src[4*k+1], src[4*k+2]
		all &= uint64(src[4*k+3])<<56 | uint64(src[4*k+3])<<24 | 0x00ffffff_00ffffff
	}
	return all&alpha2 == alpha2
}

// alpha2 masks the alpha bytes of two 8-bit RGBA pixels read as a
// little-endian word.
const alpha2 = 0xff000000_ff000000

// isOpaque reports whether every pixel of the RGBA (depth 8) or RGBA64
// (depth 16) rows is fully opaque, reading eight bytes at a time.
func isOpaque(pix []byte, stride, width, height, depth int) bool {
	mask := uint64(0xff000000ff000000) // the alpha bytes of two 8-bit pixels
	if depth == 16 {
		mask = 0xffff000000000000 // the alpha of one 16-bit pixel
	}
	rowBytes := width * 4 * depth / 8
	for y := range height {
		row := pix[y*stride : y*stride+rowBytes]
		i := 0
		for ; i+8 <= len(row); i += 8 {
			if binary.LittleEndian.Uint64(row[i:i+8])&mask != mask {
				return false
			}
		}
		if i < len(row) && row[i+3] != 0xff { // a last odd 8-bit pixel
			return false
		}
	}
	return true
}

// writeChunk writes one chunk whose data is the concatenation of parts,
// as appendChunk does, without copying the parts.
func writeChunk(w io.Writer, typ string, parts ...[]byte) error {
	var n int
	for _, p := range parts {
		n += len(p)
	}
	head := binary.BigEndian.AppendUint32(make([]byte, 0, 8), uint32(n))
	head = append(head, typ...)
	crc := crc32.ChecksumIEEE(head[4:])
	if _, err := w.Write(head); err != nil {
		return err
	}
	for _, p := range parts {
		crc = crc32.Update(crc, crc32.IEEETable, p)
		if _, err := w.Write(p); err != nil {
			return err
		}
	}
	_, err := w.Write(binary.BigEndian.AppendUint32(nil, crc))
	return err
}

// filterRow applies the five PNG filters (PNG spec §9.2: None, Sub, Up,
// Average, Paeth) to cur given the previous row and returns the filter byte
// and filtered row with the least sum of absolute values as signed bytes,
// the heuristic of §12.8.
func filterRow(cur, prev []byte, bpp int, f *[5][]byte) []byte {
	n := len(cur)
	none, sub, up, avg, pae := f[0][1:], f[1][1:], f[2][1:], f[3][1:], f[4][1:]
	f[0][0], f[1][0], f[2][0], f[3][0], f[4][0] = 0, 1, 2, 3, 4
	abs := func(b byte) int {
		if b < 128 {
			return int(b)
		}
		return 256 - int(b)
	}
	var s0, s1, s2, s3, s4 int
	for i := range bpp {
		c, b := cur[i], prev[i]
		none[i], sub[i], up[i], avg[i], pae[i] = c, c, c-b, c-b/2, c-b
		s0 += abs(c)
		s1 += abs(c)
		s2 += abs(c - b)
		s3 += abs(c - b/2)
		s4 += abs(c - b)
	}
	for i := bpp; i < n; i++ {
		c, a, b, d := cur[i], cur[i-bpp], prev[i], prev[i-bpp]
		none[i] = c
		sub[i] = c - a
		up[i] = c - b
		avg[i] = c - byte((int(a)+int(b))/2)
		// Paeth predictor (§9.4).
		p := int(a) + int(b) - int(d)
		pa, pb, pc := p-int(a), p-int(b), p-int(d)
		if pa < 0 {
			pa = -pa
		}
		if pb < 0 {
			pb = -pb
		}
		if pc < 0 {
			pc = -pc
		}
		pr := d
		if pa <= pb && pa <= pc {
			pr = a
		} else if pb <= pc {
			pr = b
		}
		pae[i] = c - pr
		s0 += abs(none[i])
		s1 += abs(sub[i])
		s2 += abs(up[i])
		s3 += abs(avg[i])
		s4 += abs(pae[i])
	}
	best, bs := 0, s0
	for k, s := range [5]int{s0, s1, s2, s3, s4} {
		if s < bs {
			best, bs = k, s
		}
	}
	return f[best][:n+1]
}
