package flight

import (
	"strings"
	"testing"
)

// FuzzParseRange: no string panics ParseRange; an accepted range is sane
// and its String form parses back to the same range.
func FuzzParseRange(f *testing.F) {
	for _, s := range []string{"0-29", "5-", "7", "", "3-1", "-1", "99999999999999999999-", " 1 - 2 "} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		r, err := ParseRange(s)
		if err != nil {
			if !strings.HasPrefix(err.Error(), "flight: ") {
				t.Fatalf("error without the package prefix: %v", err)
			}
			return
		}
		if r.First < 0 || r.Last >= 0 && r.Last < r.First {
			t.Fatalf("ParseRange(%q) = %+v", s, r)
		}
		back, err := ParseRange(r.String())
		if err != nil || back != r {
			t.Fatalf("ParseRange(%q) = %+v; its String %q parses to %+v, %v", s, r, r.String(), back, err)
		}
	})
}

// FuzzParseShard: no string panics ParseShard; an accepted shard validates
// and round-trips through String.
func FuzzParseShard(f *testing.F) {
	for _, s := range []string{"0/1", "2/8", "8/8", "-1/2", "1/0", "a/b", "1/", "3/9223372036854775807"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s string) {
		sh, err := ParseShard(s)
		if err != nil {
			if !strings.HasPrefix(err.Error(), "flight: ") {
				t.Fatalf("error without the package prefix: %v", err)
			}
			return
		}
		if err := sh.Validate(); err != nil {
			t.Fatalf("ParseShard(%q) = %+v, which does not validate: %v", s, sh, err)
		}
		back, err := ParseShard(sh.String())
		if err != nil || back != sh {
			t.Fatalf("ParseShard(%q) = %+v; its String %q parses to %+v, %v", s, sh, sh.String(), back, err)
		}
	})
}
