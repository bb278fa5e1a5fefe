package sky

import (
	"math"

	"github.com/skyframe/skyframe/analysis"
	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/render"
	"github.com/skyframe/skyframe/spectrum"
	"gonum.org/v1/gonum/spatial/r3"
)

// censusNeeds returns, for each speed, the catalogue depth a whole-sky
// census to limit needs (render.MaxBrightening over the catalogue's
// temperatures and the Doppler factors γ(1 ± β) of the whole sky).
func censusNeeds(stars *catalog.Stars, sp []analysis.Speed, heading r3.Vec, limit float64, beam spectrum.Beaming, builtIn bool) ([]float64, error) {
	tmin, tmax := BuiltInTemps()
	if !builtIn {
		d := catalog.EstimateDepth(stars)
		tmin, tmax = d.TMin, d.TMax
		if !(tmin > 0 && tmax >= tmin) {
			tmin, tmax = catalog.DefaultTeff, catalog.DefaultTeff
		}
	}
	out := make([]float64, len(sp))
	for i, s := range sp {
		b, err := s.Boost(heading)
		if err != nil {
			return nil, err
		}
		g := b.Gamma()
		dmax := g + b.GammaBeta()
		dmin := 1 / dmax
		dv, _, _ := render.MaxBrightening(tmin, tmax, dmin, dmax, beam)
		out[i] = limit - dv
	}
	return out, nil
}

// censusSkyDepth is the depth the built-in sky is drawn to for a census:
// the deepest speed's need, between the default depth and censusMaxDepth.
func censusSkyDepth(need []float64) float64 {
	v := catalog.DefaultSynthMagLimit
	for _, n := range need {
		v = math.Max(v, n)
	}
	return math.Min(censusMaxDepth, math.Ceil(v*10)/10)
}

// censusMaxDepth caps the built-in sky of a census: the whole sky to
// V = 13 is about 5·10⁶ stars, enough for V′ ≤ 6.5 at 0.99 c.
const censusMaxDepth = 13.0

// SpeedError is Census's error for a speed that gives no boost along the
// heading; its message is the boost's.
type SpeedError struct{ Err error }

func (e *SpeedError) Error() string { return e.Err.Error() }
func (e *SpeedError) Unwrap() error { return e.Err }

// Census takes the census of stars (analysis.Census) at the speeds sp with
// each row's needed depth (censusNeeds) and the catalogue's depth set, so
// that CensusTable.Incomplete tells the speeds the catalogue cannot serve.
// The built-in sky (builtIn) is drawn first as deep as the fastest speed
// needs (censusSkyDepth). It returns the table, the depth each speed needs
// and the catalogue's depth (V; NaN when unknown).
func Census(stars *catalog.Stars, builtIn bool, sp []analysis.Speed, o analysis.CensusOptions) (*analysis.CensusTable, []float64, float64, error) {
	need, err := censusNeeds(stars, sp, o.Heading, o.LimitMag, o.Beaming, builtIn)
	if err != nil {
		return nil, nil, 0, &SpeedError{err}
	}
	depthV := catalog.EstimateDepth(stars).V
	if builtIn {
		// The built-in sky is drawn as deep as the fastest speed needs.
		depthV = censusSkyDepth(need)
		if depthV > catalog.DefaultSynthMagLimit {
			stars = catalog.Synthetic(catalog.SynthOptions{MagLimit: depthV})
		}
	}
	tab, err := analysis.Census(stars, sp, o)
	if err != nil {
		return nil, nil, 0, err
	}
	if !math.IsNaN(depthV) {
		tab.DepthV = depthV
	}
	for i := range tab.Rows {
		tab.Rows[i].NeededV = need[i]
	}
	return tab, need, depthV, nil
}
