package catalog

import "testing"

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
