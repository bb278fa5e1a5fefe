package sky

import (
	"math"

	"github.com/skyframe/skyframe/analysis"
	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/render"
	"github.com/skyframe/skyframe/spectrum"
	"gonum.org/v1/gonum/spatial/r3"
)

// CensusNeeds returns, for each speed, the catalogue depth a whole-sky
// census to limit needs (render.MaxBrightening over the catalogue's
// temperatures and the Doppler factors γ(1 ± β) of the whole sky).
func CensusNeeds(stars *catalog.Stars, sp []analysis.Speed, heading r3.Vec, limit float64, beam spectrum.Beaming, builtIn bool) ([]float64, error) {
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

// CensusSkyDepth is the depth the built-in sky is drawn to for a census:
// the deepest speed's need, between the default depth and CensusMaxDepth.
func CensusSkyDepth(need []float64) float64 {
	v := catalog.DefaultSynthMagLimit
	for _, n := range need {
		v = math.Max(v, n)
	}
	return math.Min(CensusMaxDepth, math.Ceil(v*10)/10)
}

// CensusMaxDepth caps the built-in sky of a census: the whole sky to
// V = 13 is about 5·10⁶ stars, enough for V′ ≤ 6.5 at 0.99 c.
const CensusMaxDepth = 13.0
