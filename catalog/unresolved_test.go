package catalog

import (
	"math"
	"sync"
	"testing"

	"github.com/skyframe/skyframe/spectrum"
	"gonum.org/v1/gonum/spatial/r3"
)

// unresW0 is the V-band dilution the renderer uses: the W of a V = 0
// blackbody at T (spectrum.FromV, the same normalisation as every star).
func unresW0(T float64) float64 {
	b, err := spectrum.FromV(T, 0)
	if err != nil {
		return math.NaN()
	}
	return b.W
}

// s10PerSr is one S10 (one V = 10 star per square degree) in V = 0 stars
// per steradian: 10⁻⁴·(180/π)² [cp: definition of the unit; checked in
// TestS10Unit against its published value in mag arcsec⁻²].
var s10PerSr = 1e-4 * (180 / math.Pi) * (180 / math.Pi)

// TestS10Unit checks s10PerSr against the published definition "The S10
// unit is defined as the surface brightness of a star whose V-magnitude is
// 10 and whose light is smeared over one square degree, or 27.78 mag
// arcsec-2" (Wikipedia, "Sky brightness", section "Relative contributions",
// stored copy https://www.liquisearch.com/sky_brightness/relative_contributions)
// [pub], to the 0.005 mag the figure is rounded to.
func TestS10Unit(t *testing.T) {
	arcsec2PerSr := math.Pow(180*3600/math.Pi, 2)
	mu := -2.5 * math.Log10(s10PerSr/arcsec2PerSr)
	if math.Abs(mu-27.78) > 0.005 {
		t.Errorf("S10 = %.4f mag arcsec⁻², want 27.78", mu)
	}
}

// unresCache keeps the maps the tests build (a few tenths of a second each).
var unresCache sync.Map

func unresMust(t testing.TB, depth float64) *UnresolvedSky {
	t.Helper()
	if u, ok := unresCache.Load(depth); ok {
		return u.(*UnresolvedSky)
	}
	u, err := NewUnresolvedSky(depth, unresW0, SynthOptions{})
	if err != nil {
		t.Fatal(err)
	}
	unresCache.Store(depth, u)
	return u
}

func galDir(l, b float64) r3.Vec {
	x, y, z := galacticToICRS(galacticLB(l, b))
	return r3.Vec{X: x, Y: y, Z: z}
}

// TestUnresolvedSplitConservesLight checks that the resolved stars of the
// built-in sky (a Monte Carlo sample of the model) and the unresolved map
// (a quadrature of the same model) add up to the same whole sky wherever
// the split is put, in V-band light: over the whole sky for depths 6, 8 and
// 10, and per band of galactic latitude for the slice between 8 and 10.
// Tolerances: the sample's own Poisson scatter (4σ of its flux) plus 1 %.
func TestUnresolvedSplitConservesLight(t *testing.T) {
	const sampleLim = 10.0
	s := Synthetic(SynthOptions{MagLimit: sampleLim, NoNearby: true})
	total := unresMust(t, MinUnresolvedDepth).AllSkyV()
	depths := []float64{6, 8, 10}
	if testing.Short() {
		depths = depths[1:]
	}
	for _, d := range depths {
		u := unresMust(t, d)
		var res, v2 float64
		for i := 0; i < s.Len(); i++ {
			if v := float64(s.Vmag[i]); v <= d {
				f := math.Pow(10, -0.4*v)
				res += f
				v2 += f * f
			}
		}
		sum := res + u.AllSkyV()
		tol := 4*math.Sqrt(v2) + 0.01*total
		t.Logf("depth %g: resolved %.1f + unresolved %.1f = %.1f V=0 stars; whole model %.1f (tolerance %.1f)", d, res, u.AllSkyV(), sum, total, tol)
		if math.Abs(sum-total) > tol {
			t.Errorf("depth %g: resolved + unresolved = %.2f V=0 stars, want the whole model's %.2f ± %.2f", d, sum, total, tol)
		}
	}

	// The slice 8 < V ≤ 10 per latitude band: sampled stars against the
	// difference of the two maps integrated over the band.
	u8, u10 := unresMust(t, 8), unresMust(t, 10)
	bands := [][2]float64{{0, 5}, {5, 15}, {15, 40}, {40, 90}}
	for _, band := range bands {
		var res, v2 float64
		for i := 0; i < s.Len(); i++ {
			v := float64(s.Vmag[i])
			if v <= 8 || v > 10 {
				continue
			}
			_, _, gz := icrsToGalactic(float64(s.X[i]), float64(s.Y[i]), float64(s.Z[i]))
			if ab := math.Abs(math.Asin(gz)) * 180 / math.Pi; ab < band[0] || ab >= band[1] {
				continue
			}
			f := math.Pow(10, -0.4*v)
			res += f
			v2 += f * f
		}
		// Midpoint rule in l and sin b over both hemispheres.
		const nl, nb = 360, 200
		s0, s1 := math.Sin(band[0]*math.Pi/180), math.Sin(band[1]*math.Pi/180)
		model := 0.0
		for j := 0; j < nb; j++ {
			sb := s0 + (s1-s0)*(float64(j)+0.5)/nb
			b := math.Asin(sb) * 180 / math.Pi
			for i := 0; i < nl; i++ {
				l := 360 * (float64(i) + 0.5) / nl
				for _, sg := range []float64{1, -1} {
					n := galDir(l, sg*b)
					model += u8.VRadiance(n) - u10.VRadiance(n)
				}
			}
		}
		model *= 2 * math.Pi / nl * (s1 - s0) / nb
		tol := 4*math.Sqrt(v2) + 0.01*model
		t.Logf("|b| in [%g, %g)°, 8 < V ≤ 10: sampled %.2f, map %.2f V=0 stars", band[0], band[1], res, model)
		if math.Abs(res-model) > tol {
			t.Errorf("|b| in [%g, %g)°, 8 < V ≤ 10: sampled stars give %.3f V=0 stars, the map %.3f; want equal ± %.3f", band[0], band[1], res, model, tol)
		}
	}
}

// TestUnresolvedPublished compares the model's integrated starlight at rest
// with published all-sky figures.
//
// Whole sky [pub]: Sky & Telescope, "If you combine the magnitudes of all
// visible stars, how bright a star will you come up with?" (Astronomy
// Questions & Answers, http://www.skyandtelescope.com/astronomy-resources/astronomy-questions-answers/if-you-combine-the-magnitudes-of-all-visible-stars-how-bright-a-star-will-you-come-up-with/):
// the stars brighter than V = 6.5 have a "combined magnitude … almost
// exactly −5, which is equal to 100 zero-magnitude stars"; those brighter
// than 10.5 have "a combined brightness equal to 225 zero-magnitude stars.
// That's about half the total brightness of all the stars" — so the whole
// sky is about 450 stars of V = 0 (V ≈ −6.63). The article gives rounded
// figures without errors; each light is checked within 20 % (0.2 mag, the
// issue's tolerance for counts) and "about half" as 0.4–0.6.
//
// Galactic poles [pub]: Beecher 1940 (PASP 52, 1940; doi:10.1086/125140;
// https://scholar.archive.org/work/5gpg2gzmrjag5eqtx6stisighi) reports
// Seares' 1920 estimate, from the star distribution and luminosity
// functions of Kapteyn and van Rhijn, that the Galaxy in the region of the
// Sun seen from a distant point normal to its plane has "a surface
// brightness of 23 visual magnitudes per square second". Seen from the
// mid-plane, each pole looks through half of that column (a slab symmetric
// about the plane, no dust at the poles), so the mean of the two poles is
// 23 + 2.5 log₁₀ 2 = 23.75 mag arcsec⁻² = 40.8 S10. The estimate is a
// century old, rounded to the magnitude, and the Sun sits a little above
// the plane; it is checked within 30 % (0.28 mag).
//
// Poles, plane and the brightest Milky Way [pub]: P. Cinzano,
// "Inquinamento luminoso e protezione del cielo notturno" (Istituto Veneto
// di Scienze, Lettere ed Arti; online edition of 3 December 1998), Table
// 2.9 (http://lightpollution.it/cinzano/libro/node47.html), gives the
// natural sky brightness by source in S10,vis: integrated starlight
// ("luce stellare int.") 110 typical at the zenith, over the range
// 30–400, 30 at its minimum; §2.5.1 (node48.html) says this is the light
// of the stars too faint to be seen with the naked eye, least toward the
// galactic poles and greatest in the brightest parts of the Milky Way. So
// for the stars fainter than V = 6 the model's darkest direction (a
// galactic pole) is checked against 30 S10 and its brightest (near the
// galactic centre) against 400 S10, each within 30 % (the table's values
// are rounded typical figures), their ratio — the contrast of the Milky
// Way's brightest parts against the poles — against 400/30 within 30 %,
// and the whole galactic plane (b = 0, every longitude) against the range
// 30–400. (Before the model's dust thickened toward the inner Galaxy, its
// brightest point was 756 S10: 1.9 times the table's maximum.)
//
// Galactic poles and plane [mem]: the V-band integrated starlight of
// Leinert et al. 1998, A&AS 127, 1, §10 (tables after Roach & Megill 1961
// and Toller 1981). The stored copy of §10
// (https://aas.aanda.org/articles/aas/full/1998/01/ds1449/node10.html)
// holds only the opening of §10.1, which gives no V-band values, and the
// stored copies of Masana et al. 2021 (MNRAS 501, 5443; arXiv:2101.01500)
// only its abstract, so these remain quoted from memory, and the tolerances
// are the ranges those sources span rather than their quoted errors:
//
//   - at the galactic poles the starlight of all stars is 20–80 S10;
//   - the galactic plane, averaged over longitude, is 100–600 S10 and 3 to
//     20 times brighter than the poles (the plane/pole contrast at rest).
func TestUnresolvedPublished(t *testing.T) {
	all := unresMust(t, MinUnresolvedDepth)
	tot := all.AllSkyV()
	v := -2.5 * math.Log10(tot)
	t.Logf("whole sky: %.1f V=0 stars, V = %.2f (Sky & Telescope: about 2 × 225 = 450)", tot, v)
	if math.Abs(tot/450-1) > 0.2 {
		t.Errorf("whole-sky starlight %.1f V=0 stars (V = %.2f), want about 450 ± 20 %% (Sky & Telescope: twice the 225 of V ≤ 10.5)", tot, v)
	}
	for _, c := range []struct{ v, want float64 }{{6.5, 100}, {10.5, 225}} {
		l := tot - unresMust(t, c.v).AllSkyV()
		t.Logf("light of the stars to V = %g: %.1f V=0 stars, V = %.2f (Sky & Telescope: %.0f, %+.1f %%)", c.v, l, -2.5*math.Log10(l), c.want, 100*(l/c.want-1))
		if math.Abs(l/c.want-1) > 0.2 {
			t.Errorf("light of the stars brighter than V = %g: %.1f V=0 stars, want %.0f ± 20 %% (Sky & Telescope)", c.v, l, c.want)
		}
	}
	faint := unresMust(t, 10.5).AllSkyV() / tot
	t.Logf("share of the light from V > 10.5: %.3f (Sky & Telescope: about half)", faint)
	if faint < 0.4 || faint > 0.6 {
		t.Errorf("share of the whole sky's light from stars fainter than V = 10.5: %.3f, want about half, 0.4–0.6 (Sky & Telescope)", faint)
	}
	pole := (all.VRadiance(galDir(0, 90)) + all.VRadiance(galDir(0, -90))) / 2 / s10PerSr
	plane := 0.0
	for l := 0.0; l < 360; l += 1 {
		plane += all.VRadiance(galDir(l, 0))
	}
	plane /= 360 * s10PerSr
	t.Logf("poles %.1f S10, plane (mean over l) %.1f S10, contrast %.1f", pole, plane, plane/pole)
	seares := math.Pow(10, 0.4*(27.78-(23+2.5*math.Log10(2))))
	t.Logf("poles against Seares' face-on 23 mag arcsec⁻² halved: %.1f S10 against %.1f (%+.1f %%)", pole, seares, 100*(pole/seares-1))
	if math.Abs(pole/seares-1) > 0.3 {
		t.Errorf("galactic poles: %.1f S10, want %.1f ± 30 %% (Seares 1920 via Beecher 1940: 23 visual mag arcsec⁻² face-on, half the column from the mid-plane)", pole, seares)
	}
	if pole < 20 || pole > 80 {
		t.Errorf("galactic poles: %.1f S10, want 20–80 S10 (Leinert et al. 1998 §10 [mem])", pole)
	}
	if plane < 100 || plane > 600 {
		t.Errorf("galactic plane, mean over longitude: %.1f S10, want 100–600 S10 (Leinert et al. 1998 §10 [mem])", plane)
	}
	if c := plane / pole; c < 3 || c > 20 {
		t.Errorf("plane/pole contrast %.1f, want 3–20 (Leinert et al. 1998; Masana et al. 2021 [mem])", c)
	}
	// Cinzano 1998, Table 2.9: stars fainter than the naked eye.
	eye := unresMust(t, 6)
	lo, hi := math.Inf(1), 0.0
	var hiL, hiB float64
	for b := -90.0; b <= 90; b += 0.5 {
		for l := 0.0; l < 360; l += 1 {
			v := eye.VRadiance(galDir(l, b)) / s10PerSr
			lo = math.Min(lo, v)
			if v > hi {
				hi, hiL, hiB = v, l, b
			}
		}
	}
	t.Logf("stars fainter than V = 6: darkest %.1f S10, brightest %.1f S10 at (l, b) = (%g°, %g°), ratio %.1f (Cinzano 1998: 30, 400, 13.3)", lo, hi, hiL, hiB, hi/lo)
	for _, c := range []struct {
		what      string
		have, pub float64
	}{{"darkest direction", lo, 30}, {"brightest direction", hi, 400}, {"brightest/darkest", hi / lo, 400.0 / 30}} {
		if math.Abs(c.have/c.pub-1) > 0.3 {
			t.Errorf("stars fainter than V = 6, %s: %.1f, want %.1f ± 30 %% (Cinzano 1998, Table 2.9)", c.what, c.have, c.pub)
		}
	}
	for l := 0.0; l < 360; l += 1 {
		if v := eye.VRadiance(galDir(l, 0)) / s10PerSr; v < 30 || v > 400 {
			t.Errorf("stars fainter than V = 6 on the galactic plane at l = %g°: %.1f S10, want 30–400 (Cinzano 1998, Table 2.9)", l, v)
		}
	}
	// The galactic centre's side of the plane is brighter than the
	// anticentre's (the disks are exponential in radius) [cp].
	if gc, ac := all.VRadiance(galDir(20, 0)), all.VRadiance(galDir(180, 0)); !(gc > ac) {
		t.Errorf("plane at l = 20° (%.3g) not brighter than at l = 180° (%.3g)", gc, ac)
	}
}

// TestUnresolvedDilutions checks the interface form against VRadiance: the
// components' V-band flux, computed by the spectrum package from (T_k, W_k),
// must add up to the map's V-band surface brightness.
func TestUnresolvedDilutions(t *testing.T) {
	u := unresMust(t, 8)
	T := u.Temperatures()
	for k := 1; k < len(T); k++ {
		if !(T[k] > T[k-1]) {
			t.Fatalf("temperatures not ascending: %v", T)
		}
	}
	w := make([]float64, len(T))
	for _, lb := range [][2]float64{{0, 0}, {123, 4.2}, {250, -33}, {17, 89.9}, {359.9, -0.1}} {
		n := galDir(lb[0], lb[1])
		u.Dilutions(n, w)
		sum := 0.0
		for k := range w {
			if !(w[k] >= 0) {
				t.Fatalf("(l, b) = %v: W_%d = %v, want ≥ 0", lb, k, w[k])
			}
			bb, err := spectrum.NewBlackbody(T[k], w[k]/math.Pi)
			if err != nil {
				t.Fatal(err)
			}
			sum += bb.VFlux() / spectrum.V0FluxLambda
		}
		want := u.VRadiance(n)
		if math.Abs(sum/want-1) > 1e-6 {
			t.Errorf("(l, b) = %v: Σ V-band flux of the components %.6g, VRadiance %.6g", lb, sum, want)
		}
		// A non-unit direction gives the same values.
		u.Dilutions(r3.Scale(3, n), w)
		for k := range w {
			bb, _ := spectrum.NewBlackbody(T[k], w[k]/math.Pi)
			sum -= bb.VFlux() / spectrum.V0FluxLambda
		}
		if math.Abs(sum) > 1e-9*want {
			t.Errorf("(l, b) = %v: a non-unit direction changes the result by %g", lb, sum)
		}
	}
	// Interpolation is continuous across l = 0 and inside a cell [cp].
	a, b := u.VRadiance(galDir(0.001, 10)), u.VRadiance(galDir(359.999, 10))
	if math.Abs(a/b-1) > 1e-4 {
		t.Errorf("discontinuity at l = 0: %g vs %g", a, b)
	}
}

func TestUnresolvedBadInput(t *testing.T) {
	for _, d := range []float64{math.NaN(), math.Inf(1), math.Inf(-1), 31, -31} {
		if _, err := NewUnresolvedSky(d, unresW0, SynthOptions{}); err == nil {
			t.Errorf("depth %v: no error", d)
		}
	}
	if _, err := NewUnresolvedSky(8, nil, SynthOptions{}); err == nil {
		t.Error("nil dilution function: no error")
	}
	if _, err := NewUnresolvedSky(8, func(float64) float64 { return math.NaN() }, SynthOptions{}); err == nil {
		t.Error("NaN dilution: no error")
	}
}

func BenchmarkUnresolvedDilutions(b *testing.B) {
	u := unresMust(b, 8)
	w := make([]float64, len(u.Temperatures()))
	n := galDir(33, 2.5)
	b.ReportAllocs()
	for b.Loop() {
		u.Dilutions(n, w)
	}
}

func BenchmarkUnresolvedBuild(b *testing.B) {
	b.ReportAllocs()
	for b.Loop() {
		if _, err := NewUnresolvedSky(8, unresW0, SynthOptions{}); err != nil {
			b.Fatal(err)
		}
	}
}

// TestModelSky: the model's expected counts match the sampled sky's (within
// 3 %, the sample's Poisson scatter being far smaller) and its light to
// V = 10 matches the map: whole model minus the unresolved part.
func TestModelSky(t *testing.T) {
	n, light := ModelSky(9, SynthOptions{})
	s := Synthetic(SynthOptions{MagLimit: 9, NoNearby: true})
	if math.Abs(n/float64(s.Len())-1) > 0.03 {
		t.Errorf("ModelSky(9): %.0f stars expected, the sampled sky has %d", n, s.Len())
	}
	want := unresMust(t, MinUnresolvedDepth).AllSkyV() - unresMust(t, 9).AllSkyV()
	if math.Abs(light/want-1) > 0.02 {
		t.Errorf("ModelSky(9): light %.2f V=0 stars, the maps give %.2f", light, want)
	}
}
