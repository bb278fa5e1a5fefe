package flight

import (
	"math"

	"github.com/skyframe/skyframe/catalog"
	"gonum.org/v1/gonum/spatial/r3"
)

// StarsResolver returns a Resolver over a catalogue: find maps an id or name
// to a row (pass stars.Find); the position is the row's unit direction times
// its distance in parsecs. Stars without a finite distance are not usable
// destinations and resolve as unknown.
func StarsResolver(stars *catalog.Stars, find func(idOrName string) (int, bool)) Resolver {
	return func(name string) (r3.Vec, bool) {
		if stars == nil || find == nil {
			return r3.Vec{}, false
		}
		i, ok := find(name)
		if !ok || i < 0 || i >= stars.Len() || i >= len(stars.Dist) || i >= len(stars.X) ||
			i >= len(stars.Y) || i >= len(stars.Z) {
			return r3.Vec{}, false
		}
		d := float64(stars.Dist[i])
		if math.IsNaN(d) || math.IsInf(d, 0) || d <= 0 {
			return r3.Vec{}, false
		}
		return r3.Scale(d, r3.Vec{X: float64(stars.X[i]), Y: float64(stars.Y[i]), Z: float64(stars.Z[i])}), true
	}
}
