package catalog

import (
	"math"
	"strings"
	"testing"
)

// TestDisplayID: the built-in sky's identifiers read as synth-N and
// nearby-K, other identifiers as their number, and Find accepts each form
// (the identifier ranges are this project's own, see SyntheticIDBase).
func TestDisplayID(t *testing.T) {
	for _, c := range []struct {
		id   int64
		want string
	}{
		{2491, "2491"}, {0, "0"}, {-5, "-5"},
		{SyntheticIDBase, "synth-0"}, {SyntheticIDBase + 49942, "synth-49942"},
		{NearbyIDBase + 3, "nearby-3"}, {math.MaxInt64, "nearby-123372036854775807"},
	} {
		if have := DisplayID(c.id); have != c.want {
			t.Errorf("DisplayID(%d) = %q, want %q", c.id, have, c.want)
		}
	}
	s := BuiltIn()
	for _, i := range []int{0, 17, s.Len() - 1} {
		d := DisplayID(s.ID[i])
		for _, q := range []string{d, strings.ToUpper(d), " " + d} {
			if j, ok := s.Find(q); !ok || s.ID[j] != s.ID[i] {
				t.Errorf("Find(%q) = %d, %v; want the row with id %d", q, j, ok, s.ID[i])
			}
		}
	}
	for _, q := range []string{"synth-", "synth--1", "synth-x", "nearby-99999999999999999999"} {
		if _, ok := s.Find(q); ok {
			t.Errorf("Find(%q) found a star", q)
		}
	}
}
