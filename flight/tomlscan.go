package flight

import (
	"strconv"
	"strings"
)

// keyLines maps key paths found in TOML source text to the line (1-based)
// where they are first defined. It is a light line-oriented scan, used only
// to point error messages at a line; the real parsing is BurntSushi/toml.
//
// Paths are dot-joined key components. Each key is recorded twice: plainly
// ("leg.accel_g") and with the element number of enclosing arrays of tables
// ("leg#2.accel_g", 0-based), so an error about one element can name its line.
type keyLines map[string]int

func scanKeyLines(src string) keyLines {
	kl := keyLines{}
	var table, itable []string // current table path, plain and indexed
	counts := map[string]int{} // array-of-table element counters, by indexed path
	inMulti := ""              // closing delimiter of an open multi-line string
	for n, line := range strings.Split(src, "\n") {
		lineNo := n + 1
		if inMulti != "" {
			if strings.Count(line, inMulti)%2 == 1 {
				inMulti = ""
			}
			continue
		}
		s := strings.TrimSpace(line)
		if s == "" || s[0] == '#' {
			continue
		}
		if strings.HasPrefix(s, "[[") {
			end := strings.Index(s, "]]")
			if end < 0 {
				continue
			}
			parts := splitKey(s[2:end])
			table = parts
			// Indexed path: parent indexed path + this name + #count.
			parent := itablePrefix(itable, table[:len(table)-1])
			base := joinKey(append(parent, parts[len(parts)-1]))
			idx := counts[base]
			counts[base] = idx + 1
			itable = append(append([]string{}, parent...), parts[len(parts)-1]+"#"+strconv.Itoa(idx))
			kl.add(joinKey(table), lineNo)
			kl.add(joinKey(itable), lineNo)
			continue
		}
		if s[0] == '[' {
			end := strings.IndexByte(s, ']')
			if end < 0 {
				continue
			}
			table = splitKey(s[1:end])
			itable = itablePrefix(itable, table)
			kl.add(joinKey(table), lineNo)
			kl.add(joinKey(itable), lineNo)
			continue
		}
		eq := indexOutsideQuotes(s, '=')
		if eq <= 0 {
			continue
		}
		key := splitKey(s[:eq])
		kl.add(joinKey(append(append([]string{}, table...), key...)), lineNo)
		kl.add(joinKey(append(append([]string{}, itable...), key...)), lineNo)
		// A multi-line string opened on this line and not closed on it.
		val := s[eq+1:]
		for _, q := range []string{`"""`, `'''`} {
			if strings.Count(val, q)%2 == 1 {
				inMulti = q
			}
		}
	}
	return kl
}

// itablePrefix returns the indexed form of a plain table path, reusing the
// element numbers of the current indexed table where the paths agree.
func itablePrefix(itable, plain []string) []string {
	out := make([]string, 0, len(plain))
	for i, p := range plain {
		if i < len(itable) && strings.SplitN(itable[i], "#", 2)[0] == p {
			out = append(out, itable[i])
		} else {
			out = append(out, p)
		}
	}
	return out
}

func (kl keyLines) add(path string, line int) {
	if _, ok := kl[path]; !ok {
		kl[path] = line
	}
}

// line returns the line of path, or of its nearest recorded parent; 0 if
// none is known.
func (kl keyLines) line(path ...string) int {
	for n := len(path); n > 0; n-- {
		if l, ok := kl[joinKey(path[:n])]; ok {
			return l
		}
	}
	return 0
}

func joinKey(parts []string) string { return strings.Join(parts, ".") }

// splitKey splits a dotted TOML key into unquoted components.
func splitKey(s string) []string {
	var parts []string
	var cur strings.Builder
	var quote byte
	for i := 0; i < len(s); i++ {
		c := s[i]
		switch {
		case quote != 0:
			if c == quote {
				quote = 0
			} else if c == '\\' && quote == '"' && i+1 < len(s) {
				i++
				cur.WriteByte(s[i])
			} else {
				cur.WriteByte(c)
			}
		case c == '"' || c == '\'':
			quote = c
		case c == '.':
			parts = append(parts, strings.TrimSpace(cur.String()))
			cur.Reset()
		case c == ' ' || c == '\t':
		default:
			cur.WriteByte(c)
		}
	}
	return append(parts, strings.TrimSpace(cur.String()))
}

func indexOutsideQuotes(s string, b byte) int {
	var quote byte
	for i := 0; i < len(s); i++ {
		c := s[i]
		switch {
		case quote != 0:
			if c == '\\' && quote == '"' {
				i++
			} else if c == quote {
				quote = 0
			}
		case c == '"' || c == '\'':
			quote = c
		case c == b:
			return i
		case c == '#':
			return -1
		}
	}
	return -1
}

// nestingDepth scans TOML source for the deepest nesting: the number of key
// components of a table header or dotted key plus the depth of arrays and
// inline tables in values. It returns the depth and the line of its first
// occurrence. Strings and comments are skipped. Dotted keys inside inline
// tables are counted by their braces only.
func nestingDepth(src string) (depth, line int) {
	lineNo := 1
	tableDepth := 0
	bracket := 0
	atLineStart := true
	keyParts := 1
	inKey := false
	update := func(d int) {
		if d > depth {
			depth, line = d, lineNo
		}
	}
	for i := 0; i < len(src); i++ {
		c := src[i]
		switch {
		case c == '\n':
			lineNo++
			atLineStart = true
			inKey = false
			continue
		case c == ' ' || c == '\t' || c == '\r':
			continue
		case c == '#':
			for i < len(src) && src[i] != '\n' {
				i++
			}
			i--
			continue
		case c == '"' || c == '\'':
			q := string(c)
			if strings.HasPrefix(src[i:], q+q+q) {
				q = q + q + q
			}
			j := i + len(q)
			for j < len(src) {
				if src[j] == '\\' && c == '"' {
					j += 2
					continue
				}
				if strings.HasPrefix(src[j:], q) {
					break
				}
				if src[j] == '\n' {
					lineNo++
				}
				j++
			}
			i = j + len(q) - 1
			atLineStart = false
			continue
		}
		if atLineStart && bracket == 0 && c == '[' {
			// Table header: count its components.
			end := strings.IndexByte(src[i:], '\n')
			if end < 0 {
				end = len(src) - i
			}
			h := strings.Trim(strings.TrimSpace(src[i:i+end]), "[]")
			if k := indexOutsideQuotes(h, '#'); k >= 0 {
				h = h[:k]
			}
			tableDepth = len(splitKey(strings.Trim(strings.TrimSpace(h), "[]")))
			update(tableDepth)
			i += end - 1
			atLineStart = false
			continue
		}
		if atLineStart && bracket == 0 {
			inKey, keyParts = true, 1
		}
		atLineStart = false
		switch {
		case inKey && c == '.':
			keyParts++
		case inKey && c == '=':
			inKey = false
			update(tableDepth + keyParts)
		case c == '[' || c == '{':
			bracket++
			update(tableDepth + keyParts + bracket)
		case c == ']' || c == '}':
			if bracket > 0 {
				bracket--
			}
		}
	}
	return depth, line
}

// editDistance is the Levenshtein distance between a and b.
func editDistance(a, b string) int {
	ra, rb := []rune(a), []rune(b)
	prev := make([]int, len(rb)+1)
	cur := make([]int, len(rb)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(ra); i++ {
		cur[0] = i
		for j := 1; j <= len(rb); j++ {
			cost := 1
			if ra[i-1] == rb[j-1] {
				cost = 0
			}
			cur[j] = min(prev[j]+1, cur[j-1]+1, prev[j-1]+cost)
		}
		prev, cur = cur, prev
	}
	return prev[len(rb)]
}

// closest returns the candidate nearest to s by edit distance (ties: the
// first in candidates order).
func closest(s string, candidates []string) string {
	best, bd := "", -1
	for _, c := range candidates {
		if d := editDistance(strings.ToLower(s), c); bd < 0 || d < bd {
			best, bd = c, d
		}
	}
	return best
}
