package spectrum

import (
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
