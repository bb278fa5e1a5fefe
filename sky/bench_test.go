package sky

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/render"
)

// BenchmarkFrame settles one flight frame's sky at 0.9 c looking ahead,
// from a warm cache: the depth profiles of three instants (the frame's and
// the shutter's ends), the cells that reach them, and the frame's
// catalogue and its prepared form when the previous frame's differ (here
// every time, alternating between two frames).
func BenchmarkFrame(b *testing.B) {
	src := NewSource(catalog.BuiltIn(), true)
	au := r3.Vec{X: catalog.AUParsec}
	frames := [2][]render.Options{}
	for k, beta := range []float64{0.9, 0.91} {
		for range 3 {
			frames[k] = append(frames[k], frameOpt(b, beta, galacticCentre, au))
		}
	}
	for k := range frames {
		f, err := src.Frame(frames[k], math.NaN())
		if err != nil {
			b.Fatal(err)
		}
		if _, _, err := f.Stars(au); err != nil {
			b.Fatal(err)
		}
	}
	src.last = [2]entry{}
	b.ReportAllocs()
	b.ResetTimer()
	for i := range b.N {
		f, err := src.Frame(frames[i%2], math.NaN())
		if err != nil {
			b.Fatal(err)
		}
		s, _, err := f.Stars(au)
		if err != nil {
			b.Fatal(err)
		}
		src.last = [2]entry{} // a new catalogue every frame: the worst case
		b.ReportMetric(float64(s.Len()), "stars")
	}
}

// BenchmarkFrameDepth is the depth decision alone for a frame of three
// instants (no catalogue built).
func BenchmarkFrameDepth(b *testing.B) {
	src := NewSource(catalog.BuiltIn(), true)
	au := r3.Vec{X: catalog.AUParsec}
	opts := []render.Options{frameOpt(b, 0.9, galacticCentre, au), frameOpt(b, 0.9, galacticCentre, au), frameOpt(b, 0.9, galacticCentre, au)}
	b.ReportAllocs()
	b.ResetTimer()
	for range b.N {
		if _, err := src.Frame(opts, math.NaN()); err != nil {
			b.Fatal(err)
		}
	}
}
