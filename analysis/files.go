package analysis

import (
	"os"
	"path/filepath"
	"strconv"
	"strings"
)

// OutputPath joins a file name prefix, or a directory (an existing one,
// or a prefix ending in the path separator), with a file name.
func OutputPath(prefix, name string) string {
	if prefix == "" {
		return name
	}
	if strings.HasSuffix(prefix, "/") || strings.HasSuffix(prefix, string(os.PathSeparator)) {
		return filepath.Join(prefix, name)
	}
	if st, err := os.Stat(prefix); err == nil && st.IsDir() {
		return filepath.Join(prefix, name)
	}
	return prefix + name
}

// RangeSpeed is the i-th of n evenly spaced speeds from from to to,
// rounded to 12 significant digits so that a range reads as people write
// it (0.27, not 0.26999999999999996, for the 4th of 12 from 0 to 0.99);
// the last is to exactly.
func RangeSpeed(from, to float64, i, n int) float64 {
	if i == n-1 {
		return to
	}
	b := from + (to-from)*float64(i)/float64(n-1)
	r, err := strconv.ParseFloat(strconv.FormatFloat(b, 'g', 12, 64), 64)
	if err != nil || !(r >= 0 && r < 1) {
		return b
	}
	return r
}
