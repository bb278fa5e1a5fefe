package names

import (
	"bufio"
	"bytes"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"
	"strings"
	"unicode/utf8"
)

// Errors a names file can give, wrapped in a *ParseError.
var (
	// ErrFormat: a line does not have the columns of the IAU-CSN table.
	ErrFormat = errors.New("not an IAU-CSN row")
	// ErrUTF8: a line is not valid UTF-8 (the table's Greek column needs it).
	ErrUTF8 = errors.New("invalid UTF-8")
	// ErrDuplicate: the same proper name appears twice.
	ErrDuplicate = errors.New("duplicate name")
)

// ParseError names the file and line of a bad names file.
type ParseError struct {
	File  string // as given to Read
	Line  int    // 1-based; 0 when the error is about the whole file
	Field string // column name; empty when not tied to one
	Err   error
}

func (e *ParseError) Error() string {
	var b strings.Builder
	b.WriteString("names: ")
	if e.File != "" {
		b.WriteString(e.File)
	} else {
		b.WriteString("<input>")
	}
	if e.Line > 0 {
		b.WriteString(":" + strconv.Itoa(e.Line))
	}
	b.WriteString(": ")
	if e.Field != "" {
		b.WriteString("column " + e.Field + ": ")
	}
	b.WriteString(e.Err.Error())
	return b.String()
}

func (e *ParseError) Unwrap() error { return e.Err }

// Entry is one row of the IAU Catalog of Star Names.
type Entry struct {
	Name        string // proper name adopted by the WGSN, e.g. "Betelgeuse"
	Designation string // fiducial designation: "HR 2061", "GJ 699", "PSR B1257+12"
	HR          int    // Bright Star Catalogue number; 0 when the star has none
	ID          string // Bayer (SIMBAD abbreviation "alf", "tet01"), Flamsteed ("80") or variable-star id; "" for none
	Greek       string // the ID with the Bayer letter in UTF-8 ("α", "θ1"); "" for none
	Con         string // IAU constellation abbreviation, e.g. "Ori"
	Component   string // multiple-star component ("A", "Aa"); "" for none
	Vmag        float64
	HIP, HD     int     // 0 when none
	RA, Dec     float64 // ICRS degrees, epoch J2000.0
	Date        string  // date the WGSN adopted the name, YYYY-MM-DD
	Line        int     // line in the file
}

// Table is the names file: its entries in file order.
type Table struct {
	Entries []Entry
	Source  string // file name
}

// Credit is the attribution the IAU asks for wherever the names are shown.
const Credit = "Star names: IAU Catalog of Star Names, IAU Division C Working Group on Star Names (WGSN), CC BY 4.0"

// MaxLine bounds one line of a names file, in bytes.
const MaxLine = 4096

// ReadFile reads a names file.
func ReadFile(path string) (*Table, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("names: %w", err)
	}
	defer f.Close()
	return Read(f, path)
}

// Read reads the IAU-CSN table from r; file names the input in errors.
//
// Layout (the table's own header and notes): lines starting with '#' are
// comments; the first other line is the header, which must start with
// "Name" and name the "Designation" column; each later non-blank line is an
// entry of 13 columns: Name (may contain blanks, ends before the column
// where the header's "Designation" starts), Designation (one or more
// blank-separated words), then IDa, IDb, Con, component, WDS_J, Vmag, HIP,
// HD, RA, Dec, Date, each one word, "-" for none. A line that breaks this,
// is not UTF-8, names an unknown constellation, or repeats a proper name
// (compared as Index.Find compares them) is an error naming the line.
func Read(r io.Reader, file string) (*Table, error) {
	br := bufio.NewReader(r)
	t := &Table{Source: file}
	fail := func(line int, field string, err error) (*Table, error) {
		return nil, &ParseError{File: file, Line: line, Field: field, Err: err}
	}
	desigCol := -1
	seen := map[string]int{}
	for n := 1; ; n++ {
		raw, err := readLine(br)
		if err == io.EOF {
			break
		}
		if err != nil {
			if errors.Is(err, errLong) {
				return fail(n, "", fmt.Errorf("%w: line longer than %d bytes", ErrFormat, MaxLine))
			}
			return nil, fmt.Errorf("names: %s: %w", file, err)
		}
		if !utf8.Valid(raw) {
			return fail(n, "", ErrUTF8)
		}
		line := strings.TrimRight(string(raw), " \t\r")
		if line == "" || line[0] == '#' {
			continue
		}
		if desigCol < 0 {
			if !strings.HasPrefix(line, "Name") {
				return fail(n, "", fmt.Errorf("%w: want the header line starting with \"Name\" before the first entry", ErrFormat))
			}
			k := strings.Index(line, "Designation")
			if k < 0 {
				return fail(n, "", fmt.Errorf("%w: the header line names no Designation column", ErrFormat))
			}
			desigCol = utf8.RuneCountInString(line[:k])
			continue
		}
		e, field, err := parseEntry(line, desigCol)
		if err != nil {
			return fail(n, field, err)
		}
		e.Line = n
		key := foldName(e.Name)
		if prev, dup := seen[key]; dup {
			return fail(n, "Name", fmt.Errorf("%w %q (also on line %d)", ErrDuplicate, e.Name, prev))
		}
		seen[key] = n
		t.Entries = append(t.Entries, e)
	}
	if desigCol < 0 {
		return fail(0, "", fmt.Errorf("%w: no header line (\"Name  Designation …\"); is this the IAU Catalog of Star Names?", ErrFormat))
	}
	if len(t.Entries) == 0 {
		return fail(0, "", fmt.Errorf("%w: no entries", ErrFormat))
	}
	return t, nil
}

var errLong = errors.New("line too long")

// readLine returns the next line without its newline, or io.EOF.
func readLine(br *bufio.Reader) ([]byte, error) {
	var buf []byte
	for {
		chunk, err := br.ReadSlice('\n')
		buf = append(buf, chunk...)
		if len(buf) > MaxLine+1 {
			return nil, errLong
		}
		if err == bufio.ErrBufferFull {
			continue
		}
		if err == io.EOF {
			if len(buf) == 0 {
				return nil, io.EOF
			}
			return buf, nil
		}
		if err != nil {
			return nil, err
		}
		return bytes.TrimSuffix(buf, []byte{'\n'}), nil
	}
}

// fixedCols are the one-word columns after the designation.
var fixedCols = [...]string{"IDa", "IDb", "Con", "#", "WDS_J", "Vmag", "HIP", "HD", "RA(J2000)", "Dec(J2000)", "Date"}

func parseEntry(line string, desigCol int) (Entry, string, error) {
	var e Entry
	runes := []rune(line)
	if len(runes) <= desigCol {
		return e, "", fmt.Errorf("%w: the line ends before the Designation column", ErrFormat)
	}
	if desigCol > 0 && runes[desigCol-1] != ' ' {
		return e, "Name", fmt.Errorf("%w: the name runs into the Designation column", ErrFormat)
	}
	e.Name = strings.Join(strings.Fields(string(runes[:desigCol])), " ")
	if e.Name == "" {
		return e, "Name", fmt.Errorf("%w: empty name", ErrFormat)
	}
	if foldName(e.Name) == "" {
		return e, "Name", fmt.Errorf("%w: name %q has no letters or digits", ErrFormat, e.Name)
	}
	w := strings.Fields(string(runes[desigCol:]))
	if len(w) < len(fixedCols)+1 {
		return e, "", fmt.Errorf("%w: %d columns after the name, want at least %d", ErrFormat, len(w), len(fixedCols)+1)
	}
	nd := len(w) - len(fixedCols)
	e.Designation = strings.Join(w[:nd], " ")
	if rest, ok := strings.CutPrefix(e.Designation, "HR "); ok {
		hr, err := strconv.Atoi(rest)
		if err != nil || hr <= 0 {
			return e, "Designation", fmt.Errorf("%w: %q is not an HR number", ErrFormat, e.Designation)
		}
		e.HR = hr
	}
	f := w[nd:]
	dash := func(s string) string {
		if s == "-" {
			return ""
		}
		return s
	}
	e.ID, e.Greek, e.Component = dash(f[0]), dash(f[1]), dash(f[3])
	if _, ok := conIndex[strings.ToLower(f[2])]; !ok {
		return e, "Con", fmt.Errorf("%w: %q is not an IAU constellation abbreviation", ErrFormat, f[2])
	}
	e.Con = constellations[conIndex[strings.ToLower(f[2])]].abbr
	e.Vmag = math.NaN()
	if f[5] != "-" {
		v, err := strconv.ParseFloat(f[5], 64)
		if err != nil || v < -2 || v > 30 {
			return e, "Vmag", fmt.Errorf("%w: %q is not a V magnitude", ErrFormat, f[5])
		}
		e.Vmag = v
	}
	for _, c := range []struct {
		s    string
		name string
		dst  *int
	}{{f[6], "HIP", &e.HIP}, {f[7], "HD", &e.HD}} {
		if c.s == "-" {
			continue
		}
		v, err := strconv.Atoi(c.s)
		if err != nil || v <= 0 {
			return e, c.name, fmt.Errorf("%w: %q is not a catalogue number", ErrFormat, c.s)
		}
		*c.dst = v
	}
	ra, err := strconv.ParseFloat(f[8], 64)
	if err != nil || !(ra >= 0 && ra < 360) {
		return e, "RA(J2000)", fmt.Errorf("%w: %q is not a right ascension in degrees [0, 360)", ErrFormat, f[8])
	}
	dec, err := strconv.ParseFloat(f[9], 64)
	if err != nil || !(dec >= -90 && dec <= 90) {
		return e, "Dec(J2000)", fmt.Errorf("%w: %q is not a declination in degrees [−90, 90]", ErrFormat, f[9])
	}
	e.RA, e.Dec = ra, dec
	if d := f[10]; len(d) != 10 || d[4] != '-' || d[7] != '-' {
		return e, "Date", fmt.Errorf("%w: %q is not a date YYYY-MM-DD", ErrFormat, d)
	}
	e.Date = f[10]
	return e, "", nil
}
