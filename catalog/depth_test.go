package catalog

import (
	"math"
	"testing"

	"github.com/skyframe/skyframe/internal/sharedcat"
)

// TestEstimateDepthBSC5: the Bright Star Catalogue lists the stars to about
// V = 6.5 (Hoffleit & Warren 1991, the catalogue's ReadMe at CDS V/50:
// "essentially all stars brighter than 6.5 mag" [mem]); its counts must turn
// over there (±0.25 mag, one bin).
func TestEstimateDepthBSC5(t *testing.T) {
	s, _, err := Open(sharedcat.BSC5(t), ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	d := EstimateDepth(s)
	t.Logf("BSC5: depth %.2f, faintest %.2f, T %.0f–%.0f K", d.V, d.Faintest, d.TMin, d.TMax)
	if math.Abs(d.V-6.5) > 0.25 {
		t.Errorf("BSC5 depth %.2f, want 6.5 ± 0.25 (Hoffleit & Warren 1991 [mem])", d.V)
	}
	if !(d.Faintest > 7.5) || !(d.TMin < 3500) || !(d.TMax > 15000) {
		t.Errorf("BSC5: faintest %.2f, T %.0f–%.0f K: want > 7.5 and a range from M to B stars", d.Faintest, d.TMin, d.TMax)
	}
}

// TestEstimateDepthSynthetic: a sky drawn to V = 9 turns over at 9, and a
// handful of stars gives no estimate.
func TestEstimateDepthSynthetic(t *testing.T) {
	d := EstimateDepth(Synthetic(SynthOptions{MagLimit: 9, NoNearby: true}))
	if math.Abs(d.V-9) > 0.25 || d.Faintest > 9 {
		t.Errorf("V = 9 sky: depth %.2f, faintest %.3f; want 9", d.V, d.Faintest)
	}
	if d := EstimateDepth(Synthetic(SynthOptions{MagLimit: 1, NoNearby: true})); !math.IsNaN(d.V) {
		t.Errorf("%d stars: depth %v, want NaN", Synthetic(SynthOptions{MagLimit: 1, NoNearby: true}).Len(), d.V)
	}
}
