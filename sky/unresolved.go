package sky

import (
	"fmt"
	"math"
	"sync"

	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/spectrum"
)

// UnresolvedMaps builds the built-in sky's unresolved-light maps
// (catalog.NewUnresolvedSky) and keeps them by depth: a map takes a few
// tenths of a second of CPU and the frames of a flight come back to the
// same few depths. The zero value is ready; safe for concurrent use.
type UnresolvedMaps struct {
	mu sync.Mutex
	m  map[float64]*catalog.UnresolvedSky
}

// At returns the map of the model's light of the stars fainter than depth
// (V, in [catalog.MinUnresolvedDepth, catalog.MaxUnresolvedDepth]), on the
// photometric scale of the stars (V0Dilution).
func (u *UnresolvedMaps) At(depth float64) (*catalog.UnresolvedSky, error) {
	if !(depth >= catalog.MinUnresolvedDepth && depth <= catalog.MaxUnresolvedDepth) {
		return nil, fmt.Errorf("sky: unresolved-light depth %v: want a V magnitude in [%g, %g]", depth, catalog.MinUnresolvedDepth, catalog.MaxUnresolvedDepth)
	}
	u.mu.Lock()
	defer u.mu.Unlock()
	if m, ok := u.m[depth]; ok {
		return m, nil
	}
	m, err := catalog.NewUnresolvedSky(depth, V0Dilution, catalog.SynthOptions{})
	if err != nil {
		return nil, err
	}
	if u.m == nil {
		u.m = map[float64]*catalog.UnresolvedSky{}
	}
	u.m[depth] = m
	return m, nil
}

// V0Dilution is the dilution of a blackbody at T (K) whose V-band flux is
// that of a V = 0 star, from the same photometry as every star; NaN when T
// is out of range.
func V0Dilution(T float64) float64 {
	b, err := spectrum.FromV(T, 0)
	if err != nil {
		return math.NaN()
	}
	return b.W
}
