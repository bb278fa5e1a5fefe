package exr

import (
	"bytes"
	"compress/zlib"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math"
	"slices"
)

// ErrFormat reports a file that is not an OpenEXR file this package reads.
var ErrFormat = errors.New("exr: bad file")

// Decoded is an image read by Decode, with the header as found.
type Decoded struct {
	Image
	// Compression is the file's compression code (0 none, 2 ZIPS, 3 ZIP).
	Compression byte
	// Window is the data window.
	Window Box2i
}

// Attr returns the value of the attribute name and whether it is present.
func (d *Decoded) Attr(name string) (any, bool) {
	for _, a := range d.Attributes {
		if a.Name == name {
			return a.Value, true
		}
	}
	return nil, false
}

// Channel returns the channel name, or nil.
func (d *Decoded) Channel(name string) *Channel {
	for i := range d.Channels {
		if d.Channels[i].Name == name {
			return &d.Channels[i]
		}
	}
	return nil
}

// Decode reads a single-part scan-line OpenEXR file with HALF or FLOAT
// channels, uncompressed, ZIPS or ZIP compressed (what Encode writes, and
// the same subset from other writers). Channels come in file (name) order;
// Attributes hold every header attribute except channels, compression,
// dataWindow and lineOrder, which are interpreted. Damaged or unsupported
// files are errors wrapping ErrFormat, never panics.
func Decode(r io.Reader) (*Decoded, error) {
	data, err := io.ReadAll(r)
	if err != nil {
		return nil, fmt.Errorf("exr: reading: %w", err)
	}
	return decode(data)
}

func bad(format string, a ...any) error {
	return fmt.Errorf("%w: %s", ErrFormat, fmt.Sprintf(format, a...))
}

func cstring(d []byte, pos int) (string, int, error) {
	i := bytes.IndexByte(d[min(pos, len(d)):], 0)
	if i < 0 {
		return "", 0, bad("unterminated name at byte %d", pos)
	}
	return string(d[pos : pos+i]), pos + i + 1, nil
}

func decode(d []byte) (*Decoded, error) {
	le := binary.LittleEndian
	if len(d) < 8 || le.Uint32(d) != Magic {
		return nil, bad("no OpenEXR magic number")
	}
	version := le.Uint32(d[4:])
	if version&0xff != 2 {
		return nil, bad("version %d, want 2", version&0xff)
	}
	if version&^uint32(0x4ff) != 0 {
		return nil, bad("version flags %#x: tiled, deep and multi-part files are not supported", version&^uint32(0xff))
	}
	out := &Decoded{Compression: 255}
	pos := 8
	var chl []byte
	haveWin, haveOrder := false, false
	for {
		if pos >= len(d) {
			return nil, bad("header not terminated")
		}
		if d[pos] == 0 {
			pos++
			break
		}
		name, p, err := cstring(d, pos)
		if err != nil {
			return nil, err
		}
		typ, p, err := cstring(d, p)
		if err != nil {
			return nil, err
		}
		if p+4 > len(d) {
			return nil, bad("attribute %s truncated", name)
		}
		size := int64(int32(le.Uint32(d[p:])))
		p += 4
		if size < 0 || int64(p)+size > int64(len(d)) {
			return nil, bad("attribute %s: size %d", name, size)
		}
		val := d[p : p+int(size)]
		pos = p + int(size)
		switch name {
		case "channels":
			chl = val
			continue
		case "compression":
			if len(val) != 1 {
				return nil, bad("compression of %d bytes", len(val))
			}
			out.Compression = val[0]
			continue
		case "lineOrder":
			if len(val) != 1 || val[0] > 2 {
				return nil, bad("lineOrder %v", val)
			}
			haveOrder = true
			continue
		case "dataWindow":
			v, err := decodeValue(typ, val)
			if err != nil {
				return nil, bad("dataWindow: %v", err)
			}
			w, ok := v.(Box2i)
			if !ok {
				return nil, bad("dataWindow of type %s", typ)
			}
			out.Window, haveWin = w, true
			continue
		}
		v, err := decodeValue(typ, val)
		if err != nil {
			return nil, bad("attribute %s: %v", name, err)
		}
		out.Attributes = append(out.Attributes, Attribute{Name: name, Value: v})
	}
	if chl == nil || !haveWin || !haveOrder || out.Compression == 255 {
		return nil, bad("missing a required attribute (channels, compression, dataWindow, lineOrder)")
	}
	win := out.Window
	w64, h64 := int64(win.XMax)-int64(win.XMin)+1, int64(win.YMax)-int64(win.YMin)+1
	if w64 < 1 || h64 < 1 || w64 > MaxSize || h64 > MaxSize || w64*h64 > 1<<31 {
		return nil, bad("data window %v", win)
	}
	out.Width, out.Height = int(w64), int(h64)
	// Channel list.
	for p := 0; ; {
		if p >= len(chl) {
			return nil, bad("channel list not terminated")
		}
		if chl[p] == 0 {
			break
		}
		name, q, err := cstring(chl, p)
		if err != nil {
			return nil, err
		}
		if q+16 > len(chl) {
			return nil, bad("channel %s truncated", name)
		}
		pt := int32(le.Uint32(chl[q:]))
		xs, ys := int32(le.Uint32(chl[q+8:])), int32(le.Uint32(chl[q+12:]))
		p = q + 16
		if xs != 1 || ys != 1 {
			return nil, bad("channel %s: subsampled channels are not supported", name)
		}
		var t PixelType
		switch pt {
		case 1:
			t = Half
		case 2:
			t = Float
		default:
			return nil, bad("channel %s: pixel type %d is not supported", name, pt)
		}
		if len(out.Channels) > 0 && out.Channels[len(out.Channels)-1].Name >= name {
			return nil, bad("channel %s out of order", name)
		}
		out.Channels = append(out.Channels, Channel{Name: name, Type: t})
	}
	if len(out.Channels) == 0 {
		return nil, bad("no channels")
	}
	var lines int
	switch out.Compression {
	case 0, 2:
		lines = 1
	case 3:
		lines = 16
	default:
		return nil, bad("compression %d is not supported", out.Compression)
	}
	n := out.Width * out.Height
	lineBytes := 0
	for i := range out.Channels {
		out.Channels[i].Pix = make([]float32, n)
		lineBytes += out.Channels[i].Type.size() * out.Width
	}
	nBlocks := (out.Height + lines - 1) / lines
	if pos+8*nBlocks > len(d) {
		return nil, bad("line offset table truncated")
	}
	done := make([]bool, nBlocks)
	for i := range nBlocks {
		off := le.Uint64(d[pos+8*i:])
		if off > uint64(len(d)) || off+8 > uint64(len(d)) {
			return nil, bad("block %d offset %d outside the file", i, off)
		}
		b := d[off:]
		y := int64(int32(le.Uint32(b))) - int64(win.YMin)
		size := int64(int32(le.Uint32(b[4:])))
		if y < 0 || y >= int64(out.Height) || y%int64(lines) != 0 {
			return nil, bad("block %d at line %d", i, y)
		}
		k := int(y) / lines
		if done[k] {
			return nil, bad("block for line %d twice", y)
		}
		done[k] = true
		if size < 0 || size > int64(len(b)-8) {
			return nil, bad("block %d: size %d", i, size)
		}
		y0 := int(y)
		y1 := min(out.Height, y0+lines)
		want := (y1 - y0) * lineBytes
		raw := b[8 : 8+size]
		if int(size) < want {
			if out.Compression == 0 {
				return nil, bad("block %d: %d bytes, want %d", i, size, want)
			}
			var err error
			if raw, err = unzip(raw, want); err != nil {
				return nil, bad("block %d: %v", i, err)
			}
		} else if int(size) != want {
			return nil, bad("block %d: %d bytes, want %d", i, size, want)
		}
		for yy := y0; yy < y1; yy++ {
			for ci := range out.Channels {
				c := &out.Channels[ci]
				row := c.Pix[yy*out.Width : (yy+1)*out.Width]
				if c.Type == Float {
					for x := range row {
						row[x] = math.Float32frombits(le.Uint32(raw[4*x:]))
					}
					raw = raw[4*out.Width:]
					continue
				}
				for x := range row {
					row[x] = Float32FromHalf(le.Uint16(raw[2*x:]))
				}
				raw = raw[2*out.Width:]
			}
		}
	}
	if i := slices.Index(done, false); i >= 0 {
		return nil, bad("no block for line %d", i*lines)
	}
	return out, nil
}

// unzip inverts the ZIP block transform: zlib, predictor, byte split.
func unzip(data []byte, want int) ([]byte, error) {
	zr, err := zlib.NewReader(bytes.NewReader(data))
	if err != nil {
		return nil, err
	}
	t := make([]byte, want)
	if _, err := io.ReadFull(zr, t); err != nil {
		return nil, fmt.Errorf("zlib: %v", err)
	}
	if n, _ := zr.Read(make([]byte, 1)); n != 0 {
		return nil, fmt.Errorf("zlib: more than %d bytes", want)
	}
	for i := 1; i < len(t); i++ {
		t[i] = t[i-1] + t[i] - 128
	}
	raw := make([]byte, want)
	h := (want + 1) / 2
	for i := 0; i < want/2; i++ {
		raw[2*i] = t[i]
		raw[2*i+1] = t[h+i]
	}
	if want%2 == 1 {
		raw[want-1] = t[h-1]
	}
	return raw, nil
}
