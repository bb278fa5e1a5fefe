package camera

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/spatial/r3"
)

// TestObserverParallax: moving the observer 1 pc toward a star 2 pc away
// halves its distance, so its dilution W grows by (2/1)² = 4 [cp: inverse
// square law]; a star of unknown distance is unaffected.
func TestObserverParallax(t *testing.T) {
	u := r3.Unit(r3.Vec{X: 1, Y: 2, Z: 2})
	o := Observer{Position: u} // 1 pc along u
	n, d, dil, r := o.See(u, 2)
	if !scalar.EqualWithinAbs(r, 1, 1e-15) || !scalar.EqualWithinRel(dil, 4, 1e-15) ||
		angle(n, u) > 1e-15 || d != 1 {
		t.Errorf("star at 2 pc seen from 1 pc: n=%v D=%v dilution=%v r=%v, want n=u D=1 dilution 4 r 1", n, d, dil, r)
	}
	n, d, dil, r = o.See(u, math.Inf(1))
	if n != u || d != 1 || dil != 1 || !math.IsInf(r, 1) {
		t.Errorf("infinite star: n=%v D=%v dilution=%v r=%v", n, d, dil, r)
	}
	// Unknown-distance encodings all read as +Inf.
	for _, dist := range []float64{math.NaN(), 0, -3} {
		if _, _, dil, r := o.See(u, dist); dil != 1 || !math.IsInf(r, 1) {
			t.Errorf("dist %v: dilution %v r %v, want 1, +Inf", dist, dil, r)
		}
	}
	// Sideways: a star 1 pc along +Y seen from 1 pc along +X is at
	// distance √2, direction (−1, 1, 0)/√2, dilution 1/2 [cp: geometry].
	o = Observer{Position: r3.Vec{X: 1}}
	n, _, dil, r = o.See(r3.Vec{Y: 1}, 1)
	want := r3.Unit(r3.Vec{X: -1, Y: 1})
	if angle(n, want) > 1e-15 || !scalar.EqualWithinRel(r, math.Sqrt2, 1e-15) || !scalar.EqualWithinRel(dil, 0.5, 1e-15) {
		t.Errorf("sideways: n=%v r=%v dilution=%v", n, r, dil)
	}
}

func TestObserverAtStar(t *testing.T) {
	u := r3.Vec{Z: 1}
	o := Observer{Position: r3.Vec{Z: 5}}
	n, d, dil, r := o.See(u, 5)
	if r != 0 || !math.IsInf(dil, 1) || n != u || d != 1 {
		t.Errorf("observer at star: n=%v D=%v dilution=%v r=%v, want flag r=0, dilution +Inf", n, d, dil, r)
	}
}

func TestObserverBoosted(t *testing.T) {
	// At rest at the Sun, a moving observer sees Boost.Apply(u).
	b := mustBoost(t, r3.Vec{X: 1}, 0.6)
	o := Observer{Boost: b}
	u := r3.Unit(r3.Vec{X: -1, Y: 1})
	n, d, dil, r := o.See(u, 10)
	wn, wd := b.Apply(u)
	if n != wn || d != wd || dil != 1 || r != 10 {
		t.Errorf("boosted at Sun: n=%v D=%v dil=%v r=%v; want %v %v 1 10", n, d, dil, r, wn, wd)
	}
}

func BenchmarkObserverSee(b *testing.B) {
	o := Observer{Position: r3.Vec{X: 1, Y: 0.3}, Boost: mustGamma(b, r3.Vec{X: 1}, 5)}
	u := r3.Unit(r3.Vec{X: 1, Y: 2, Z: 3})
	var sink float64
	b.ReportAllocs()
	for b.Loop() {
		n, d, dil, _ := o.See(u, 7)
		sink += n.X + d + dil
	}
	_ = sink
}
