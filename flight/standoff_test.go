package flight

import (
	"errors"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/catalog"
)

// twoSuns is a catalogue of a Sun-like star at 1 pc (V = M_V − 5 = −0.17
// with M_V = 4.83 [cp], T = 5772 K, IAU 2015 B3 [pub]) and a star of the
// same temperature and absolute magnitude −0.17, 5 mag brighter (L = 100
// times the first's), at 2 pc.
func twoSuns() *catalog.Stars {
	s := &catalog.Stars{Epoch: 2000, Source: "test", Format: "in-code"}
	for i, c := range []struct {
		name string
		v, d float64
	}{{"Near", -0.17, 1}, {"Bright", -0.17 - 5 + 5*math.Log10(2), 2}} {
		s.Append(catalog.Star{ID: int64(i + 1), Name: c.name, Dist: c.d, Vmag: c.v, Teff: 5772, BV: math.NaN(), RV: math.NaN()})
		s.X[i], s.Y[i], s.Z[i] = 1, 0, 0
	}
	return s
}

func findIn(s *catalog.Stars) func(string) (int, bool) {
	return func(q string) (int, bool) {
		for i := range s.ID {
			if s.Names[i] == q {
				return i, true
			}
		}
		return 0, false
	}
}

// The default stand-off is √(L/L☉) au: for the Sun's own V and
// temperature it is 1 au within 2.5 % (the radius-like error of the
// blackbody V normalisation: physics.md holds the bolometric flux of a
// V = −26.74, 5772 K blackbody to 5 % of the solar constant), and it
// scales as √L exactly (a star 100 times as luminous: 10 times as far).
func TestStarsStandOff(t *testing.T) {
	s := twoSuns()
	so := StarsStandOff(s, findIn(s))
	near, ok1 := so("Near")
	bright, ok2 := so("Bright")
	if !ok1 || !ok2 {
		t.Fatal("stand-off unknown")
	}
	t.Logf("Sun-like star: stand-off %.5f au", near/AUPc)
	if !scalar.EqualWithinRel(near, AUPc, 0.025) {
		t.Errorf("Sun-like stand-off %.5f au, want 1 au within 2.5 %%", near/AUPc)
	}
	if !scalar.EqualWithinRel(bright/near, 10, 1e-5) {
		t.Errorf("√L scaling: ratio %.6f, want 10", bright/near)
	}
	if _, ok := so("Nowhere"); ok {
		t.Error("unknown star has a stand-off")
	}
}

// A voyage to a star ends at rest at the stand-off on the line of flight,
// the trajectory's destination stays the star; standoff_au overrides the
// default; zero, negative, NaN, or not short of the star are errors naming
// the key and line.
func TestVoyageStandOff(t *testing.T) {
	s := twoSuns()
	res := StarsResolver(s, findIn(s))
	plan := func(extra string) string {
		return "[[leg]]\nkind = \"voyage\"\naccel_g = 1\nto_star = \"Near\"\n" + extra + "[show]\nseconds = 1\n"
	}
	for _, c := range []struct {
		extra string
		want  float64 // au short of the star; 0: the default
	}{{"", 0}, {"standoff_au = 5\n", 5}} {
		p, err := ParsePlan([]byte(plan(c.extra)), "s.toml")
		if err != nil {
			t.Fatal(err)
		}
		p.StandOff = StarsStandOff(s, findIn(s))
		if err := p.Bind(res); err != nil {
			t.Fatal(err)
		}
		want := c.want * AUPc
		if c.want == 0 {
			want, _ = p.StandOff("Near")
		}
		tr := p.Trajectory()
		end := tr.End()
		star := r3.Vec{X: 1}
		if tr.Destination() != star {
			t.Errorf("destination %v, want the star", tr.Destination())
		}
		if have := r3.Norm(r3.Sub(star, end.Pos)); !scalar.EqualWithinRel(have, want, 1e-9) || end.Pos.X >= 1 || end.Beta != 0 {
			t.Errorf("%q: end %v at β %v, %.9g pc from the star; want rest %.9g pc short", c.extra, end.Pos, end.Beta, have, want)
		}
	}
	for _, c := range []struct{ bad, where string }{
		{"standoff_au = 0\n", "s.toml:5: leg[0].standoff_au"},
		{"standoff_au = -1\n", "s.toml:5: leg[0].standoff_au"},
		{"standoff_au = nan\n", "s.toml:5: leg[0].standoff_au"},
		{"standoff_au = 1e9\n", "s.toml:1: leg[0]"}, // beyond the star: the leg
	} {
		p, err := ParsePlan([]byte(plan(c.bad)), "s.toml")
		if err == nil {
			p.StandOff = StarsStandOff(s, findIn(s))
			err = p.Bind(res)
			if !errors.Is(err, ErrStandOff) {
				t.Errorf("%q: have %v, want ErrStandOff", c.bad, err)
			}
		}
		if err == nil || !strings.Contains(err.Error(), c.where) {
			t.Errorf("%q: have %v, want an error naming %s", c.bad, err, c.where)
		}
	}
}
