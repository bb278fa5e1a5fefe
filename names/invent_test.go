package names

import (
	"slices"
	"strings"
	"testing"

	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/internal/sharedcat"
)

// Invented names must never be a real star's: compared with every name of
// the IAU Catalog of Star Names (shared/catalogs/iau-csn.txt), ignoring
// case, blanks and accents, and with every name of more seeds than the
// built-in sky uses.
func TestInventedNotIAU(t *testing.T) {
	tab, err := ReadFile(sharedcat.IAUCSN(t))
	if err != nil {
		t.Fatal(err)
	}
	real := map[string]string{}
	for _, e := range tab.Entries {
		real[foldName(e.Name)] = e.Name
		for _, w := range strings.Fields(e.Name) {
			real[foldName(w)] = e.Name
		}
	}
	for _, seed := range []uint64{catalog.DefaultSynthSeed, 1, 2, 3, 42} {
		for _, n := range Invent(seed, 200) {
			if r, ok := real[foldName(n)]; ok {
				t.Errorf("seed %#x: invented %q equals the IAU name %q", seed, n, r)
			}
		}
	}
	x := NewIndex(catalog.BuiltIn(), nil)
	for _, i := range x.Named() {
		if r, ok := real[foldName(x.Proper(i))]; ok {
			t.Errorf("built-in sky: %q equals the IAU name %q", x.Proper(i), r)
		}
	}
}

// Pronounceable and well-formed: capitalised letters only, 5–11 long, no
// three consonants or three vowels in a row; distinct; stable for a seed
// and different for another.
func TestInventShape(t *testing.T) {
	a := Invent(catalog.DefaultSynthSeed, 100)
	b := Invent(catalog.DefaultSynthSeed, 100)
	if !slices.Equal(a, b) {
		t.Fatal("Invent is not stable for a seed")
	}
	if slices.Equal(a, Invent(catalog.DefaultSynthSeed+1, 100)) {
		t.Error("another seed gives the same names")
	}
	seen := map[string]bool{}
	isVowel := func(r byte) bool { return strings.IndexByte("aeiouy", r) >= 0 }
	for _, n := range a {
		if seen[n] {
			t.Errorf("%q twice", n)
		}
		seen[n] = true
		if len(n) < 5 || len(n) > 11 || n[0] < 'A' || n[0] > 'Z' {
			t.Errorf("%q: want 5–11 letters, capitalised", n)
		}
		l := strings.ToLower(n)
		run, kind := 0, false
		for i := 0; i < len(l); i++ {
			if l[i] < 'a' || l[i] > 'z' {
				t.Errorf("%q: not a letter at %d", n, i)
			}
			v := isVowel(l[i])
			if i > 0 && v == kind {
				run++
			} else {
				run = 1
			}
			kind = v
			if run >= 3 && !(l[i-1] == 'h' || l[i] == 'h' || strings.Contains(l[i-2:i+1], "qu")) {
				t.Errorf("%q: three %s in a row", n, map[bool]string{true: "vowels", false: "consonants"}[v])
				break
			}
		}
	}
}

// The built-in sky: its brightest sampled stars carry invented names that
// Find reads and Label shows, the same on every build; the invented nearby
// stars keep theirs; real names are not attached even with a table.
func TestBuiltInNames(t *testing.T) {
	sky := catalog.BuiltIn()
	x := NewIndex(sky, nil)
	named := x.Named()
	if len(named) < 15 || len(named) > 40 {
		t.Fatalf("%d named rows, want about two dozen", len(named))
	}
	distinct := map[string]bool{}
	for _, i := range named {
		distinct[x.Proper(i)] = true
	}
	if len(distinct) != len(named) {
		t.Errorf("%d names for %d stars", len(distinct), len(named))
	}
	faintestNamed := float32(-100)
	for _, i := range named {
		nm := x.Proper(i)
		if j, err := x.Find(strings.ToUpper(nm)); err != nil || j != i {
			t.Errorf("%q: row %d %v, want %d", nm, j, err, i)
		}
		if x.Label(i) != nm {
			t.Errorf("row %d: label %q, want %q", i, x.Label(i), nm)
		}
		faintestNamed = max(faintestNamed, sky.Vmag[i])
	}
	brighter := 0
	for i, id := range sky.ID {
		if id >= catalog.SyntheticIDBase && id < catalog.NearbyIDBase && sky.Vmag[i] < faintestNamed {
			brighter++
		}
	}
	if brighter >= len(named) {
		t.Errorf("%d sampled stars are brighter than the faintest named one; want the brightest named", brighter)
	}
	// A star's name does not depend on the rows beside it: an index of a
	// part of the sky (as a streamed chunk gives) names the same stars alike.
	part := &catalog.Stars{Source: sky.Source, Format: sky.Format, Epoch: sky.Epoch}
	for _, i := range named[len(named)/2:] {
		part.AppendRow(sky, i)
	}
	px := NewIndex(part, nil)
	for k, i := range named[len(named)/2:] {
		if px.Proper(k) != x.Proper(i) {
			t.Errorf("row %d alone: %q, in the whole sky %q", i, px.Proper(k), x.Proper(i))
		}
	}
	y := NewIndex(sky, nil)
	for _, i := range named {
		if y.Proper(i) != x.Proper(i) {
			t.Errorf("row %d: %q then %q", i, x.Proper(i), y.Proper(i))
		}
	}
	if i, err := x.Find("Ambrel"); err != nil || sky.Names[i] != "Ambrel" {
		t.Errorf("Ambrel: %v", err)
	}
	if l := x.Label(0); l != catalog.NearbyStars()[0].Name {
		t.Errorf("row 0 label %q", l)
	}
}
