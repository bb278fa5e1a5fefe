package catalog

import (
	"errors"
	"strconv"
	"strings"
)

// Sentinel errors. Readers wrap them in a *ParseError that names the file,
// line and field; test for them with errors.Is.
var (
	// ErrUnknownFormat: the content matches no supported catalogue format.
	ErrUnknownFormat = errors.New("unknown catalogue format")
	// ErrNotNumber: a numeric field holds text that is not a number.
	ErrNotNumber = errors.New("not a number")
	// ErrNotFinite: a numeric field holds NaN or ±Inf (or overflows float64).
	ErrNotFinite = errors.New("value is NaN or infinite")
	// ErrOutOfRange: a value lies outside the range its field allows.
	ErrOutOfRange = errors.New("value out of range")
	// ErrLineTooLong: a line is longer than ReadOptions.MaxLineBytes.
	ErrLineTooLong = errors.New("line too long")
	// ErrTooManyRows: the file has, or declares, more rows than
	// ReadOptions.MaxRows.
	ErrTooManyRows = errors.New("too many rows")
	// ErrDecompressedTooLarge: a gzip stream inflates past
	// ReadOptions.MaxDecompressedBytes or past the allowed compression ratio
	// (a "gzip bomb").
	ErrDecompressedTooLarge = errors.New("decompressed data too large")
	// ErrTruncated: the input ends in the middle of a gzip stream or a cache.
	ErrTruncated = errors.New("truncated input")
	// ErrCorrupt: a gzip stream or cache fails its checksum or structure.
	ErrCorrupt = errors.New("corrupt input")
	// ErrMissingColumn: a header lacks a column the format or ColumnMap needs.
	ErrMissingColumn = errors.New("missing column")
	// ErrDuplicateColumn: two header columns have the same name.
	ErrDuplicateColumn = errors.New("duplicate column name")
	// ErrFieldCount: a delimited row has a different number of fields than
	// its header, or too few fields for its format.
	ErrFieldCount = errors.New("wrong number of fields")
	// ErrNoRows: the input holds no star at all.
	ErrNoRows = errors.New("no stars in input")
	// ErrBadCache: a binary cache has a wrong magic, version or layout.
	ErrBadCache = errors.New("not a valid skyframe catalogue cache")
)

// ParseError reports a problem at one place of a catalogue file. Its message
// reads "catalog: file:line: field X: value "v": reason", leaving out the
// parts that are unknown.
type ParseError struct {
	File  string // file name as given to Open or Read
	Line  int    // 1-based line number; 0 when not tied to a line
	Field string // field or column name; empty when not tied to a field
	Value string // offending text, shortened to 40 bytes
	Err   error  // underlying reason, often one of the sentinels above
}

func (e *ParseError) Error() string {
	var b strings.Builder
	b.WriteString("catalog: ")
	if e.File != "" {
		b.WriteString(e.File)
	} else {
		b.WriteString("<input>")
	}
	if e.Line > 0 {
		b.WriteByte(':')
		b.WriteString(strconv.Itoa(e.Line))
	}
	b.WriteString(": ")
	if e.Field != "" {
		b.WriteString("field ")
		b.WriteString(e.Field)
		b.WriteString(": ")
	}
	if e.Value != "" {
		b.WriteString("value ")
		b.WriteString(strconv.Quote(e.Value))
		b.WriteString(": ")
	}
	if e.Err != nil {
		b.WriteString(e.Err.Error())
	}
	return b.String()
}

// Unwrap returns the underlying reason.
func (e *ParseError) Unwrap() error { return e.Err }

// shortValue keeps error messages bounded for hostile input.
func shortValue(b []byte) string {
	const max = 40
	if len(b) > max {
		return string(b[:max]) + "..."
	}
	return string(b)
}
