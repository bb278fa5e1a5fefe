package spectrum

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

// The embedded table's column sums equal those recorded with an independent
// copy of the same CVRL ciexyz31 5 nm file (CIE 015:2004) [pub]: a guard
// against errors in copying the table.
func TestCMFTableSums(t *testing.T) {
	want := [3]float64{21.373139988621006, 21.371407850470007, 21.378664308989997}
	var have [3]float64
	for _, r := range cmfTable {
		for c := range r {
			have[c] += r[c]
		}
	}
	for c := range want {
		if !scalar.EqualWithinAbs(have[c], want[c], 1e-12) {
			t.Errorf("column %d: sum have %.15f, want %.15f", c, have[c], want[c])
		}
	}
	// ȳ(555 nm) = 1 by definition of V(λ) [pub CIE 1931].
	if y := cmfTable[(555-360)/5][1]; y != 1 {
		t.Errorf("ȳ(555) = %g, want 1", y)
	}
	// Bessell (1990) V peaks at 1 at 530 nm [pub].
	if v := vTable[(530-470)/10]; v != 1 {
		t.Errorf("S_V(530) = %g, want 1", v)
	}
}

// CMF returns the CIE 015:2004 table values at its nodes (ȳ(555 nm) = 1,
// x̄(600 nm) = 1.0622 [pub]), interpolates linearly between them and is
// zero outside 360–830 nm.
func TestCMFExported(t *testing.T) {
	if _, y, _ := CMF(555e-9); y != 1 {
		t.Errorf("ȳ(555 nm) = %g, want 1", y)
	}
	if x, _, _ := CMF(600e-9); math.Abs(x-1.0622) > 1e-12 {
		t.Errorf("x̄(600 nm) = %.6f, want 1.0622", x)
	}
	_, y0, _ := CMF(555e-9)
	_, y1, _ := CMF(560e-9)
	if _, y, _ := CMF(557.5e-9); math.Abs(y-(y0+y1)/2) > 1e-12 {
		t.Errorf("ȳ(557.5 nm) = %g, want the mean of its nodes %g", y, (y0+y1)/2)
	}
	for _, l := range []float64{359e-9, 831e-9, math.NaN(), -1} {
		if x, y, z := CMF(l); x != 0 || y != 0 || z != 0 {
			t.Errorf("CMF(%g) = %g %g %g, want 0", l, x, y, z)
		}
	}
}
