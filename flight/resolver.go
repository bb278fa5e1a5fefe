package flight

import (
	"math"

	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/spectrum"
	"gonum.org/v1/gonum/spatial/r3"
)

// SolarLuminosity is the IAU 2015 Resolution B3 nominal solar luminosity,
// 3.828·10²⁶ W [pub].
const SolarLuminosity = 3.828e26

// StarsStandOff returns the default stand-off of a voyage to a star of the
// catalogue (find maps an id or name to a row): the distance at which the
// star is as bright as the Sun seen from Earth, √(L/L☉) au, in parsecs.
// L = 4πd²F from the star's distance d and bolometric flux F seen from the
// Sun, F = W σ T⁴ with W the dilution that gives its catalogue V at its
// temperature (the same photometry as the renderer). ok is false for an
// unknown star or one without a distance.
func StarsStandOff(stars *catalog.Stars, find func(idOrName string) (int, bool)) func(name string) (pc float64, ok bool) {
	return func(name string) (float64, bool) {
		if stars == nil || find == nil {
			return 0, false
		}
		i, ok := find(name)
		if !ok || i < 0 || i >= stars.Len() {
			return 0, false
		}
		d := float64(stars.Dist[i])
		if !(d > 0) || math.IsInf(d, 0) {
			return 0, false
		}
		bb, err := spectrum.FromV(float64(stars.Teff[i]), float64(stars.Vmag[i]))
		if err != nil {
			return 0, false
		}
		dm := d * Parsec
		l := 4 * math.Pi * dm * dm * bb.Bolometric()
		r := math.Sqrt(l/SolarLuminosity) * AUPc
		if !(r > 0) || math.IsInf(r, 0) {
			return 0, false
		}
		return r, true
	}
}

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
