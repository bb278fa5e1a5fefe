package catalog

import (
	"math"
	"testing"
)

func TestNearbyStars(t *testing.T) {
	ns := NearbyStars()
	// The brief asks for 5–8 invented stars within 5 pc [cp].
	if len(ns) < 5 || len(ns) > 8 {
		t.Fatalf("have %d nearby stars, want 5–8", len(ns))
	}
	sky := BuiltIn()
	names := map[string]bool{}
	for k, st := range ns {
		def := &nearbyStars[k]
		if st.Dist <= 0 || st.Dist >= 5 {
			t.Errorf("%s: distance %v pc, want within 5 pc", st.Name, st.Dist)
		}
		// Distance modulus, V − M_V = 5 log10(d / 10 pc) [pub, definition].
		if want := def.absV + 5*math.Log10(st.Dist/10); math.Abs(st.Vmag-want) > 1e-12 {
			t.Errorf("%s: V = %v, want M_V + 5 log10(d/10) = %v", st.Name, st.Vmag, want)
		}
		if st.ID != NearbyIDBase+int64(k)+1 {
			t.Errorf("%s: id %d, want %d", st.Name, st.ID, NearbyIDBase+int64(k)+1)
		}
		if names[st.Name] || st.Name == "" {
			t.Errorf("name %q empty or repeated", st.Name)
		}
		names[st.Name] = true
		if sp, ok := NearbySpectralType(st.Name); !ok || sp != def.spType {
			t.Errorf("%s: spectral type %q, %v; want %q", st.Name, sp, ok, def.spType)
		}
		// Present in the built-in sky at RowIndex with the same values.
		row := sky.At(st.RowIndex)
		if row.ID != st.ID || row.Name != st.Name || float32(row.Dist) != float32(st.Dist) || float32(row.Vmag) != float32(st.Vmag) {
			t.Errorf("%s: BuiltIn row %d is %+v, want the nearby star", st.Name, st.RowIndex, row)
		}
		if i, ok := sky.Find(st.Name); !ok || i != st.RowIndex {
			t.Errorf("Find(%q) = %d, %v; want %d, true", st.Name, i, ok, st.RowIndex)
		}
		if math.Abs(row.RA-st.RA) > 1e-4 || math.Abs(row.Dec-st.Dec) > 1e-4 {
			t.Errorf("%s: BuiltIn position (%v, %v), want (%v, %v)", st.Name, row.RA, row.Dec, st.RA, st.Dec)
		}
	}
	if _, ok := NearbySpectralType("Sirius"); ok {
		t.Error("NearbySpectralType knows a name that is not an invented nearby star")
	}
	// A fresh copy each call: changing it must not change the next one.
	ns[0].Name = "changed"
	if NearbyStars()[0].Name == "changed" {
		t.Error("NearbyStars returned shared storage")
	}
}

// TestNearbyDwarfSequence checks that the invented main-sequence stars follow
// the dwarf sequence: cooler and redder as they get fainter [cp], and within
// 0.3 in B−V and 12 % in Teff of the Ballesteros (2012) temperature of their
// colour [pub] (a blackbody relation, so M dwarfs come out warmer than
// their tabulated Teff; the tolerance covers that).
func TestNearbyDwarfSequence(t *testing.T) {
	var prev *nearbyDef
	for _, k := range []int{3, 2, 0, 4, 1, 5} { // G2, K1, M1.5, M3, M4.5, M5.5
		d := &nearbyStars[k]
		if prev != nil && !(d.absV > prev.absV && d.bv > prev.bv && d.teff < prev.teff) {
			t.Errorf("%s (%s) does not follow %s (%s) down the main sequence", d.name, d.spType, prev.name, prev.spType)
		}
		if bt := TeffFromBV(d.bv); math.Abs(bt/d.teff-1) > 0.12 {
			t.Errorf("%s: Teff %v vs Ballesteros %v for B−V %v: differ by more than 12 %%", d.name, d.teff, bt, d.bv)
		}
		prev = d
	}
}
