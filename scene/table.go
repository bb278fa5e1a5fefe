package scene

import (
	"fmt"
	"slices"
	"strconv"

	"github.com/skyframe/skyframe/analysis"
	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/sky"
)

// tableLimit is the observed V to which the completeness of a star table
// is judged: the naked-eye limit (common practice), the still's naked-eye
// preset.
const tableLimit = 6.5

// TableDepthWarning returns the completeness warning of a star table
// ("" when none is due) when the catalogue cannot list every star that reaches V′ = tableLimit
// anywhere in the sky at the table's speed (with --speeds, the fastest):
// the catalogue's depth and the depth needed, the estimated share of stars
// and light missing, and the V′ to which the rows are complete.
func TableDepthWarning(sc *Scene, betas []float64) (string, error) {
	b := sc.Observer.Boost
	what := fmt.Sprintf("a whole-sky list to V′ = %g (the naked-eye limit)", tableLimit)
	if len(betas) > 0 {
		fast := slices.Max(betas)
		var err error
		if b, err = camera.NewBoost(sc.Heading, fast); err != nil {
			return "", err
		}
		if len(betas) > 1 {
			what += fmt.Sprintf(" at β = %s (the fastest of --speeds)", strconv.FormatFloat(fast, 'g', 6, 64))
		}
	}
	rep := sky.WholeSky(catalog.EstimateDepth(sc.Stars), sc.BuiltIn, b, tableLimit, sc.Beaming)
	rep.Hint = fmt.Sprintf("rows fainter than V′ ≈ %.1f may lack stars; a deeper catalogue lists them", rep.Have+rep.Needed.DeltaV)
	return rep.Warning("stars", what), nil
}

// StarTable observes every star of sc (analysis.ObserveStars), brightest
// first, keeping the limit brightest (0: all): from sc's observer when
// betas is nil, else at each speed of betas toward sc's heading in turn,
// with beta holding each row's speed.
func StarTable(sc *Scene, betas []float64, limit int) (rows []analysis.StarRow, beta []float64, err error) {
	observe := func(obs camera.Observer) []analysis.StarRow {
		r := analysis.ObserveStars(sc.Stars, sc.Index.Name, sc.Heading, sc.Beaming, obs)
		if limit > 0 && len(r) > limit {
			r = r[:limit]
		}
		return r
	}
	if betas == nil {
		return observe(sc.Observer), nil, nil
	}
	for _, b := range betas {
		bo, err := camera.NewBoost(sc.Heading, b)
		if err != nil {
			return nil, nil, err
		}
		r := observe(camera.Observer{Position: sc.Observer.Position, Boost: bo})
		rows = append(rows, r...)
		for range r {
			beta = append(beta, b)
		}
	}
	return rows, beta, nil
}
