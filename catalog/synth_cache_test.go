package catalog

import (
	"fmt"
	"maps"
	"math"
	"slices"
	"testing"
)

// sameStars reports the first difference between the columns of a and b.
func sameStars(t *testing.T, what string, a, b *Stars) {
	t.Helper()
	if a.Len() != b.Len() {
		t.Fatalf("%s: %d stars, want %d", what, a.Len(), b.Len())
	}
	if !slices.Equal(a.ID, b.ID) || !slices.Equal(a.X, b.X) || !slices.Equal(a.Y, b.Y) || !slices.Equal(a.Z, b.Z) ||
		!slices.Equal(a.Dist, b.Dist) || !slices.Equal(a.Vmag, b.Vmag) || !slices.Equal(a.Teff, b.Teff) ||
		!slices.EqualFunc(a.BV, b.BV, func(x, y float32) bool { return x == y || x != x && y != y }) || !slices.Equal(a.Flags, b.Flags) {
		t.Fatalf("%s: columns differ from Synthetic's", what)
	}
	if a.Names[0] != b.Names[0] || len(a.Names) != len(b.Names) {
		t.Fatalf("%s: names differ", what)
	}
}

// deeperAbove is a CellLimit: v for the cells whose direction's component
// k exceeds above, DefaultSynthMagLimit for the others.
func deeperAbove(k int, above, v float64) func(SynthCell) float64 {
	return func(c SynthCell) float64 {
		if c.Dir[k] > above {
			return v
		}
		return DefaultSynthMagLimit
	}
}

// TestSkyCacheIsSynthetic: whatever was asked of the cache before (deeper,
// shallower, other cells), Sky gives Synthetic's catalogue for the same
// options bit for bit — the determinism a flight's frames rely on — and
// draws a cell only when asked deeper than before.
func TestSkyCacheIsSynthetic(t *testing.T) {
	// Cells toward one half of the sky deeper than the rest.
	half := func(v float64) func(SynthCell) float64 { return deeperAbove(0, 0, v) }
	deep := 9.6
	if testing.Short() {
		deep = 9.1
	}
	cases := []struct {
		lim  float64
		cell func(SynthCell) float64
	}{
		{8, nil},
		{deep, half(deep)},
		{deep - 0.45, nil},
		{8.5, half(8.3)},
		{deep, nil},
		{0, nil},
		{math.NaN(), half(8.7)},
	}
	c := NewSkyCache(SynthOptions{})
	held := 0
	for i, k := range cases {
		got := c.Sky(k.lim, k.cell)
		want := Synthetic(SynthOptions{MagLimit: k.lim, CellLimit: k.cell})
		sameStars(t, "case "+string(rune('0'+i)), got, want)
		if h := c.Held(); h < held {
			t.Errorf("case %d: the cache shrank from %d to %d stars", i, held, h)
		} else {
			held = h
		}
	}
	// The built-in sky is the prefix of every deeper sky (a frame's
	// references into it stay valid).
	b, d := BuiltIn(), c.Sky(deep, half(deep))
	sameStars(t, "prefix", d.Slice(0, b.Len()), b)
}

// TestSkyAfter: SkyAfter(base, skip, …) holds exactly Concat(base,
// Sky(…).Slice(skip, …)) — every column, optional ones and names
// included — for skips before, at and inside the magnitude blocks, past
// the end, and without a base.
func TestSkyAfter(t *testing.T) {
	halfTo := func(v float64) func(SynthCell) float64 { return deeperAbove(2, 0.3, v) }
	half := halfTo(8.9)
	c := NewSkyCache(SynthOptions{})
	// Drawn deeper first: the blocks then hold stars beyond 8.9 to pass
	// over.
	c.Sky(9.3, halfTo(9.3))
	full := c.Sky(8.9, half)
	sameStars(t, "Sky after a deeper one", full, Synthetic(SynthOptions{MagLimit: 8.9, CellLimit: half}))
	nb := BuiltIn().Len()
	if full.Len() < nb+1000 {
		t.Fatalf("only %d rows beyond the built-in sky's %d", full.Len()-nb, nb)
	}
	base := &Stars{Source: "base", Epoch: 2016}
	base.Append(Star{ID: 7, Name: "Base One", RA: 10, Dec: 20, Dist: 5, Vmag: 3, Teff: 5000, BV: 0.5, PMRA: 3, PMDec: -1, RV: 12})
	base.Append(Star{ID: 8, RA: 30, Dec: -5, Dist: 7, Vmag: 4, Teff: 6000, BV: 0.4, RV: math.NaN()})
	// Each case after the first draws into the storage of the one before.
	var lend *Stars
	for _, skip := range []int{0, 1, nb - 3, nb, nb + 1, nb + 517, full.Len() - 301, full.Len() - 1, full.Len(), full.Len() + 5} {
		want := Concat(base, full.Slice(min(skip, full.Len()), full.Len()))
		got := c.SkyAfter(lend, base, skip, 8.9, half)
		what := fmt.Sprintf("skip %d", skip)
		if lend != nil && got.Len() > 0 && &got.X[0] != &lend.X[:1][0] {
			t.Errorf("%s: %d rows in new storage, not the %d of the catalogue lent", what, got.Len(), cap(lend.X))
		}
		sameStars(t, what, got, want)
		if got.Source != "base" || got.Epoch != 2016 || !maps.Equal(got.Names, want.Names) ||
			!slices.Equal(got.PMRA, want.PMRA) || !slices.Equal(got.PMDec, want.PMDec) ||
			!slices.EqualFunc(got.RV, want.RV, func(x, y float32) bool { return x == y || x != x && y != y }) {
			t.Errorf("%s: header, names or optional columns differ from Concat's", what)
		}
		if err := got.Validate(); err != nil {
			t.Errorf("%s: %v", what, err)
		}
		lend = got
	}
	sameStars(t, "no base", c.SkyAfter(nil, nil, nb, 8.9, half), full.Slice(nb, full.Len()))
	if base.Len() != 2 || len(base.Names) != 1 {
		t.Error("SkyAfter modified its base")
	}
}

// Concat keeps both catalogues' rows, names and optional columns.
func TestConcat(t *testing.T) {
	a := &Stars{Source: "a"}
	a.Append(Star{ID: 1, Name: "One", RA: 10, Dec: 20, Dist: 5, Vmag: 3, Teff: 5000, BV: 0.5, RV: 12})
	b := &Stars{}
	b.Append(Star{ID: 2, RA: 30, Dec: -5, Dist: 7, Vmag: 4, Teff: 6000, BV: 0.4, RV: math.NaN()})
	b.Append(Star{ID: 3, Name: "Three", RA: 50, Dec: 5, Dist: 9, Vmag: 5, Teff: 7000, BV: 0.3, PMRA: 1, PMDec: -2, RV: math.NaN()})
	c := Concat(a, b)
	if c.Len() != 3 || c.Source != "a" || c.Names[0] != "One" || c.Names[2] != "Three" || c.Names[1] != "" {
		t.Fatalf("Concat: %d rows, names %v", c.Len(), c.Names)
	}
	if c.PMRA[0] != 0 || c.PMRA[2] != 1 || c.PMDec[2] != -2 || c.RV[0] != 12 || c.RV[1] == c.RV[1] || c.Vmag[2] != 5 {
		t.Errorf("Concat: PM %v/%v, RV %v, V %v", c.PMRA, c.PMDec, c.RV, c.Vmag)
	}
	if err := c.Validate(); err != nil {
		t.Error(err)
	}
	if a.Len() != 1 || b.Len() != 2 {
		t.Error("Concat modified its inputs")
	}
}
