package exr

import (
	"encoding/binary"
	"fmt"
	"math"
)

// Attribute is one named header value. The Go type of Value selects the
// OpenEXR attribute type:
//
//	string          string
//	[]string        stringvector
//	float64         double
//	float32         float
//	int32, int      int
//	V2f             v2f
//	V3f             v3f
//	Box2i           box2i
//	Chromaticities  chromaticities
//	Rational        rational
//	Envmap          envmap
//	Opaque          any other type, kept as raw bytes (from Decode)
type Attribute struct {
	Name  string
	Value any
}

// V2f is a pair of floats (type v2f).
type V2f [2]float32

// V3f is a triple of floats (type v3f).
type V3f [3]float32

// Box2i is an integer rectangle, corners inclusive (type box2i).
type Box2i struct{ XMin, YMin, XMax, YMax int32 }

// Chromaticities are the CIE 1931 xy chromaticities of the red, green and
// blue primaries and of the white point of RGB data (type chromaticities).
type Chromaticities struct {
	Red, Green, Blue, White [2]float32
}

// Rational is a fraction N/D (type rational), e.g. frames per second.
type Rational struct {
	N int32
	D uint32
}

// Envmap says that an image is an environment map (type envmap).
type Envmap uint8

// Environment map kinds (Standard Optional Attributes, "envmap").
const (
	// EnvLatLong is a latitude-longitude (equirectangular) map.
	EnvLatLong Envmap = 0
	// EnvCube is a cube map.
	EnvCube Envmap = 1
)

// Opaque is an attribute value of a type this package does not interpret.
type Opaque struct {
	Type string
	Data []byte
}

// required names the attributes the encoder writes itself.
var required = map[string]bool{
	"channels": true, "compression": true, "dataWindow": true, "displayWindow": true,
	"lineOrder": true, "pixelAspectRatio": true, "screenWindowCenter": true, "screenWindowWidth": true,
}

// appendAttr appends the encoded attribute (name, type, size, value).
func appendAttr(b []byte, name, typ string, value []byte) []byte {
	b = append(b, name...)
	b = append(b, 0)
	b = append(b, typ...)
	b = append(b, 0)
	b = binary.LittleEndian.AppendUint32(b, uint32(len(value)))
	return append(b, value...)
}

func appendF32(b []byte, v ...float32) []byte {
	for _, f := range v {
		b = binary.LittleEndian.AppendUint32(b, math.Float32bits(f))
	}
	return b
}

func appendI32(b []byte, v ...int32) []byte {
	for _, i := range v {
		b = binary.LittleEndian.AppendUint32(b, uint32(i))
	}
	return b
}

// encodeValue returns the OpenEXR type name and the value bytes of v.
func encodeValue(name string, v any) (string, []byte, error) {
	switch x := v.(type) {
	case string:
		return "string", []byte(x), nil
	case []string:
		var b []byte
		for _, s := range x {
			b = appendI32(b, int32(len(s)))
			b = append(b, s...)
		}
		return "stringvector", b, nil
	case float64:
		return "double", binary.LittleEndian.AppendUint64(nil, math.Float64bits(x)), nil
	case float32:
		return "float", appendF32(nil, x), nil
	case int32:
		return "int", appendI32(nil, x), nil
	case int:
		if x < math.MinInt32 || x > math.MaxInt32 {
			return "", nil, fmt.Errorf("exr: attribute %s: int %d out of 32-bit range", name, x)
		}
		return "int", appendI32(nil, int32(x)), nil
	case V2f:
		return "v2f", appendF32(nil, x[:]...), nil
	case V3f:
		return "v3f", appendF32(nil, x[:]...), nil
	case Box2i:
		return "box2i", appendI32(nil, x.XMin, x.YMin, x.XMax, x.YMax), nil
	case Chromaticities:
		return "chromaticities", appendF32(nil, x.Red[0], x.Red[1], x.Green[0], x.Green[1], x.Blue[0], x.Blue[1], x.White[0], x.White[1]), nil
	case Rational:
		return "rational", binary.LittleEndian.AppendUint32(appendI32(nil, x.N), x.D), nil
	case Envmap:
		return "envmap", []byte{byte(x)}, nil
	case Opaque:
		if x.Type == "" {
			return "", nil, fmt.Errorf("exr: attribute %s: opaque value without a type name", name)
		}
		return x.Type, x.Data, nil
	}
	return "", nil, fmt.Errorf("exr: attribute %s: unsupported value type %T", name, v)
}

// decodeValue interprets the value bytes of an attribute of type typ.
func decodeValue(typ string, d []byte) (any, error) {
	le := binary.LittleEndian
	need := func(n int) error {
		if len(d) != n {
			return fmt.Errorf("%s value of %d bytes, want %d", typ, len(d), n)
		}
		return nil
	}
	f32 := func(i int) float32 { return math.Float32frombits(le.Uint32(d[4*i:])) }
	i32 := func(i int) int32 { return int32(le.Uint32(d[4*i:])) }
	switch typ {
	case "string":
		return string(d), nil
	case "stringvector":
		var out []string
		for len(d) > 0 {
			if len(d) < 4 {
				return nil, fmt.Errorf("stringvector truncated")
			}
			n := int(int32(le.Uint32(d)))
			if n < 0 || n > len(d)-4 {
				return nil, fmt.Errorf("stringvector entry of %d bytes", n)
			}
			out = append(out, string(d[4:4+n]))
			d = d[4+n:]
		}
		return out, nil
	case "double":
		if err := need(8); err != nil {
			return nil, err
		}
		return math.Float64frombits(le.Uint64(d)), nil
	case "float":
		if err := need(4); err != nil {
			return nil, err
		}
		return f32(0), nil
	case "int":
		if err := need(4); err != nil {
			return nil, err
		}
		return i32(0), nil
	case "v2f":
		if err := need(8); err != nil {
			return nil, err
		}
		return V2f{f32(0), f32(1)}, nil
	case "v3f":
		if err := need(12); err != nil {
			return nil, err
		}
		return V3f{f32(0), f32(1), f32(2)}, nil
	case "box2i":
		if err := need(16); err != nil {
			return nil, err
		}
		return Box2i{i32(0), i32(1), i32(2), i32(3)}, nil
	case "chromaticities":
		if err := need(32); err != nil {
			return nil, err
		}
		return Chromaticities{Red: [2]float32{f32(0), f32(1)}, Green: [2]float32{f32(2), f32(3)},
			Blue: [2]float32{f32(4), f32(5)}, White: [2]float32{f32(6), f32(7)}}, nil
	case "rational":
		if err := need(8); err != nil {
			return nil, err
		}
		return Rational{N: i32(0), D: le.Uint32(d[4:])}, nil
	case "envmap":
		if err := need(1); err != nil {
			return nil, err
		}
		return Envmap(d[0]), nil
	}
	return Opaque{Type: typ, Data: append([]byte(nil), d...)}, nil
}
