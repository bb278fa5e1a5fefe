package scene

import (
	"testing"

	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/internal/sharedcat"
	"github.com/skyframe/skyframe/names"
	"gonum.org/v1/gonum/spatial/r3"
)

// Issue 17's checks through the options that name stars: every spelling
// of Betelgeuse points --toward at HR 2061's direction (within 1e-7, the
// float32 precision of the stored direction, renormalised from the star's
// position) (from the real
// BSC5 and IAU-CSN files), α Cen's two named components resolve apart.
func TestTowardByName(t *testing.T) {
	stars, _, err := catalog.Open(sharedcat.BSC5(t), catalog.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	table, err := LoadNames(sharedcat.IAUCSN(t))
	if err != nil {
		t.Fatal(err)
	}
	x := names.NewIndex(stars, table)
	dirOf := func(hr int64) r3.Vec {
		for i, id := range stars.ID {
			if id == hr {
				st := stars.At(i)
				return r3.Vec{X: st.Dir[0], Y: st.Dir[1], Z: st.Dir[2]}
			}
		}
		t.Fatalf("HR %d missing", hr)
		return r3.Vec{}
	}
	for _, c := range []struct {
		q  string
		hr int64
	}{
		{"Betelgeuse", 2061}, {"betelgeuse", 2061}, {"alf Ori", 2061}, {"α Ori", 2061},
		{"Alpha Orionis", 2061}, {"58 Ori", 2061}, {"HR 2061", 2061}, {"HIP 27989", 2061},
		{"Rigil Kentaurus", 5459}, {"Toliman", 5460},
	} {
		d, err := ResolveDirection(x, "toward", c.q, r3.Vec{})
		if err != nil {
			t.Errorf("%q: %v", c.q, err)
			continue
		}
		if w := dirOf(c.hr); r3.Norm(r3.Sub(d, w)) > 1e-7 {
			t.Errorf("%q: direction %v, want HR %d's %v", c.q, d, c.hr, w)
		}
	}
}
