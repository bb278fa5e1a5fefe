package catalog

import (
	"math"
	"strconv"
	"strings"
	"unicode"
)

// idPrefixes maps a designation prefix (lower case, without blanks) to the
// catalogue formats whose ID column it names.
var idPrefixes = []struct {
	prefix  string
	formats []string
}{
	{"gaiadr3", []string{"gaia"}},
	{"gaiadr2", []string{"gaia"}},
	{"gaia", []string{"gaia"}},
	{"hip", []string{"hipparcos", "hipparcos2007"}},
	{"hr", []string{"bsc5"}},
}

// Designations of the built-in sky's identifiers, as DisplayID writes them
// and Find reads them: "synth-N" is SyntheticIDBase + N, "nearby-K" is
// NearbyIDBase + K.
var builtInPrefixes = []struct {
	prefix string
	base   int64
}{
	{"synth-", SyntheticIDBase},
	{"nearby-", NearbyIDBase},
}

// DisplayID returns the designation to show for catalogue identifier id:
// the number itself, except for the built-in sky's 19-digit identifiers,
// which read "synth-N" (sampled stars) and "nearby-K" (the invented nearby
// stars). Find accepts what it returns.
func DisplayID(id int64) string {
	if id == SunID {
		return SunName
	}
	for i := len(builtInPrefixes) - 1; i >= 0; i-- {
		if p := builtInPrefixes[i]; id >= p.base {
			return p.prefix + strconv.FormatInt(id-p.base, 10)
		}
	}
	return strconv.FormatInt(id, 10)
}

// Find returns the row of the star named by idOrName and whether there is
// one. It accepts:
//   - a designation written by DisplayID ("synth-49942");
//   - a bare catalogue number ("2491"), matched against ID;
//   - a prefixed number, "HR 2491" (BSC5), "HIP 32349" (Hipparcos, either
//     reduction), "Gaia DR3 123…" (Gaia), matched against ID only when the
//     stars come from that catalogue (Stars.Format);
//   - a name from Names, compared ignoring case and blanks; for BSC5-style
//     names ("9Alp CMa") also without the Flamsteed number ("Alp CMa") or
//     with only it ("9 CMa").
//
// The first matching row wins. Find scans the columns; it is meant for
// occasional look-ups, not per-star work.
func (s *Stars) Find(idOrName string) (int, bool) {
	q := normName(idOrName)
	if q == "" {
		return 0, false
	}
	if id, err := strconv.ParseInt(q, 10, 64); err == nil {
		return s.findID(id)
	}
	for _, p := range builtInPrefixes {
		if rest, ok := strings.CutPrefix(q, p.prefix); ok {
			if k, err := strconv.ParseInt(rest, 10, 64); err == nil && k >= 0 && k <= math.MaxInt64-p.base {
				return s.findID(p.base + k)
			}
		}
	}
	for _, p := range idPrefixes {
		rest, ok := strings.CutPrefix(q, p.prefix)
		if !ok {
			continue
		}
		id, err := strconv.ParseInt(rest, 10, 64)
		if err != nil {
			break
		}
		for _, f := range p.formats {
			if s.Format == f {
				return s.findID(id)
			}
		}
		break
	}
	best := -1
	for i, nm := range s.Names {
		if i < 0 || i >= s.Len() || (best >= 0 && i > best) {
			continue
		}
		if nameMatches(nm, q) {
			best = i
		}
	}
	return best, best >= 0
}

func (s *Stars) findID(id int64) (int, bool) {
	for i, v := range s.ID {
		if v == id {
			return i, true
		}
	}
	return 0, false
}

// normName lower-cases s and removes blanks.
func normName(s string) string {
	var b strings.Builder
	for _, r := range s {
		if unicode.IsSpace(r) {
			continue
		}
		b.WriteRune(unicode.ToLower(r))
	}
	return b.String()
}

// nameMatches compares a stored name with a normalised query, also trying
// the Bayer-only and Flamsteed-only forms of "9Alp CMa"-style names.
func nameMatches(name, q string) bool {
	n := normName(name)
	if n == q {
		return true
	}
	digits := 0
	for digits < len(n) && n[digits] >= '0' && n[digits] <= '9' {
		digits++
	}
	if digits == 0 || digits == len(n) {
		return false
	}
	if n[digits:] == q {
		return true
	}
	// Flamsteed number with the constellation (last three letters).
	f := strings.Fields(name)
	if len(f) >= 2 && len(n) >= digits+3 {
		con := strings.ToLower(f[len(f)-1])
		return n[:digits]+con == q
	}
	return false
}
