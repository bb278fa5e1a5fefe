package scene

import (
	"fmt"
	"math"
	"strings"

	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/render"
	"github.com/skyframe/skyframe/sky"
)

// Unresolved-light modes of --unresolved (plan key overlays.unresolved).
const (
	unresolvedAuto = "auto" // on for the built-in sky, off for a catalogue file
	unresolvedOn   = "on"
	unresolvedOff  = "off"
)

// builtInDepth is the resolved depth (V) of the built-in sky when nothing
// drew it deeper: the map of unresolved light starts where its sampled
// stars stop. (A flight's frames draw deeper and move the layer with them:
// job.Job.UnresolvedFollows.)
const builtInDepth = catalog.DefaultSynthMagLimit

// unresolvedLayer resolves, with the maps kept in maps (nil: built
// afresh), the unresolved-light options (frameopt
// unresolved and unresolved-depth) for stars: mode is auto (""), on or off;
// depthOpt (nil: not given) is the V magnitude where the catalogue stops
// resolving stars, and giving it turns auto into on; without it, knownV
// (the depth the built-in sky was drawn to for the frame; 0 when not known)
// is used. It returns nil when
// the layer is off, and the depth used. Messages name the flags, as the
// other frame layers do (a flight prefixes the plan and "overlays").
func unresolvedLayer(maps *sky.UnresolvedMaps, stars *catalog.Stars, mode string, depthOpt *float64, knownV float64) (render.UnresolvedSky, float64, error) {
	const what = "--unresolved"
	builtIn := stars != nil && stars.Source == catalog.SyntheticSource
	depth := math.NaN()
	if depthOpt != nil {
		depth = *depthOpt
	}
	switch m := strings.ToLower(strings.TrimSpace(mode)); {
	case m == unresolvedOff:
		return nil, 0, nil
	case (m == unresolvedAuto || m == "") && depthOpt == nil:
		if !builtIn {
			return nil, 0, nil
		}
	case m == unresolvedOn || m == unresolvedAuto || m == "":
	default:
		return nil, 0, usagef("%s %q: want auto, on or off", what, mode)
	}
	if math.IsNaN(depth) && knownV != 0 {
		depth = knownV
	}
	if math.IsNaN(depth) {
		if !builtIn {
			return nil, 0, usagef("%s on with a catalogue file needs --unresolved-depth, the catalogue's completeness limit (V): the model adds the light of the stars fainter than it", what)
		}
		depth = builtInDepth
	}
	if math.IsInf(depth, 0) || depth < catalog.MinUnresolvedDepth || depth > catalog.MaxUnresolvedDepth {
		return nil, 0, usagef("--unresolved-depth %v: want a V magnitude in [%g, %g]", depth, catalog.MinUnresolvedDepth, catalog.MaxUnresolvedDepth)
	}
	if maps == nil {
		maps = new(sky.UnresolvedMaps)
	}
	u, err := maps.At(depth)
	if err != nil {
		return nil, 0, fmt.Errorf("%s: %w", what, err)
	}
	return u, depth, nil
}
