package imgfile

import (
	"bufio"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math"
	"regexp"
	"strconv"
	"strings"

	"github.com/skyframe/skyframe/camera"
)

// References for this file: FITS Standard version 4.0 (IAU FITS Working
// Group 2016, "Definition of the Flexible Image Transport System"), cited
// below as "FITS 4.0 §n".

const (
	fitsBlock = 2880 // bytes per logical record, FITS 4.0 §3.1
	fitsCard  = 80   // bytes per header keyword record, FITS 4.0 §4.1.1
)

// Card is one FITS header keyword record (FITS 4.0 §4.1).
//
// Value is nil (an undefined value, or no value for the commentary keywords
// COMMENT, HISTORY and the blank keyword), a bool (written T or F), an
// integer (int, int32, int64), a float (float32, float64; NaN and ±Inf are
// not representable and rejected) or a string. ReadFITSHeader returns
// integers as int64 and reals as float64.
type Card struct {
	Key     string
	Value   any
	Comment string
}

// FITSHeader is an ordered list of header cards.
type FITSHeader []Card

// Get returns the first card with the given keyword.
func (h FITSHeader) Get(key string) (Card, bool) {
	for _, c := range h {
		if c.Key == key {
			return c, true
		}
	}
	return Card{}, false
}

// ErrFITSKey reports a missing header keyword or one whose value has the
// wrong type.
var ErrFITSKey = errors.New("imgfile: FITS keyword")

// Float returns the numeric value of key (an integer value is converted).
func (h FITSHeader) Float(key string) (float64, error) {
	c, ok := h.Get(key)
	if !ok {
		return 0, fmt.Errorf("%w %s: missing", ErrFITSKey, key)
	}
	switch v := c.Value.(type) {
	case float64:
		return v, nil
	case int64:
		return float64(v), nil
	}
	return 0, fmt.Errorf("%w %s: value %v is not a number", ErrFITSKey, key, c.Value)
}

// Int returns the integer value of key.
func (h FITSHeader) Int(key string) (int64, error) {
	c, ok := h.Get(key)
	if !ok {
		return 0, fmt.Errorf("%w %s: missing", ErrFITSKey, key)
	}
	if v, ok := c.Value.(int64); ok {
		return v, nil
	}
	return 0, fmt.Errorf("%w %s: value %v is not an integer", ErrFITSKey, key, c.Value)
}

// String returns the string value of key.
func (h FITSHeader) String(key string) (string, error) {
	c, ok := h.Get(key)
	if !ok {
		return "", fmt.Errorf("%w %s: missing", ErrFITSKey, key)
	}
	if v, ok := c.Value.(string); ok {
		return v, nil
	}
	return "", fmt.Errorf("%w %s: value %v is not a string", ErrFITSKey, key, c.Value)
}

// ErrFITSCard reports a header card that cannot be written: a bad keyword,
// an unrepresentable value, a reserved or duplicated keyword.
var ErrFITSCard = errors.New("imgfile: bad FITS card")

// fitsReserved are the structural keywords WriteFITS writes itself.
var fitsReserved = map[string]bool{
	"SIMPLE": true, "BITPIX": true, "NAXIS": true, "NAXIS1": true,
	"NAXIS2": true, "NAXIS3": true, "EXTEND": true, "END": true,
	"BSCALE": true, "BZERO": true,
}

func isCommentary(key string) bool {
	return key == "COMMENT" || key == "HISTORY" || key == ""
}

// WriteFITS writes a single-HDU FITS file (FITS 4.0 §3.3, a primary header
// and primary data array) holding a width×height image of 32-bit IEEE
// floats (BITPIX = −32, big-endian, FITS 4.0 §5.3).
//
// pix is row-major with rows top to bottom, like Buffer.Pix: either one
// value per pixel (written as a 2-D image, NAXIS = 2) or three interleaved
// values R, G, B per pixel (written as a cube with NAXIS3 = 3: plane 1 R,
// plane 2 G, plane 3 B, each linear).
//
// FITS pixel (1,1) is the first pixel of the data array, and by the usual
// convention of FITS display programs, which draw the first row at the
// bottom, it is the lower-left pixel. WriteFITS therefore stores the bottom
// row first (the y axis is flipped), so that the image appears upright: the
// buffer pixel (x, y) with y counted downward becomes FITS pixel
// (x+1, height−y). The WCS keywords of WCSCards use the same convention.
//
// cards follow the mandatory keywords (FITS 4.0 §4.4.1) in the given order;
// they may not repeat a structural keyword (SIMPLE, BITPIX, NAXISn, EXTEND,
// BSCALE, BZERO, END) nor any other keyword except commentary ones. Long
// COMMENT or HISTORY texts are split across cards; comments on valued cards
// are truncated to fit the 80-byte card. Nothing is written if a card is
// invalid. The output is a pure function of the arguments: no DATE card is
// written unless the caller supplies one.
func WriteFITS(w io.Writer, width, height int, pix []float32, cards []Card) error {
	if width < 1 || height < 1 || width > MaxSize || height > MaxSize {
		return fmt.Errorf("%w: FITS image %d×%d, want 1..%d each", ErrSize, width, height, MaxSize)
	}
	n := width * height
	var channels int
	switch len(pix) {
	case n:
		channels = 1
	case 3 * n:
		channels = 3
	default:
		return fmt.Errorf("imgfile: FITS image %d×%d needs %d or %d values, have %d", width, height, n, 3*n, len(pix))
	}
	hdr := []Card{
		{"SIMPLE", true, "conforms to FITS Standard 4.0"},
		{"BITPIX", -32, "IEEE 754 single precision"},
	}
	if channels == 1 {
		hdr = append(hdr,
			Card{"NAXIS", 2, ""},
			Card{"NAXIS1", width, "[pixel] x, left to right"},
			Card{"NAXIS2", height, "[pixel] y, bottom to top"})
	} else {
		hdr = append(hdr,
			Card{"NAXIS", 3, ""},
			Card{"NAXIS1", width, "[pixel] x, left to right"},
			Card{"NAXIS2", height, "[pixel] y, bottom to top"},
			Card{"NAXIS3", 3, "planes: linear sRGB R, G, B"})
	}
	seen := map[string]bool{}
	for _, c := range cards {
		if fitsReserved[c.Key] {
			return fmt.Errorf("%w: keyword %s is written by WriteFITS", ErrFITSCard, c.Key)
		}
		if !isCommentary(c.Key) {
			if seen[c.Key] {
				return fmt.Errorf("%w: keyword %s repeated", ErrFITSCard, c.Key)
			}
			seen[c.Key] = true
		}
	}
	hdr = append(hdr, cards...)

	head := make([]byte, 0, fitsBlock)
	for _, c := range hdr {
		var err error
		head, err = appendCard(head, c)
		if err != nil {
			return err
		}
	}
	head = append(head, padCard("END")...)
	head = padTo(head, ' ')

	bw := bufio.NewWriterSize(w, 1<<16)
	if _, err := bw.Write(head); err != nil {
		return fmt.Errorf("imgfile: writing FITS header: %w", err)
	}
	// Data: NAXIS1 varies fastest, then NAXIS2, then NAXIS3 (FITS 4.0 §3.3.2).
	row := make([]byte, 4*width)
	for ch := range channels {
		for j := height - 1; j >= 0; j-- { // bottom row first
			src := pix[channels*j*width:]
			for i := range width {
				binary.BigEndian.PutUint32(row[4*i:], math.Float32bits(src[channels*i+ch]))
			}
			if _, err := bw.Write(row); err != nil {
				return fmt.Errorf("imgfile: writing FITS data: %w", err)
			}
		}
	}
	// Fill the last data block with zeros (FITS 4.0 §3.3.2).
	if r := (4 * channels * n) % fitsBlock; r != 0 {
		if _, err := bw.Write(make([]byte, fitsBlock-r)); err != nil {
			return fmt.Errorf("imgfile: writing FITS data: %w", err)
		}
	}
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("imgfile: writing FITS data: %w", err)
	}
	return nil
}

func padTo(b []byte, fill byte) []byte {
	for len(b)%fitsBlock != 0 {
		b = append(b, fill)
	}
	return b
}

func padCard(s string) string {
	return s + strings.Repeat(" ", fitsCard-len(s))
}

var fitsKeyRE = regexp.MustCompile(`^[A-Z0-9_-]{1,8}$`)

// appendCard formats one card or, for long commentary text, several.
func appendCard(b []byte, c Card) ([]byte, error) {
	if isCommentary(c.Key) {
		if c.Value != nil {
			return nil, fmt.Errorf("%w: commentary keyword %q takes no value, have %v", ErrFITSCard, c.Key, c.Value)
		}
		if err := checkASCII(c.Key, c.Comment); err != nil {
			return nil, err
		}
		// Bytes 9–80 hold the text (FITS 4.0 §4.4.2.4).
		text := c.Comment
		for {
			chunk := text[:min(len(text), 72)]
			b = append(b, padCard(fmt.Sprintf("%-8s%s", c.Key, chunk))...)
			text = text[len(chunk):]
			if text == "" {
				return b, nil
			}
		}
	}
	if !fitsKeyRE.MatchString(c.Key) {
		return nil, fmt.Errorf("%w: keyword %q: want 1–8 of A–Z 0–9 - _", ErrFITSCard, c.Key)
	}
	val, err := fitsValue(c.Key, c.Value)
	if err != nil {
		return nil, err
	}
	if err := checkASCII(c.Key, c.Comment); err != nil {
		return nil, err
	}
	// Bytes 1–8 keyword, 9–10 "= ", value from byte 11; fixed format puts
	// numbers and logicals right-justified in bytes 11–30 (§4.2), strings
	// start with the quote in byte 11.
	s := fmt.Sprintf("%-8s= ", c.Key)
	if _, isStr := c.Value.(string); isStr || len(val) > 20 {
		s += val
	} else {
		s += fmt.Sprintf("%20s", val)
	}
	if len(s) > fitsCard {
		return nil, fmt.Errorf("%w: keyword %s: value %s too long for one card", ErrFITSCard, c.Key, val)
	}
	if c.Comment != "" && len(s)+3 < fitsCard {
		s += " / " + c.Comment
		s = s[:min(len(s), fitsCard)]
	}
	return append(b, padCard(s)...), nil
}

func checkASCII(key, s string) error {
	for i := 0; i < len(s); i++ {
		if s[i] < 32 || s[i] > 126 {
			return fmt.Errorf("%w: keyword %s: byte %#x in %q is not printable ASCII (FITS 4.0 §4.1.2)", ErrFITSCard, key, s[i], s)
		}
	}
	return nil
}

// fitsValue formats a value field (FITS 4.0 §4.2).
func fitsValue(key string, v any) (string, error) {
	switch v := v.(type) {
	case nil:
		return "", nil
	case bool:
		if v {
			return "T", nil
		}
		return "F", nil
	case int:
		return strconv.FormatInt(int64(v), 10), nil
	case int32:
		return strconv.FormatInt(int64(v), 10), nil
	case int64:
		return strconv.FormatInt(v, 10), nil
	case float32:
		return fitsFloat(key, float64(v))
	case float64:
		return fitsFloat(key, v)
	case string:
		if err := checkASCII(key, v); err != nil {
			return "", err
		}
		// Quotes are doubled; the string is padded to at least 8
		// characters (§4.2.1.1); trailing blanks are not significant.
		q := strings.ReplaceAll(v, "'", "''")
		if len(q) < 8 {
			q += strings.Repeat(" ", 8-len(q))
		}
		return "'" + q + "'", nil
	}
	return "", fmt.Errorf("%w: keyword %s: unsupported value type %T", ErrFITSCard, key, v)
}

// fitsFloat writes the shortest decimal that reads back as exactly v, with
// a decimal point and an E exponent where shorter (§4.2.4).
func fitsFloat(key string, v float64) (string, error) {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "", fmt.Errorf("%w: keyword %s: value %v is not representable", ErrFITSCard, key, v)
	}
	if v == 0 {
		v = 0 // write −0 as 0
	}
	withPoint := func(s string) string {
		if strings.ContainsAny(s, ".") {
			return s
		}
		if i := strings.IndexByte(s, 'E'); i >= 0 {
			return s[:i] + ".0" + s[i:]
		}
		return s + ".0"
	}
	g := withPoint(strconv.FormatFloat(v, 'G', -1, 64))
	e := withPoint(strconv.FormatFloat(v, 'E', -1, 64))
	if len(e) < len(g) {
		return e, nil
	}
	return g, nil
}

// ErrFITSFormat reports input that ReadFITSHeader or ReadFITS cannot parse.
var ErrFITSFormat = errors.New("imgfile: malformed FITS")

// ReadFITSHeader reads the primary header of a FITS file up to and
// including its END card and the rest of that block, leaving r at the start
// of the data. It understands the value types that WriteFITS writes;
// commentary cards keep their text in Comment.
func ReadFITSHeader(r io.Reader) (FITSHeader, error) {
	var h FITSHeader
	block := make([]byte, fitsBlock)
	for nblock := 0; ; nblock++ {
		if _, err := io.ReadFull(r, block); err != nil {
			return nil, fmt.Errorf("%w: header block %d: %v", ErrFITSFormat, nblock, err)
		}
		for i := 0; i < fitsBlock; i += fitsCard {
			line := string(block[i : i+fitsCard])
			key := strings.TrimRight(line[:8], " ")
			if nblock == 0 && i == 0 && key != "SIMPLE" {
				return nil, fmt.Errorf("%w: first keyword %q, want SIMPLE", ErrFITSFormat, key)
			}
			if key == "END" {
				return h, nil
			}
			c, err := parseCard(line)
			if err != nil {
				return nil, fmt.Errorf("%w: card %d: %v", ErrFITSFormat, len(h)+1, err)
			}
			h = append(h, c)
		}
	}
}

func parseCard(line string) (Card, error) {
	key := strings.TrimRight(line[:8], " ")
	if line[8:10] != "= " || isCommentary(key) {
		return Card{Key: key, Comment: strings.TrimRight(line[8:], " ")}, nil
	}
	rest := line[10:]
	trimmed := strings.TrimLeft(rest, " ")
	c := Card{Key: key}
	var valText string
	if strings.HasPrefix(trimmed, "'") {
		// String: find the closing quote, skipping doubled quotes.
		var sb strings.Builder
		i := 1
		for {
			if i >= len(trimmed) {
				return c, fmt.Errorf("keyword %s: unterminated string", key)
			}
			if trimmed[i] == '\'' {
				if i+1 < len(trimmed) && trimmed[i+1] == '\'' {
					sb.WriteByte('\'')
					i += 2
					continue
				}
				break
			}
			sb.WriteByte(trimmed[i])
			i++
		}
		c.Value = strings.TrimRight(sb.String(), " ")
		trimmed = trimmed[i+1:]
	} else {
		slash := strings.IndexByte(trimmed, '/')
		if slash < 0 {
			slash = len(trimmed)
		}
		valText = strings.TrimSpace(trimmed[:slash])
		trimmed = trimmed[slash:]
		switch {
		case valText == "":
			c.Value = nil
		case valText == "T":
			c.Value = true
		case valText == "F":
			c.Value = false
		case !strings.ContainsAny(valText, ".EeDd"):
			v, err := strconv.ParseInt(valText, 10, 64)
			if err != nil {
				return c, fmt.Errorf("keyword %s: integer %q: %v", key, valText, err)
			}
			c.Value = v
		default:
			v, err := strconv.ParseFloat(strings.NewReplacer("D", "E", "d", "e").Replace(valText), 64)
			if err != nil {
				return c, fmt.Errorf("keyword %s: real %q: %v", key, valText, err)
			}
			c.Value = v
		}
	}
	trimmed = strings.TrimSpace(trimmed)
	if strings.HasPrefix(trimmed, "/") {
		c.Comment = strings.TrimSpace(trimmed[1:])
	} else if trimmed != "" {
		return c, fmt.Errorf("keyword %s: unexpected %q after the value", key, trimmed)
	}
	return c, nil
}

// FITSImage is a FITS primary array read back by ReadFITS.
type FITSImage struct {
	Header        FITSHeader
	Width, Height int
	// Channels is 1 for a 2-D image, NAXIS3 for a cube.
	Channels int
	// Pix holds Channels interleaved values per pixel, rows top to bottom:
	// the layout WriteFITS takes, so a round trip returns its input.
	Pix []float32
}

// ReadFITS reads a FITS file with a BITPIX = −32 primary array of 2 or 3
// axes, undoing the row order of WriteFITS. It is meant for checking
// WriteFITS output, not as a general FITS reader.
func ReadFITS(r io.Reader) (*FITSImage, error) {
	h, err := ReadFITSHeader(r)
	if err != nil {
		return nil, err
	}
	get := func(k string) (int, error) {
		v, err := h.Int(k)
		if err != nil {
			return 0, fmt.Errorf("%w: %v", ErrFITSFormat, err)
		}
		return int(v), nil
	}
	bitpix, err := get("BITPIX")
	if err != nil {
		return nil, err
	}
	naxis, err := get("NAXIS")
	if err != nil {
		return nil, err
	}
	if bitpix != -32 || naxis < 2 || naxis > 3 {
		return nil, fmt.Errorf("%w: BITPIX %d NAXIS %d, want −32 and 2 or 3", ErrFITSFormat, bitpix, naxis)
	}
	img := &FITSImage{Header: h, Channels: 1}
	if img.Width, err = get("NAXIS1"); err != nil {
		return nil, err
	}
	if img.Height, err = get("NAXIS2"); err != nil {
		return nil, err
	}
	if naxis == 3 {
		if img.Channels, err = get("NAXIS3"); err != nil {
			return nil, err
		}
	}
	w, ht, ch := img.Width, img.Height, img.Channels
	if w < 1 || ht < 1 || ch < 1 || w > MaxSize || ht > MaxSize || ch > 16 {
		return nil, fmt.Errorf("%w: array %d×%d×%d out of range", ErrFITSFormat, w, ht, ch)
	}
	// Read the data before allocating for it, so a header that declares a
	// large array over a short input costs no more memory than the input.
	need := int64(4 * w * ht * ch)
	data, err := io.ReadAll(io.LimitReader(bufio.NewReaderSize(r, 1<<16), need))
	if err != nil {
		return nil, fmt.Errorf("%w: data: %v", ErrFITSFormat, err)
	}
	if int64(len(data)) < need {
		n := len(data) / (4 * w)
		return nil, fmt.Errorf("%w: data plane %d row %d: %v", ErrFITSFormat, n/ht+1, n%ht+1, io.ErrUnexpectedEOF)
	}
	img.Pix = make([]float32, w*ht*ch)
	for c := range ch {
		for j := ht - 1; j >= 0; j-- {
			row := data[:4*w]
			data = data[4*w:]
			dst := img.Pix[ch*j*w:]
			for i := range w {
				dst[ch*i+c] = math.Float32frombits(binary.BigEndian.Uint32(row[4*i:]))
			}
		}
	}
	return img, nil
}

// FITSMeta describes the rendered frame's physical state as FITS header
// cards (see Cards). Strings left empty are omitted; numbers are written as
// given, except where noted.
type FITSMeta struct {
	// Object is written as OBJECT, e.g. the name of the target star.
	Object string
	// Creator is the program and version, written as CREATOR.
	Creator string
	// Date is the file creation date DATE, "YYYY-MM-DD" or
	// "YYYY-MM-DDThh:mm:ss[.s…]" in UTC (FITS 4.0 §4.4.2.1, §9.1.1). It is
	// only written when the caller supplies it: the library never reads the
	// clock, so files are reproducible.
	Date string
	// Unit is the pixel value unit BUNIT. Empty writes BUNIT = '', the
	// FITS and astropy spelling of a dimensionless value: skyframe's data
	// are linear sRGB where 1 is full scale at the exposure, and
	// ScalePerLux converts them to illuminance.
	Unit string
	// ScalePerLux is the data value per lux of illuminance at the observer
	// (the frame's photometric scale, the sidecar's scale_per_lux), written
	// as LUXSCALE when positive: a pixel's value / LUXSCALE is the
	// illuminance in lux that the light falling in that pixel gives (for
	// the G plane and a white source; R, G and B are linear sRGB).
	ScalePerLux float64
	// ExtendedScale, when positive and not 1, is the factor on extended
	// light (star discs, CMB, unresolved starlight) against ScalePerLux in
	// the data, as a reduced preview draws it (EXTSCALE).
	ExtendedScale float64
	// White names the white point the colours are adapted to (WHITEPT).
	White string
	// Layers lists the linear contributions summed in the data, e.g.
	// "stars", "cmb", "unresolved" (LAYERS, comma-separated).
	Layers []string
	// Beta and Gamma are the ship's speed v/c and Lorentz factor, written as
	// BETA and GAMMA when Gamma ≥ 1.
	Beta, Gamma float64
	// MotionRA and MotionDec give the direction of motion (ICRS, degrees),
	// written as VELRA, VELDEC when Gamma > 1.
	MotionRA, MotionDec float64
	// Position is the observer's position (ICRS, parsecs from the Sun),
	// written as OBSX, OBSY, OBSZ.
	Position [3]float64
	// Exposure is the observed V magnitude that reaches full scale,
	// written as EXPOSURE.
	Exposure float64
	// Limit is the faint magnitude limit of the stars drawn, MAGLIM,
	// written when not zero.
	Limit float64
	// FWHM is the point-spread function's full width at half maximum in
	// pixels, PSFFWHM, written when positive.
	FWHM float64
	// Beaming names the beaming law, BEAMING.
	Beaming string
	// Projection names the projection kind, PROJ; FOV and Tilt (degrees)
	// are written as FOV when positive and TILT when not zero.
	Projection string
	FOV, Tilt  float64
	// Catalog names the star catalogue, CATALOG; Stars is the number of
	// stars drawn, NSTARS, written when positive.
	Catalog string
	Stars   int
}

var fitsDateRE = regexp.MustCompile(`^[0-9]{4}-[0-9]{2}-[0-9]{2}(T[0-9]{2}:[0-9]{2}:[0-9]{2}(\.[0-9]+)?)?$`)

// Cards returns the header cards for m, in a fixed order.
func (m FITSMeta) Cards() ([]Card, error) {
	var c []Card
	str := func(key, v, comment string) {
		if v != "" {
			c = append(c, Card{key, v, comment})
		}
	}
	str("OBJECT", m.Object, "target")
	str("CREATOR", m.Creator, "software that wrote this file")
	if m.Date != "" {
		if !fitsDateRE.MatchString(m.Date) {
			return nil, fmt.Errorf("%w: DATE %q, want YYYY-MM-DD[Thh:mm:ss[.s]]", ErrFITSCard, m.Date)
		}
		c = append(c, Card{"DATE", m.Date, "file creation date (UTC)"})
	}
	if m.Unit == "" {
		c = append(c, Card{"BUNIT", "", "dimensionless: linear sRGB, 1 = full scale"})
	} else {
		c = append(c, Card{"BUNIT", m.Unit, "linear sRGB"})
	}
	if m.ScalePerLux > 0 {
		c = append(c, Card{"LUXSCALE", m.ScalePerLux, "[1/lx] value per lux: lux = value / LUXSCALE"})
	}
	if m.ExtendedScale > 0 && m.ExtendedScale != 1 {
		c = append(c, Card{"EXTSCALE", m.ExtendedScale, "extended light x this (a preview)"})
	}
	str("WHITEPT", m.White, "white point the sRGB is adapted to")
	if len(m.Layers) > 0 {
		c = append(c, Card{"LAYERS", strings.Join(m.Layers, ","), "linear contributions summed in the data"})
	}
	if m.Gamma >= 1 {
		c = append(c,
			Card{"BETA", m.Beta, "ship speed v/c"},
			Card{"GAMMA", m.Gamma, "Lorentz factor"})
		if m.Gamma > 1 {
			c = append(c,
				Card{"VELRA", m.MotionRA, "[deg] direction of motion, ICRS RA"},
				Card{"VELDEC", m.MotionDec, "[deg] direction of motion, ICRS Dec"})
		}
	}
	c = append(c,
		Card{"OBSX", m.Position[0], "[pc] observer position, ICRS x from Sun"},
		Card{"OBSY", m.Position[1], "[pc] observer position, ICRS y from Sun"},
		Card{"OBSZ", m.Position[2], "[pc] observer position, ICRS z from Sun"},
		Card{"EXPOSURE", m.Exposure, "[mag] observed V at full scale"})
	if m.Limit != 0 {
		c = append(c, Card{"MAGLIM", m.Limit, "[mag] faintest observed V drawn"})
	}
	if m.FWHM > 0 {
		c = append(c, Card{"PSFFWHM", m.FWHM, "[pixel] star image FWHM"})
	}
	str("BEAMING", m.Beaming, "beaming law")
	str("PROJ", m.Projection, "projection")
	if m.FOV > 0 {
		c = append(c, Card{"FOV", m.FOV, "[deg] field of view"})
	}
	if m.Tilt != 0 {
		c = append(c, Card{"TILT", m.Tilt, "[deg] fisheye axis tilt toward up"})
	}
	str("CATALOG", m.Catalog, "star catalogue")
	if m.Stars > 0 {
		c = append(c, Card{"NSTARS", m.Stars, "stars drawn"})
	}
	for _, card := range c {
		if _, err := fitsValue(card.Key, card.Value); err != nil {
			return nil, err
		}
	}
	return c, nil
}

// MaxSize is the largest width or height WriteFITS and ReadFITS accept, in
// pixels (the projections' limit).
const MaxSize = camera.MaxSize

// ErrSize reports an image size outside 1..MaxSize.
var ErrSize = errors.New("imgfile: image size out of range")
