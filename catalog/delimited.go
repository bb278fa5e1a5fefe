package catalog

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// Column roles of delimited tables.
const (
	roleID = iota
	roleRA
	roleDec
	roleVmag
	roleBV
	roleTeff
	rolePlx
	roleDist
	roleName
	rolePMRA
	rolePMDec
	roleRV
	roleG    // Gaia phot_g_mean_mag
	roleBPRP // Gaia bp_rp
	roleEpoch
	nRoles
)

var roleDefaults = [nRoles][]string{
	roleID:    {"id", "hip", "hr", "source_id"},
	roleRA:    {"ra", "ra_deg", "radeg", "raj2000", "_raj2000", "ra_icrs"},
	roleDec:   {"dec", "de", "dec_deg", "dedeg", "dej2000", "_dej2000", "de_icrs"},
	roleVmag:  {"vmag", "v", "mag", "v_mag", "phot_v_mean_mag"},
	roleBV:    {"b-v", "bv", "b_v", "bmv", "b-v_mag"},
	roleTeff:  {"teff", "t_eff", "teff_k"},
	rolePlx:   {"parallax", "plx"},
	roleDist:  {"dist", "distance", "dist_pc"},
	roleName:  {"name"},
	rolePMRA:  {"pmra", "pm_ra"},
	rolePMDec: {"pmdec", "pmde", "pm_dec"},
	roleRV:    {"rv", "radial_velocity", "radvel"},
}

var roleLabels = [nRoles]string{"id", "ra", "dec", "vmag", "bv", "teff", "parallax", "dist", "name", "pmra", "pmdec", "rv", "phot_g_mean_mag", "bp_rp", "ref_epoch"}

// readDelimited reads a Gaia archive CSV or a generic CSV/TSV table.
//
// Lines starting with '#' before the header are comments. A comment of the
// form "# rows: N" or "# nrows = N" declares the row count: it is used to
// preallocate (at most 2²⁰ rows up front) and a count above
// ReadOptions.MaxRows is refused before anything is allocated. Fields may
// be double-quoted ("" inside quotes is a quote); a row must have as many
// fields as the header. "null" and blanks are missing values. A leading
// UTF-8 byte-order mark is ignored. An id column found by its usual name
// (not given in the ColumnMap) whose first value is not an integer is not
// used: rows are numbered instead.
//
// Gaia: required columns source_id, ra, dec, parallax, phot_g_mean_mag,
// bp_rp; optional teff_gspphot, pmra, pmdec, radial_velocity, ref_epoch
// (positions are at ref_epoch of the first row, else 2016.0, Gaia DR3).
// V comes from G and BP−RP by VFromGaia; without BP−RP, SolarBPRP is used
// for G → V and the star gets DefaultTeff with FlagNoColour unless
// teff_gspphot is given.
func readDelimited(lr *lineReader, b *builder, f Format) error {
	var header []byte
	ecsv := false
	var ecsvDelim byte
	for {
		line, err := lr.next()
		if err == io.EOF {
			return &ParseError{File: b.file, Line: lr.line, Err: fmt.Errorf("%w: no header line", ErrMissingColumn)}
		}
		if err != nil {
			return err
		}
		if isBlank(line) {
			continue
		}
		if lr.line == 1 && bytes.HasPrefix(line, ecsvMagic) {
			ecsv = true
			ecsvDelim = ' ' // the ECSV default
			continue
		}
		if ecsv && line[0] == '#' {
			if d, ok, err := ecsvDelimiter(line); err != nil {
				return &ParseError{File: b.file, Line: lr.line, Field: "delimiter", Value: shortValue(line), Err: err}
			} else if ok {
				ecsvDelim = d
			}
			continue
		}
		if line[0] == '#' {
			if n, ok, err := declaredRows(line); err != nil {
				return &ParseError{File: b.file, Line: lr.line, Field: "rows", Value: shortValue(line), Err: err}
			} else if ok {
				if err := b.declare(n, lr.line); err != nil {
					return err
				}
			}
			continue
		}
		header = append([]byte(nil), line...)
		break
	}
	hline := lr.line
	if bytes.IndexByte(header, 0) >= 0 {
		return &ParseError{File: b.file, Line: hline, Err: fmt.Errorf("%w: NUL bytes in the header line: UTF-16 or binary data; save the table as UTF-8 text", ErrUnknownFormat)}
	}
	delim := pickDelimiter(header)
	if f == FormatTSV {
		delim = '\t'
	}
	if ecsv {
		delim = ecsvDelim
	}
	if f == FormatCSV && b.detected && b.opt.Columns == (ColumnMap{}) && headerFormatDelim(header, delim) == FormatGaiaCSV {
		// A generic table detected as such only because its header
		// lies beyond the sniffed bytes (an ECSV's long YAML header)
		// or its extension decided: its column names say Gaia.
		f = FormatGaiaCSV
		b.rep.Format = f
		b.s.Format = f.String()
		b.setEpoch(2016.0)
	}
	names, err := splitFields(header, delim, nil)
	if err != nil {
		return &ParseError{File: b.file, Line: hline, Err: err}
	}
	labels := make([]string, len(names))
	for i, nm := range names {
		labels[i] = string(bytes.TrimSpace(nm))
	}
	pl, err := planColumns(b, labels, f == FormatGaiaCSV, hline)
	if err != nil {
		return err
	}
	var fields [][]byte
	row := 0
	for {
		line, err := lr.next()
		if err == io.EOF {
			return nil
		}
		if err != nil {
			return err
		}
		if isBlank(line) || line[0] == '#' {
			continue
		}
		n := lr.line
		row++
		fields, err = splitFields(line, delim, fields[:0])
		if err != nil {
			return &ParseError{File: b.file, Line: n, Err: err}
		}
		if len(fields) != len(names) {
			return &ParseError{File: b.file, Line: n, Err: fmt.Errorf("%w: %d fields, header has %d", ErrFieldCount, len(fields), len(names))}
		}
		if err := pl.addRow(b, textFields(fields), row, n); err != nil {
			return err
		}
	}
}

// rowPlan says which column of a table holds each role, for the row
// builder shared by the text (CSV/TSV) and Parquet readers.
type rowPlan struct {
	gaia      bool
	cols      [nRoles]int
	labels    []string // column names as the file gives them
	guessedID bool     // the id column was found by its usual name, not mapped
	epochSet  bool
}

// planColumns maps column names to roles: the fixed Gaia names when gaia,
// else b.opt.Columns and the usual names. line is where the names are
// (the header line; 0 for Parquet) for error messages.
func planColumns(b *builder, labels []string, gaia bool, line int) (*rowPlan, error) {
	index := map[string]int{}
	for i, nm := range labels {
		key := strings.ToLower(strings.TrimSpace(nm))
		if j, dup := index[key]; dup && key != "" {
			return nil, &ParseError{File: b.file, Line: line, Field: nm, Err: fmt.Errorf("%w: columns %d and %d are both named %q (names compare without case)", ErrDuplicateColumn, j+1, i+1, nm)}
		}
		index[key] = i
	}
	pl := &rowPlan{gaia: gaia, labels: labels}
	cols := &pl.cols
	for i := range cols {
		cols[i] = -1
	}
	missing := func(name string) error {
		return &ParseError{File: b.file, Line: line, Field: name, Err: fmt.Errorf("%w: header has %d columns, none named %q", ErrMissingColumn, len(labels), name)}
	}
	if gaia {
		for role, name := range map[int]string{roleID: "source_id", roleRA: "ra", roleDec: "dec", rolePlx: "parallax", roleG: "phot_g_mean_mag", roleBPRP: "bp_rp"} {
			i, ok := index[name]
			if !ok {
				return nil, missing(name)
			}
			cols[role] = i
		}
		for role, name := range map[int]string{roleTeff: "teff_gspphot", rolePMRA: "pmra", rolePMDec: "pmdec", roleRV: "radial_velocity", roleEpoch: "ref_epoch"} {
			if i, ok := index[name]; ok {
				cols[role] = i
			}
		}
		return pl, nil
	}
	cm := b.opt.Columns
	given := [nRoles]string{roleID: cm.ID, roleRA: cm.RA, roleDec: cm.Dec, roleVmag: cm.Vmag, roleBV: cm.BV, roleTeff: cm.Teff,
		rolePlx: cm.Parallax, roleDist: cm.Dist, roleName: cm.Name, rolePMRA: cm.PMRA, rolePMDec: cm.PMDec, roleRV: cm.RV}
	for role := 0; role < roleG; role++ {
		if g := strings.ToLower(strings.TrimSpace(given[role])); g != "" {
			i, ok := index[g]
			if !ok {
				return nil, missing(given[role])
			}
			cols[role] = i
			continue
		}
		if role == roleID {
			pl.guessedID = true
		}
		for _, d := range roleDefaults[role] {
			if i, ok := index[d]; ok {
				cols[role] = i
				break
			}
		}
	}
	for _, role := range [...]int{roleRA, roleDec, roleVmag} {
		if cols[role] < 0 {
			name := given[role]
			if name == "" {
				name = roleLabels[role]
			}
			return nil, missing(name)
		}
	}
	if (cols[rolePMRA] < 0) != (cols[rolePMDec] < 0) {
		cols[rolePMRA], cols[rolePMDec] = -1, -1
	}
	return pl, nil
}

// rowFields gives access to one row's values by column index.
type rowFields interface {
	// num returns a numeric value checked against [lo, hi]; a missing
	// value gives (NaN, false, nil).
	num(b *builder, col int, label string, line int, lo, hi float64) (float64, bool, error)
	// integer returns an identifier.
	integer(b *builder, col int, label string, line int) (int64, error)
	// text returns a value as text (the designation).
	text(col int) []byte
}

// textFields are the fields of a delimited line.
type textFields [][]byte

func (f textFields) num(b *builder, col int, label string, line int, lo, hi float64) (float64, bool, error) {
	return b.ranged(f[col], label, line, lo, hi)
}
func (f textFields) integer(b *builder, col int, label string, line int) (int64, error) {
	return b.integer(f[col], label, line)
}
func (f textFields) text(col int) []byte { return f[col] }

// addRow turns data row number row (1-based; line is where it is, for
// messages) into a star, or counts why it is skipped.
//
// Gaia rows get V from G and BP−RP by VFromGaia; without BP−RP, SolarBPRP
// is used for G → V and the star gets DefaultTeff with FlagNoColour unless
// teff_gspphot is given.
func (pl *rowPlan) addRow(b *builder, fr rowFields, row, n int) error {
	cols := &pl.cols
	gaia := pl.gaia
	label := func(role int) string { return pl.labels[cols[role]] }
	num := func(role int, lo, hi float64) (float64, bool, error) {
		if cols[role] < 0 {
			return math.NaN(), false, nil
		}
		return fr.num(b, cols[role], label(role), n, lo, hi)
	}
	st := Star{RV: math.NaN(), ID: int64(row)}
	if cols[roleID] >= 0 {
		id, err := fr.integer(b, cols[roleID], label(roleID), n)
		switch {
		case err == nil:
			st.ID = id
		case pl.guessedID && row == 1:
			// A column that merely has a usual id name but does not
			// hold integers (e.g. "HD 48915") is not used as the id;
			// rows are numbered instead. Decided on the first row only.
			cols[roleID] = -1
		default:
			return err
		}
		pl.guessedID = false
	}
	raHi := 360.0
	if !gaia && b.opt.Columns.RAHours {
		raHi = 24
	}
	ra, okRA, err := num(roleRA, 0, raHi)
	if err != nil {
		return err
	}
	dec, okDE, err := num(roleDec, -90, 90)
	if err != nil {
		return err
	}
	if gaia && !pl.epochSet {
		if e, ok, err := num(roleEpoch, -1e4, 1e4); err != nil {
			return err
		} else if ok {
			b.setEpoch(e)
		}
		pl.epochSet = true
	}
	// Validate every numeric field before deciding to skip, so a
	// malformed value is never hidden by a blank required one.
	teff, _, err := num(roleTeff, teffLo, teffHi)
	if err != nil {
		return err
	}
	plx, okPlx, err := num(rolePlx, -1e6, 1e6)
	if err != nil {
		return err
	}
	pmra, _, err := num(rolePMRA, -pmLim, pmLim)
	if err != nil {
		return err
	}
	pmde, _, err := num(rolePMDec, -pmLim, pmLim)
	if err != nil {
		return err
	}
	rv, _, err := num(roleRV, -rvLim, rvLim)
	if err != nil {
		return err
	}
	var mag, bv, bprp, dist float64
	var okMag, okDist bool
	if gaia {
		mag, okMag, err = num(roleG, vmagLo, vmagHi)
		if err != nil {
			return err
		}
		bprp, _, err = num(roleBPRP, bvLo, bvHi)
		if err != nil {
			return err
		}
		bv = math.NaN()
	} else {
		mag, okMag, err = num(roleVmag, vmagLo, vmagHi)
		if err != nil {
			return err
		}
		bv, _, err = num(roleBV, bvLo, bvHi)
		if err != nil {
			return err
		}
		bprp = math.NaN()
		dist, okDist, err = num(roleDist, 0, 1e12)
		if err != nil {
			return err
		}
	}
	if !okRA || !okDE {
		b.skip("no position", n)
		return nil
	}
	if !okMag {
		if gaia {
			b.skip("no G magnitude", n)
		} else {
			b.skip("no V magnitude", n)
		}
		return nil
	}
	if !gaia && b.opt.Columns.RAHours {
		ra *= 15
	}
	if ra >= 360 {
		ra -= 360
	}
	st.RA, st.Dec, st.BV, st.RV = ra, dec, bv, rv
	if gaia {
		c := bprp
		if math.IsNaN(c) {
			c = SolarBPRP
		}
		st.Vmag = VFromGaia(mag, c)
	} else {
		st.Vmag = mag
	}
	if !math.IsNaN(pmra) && !math.IsNaN(pmde) {
		st.PMRA, st.PMDec = pmra, pmde
	}
	var fd, fc Flag
	switch {
	case cols[rolePlx] >= 0:
		st.Dist, fd = distFromParallax(plx, okPlx)
	case okDist && dist > 0:
		st.Dist = dist
	default:
		st.Dist, fd = math.Inf(1), FlagNoDistance
	}
	st.Teff, fc = starColour(teff, bv, bprp)
	st.Flags = fd | fc
	if cols[roleName] >= 0 {
		if nm := bytes.TrimSpace(fr.text(cols[roleName])); len(nm) > 0 {
			st.Name = string(nm)
		}
	}
	return b.add(st, n)
}

// declaredRows recognises "# rows: N", "# nrows = N" (any case).
func declaredRows(line []byte) (int64, bool, error) {
	t := strings.ToLower(strings.TrimSpace(strings.TrimLeft(string(line), "#")))
	var rest string
	switch {
	case strings.HasPrefix(t, "nrows"):
		rest = t[5:]
	case strings.HasPrefix(t, "rows"):
		rest = t[4:]
	default:
		return 0, false, nil
	}
	rest = strings.TrimSpace(rest)
	if rest == "" || (rest[0] != ':' && rest[0] != '=') {
		return 0, false, nil
	}
	v := strings.TrimSpace(rest[1:])
	n, err := strconv.ParseInt(v, 10, 64)
	if err != nil {
		if f, ferr := strconv.ParseFloat(v, 64); ferr == nil && f >= 0 && f == math.Trunc(f) {
			if f > math.MaxInt64/2 {
				return math.MaxInt64, true, nil
			}
			return int64(f), true, nil
		}
		return 0, false, fmt.Errorf("%w: row count", ErrNotNumber)
	}
	return n, true, nil
}

// splitFields splits a delimited line, honouring double quotes.
func splitFields(line []byte, delim byte, out [][]byte) ([][]byte, error) {
	if bytes.IndexByte(line, '"') < 0 {
		for {
			i := bytes.IndexByte(line, delim)
			if i < 0 {
				return append(out, line), nil
			}
			out = append(out, line[:i])
			line = line[i+1:]
		}
	}
	for {
		t := line
		if delim != ' ' {
			t = bytes.TrimLeft(line, " ")
		}
		if len(t) > 0 && t[0] == '"' {
			var field []byte
			i := 1
			closed := false
			if j := bytes.IndexByte(t[1:], '"'); j >= 0 && (j+2 >= len(t) || t[j+2] != '"') {
				// No doubled quote inside: the field is a sub-slice.
				field, i, closed = t[1:1+j], j+2, true
			}
			for !closed && i < len(t) {
				if t[i] == '"' {
					if i+1 < len(t) && t[i+1] == '"' {
						field = append(field, '"')
						i += 2
						continue
					}
					closed = true
					i++
					break
				}
				field = append(field, t[i])
				i++
			}
			if !closed {
				return out, fmt.Errorf("%w: unterminated quoted field", ErrFieldCount)
			}
			rest := t[i:]
			if delim != ' ' {
				rest = bytes.TrimLeft(rest, " ")
			}
			out = append(out, field)
			if len(rest) == 0 {
				return out, nil
			}
			if rest[0] != delim {
				return out, fmt.Errorf("%w: text after a closing quote", ErrFieldCount)
			}
			line = rest[1:]
			continue
		}
		i := bytes.IndexByte(line, delim)
		if i < 0 {
			return append(out, line), nil
		}
		out = append(out, line[:i])
		line = line[i+1:]
	}
}

// ecsvDelimiter recognises the ECSV header key "delimiter" ("# delimiter:
// ','"): ECSV 1.0 allows a space (the default) or a comma.
func ecsvDelimiter(line []byte) (byte, bool, error) {
	t := strings.TrimSpace(strings.TrimPrefix(string(line), "#"))
	v, ok := strings.CutPrefix(t, "delimiter:")
	if !ok {
		return 0, false, nil
	}
	switch strings.Trim(strings.TrimSpace(v), "'\"") {
	case ",":
		return ',', true, nil
	case " ", "":
		return ' ', true, nil
	}
	return 0, false, fmt.Errorf("%w: ECSV delimiter %s: ECSV 1.0 allows a space or a comma", ErrUnknownFormat, strings.TrimSpace(v))
}
