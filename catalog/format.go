package catalog

import (
	"bufio"
	"bytes"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"strconv"
	"strings"
)

// Format names a catalogue file format.
type Format int

const (
	// FormatAuto (the zero value) asks the reader to detect the format from
	// the content, with the file extension only as a tie-breaking hint.
	FormatAuto Format = iota
	// FormatBSC5: Yale Bright Star Catalogue, 5th Revised Ed. (Hoffleit &
	// Warren 1991), CDS V/50 file "catalog", fixed-width, J2000 positions.
	FormatBSC5
	// FormatHipparcos: The Hipparcos Catalogue (ESA 1997), CDS I/239 file
	// hip_main.dat, '|'-separated fields H0…H77, positions at J1991.25.
	FormatHipparcos
	// FormatHipparcos2007: Hipparcos, the New Reduction (van Leeuwen 2007),
	// CDS I/311 file hip2.dat, fixed-width, positions at J1991.25.
	FormatHipparcos2007
	// FormatGaiaCSV: a CSV export of the Gaia archive with at least the
	// columns source_id, ra, dec, parallax, phot_g_mean_mag, bp_rp.
	FormatGaiaCSV
	// FormatCSV: any comma- (or semicolon-) separated table with a header,
	// read through a ColumnMap.
	FormatCSV
	// FormatTSV: any tab-separated table with a header, read through a
	// ColumnMap.
	FormatTSV
	// FormatCache: skyframe's binary catalogue cache (see WriteCache).
	FormatCache
	// FormatParquet: an Apache Parquet file (magic "PAR1"): a Gaia table
	// (columns as FormatGaiaCSV), a generic table through a ColumnMap, or
	// the Stars layout of WriteParquet; see parquet.go.
	FormatParquet
)

var formatNames = [...]string{
	FormatAuto:          "auto",
	FormatBSC5:          "bsc5",
	FormatHipparcos:     "hipparcos",
	FormatHipparcos2007: "hipparcos2007",
	FormatGaiaCSV:       "gaia",
	FormatCSV:           "csv",
	FormatTSV:           "tsv",
	FormatCache:         "cache",
	FormatParquet:       "parquet",
}

// String returns the format's short name, as accepted by ParseFormat.
func (f Format) String() string {
	if f >= 0 && int(f) < len(formatNames) {
		return formatNames[f]
	}
	return fmt.Sprintf("Format(%d)", int(f))
}

// ParseFormat converts a short name ("bsc5", "hipparcos", "hipparcos2007",
// "gaia", "csv", "tsv", "cache", "parquet", "auto" or "") into a Format. A
// few aliases are accepted: "v50", "i239", "hip", "i311", "hip2",
// "gaia-csv", "pq".
func ParseFormat(s string) (Format, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "", "auto":
		return FormatAuto, nil
	case "bsc5", "bsc", "v50", "v/50":
		return FormatBSC5, nil
	case "hipparcos", "hip", "i239", "i/239", "hip_main":
		return FormatHipparcos, nil
	case "hipparcos2007", "hip2", "i311", "i/311":
		return FormatHipparcos2007, nil
	case "gaia", "gaia-csv", "gaiacsv":
		return FormatGaiaCSV, nil
	case "csv":
		return FormatCSV, nil
	case "tsv":
		return FormatTSV, nil
	case "cache", "skyfcat":
		return FormatCache, nil
	case "parquet", "pq":
		return FormatParquet, nil
	}
	return FormatAuto, fmt.Errorf("catalog: unknown format name %q (want bsc5, hipparcos, hipparcos2007, gaia, csv, tsv, cache or parquet)", s)
}

// --- format detection ---

var cacheMagic = []byte("SKYFCAT")

// ecsvMagic starts an ECSV table (Astropy APE 6, "Enhanced Character
// Separated Values", version 1.0): "# %ECSV 1.0", then "# ---" and a YAML
// header in lines starting "# ", then the column-name line and the data.
var ecsvMagic = []byte("# %ECSV ")

func detectFormat(br *bufio.Reader, name string, gz bool) (Format, error) {
	head, err := br.Peek(sniffBytes)
	if err != nil && err != io.EOF && err != bufio.ErrBufferFull {
		return FormatAuto, &ParseError{File: name, Line: 1, Err: mapReadErr(err, gz)}
	}
	atEOF := err == io.EOF
	head = bytes.TrimPrefix(head, utf8BOM)
	if bytes.HasPrefix(head, cacheMagic) {
		return FormatCache, nil
	}
	if bytes.HasPrefix(head, parquetMagic) {
		return FormatParquet, nil
	}
	if bytes.HasPrefix(head, ecsvMagic) {
		// An ECSV table (its YAML header may be longer than the sniffed
		// bytes): readDelimited reads the header and decides between
		// Gaia and a generic table from the column names.
		return FormatCSV, nil
	}
	var first []byte
	rest := head
	for len(rest) > 0 {
		i := bytes.IndexByte(rest, '\n')
		var ln []byte
		if i < 0 {
			if !atEOF && len(head) == sniffBytes {
				break
			}
			ln, rest = rest, nil
		} else {
			ln, rest = rest[:i], rest[i+1:]
		}
		ln = bytes.TrimRight(ln, "\r")
		if isBlank(ln) || ln[0] == '#' {
			continue
		}
		first = ln
		break
	}
	if first != nil {
		switch {
		case bytes.HasPrefix(first, []byte("H|")):
			return FormatHipparcos, nil
		case looksLikeHeader(first):
			return headerFormat(first), nil
		case looksLikeHip2(first):
			return FormatHipparcos2007, nil
		case looksLikeBSC5(first):
			return FormatBSC5, nil
		}
	}
	ext := strings.ToLower(filepath.Ext(strings.TrimSuffix(strings.ToLower(name), ".gz")))
	switch ext {
	case ".csv":
		return FormatCSV, nil
	case ".tsv", ".tab":
		return FormatTSV, nil
	}
	if len(head) == 0 {
		return FormatAuto, &ParseError{File: name, Err: fmt.Errorf("%w: input is empty", ErrNoRows)}
	}
	return FormatAuto, &ParseError{File: name, Line: 1, Err: ErrUnknownFormat}
}

// looksLikeHeader: a delimited line whose first field starts with a letter.
func looksLikeHeader(ln []byte) bool {
	if !bytes.ContainsAny(ln, ",\t;") {
		return false
	}
	t := bytes.TrimLeft(ln, " \"'")
	if len(t) == 0 {
		return false
	}
	c := t[0]
	return c == '_' || (c|0x20 >= 'a' && c|0x20 <= 'z')
}

func headerFormat(ln []byte) Format { return headerFormatDelim(ln, pickDelimiter(ln)) }

// headerFormatDelim is headerFormat with the delimiter known.
func headerFormatDelim(ln []byte, delim byte) Format {
	lower := strings.ToLower(string(ln))
	names := map[string]bool{}
	for _, f := range strings.Split(lower, string(delim)) {
		names[strings.Trim(strings.TrimSpace(f), "\"'")] = true
	}
	if names["source_id"] && names["phot_g_mean_mag"] {
		return FormatGaiaCSV
	}
	if delim == '\t' {
		return FormatTSV
	}
	return FormatCSV
}

func pickDelimiter(header []byte) byte {
	switch {
	case bytes.IndexByte(header, '\t') >= 0:
		return '\t'
	case bytes.IndexByte(header, ',') < 0 && bytes.IndexByte(header, ';') >= 0:
		return ';'
	}
	return ','
}

func looksLikeHip2(ln []byte) bool {
	if len(ln) < 136 || ln[14] != ' ' || ln[28] != ' ' {
		return false
	}
	if _, err := strconv.Atoi(string(bytes.TrimSpace(col(ln, 1, 6)))); err != nil {
		return false
	}
	ra, err1 := strconv.ParseFloat(string(bytes.TrimSpace(col(ln, 16, 28))), 64)
	de, err2 := strconv.ParseFloat(string(bytes.TrimSpace(col(ln, 30, 42))), 64)
	return err1 == nil && err2 == nil && ra >= 0 && ra <= 2*math.Pi+1e-9 && math.Abs(de) <= math.Pi/2+1e-9
}

func looksLikeBSC5(ln []byte) bool {
	if len(ln) < 107 {
		return false
	}
	if _, err := strconv.Atoi(string(bytes.TrimSpace(col(ln, 1, 4)))); err != nil {
		return false
	}
	pos := col(ln, 76, 90)
	if isBlank(pos) {
		return true
	}
	d := func(c byte) bool { return c >= '0' && c <= '9' }
	return d(ln[75]) && d(ln[76]) && (ln[83] == '+' || ln[83] == '-') && d(ln[84]) && d(ln[85])
}
