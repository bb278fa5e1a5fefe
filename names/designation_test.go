package names

import "testing"

func TestConstellations(t *testing.T) {
	seen := map[string]bool{}
	for _, c := range constellations {
		if seen[c.abbr] || len(c.abbr) != 3 {
			t.Errorf("abbreviation %q repeated or not three letters", c.abbr)
		}
		seen[c.abbr] = true
	}
	if len(seen) != 88 {
		t.Errorf("%d constellations, want the IAU's 88", len(seen))
	}
}

// Spellings of one designation, each from a source that uses it: the
// IAU-CSN table (alf, tet01, θ1), the Bright Star Catalogue's Name field
// (58Alp Ori, Alp1Cen, 13Mu  Gem), SIMBAD-style and plain-text forms
// (common practice).
func TestParseDesignation(t *testing.T) {
	alfOri := Designation{Letter: 1, Con: conIndex["ori"]}
	for _, c := range []struct {
		in   string
		want Designation
		str  string
	}{
		{"alf Ori", alfOri, "α Ori"},
		{"α Ori", alfOri, "α Ori"},
		{"Alpha Orionis", alfOri, "α Ori"},
		{"alpha orionis", alfOri, "α Ori"},
		{"Alp Ori", alfOri, "α Ori"},
		{"ALF  ORI", alfOri, "α Ori"},
		{"αOri", alfOri, "α Ori"},
		{"58 Ori", Designation{Flamsteed: 58, Con: conIndex["ori"]}, "58 Ori"},
		{"58Alp Ori", Designation{Flamsteed: 58, Letter: 1, Con: conIndex["ori"]}, "α Ori"},
		{"58 Alpha Orionis", Designation{Flamsteed: 58, Letter: 1, Con: conIndex["ori"]}, "α Ori"},
		{"Alp1Cen", Designation{Letter: 1, Sup: 1, Con: conIndex["cen"]}, "α¹ Cen"},
		{"α¹ Cen", Designation{Letter: 1, Sup: 1, Con: conIndex["cen"]}, "α¹ Cen"},
		{"alf02 Cen", Designation{Letter: 1, Sup: 2, Con: conIndex["cen"]}, "α² Cen"},
		{"tet01 Eri", Designation{Letter: 8, Sup: 1, Con: conIndex["eri"]}, "θ¹ Eri"},
		{"θ1 Eri", Designation{Letter: 8, Sup: 1, Con: conIndex["eri"]}, "θ¹ Eri"},
		{"13Mu  Gem", Designation{Flamsteed: 13, Letter: 12, Con: conIndex["gem"]}, "μ Gem"},
		{"Alpha Canis Majoris", Designation{Letter: 1, Con: conIndex["cma"]}, "α CMa"},
		{"alf CMa", Designation{Letter: 1, Con: conIndex["cma"]}, "α CMa"},
		{"tau Tau", Designation{Letter: 19, Con: conIndex["tau"]}, "τ Tau"},
		{"Tau Ceti", Designation{Letter: 19, Con: conIndex["cet"]}, "τ Cet"},
		{"eps Boo", Designation{Letter: 5, Con: conIndex["boo"]}, "ε Boo"},
		{"Epsilon Bootis", Designation{Letter: 5, Con: conIndex["boo"]}, "ε Boo"},
		{"Epsilon Boötis", Designation{Letter: 5, Con: conIndex["boo"]}, "ε Boo"},
		{"ksi UMa", Designation{Letter: 14, Con: conIndex["uma"]}, "ξ UMa"},
		{"Xi Ursae Majoris", Designation{Letter: 14, Con: conIndex["uma"]}, "ξ UMa"},
	} {
		d, ok := ParseDesignation(c.in)
		if !ok || d != c.want {
			t.Errorf("%q: have %+v %v, want %+v", c.in, d, ok, c.want)
			continue
		}
		if d.String() != c.str {
			t.Errorf("%q: String %q, want %q", c.in, d.String(), c.str)
		}
	}
	for _, s := range []string{"", "Betelgeuse", "Ori", "alf", "58", "HR 2061", "V2500 Oph", "Y CVn", "alf Xyz", "0 Ori", "1000 Ori"} {
		if d, ok := ParseDesignation(s); ok {
			t.Errorf("%q: parsed as %+v, want no designation", s, d)
		}
	}
}
