package names

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"sort"
	"strconv"
	"strings"

	"github.com/skyframe/skyframe/catalog"
)

// Lookup errors, wrapped in a *LookupError.
var (
	// ErrUnknown: nothing in the catalogue or the names table has that name.
	ErrUnknown = errors.New("no star of that name")
	// ErrAmbiguous: the name fits several stars of the catalogue.
	ErrAmbiguous = errors.New("ambiguous star name")
	// ErrNotInCatalogue: the names table knows the star, the catalogue
	// does not hold it.
	ErrNotInCatalogue = errors.New("star not in the catalogue")
)

// AcceptedForms describes what Index.Find reads, for messages.
const AcceptedForms = "a proper name (Betelgeuse; from the IAU star names table given with --names or fetched with `skyframe catalog fetch names`), " +
	"a Bayer or Flamsteed designation (alf Ori, α Ori, Alpha Orionis, 58 Ori), " +
	"a catalogue number (HR 2061, HIP 27989, or the catalogue's own id)"

// LookupError explains why a name found no single star.
type LookupError struct {
	Query      string
	Source     string   // the catalogue searched
	Err        error    // ErrUnknown, ErrAmbiguous or ErrNotInCatalogue
	Candidates []string // the stars an ambiguous name fits, or close matches of an unknown one
	Detail     string   // what the names table says of a star not in the catalogue
}

func (e *LookupError) Error() string {
	var b strings.Builder
	fmt.Fprintf(&b, "%q: ", e.Query)
	switch e.Err {
	case ErrAmbiguous:
		fmt.Fprintf(&b, "%v in %s: it fits %s; name one of them", e.Err, e.Source, strings.Join(e.Candidates, "; "))
	case ErrNotInCatalogue:
		fmt.Fprintf(&b, "%s is not in %s", e.Detail, e.Source)
	default:
		fmt.Fprintf(&b, "%v in %s; want %s", e.Err, e.Source, AcceptedForms)
		if len(e.Candidates) > 0 {
			fmt.Fprintf(&b, "; close matches: %s", strings.Join(e.Candidates, ", "))
		}
	}
	return b.String()
}

func (e *LookupError) Unwrap() error { return e.Err }

// Index finds stars of one catalogue by name and writes their labels. It
// joins the catalogue's own designations (Stars.Names, Stars.ID) with an
// optional IAU names table: table entries are matched to rows by HR number
// (Bright Star Catalogue), HIP number (both Hipparcos reductions) or, for
// other catalogues, by position (within MatchRadius, the brightest
// candidate). The built-in synthetic sky is never matched with real names:
// its brightest stars get invented ones (Invent). Build one with NewIndex;
// it is read-only afterwards and safe for concurrent use.
type Index struct {
	stars    *catalog.Stars
	table    *Table
	keys     map[string][]int // designation keys and "n:"+folded names → rows, ascending
	entryRow map[int]int      // table entry → row
	rowEntry map[int]int      // row → table entry
	invented map[int]string   // row → invented name
	byName   map[string]int   // folded proper name → table entry
	idRow    map[int64]int    // catalogue id → row, for rows with a proper name
}

// MatchRadius is how far, in degrees, a catalogue star may lie from a names
// table position to take its name when the catalogue has no HR or HIP ids.
const MatchRadius = 1.0 / 60

// NewIndex indexes stars (not nil) with the names table t (nil for none).
func NewIndex(stars *catalog.Stars, t *Table) *Index {
	x := &Index{stars: stars, table: t, keys: map[string][]int{},
		entryRow: map[int]int{}, rowEntry: map[int]int{}, byName: map[string]int{}}
	rows := make([]int, 0, len(stars.Names))
	for i := range stars.Names {
		if i >= 0 && i < stars.Len() {
			rows = append(rows, i)
		}
	}
	sort.Ints(rows)
	for _, i := range rows {
		nm := stars.Names[i]
		x.add("n:"+foldName(nm), i)
		if d, ok := ParseDesignation(nm); ok {
			for _, k := range d.keys() {
				x.add(k, i)
			}
		}
	}
	if stars.Format == catalog.SyntheticFormat {
		x.invented = inventBuiltIn(stars)
		for i, nm := range x.invented {
			x.add("n:"+foldName(nm), i)
		}
		return x.finish()
	}
	if t == nil {
		return x.finish()
	}
	for k, e := range t.Entries {
		x.byName[foldName(e.Name)] = k
	}
	x.match()
	for k, i := range x.entryRow {
		e := &t.Entries[k]
		x.add("n:"+foldName(e.Name), i)
		if d, ok := ParseDesignation(e.ID + " " + e.Con); ok {
			for _, key := range d.keys() {
				x.add(key, i)
			}
		}
	}
	return x.finish()
}

func (x *Index) finish() *Index {
	for _, l := range x.keys {
		sort.Ints(l)
	}
	x.idRow = map[int64]int{}
	for _, i := range x.Named() {
		x.idRow[x.stars.ID[i]] = i
	}
	return x
}

func (x *Index) add(key string, row int) {
	l := x.keys[key]
	for _, r := range l {
		if r == row {
			return
		}
	}
	x.keys[key] = append(l, row)
}

// match pairs table entries with catalogue rows.
func (x *Index) match() {
	s, t := x.stars, x.table
	switch s.Format {
	case catalog.FormatBSC5.String(), catalog.FormatHipparcos.String(), catalog.FormatHipparcos2007.String():
		byNum := map[int64]int{}
		for k, e := range t.Entries {
			n := e.HIP
			if s.Format == catalog.FormatBSC5.String() {
				n = e.HR
			}
			if n > 0 {
				byNum[int64(n)] = k
			}
		}
		for i, id := range s.ID {
			if k, ok := byNum[id]; ok {
				if _, taken := x.entryRow[k]; !taken {
					x.entryRow[k], x.rowEntry[i] = i, k
				}
			}
		}
		return
	}
	// By position: entries bucketed by whole degrees of declination.
	cosR := math.Cos(MatchRadius * math.Pi / 180)
	type cand struct {
		v [3]float64
		k int
	}
	buckets := map[int][]cand{}
	faintest := math.Inf(-1)
	for k, e := range t.Entries {
		ra, dec := e.RA*math.Pi/180, e.Dec*math.Pi/180
		b := int(math.Floor(e.Dec))
		buckets[b] = append(buckets[b], cand{[3]float64{math.Cos(dec) * math.Cos(ra), math.Cos(dec) * math.Sin(ra), math.Sin(dec)}, k})
		if !math.IsNaN(e.Vmag) {
			faintest = math.Max(faintest, e.Vmag)
		}
	}
	best := map[int]int{} // entry → row, the brightest within the radius
	for i := range s.ID {
		if float64(s.Vmag[i]) > faintest+2 {
			continue
		}
		v := [3]float64{float64(s.X[i]), float64(s.Y[i]), float64(s.Z[i])}
		dec := math.Asin(math.Max(-1, math.Min(1, v[2]))) * 180 / math.Pi
		b := int(math.Floor(dec))
		for db := b - 1; db <= b+1; db++ {
			for _, c := range buckets[db] {
				if c.v[0]*v[0]+c.v[1]*v[1]+c.v[2]*v[2] < cosR {
					continue
				}
				if j, ok := best[c.k]; !ok || s.Vmag[i] < s.Vmag[j] {
					best[c.k] = i
				}
			}
		}
	}
	for k, i := range best {
		if _, taken := x.rowEntry[i]; taken {
			continue
		}
		x.entryRow[k], x.rowEntry[i] = i, k
	}
}

// Table returns the names table the index was built with (nil for none).
func (x *Index) Table() *Table { return x.table }

// Stars returns the indexed catalogue.
func (x *Index) Stars() *catalog.Stars { return x.stars }

// Proper returns the proper name of row i from the names table, or its
// invented name in the built-in sky; "" when it has none.
func (x *Index) Proper(i int) string {
	if k, ok := x.rowEntry[i]; ok {
		return x.table.Entries[k].Name
	}
	return x.invented[i]
}

// Named returns the rows with a proper or invented name, ascending.
func (x *Index) Named() []int {
	var out []int
	for i := range x.rowEntry {
		out = append(out, i)
	}
	for i := range x.invented {
		out = append(out, i)
	}
	sort.Ints(out)
	return out
}

// Find returns the row of the star q names. It reads, in this order:
//   - a catalogue number: bare ("2061"), prefixed for this catalogue
//     ("HR 2061" in the Bright Star Catalogue, "HIP 27989" in Hipparcos),
//     or the built-in sky's "synth-N" and "nearby-K" (catalog.Stars.Find);
//   - HR, HIP or HD numbers of other catalogues, through the names table's
//     cross-identifications ("HIP 27989" in the Bright Star Catalogue);
//   - a proper name from the names table, an invented name of the built-in
//     sky, or a name the catalogue carries, ignoring case, blanks and
//     punctuation;
//   - a Bayer or Flamsteed designation (ParseDesignation).
//
// A name that fits several stars (alf Cen: α¹ and α² Cen) is an error
// listing them; a name the table knows whose star the catalogue lacks is an
// error saying so; an unknown name lists up to five close matches. Errors
// are *LookupError.
func (x *Index) Find(q string) (int, error) {
	s := x.stars
	fq := foldName(q)
	if fq == "" {
		return 0, &LookupError{Query: q, Source: s.Source, Err: ErrUnknown}
	}
	prefix, num, isNum := splitNumber(fq)
	if isNum {
		if i, ok := s.Find(q); ok {
			return i, nil
		}
		if x.table != nil && (prefix == "hr" || prefix == "hip" || prefix == "hd") {
			for k, e := range x.table.Entries {
				if (prefix == "hr" && int64(e.HR) == num) || (prefix == "hip" && int64(e.HIP) == num) || (prefix == "hd" && int64(e.HD) == num) {
					if i, ok := x.entryRow[k]; ok {
						return i, nil
					}
					return 0, x.notIn(q, k)
				}
			}
		}
		if prefix == "" || prefix == "hr" || prefix == "hip" || prefix == "hd" || prefix == "synth" || prefix == "nearby" {
			return 0, &LookupError{Query: q, Source: s.Source, Err: ErrUnknown}
		}
	}
	if rows := x.keys["n:"+fq]; len(rows) > 0 {
		return x.one(q, rows)
	}
	if k, ok := x.byName[fq]; ok {
		return 0, x.notIn(q, k)
	}
	if d, ok := ParseDesignation(q); ok {
		if rows := x.keys[d.queryKey()]; len(rows) > 0 {
			if len(rows) > 1 {
				if i, ok := x.tableDesignation(d, rows); ok {
					return i, nil
				}
			}
			return x.one(q, rows)
		}
		if x.table != nil {
			for k, e := range x.table.Entries {
				if ed, ok := ParseDesignation(e.ID + " " + e.Con); ok && ed.Con == d.Con &&
					((d.Letter > 0 && ed.Letter == d.Letter && (d.Sup == 0 || d.Sup == ed.Sup)) ||
						(d.Letter == 0 && ed.Flamsteed == d.Flamsteed)) {
					return 0, x.notIn(q, k)
				}
			}
		}
	}
	return 0, &LookupError{Query: q, Source: s.Source, Err: ErrUnknown, Candidates: x.closeMatches(fq, 5)}
}

// tableDesignation settles a designation that fits several rows (a
// multiple star the catalogue lists by component, such as HR 1879 and
// HR 1880, both "Lam Ori" in BSC5) when exactly one names-table entry
// carries that designation as written (lam Ori: Meissa) and is one of the
// rows. α Cen stays ambiguous: the table names both components alf Cen.
func (x *Index) tableDesignation(d Designation, rows []int) (int, bool) {
	if x.table == nil {
		return 0, false
	}
	found, n := -1, 0
	for k, e := range x.table.Entries {
		ed, ok := ParseDesignation(e.ID + " " + e.Con)
		if !ok || ed.Con != d.Con || ed.Letter != d.Letter || ed.Sup != d.Sup ||
			(d.Letter == 0 && ed.Flamsteed != d.Flamsteed) {
			continue
		}
		n++
		if i, ok := x.entryRow[k]; ok && slices.Contains(rows, i) {
			found = i
		}
	}
	return found, n == 1 && found >= 0
}

// one returns the single row of rows or an ambiguity error listing them.
func (x *Index) one(q string, rows []int) (int, error) {
	if len(rows) == 1 {
		return rows[0], nil
	}
	var c []string
	for _, i := range rows {
		c = append(c, x.describe(i))
	}
	return 0, &LookupError{Query: q, Source: x.stars.Source, Err: ErrAmbiguous, Candidates: c}
}

// describe is "Rigil Kentaurus (α¹ Cen, HR 5459)".
func (x *Index) describe(i int) string {
	l := x.Label(i)
	id := x.catalogueID(i)
	var extra []string
	if d, ok := ParseDesignation(x.stars.Names[i]); ok && d.String() != l {
		extra = append(extra, d.String())
	} else if k, ok := x.rowEntry[i]; ok {
		if d, ok := ParseDesignation(x.table.Entries[k].ID + " " + x.table.Entries[k].Con); ok && d.String() != l {
			extra = append(extra, d.String())
		}
	}
	if id != l {
		extra = append(extra, id)
	}
	if len(extra) == 0 {
		return l
	}
	return l + " (" + strings.Join(extra, ", ") + ")"
}

func (x *Index) notIn(q string, k int) error {
	e := x.table.Entries[k]
	var ids []string
	if d, ok := ParseDesignation(e.ID + " " + e.Con); ok {
		ids = append(ids, d.String())
	}
	ids = append(ids, e.Designation)
	if e.HIP > 0 && !strings.HasPrefix(e.Designation, "HIP ") {
		ids = append(ids, "HIP "+strconv.Itoa(e.HIP))
	}
	detail := fmt.Sprintf("%s (%s) is in the IAU star names table (%s) but", e.Name, strings.Join(ids, ", "), x.table.Source)
	if !math.IsNaN(e.Vmag) {
		detail = fmt.Sprintf("%s (%s, V = %g) is in the IAU star names table (%s) but", e.Name, strings.Join(ids, ", "), e.Vmag, x.table.Source)
	}
	return &LookupError{Query: q, Source: x.stars.Source, Err: ErrNotInCatalogue, Detail: detail}
}

// splitNumber splits a folded query into a letter prefix and a number:
// "hr2061" → ("hr", 2061, true); "2061" → ("", 2061, true).
func splitNumber(fq string) (string, int64, bool) {
	k := 0
	for k < len(fq) && (fq[k] < '0' || fq[k] > '9') {
		k++
	}
	if k == len(fq) || !isDigits(fq[k:]) {
		return "", 0, false
	}
	n, err := strconv.ParseInt(fq[k:], 10, 64)
	if err != nil {
		return "", 0, false
	}
	return fq[:k], n, true
}

// closeMatches returns up to n names close to the folded query, closest
// first: proper names of the table and the catalogue's own names.
func (x *Index) closeMatches(fq string, n int) []string {
	type m struct {
		name string
		d    int
	}
	seen := map[string]bool{}
	var ms []m
	maxD := max(2, len([]rune(fq))/3)
	try := func(name string) {
		if seen[name] {
			return
		}
		seen[name] = true
		f := foldName(name)
		if d := editDistance(fq, f, maxD); d <= maxD {
			ms = append(ms, m{name, d})
		}
	}
	if x.table != nil {
		for _, e := range x.table.Entries {
			try(e.Name)
		}
	}
	for _, nm := range x.invented {
		try(nm)
	}
	for _, nm := range x.stars.Names {
		if len(seen) > 200000 {
			break
		}
		try(nm)
	}
	sort.Slice(ms, func(a, b int) bool {
		if ms[a].d != ms[b].d {
			return ms[a].d < ms[b].d
		}
		return ms[a].name < ms[b].name
	})
	var out []string
	for k := 0; k < len(ms) && k < n; k++ {
		out = append(out, ms[k].name)
	}
	return out
}

// editDistance is the Levenshtein distance of a and b (runes), or a value
// above limit once it must exceed it.
func editDistance(a, b string, limit int) int {
	ra, rb := []rune(a), []rune(b)
	if d := len(ra) - len(rb); d > limit || -d > limit {
		return limit + 1
	}
	prev := make([]int, len(rb)+1)
	cur := make([]int, len(rb)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(ra); i++ {
		cur[0] = i
		rowMin := cur[0]
		for j := 1; j <= len(rb); j++ {
			c := prev[j-1]
			if ra[i-1] != rb[j-1] {
				c++
			}
			c = min(c, prev[j]+1, cur[j-1]+1)
			cur[j] = c
			rowMin = min(rowMin, c)
		}
		if rowMin > limit {
			return limit + 1
		}
		prev, cur = cur, prev
	}
	return prev[len(rb)]
}

// catalogueID is the row's catalogue designation: "HR 2061" in the Bright
// Star Catalogue, "HIP 27989" in Hipparcos, else catalog.DisplayID.
func (x *Index) catalogueID(i int) string {
	return CatalogueID(x.stars.Format, x.stars.ID[i])
}

// CatalogueID writes catalogue id of a catalogue of the given format
// (catalog.Stars.Format) as people cite it: "HR 2061", "HIP 27989", else
// catalog.DisplayID ("synth-31899", a Gaia source_id, a row number).
func CatalogueID(format string, id int64) string {
	switch format {
	case catalog.FormatBSC5.String():
		return "HR " + strconv.FormatInt(id, 10)
	case catalog.FormatHipparcos.String(), catalog.FormatHipparcos2007.String():
		return "HIP " + strconv.FormatInt(id, 10)
	}
	return catalog.DisplayID(id)
}

// Label returns the text to show beside row i: its proper name (names
// table, or invented for the built-in sky), else its Bayer designation with
// the Greek letter and constellation ("α Ori"), else its Flamsteed
// designation ("58 Ori"), else a name the catalogue gives, else its
// catalogue id ("HR 2061").
func (x *Index) Label(i int) string {
	if p := x.Proper(i); p != "" {
		return p
	}
	return LabelText(x.stars.Format, x.stars.ID[i], x.stars.Names[i])
}

// Name returns the name of row i for tables: its proper name, else its
// Bayer or Flamsteed designation, else a name the catalogue gives; "" when
// it has only a catalogue number.
func (x *Index) Name(i int) string {
	if p := x.Proper(i); p != "" {
		return p
	}
	nm := x.stars.Names[i]
	if d, ok := ParseDesignation(nm); ok {
		return d.String()
	}
	return strings.Join(strings.Fields(nm), " ")
}

// LabelText is Label for a star known only by its catalogue format, id and
// catalogue name (no proper name): Bayer, else Flamsteed, else the name,
// else CatalogueID.
func LabelText(format string, id int64, name string) string {
	if d, ok := ParseDesignation(name); ok {
		return d.String()
	}
	if name = strings.Join(strings.Fields(name), " "); name != "" {
		return name
	}
	return CatalogueID(format, id)
}

// LabelByID is Label for a star known by catalogue id and name, as frame
// statistics and streamed catalogues give them: the proper name when a row
// of the index has that id, else LabelText.
func (x *Index) LabelByID(id int64, name string) string {
	if i, ok := x.idRow[id]; ok {
		return x.Label(i)
	}
	if x.table != nil {
		// A star of a streamed catalogue, which the index holds only in
		// part: the table's HR or HIP cross-identification.
		switch x.stars.Format {
		case catalog.FormatBSC5.String(), catalog.FormatHipparcos.String(), catalog.FormatHipparcos2007.String():
			for _, e := range x.table.Entries {
				n := e.HIP
				if x.stars.Format == catalog.FormatBSC5.String() {
					n = e.HR
				}
				if n > 0 && int64(n) == id {
					return e.Name
				}
			}
		}
	}
	return LabelText(x.stars.Format, id, name)
}
