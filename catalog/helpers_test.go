package catalog

import (
	"fmt"
	"math"
	"reflect"
)

// diffStars compares two catalogues bit for bit (NaN equals NaN) and
// describes the first difference, or returns "".
func diffStars(a, b *Stars) string {
	if a.Len() != b.Len() {
		return fmt.Sprintf("length %d vs %d", a.Len(), b.Len())
	}
	if a.Epoch != b.Epoch || a.Source != b.Source || a.Format != b.Format {
		return fmt.Sprintf("header %v/%q/%q vs %v/%q/%q", a.Epoch, a.Source, a.Format, b.Epoch, b.Source, b.Format)
	}
	if !reflect.DeepEqual(a.ID, b.ID) || !reflect.DeepEqual(a.Flags, b.Flags) {
		return "ID or Flags differ"
	}
	if (a.Names == nil) != (b.Names == nil) || !reflect.DeepEqual(a.Names, b.Names) && !(len(a.Names) == 0 && len(b.Names) == 0) {
		return "Names differ"
	}
	cols := []struct {
		name string
		x, y []float32
	}{{"X", a.X, b.X}, {"Y", a.Y, b.Y}, {"Z", a.Z, b.Z}, {"Dist", a.Dist, b.Dist}, {"Vmag", a.Vmag, b.Vmag},
		{"Teff", a.Teff, b.Teff}, {"BV", a.BV, b.BV}, {"PMRA", a.PMRA, b.PMRA}, {"PMDec", a.PMDec, b.PMDec}, {"RV", a.RV, b.RV}}
	for _, c := range cols {
		if (c.x == nil) != (c.y == nil) || len(c.x) != len(c.y) {
			return fmt.Sprintf("column %s presence/length differs", c.name)
		}
		for i := range c.x {
			if math.Float32bits(c.x[i]) != math.Float32bits(c.y[i]) {
				return fmt.Sprintf("column %s row %d: %v vs %v", c.name, i, c.x[i], c.y[i])
			}
		}
	}
	return ""
}
