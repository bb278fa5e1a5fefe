package scene

import (
	"fmt"
	"slices"
	"strconv"

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
