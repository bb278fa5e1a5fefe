package catalog

import (
	"math"
)

// Depth is what a catalogue's magnitudes say about its completeness.
type Depth struct {
	// V is the estimated completeness limit: the faint edge of the 0.25-mag
	// bin where the counts per bin peak (the turnover of the magnitude
	// counts: in a complete sample they rise by a factor of about 3 per
	// magnitude). NaN when the catalogue has fewer than MinDepthStars stars
	// with a magnitude.
	V float64
	// Faintest is the faintest V in the catalogue.
	Faintest float64
	// TMin and TMax are the smallest and largest temperatures (K).
	TMin, TMax float64
}

// MinDepthStars is the fewest stars EstimateDepth needs to find a turnover.
const MinDepthStars = 100

// EstimateDepth estimates the completeness of s from its magnitude counts
// (see Depth). For the Bright Star Catalogue it gives 6.5, its published
// limit; for the built-in sky it gives the limit it was drawn to.
// Magnitudes brighter than −30 or fainter than 40, and NaN, are ignored.
func EstimateDepth(s *Stars) Depth {
	d := Depth{V: math.NaN(), Faintest: math.NaN(), TMin: math.Inf(1), TMax: math.Inf(-1)}
	const lo, w = -30.0, 0.25
	counts := make([]int, int((40-lo)/w)+1)
	n := 0
	for i := 0; i < s.Len(); i++ {
		if t := float64(s.Teff[i]); t > 0 && !math.IsInf(t, 0) {
			d.TMin, d.TMax = math.Min(d.TMin, t), math.Max(d.TMax, t)
		}
		v := float64(s.Vmag[i])
		if !(v >= lo && v <= 40) {
			continue
		}
		if math.IsNaN(d.Faintest) || v > d.Faintest {
			d.Faintest = v
		}
		// Bin (a, a+w], so a limit V ≤ 6.5 fills the bin ending at 6.5.
		counts[int(math.Ceil((v-lo)/w))]++
		n++
	}
	if n < MinDepthStars {
		return d
	}
	best := 0
	for k, c := range counts {
		if c >= counts[best] {
			best = k
		}
	}
	d.V = lo + float64(best)*w
	return d
}
