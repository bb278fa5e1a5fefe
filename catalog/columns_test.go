package catalog

import (
	"errors"
	"strings"
	"testing"
)

func TestParseColumnMap(t *testing.T) {
	cm, err := ParseColumnMap(" ra = alpha_h , dec=delta,vmag=mag,bv=colour,plx=plx_mas,name=label,id=star,ra-hours=true,epoch=2000")
	want := ColumnMap{ID: "star", RA: "alpha_h", Dec: "delta", Vmag: "mag", BV: "colour", Parallax: "plx_mas", Name: "label", RAHours: true, Epoch: 2000}
	if err != nil || cm != want {
		t.Fatalf("have %+v, %v; want %+v", cm, err, want)
	}
	// The parsed map reads the generic fixture like the literal one in TestFixturesGood [cp].
	s, _, err := Open(fixture("generic_good.csv"), ReadOptions{Columns: cm})
	if err != nil || s.Len() != 2 || s.At(0).Name != "Test One" {
		t.Fatalf("fixture through parsed map: %v", err)
	}
	for _, bad := range []string{"ra", "ra=", "colour=x", "ra=a,ra=b", "ra-hours=maybe", "epoch=soon"} {
		if _, err := ParseColumnMap(bad); err == nil {
			t.Errorf("ParseColumnMap(%q) accepted", bad)
		}
	}
	if cm, err := ParseColumnMap(""); err != nil || cm != (ColumnMap{}) {
		t.Errorf("empty spec: %+v %v", cm, err)
	}
}

// ParseColumns is the one column-map parser (--column, plan
// catalogue.columns through ColumnMap.Set, ParseColumnMap): aliases, the
// bare ra-hours word, and refusals with their sentinel errors.
func TestParseColumns(t *testing.T) {
	for _, c := range []struct {
		in   []string
		want ColumnMap
	}{
		{nil, ColumnMap{}},
		{[]string{"dist=d_pc"}, ColumnMap{Dist: "d_pc"}},
		{[]string{"distance=d_pc"}, ColumnMap{Dist: "d_pc"}},
		{[]string{" VMAG = V ", "b-v=BV", "ra-hours"}, ColumnMap{Vmag: "V", BV: "BV", RAHours: true}},
		{[]string{"de=DE", "pmde=pm", "plx=p", "v=m"}, ColumnMap{Dec: "DE", PMDec: "pm", Parallax: "p", Vmag: "m"}},
		{[]string{"epoch=1991.25", "ra_hours=false"}, ColumnMap{Epoch: 1991.25}},
	} {
		cm, err := ParseColumns(c.in)
		if err != nil || cm != c.want {
			t.Errorf("%q: have %+v, %v; want %+v", c.in, cm, err, c.want)
		}
	}
	for _, c := range []struct {
		in   string
		want error
	}{
		{"g=phot_g_mean_mag", ErrGaiaColumn},
		{"bp_rp=x", ErrGaiaColumn},
		{"vmg=V", ErrColumnField},
		{"colour=x", ErrColumnField},
	} {
		_, err := ParseColumns([]string{c.in})
		if !errors.Is(err, c.want) || !strings.Contains(err.Error(), c.in) {
			t.Errorf("%q: have %v, want %v naming the entry", c.in, err, c.want)
		}
	}
	for _, bad := range [][]string{{"ra"}, {"=x"}, {"ra="}, {"ra=a", "ra=b"}, {"epoch=1e9"}} {
		if _, err := ParseColumns(bad); err == nil {
			t.Errorf("%q accepted", bad)
		}
	}
	_, err := ParseColumns([]string{"vmg=V"})
	for _, f := range ColumnFields {
		if !strings.Contains(err.Error(), f) {
			t.Errorf("unknown-field message %q does not list %q", err, f)
		}
	}
}
