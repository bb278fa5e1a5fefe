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

func TestSeeBatch(t *testing.T) {
	o := Observer{Position: r3.Vec{X: 0.5, Y: -0.2, Z: 0.1}, Boost: mustGamma(t, r3.Vec{Y: 1}, 3)}
	dirs := []r3.Vec{{X: 1}, r3.Unit(r3.Vec{X: 1, Y: 1, Z: 1}), r3.Unit(r3.Vec{X: -1, Y: 0.2, Z: -3})}
	dists := []float32{1.3, float32(math.Inf(1)), 40}
	var x, y, z []float32
	for _, v := range dirs {
		x, y, z = append(x, float32(v.X)), append(y, float32(v.Y)), append(z, float32(v.Z))
	}
	nx, ny, nz, d, dil, r := make([]float64, 3), make([]float64, 3), make([]float64, 3), make([]float64, 3), make([]float64, 3), make([]float64, 3)
	o.SeeBatch(x, y, z, dists, nx, ny, nz, d, dil, r)
	for i := range dirs {
		u := r3.Unit(r3.Vec{X: float64(x[i]), Y: float64(y[i]), Z: float64(z[i])})
		wn, wd, wdil, wr := o.See(u, float64(dists[i]))
		have := r3.Vec{X: nx[i], Y: ny[i], Z: nz[i]}
		if angle(have, wn) > 1e-15 || !scalar.EqualWithinRel(d[i], wd, 1e-15) ||
			!scalar.EqualWithinRel(dil[i], wdil, 1e-15) || !(r[i] == wr || scalar.EqualWithinRel(r[i], wr, 1e-15)) {
			t.Errorf("star %d: batch (%v %v %v %v), See (%v %v %v %v)", i, have, d[i], dil[i], r[i], wn, wd, wdil, wr)
		}
	}
	// Observer exactly at the star: the documented flag r = 0, dilution +Inf.
	at := Observer{Position: r3.Vec{Z: 5}}
	at.SeeBatch([]float32{0}, []float32{0}, []float32{1}, []float32{5}, nx, ny, nz, d, dil, r)
	if r[0] != 0 || !math.IsInf(dil[0], 1) || nz[0] != 1 {
		t.Errorf("batch at the star: r=%v dilution=%v n=(%v,%v,%v)", r[0], dil[0], nx[0], ny[0], nz[0])
	}
	if a := testing.AllocsPerRun(10, func() { o.SeeBatch(x, y, z, dists, nx, ny, nz, d, nil, nil) }); a != 0 {
		t.Errorf("SeeBatch allocates %v times", a)
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

func BenchmarkSeeBatch1e6(b *testing.B) {
	o := Observer{Position: r3.Vec{X: 1, Y: 0.3}, Boost: mustGamma(b, r3.Vec{X: 1}, 5)}
	const n = 1_000_000
	x, y, z, dist := make([]float32, n), make([]float32, n), make([]float32, n), make([]float32, n)
	for i := range x {
		zz := float64(i)/n*2 - 1 + 1.0/n
		ph := float64(i) * 2.399963
		s := math.Sqrt(1 - zz*zz)
		x[i], y[i], z[i] = float32(s*math.Cos(ph)), float32(s*math.Sin(ph)), float32(zz)
		dist[i] = float32(1 + i%500)
	}
	nx, ny, nz, d, dil := make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n)
	b.ReportAllocs()
	o.SeeBatch(x, y, z, dist, nx, ny, nz, d, dil, nil) // touch the output pages
	// One op is one star, processed in batches over the 1e6-star arrays.
	b.ResetTimer()
	for done := 0; done < b.N; {
		m := min(n, b.N-done)
		o.SeeBatch(x[:m], y[:m], z[:m], dist[:m], nx[:m], ny[:m], nz[:m], d[:m], dil[:m], nil)
		done += m
	}
	b.ReportMetric(float64(b.N)/b.Elapsed().Seconds()/1e6, "Mstars/s")
}
