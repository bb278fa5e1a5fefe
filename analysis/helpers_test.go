package analysis

import (
	"github.com/skyframe/skyframe/internal/sharedcat"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/catalog"
)

// fibonacciSky returns n stars spread evenly over the sphere (Fibonacci
// lattice), all of temperature T and magnitude v, at unknown distance.
func fibonacciSky(n int, T, v float32) *catalog.Stars {
	s := &catalog.Stars{Source: "test lattice"}
	golden := math.Pi * (3 - math.Sqrt(5))
	for i := range n {
		z := 1 - (2*float64(i)+1)/float64(n)
		r := math.Sqrt(1 - z*z)
		x, y := r*math.Cos(golden*float64(i)), r*math.Sin(golden*float64(i))
		appendStar(s, r3.Vec{X: x, Y: y, Z: z}, float32(math.Inf(1)), v, T)
	}
	return s
}

func appendStar(s *catalog.Stars, u r3.Vec, dist, v, T float32) {
	s.ID = append(s.ID, int64(len(s.ID)+1))
	s.X = append(s.X, float32(u.X))
	s.Y = append(s.Y, float32(u.Y))
	s.Z = append(s.Z, float32(u.Z))
	s.Dist = append(s.Dist, dist)
	s.Vmag = append(s.Vmag, v)
	s.Teff = append(s.Teff, T)
	s.BV = append(s.BV, float32(math.NaN()))
	s.Flags = append(s.Flags, catalog.FlagNoDistance)
}

// randomSky is a small deterministic sky with a spread of magnitudes and
// temperatures (seeded PCG), independent of the built-in sky's model.
func randomSky(n int, seed uint64) *catalog.Stars {
	rng := rand.New(rand.NewPCG(seed, 1))
	s := &catalog.Stars{Source: "test sky"}
	for range n {
		z := 2*rng.Float64() - 1
		phi := 2 * math.Pi * rng.Float64()
		r := math.Sqrt(1 - z*z)
		v := float32(8 * math.Sqrt(rng.Float64())) // more faint stars
		T := float32(math.Exp(math.Log(3000) + rng.Float64()*math.Log(10)))
		appendStar(s, r3.Vec{X: r * math.Cos(phi), Y: r * math.Sin(phi), Z: z}, float32(math.Inf(1)), v, T)
	}
	return s
}

// bsc5Path walks up from the package directory looking for
// shared/catalogs/bsc5.dat (sharedcat.BSC5: fails under CI=true when absent,
// skips elsewhere).
func bsc5Path(t testing.TB) string {
	return sharedcat.BSC5(t)
}
