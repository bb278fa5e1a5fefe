package analysis

import (
	"bytes"
	"encoding/csv"
	"errors"
	"math"
	"strconv"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/spectrum"
)

// directCount counts the catalogue's own stars with V ≤ limit.
func directCount(s *catalog.Stars, limit float64) int {
	n := 0
	for _, v := range s.Vmag {
		if float64(v) <= limit {
			n++
		}
	}
	return n
}

// checkRestCensus compares the census at β = 0 from the Sun with values
// computed directly from the Stars and spectrum.FromV.
func checkRestCensus(t *testing.T, stars *catalog.Stars, limits []float64) {
	t.Helper()
	for _, lim := range limits {
		tab, err := Census(stars, Betas(0), CensusOptions{LimitMag: lim})
		if err != nil {
			t.Fatal(err)
		}
		r := tab.Rows[0]
		// Counts: the catalogue's own V ≤ limit (V′ = V at rest, physics.md).
		if want := directCount(stars, lim); r.Visible != want {
			t.Errorf("%s V ≤ %v: visible have %d, want %d (direct count)", stars.Source, lim, r.Visible, want)
		}
		// The brightest V′ is the catalogue's brightest V, to the bit.
		want := math.NaN()
		for _, v := range stars.Vmag {
			if float64(v) <= lim && !(want <= float64(v)) {
				want = float64(v)
			}
		}
		if r.Brightest != want && !(math.IsNaN(want) && math.IsNaN(r.Brightest)) {
			t.Errorf("%s V ≤ %v: brightest V′ %v, want %v", stars.Source, lim, r.Brightest, want)
		}
		if r.Forward+r.Rear != r.Visible {
			t.Errorf("%s V ≤ %v: forward %d + rear %d ≠ visible %d", stars.Source, lim, r.Forward, r.Rear, r.Visible)
		}
		// Each hemisphere holds roughly half the stars at rest [cp: no
		// hemisphere of the real sky holds more than ~60 % of the bright
		// stars]; loose on purpose.
		if r.Visible > 100 {
			if f := float64(r.Forward) / float64(r.Visible); f < 0.35 || f > 0.65 {
				t.Errorf("%s V ≤ %v: forward fraction %v at rest, want ≈ 0.5", stars.Source, lim, f)
			}
		}
	}
	// Illuminance and chromaticity: independent per-star sums of
	// spectrum.FromV(T, V).XYZ() (spectrum integrates directly; the census
	// uses the ln T table, 1e-8 relative, spectrum doc).
	var sx, sy, sz, vis float64
	lim := 6.5
	for i := range stars.Len() {
		bb, err := spectrum.FromV(float64(stars.Teff[i]), float64(stars.Vmag[i]))
		if err != nil {
			t.Fatal(err)
		}
		x, y, z := bb.XYZ()
		sx, sy, sz = sx+x, sy+y, sz+z
		if float64(stars.Vmag[i]) <= lim {
			vis += y
		}
	}
	tab, err := Census(stars, Betas(0), CensusOptions{LimitMag: lim})
	if err != nil {
		t.Fatal(err)
	}
	r := tab.Rows[0]
	if !scalar.EqualWithinRel(r.Illuminance, sy, 1e-6) {
		t.Errorf("%s: illuminance have %.9g lux, want %.9g (Σ FromV.XYZ Y)", stars.Source, r.Illuminance, sy)
	}
	if !scalar.EqualWithinRel(r.VisibleIlluminance, vis, 1e-6) {
		t.Errorf("%s: visible illuminance have %.9g lux, want %.9g", stars.Source, r.VisibleIlluminance, vis)
	}
	if x, y := sx/(sx+sy+sz), sy/(sx+sy+sz); !scalar.EqualWithinAbs(r.CIEx, x, 1e-7) || !scalar.EqualWithinAbs(r.CIEy, y, 1e-7) {
		t.Errorf("%s: chromaticity have (%.8f, %.8f), want (%.8f, %.8f)", stars.Source, r.CIEx, r.CIEy, x, y)
	}
}

func TestCensusRestBuiltIn(t *testing.T) {
	checkRestCensus(t, catalog.BuiltIn(), []float64{3, 6.5, 8})
}

func TestCensusRestBSC5(t *testing.T) {
	stars, _, err := catalog.Open(bsc5Path(t), catalog.ReadOptions{})
	if err != nil {
		t.Fatal(err)
	}
	checkRestCensus(t, stars, []float64{2, 4.5, 6.5})
}

func TestCensusIsotropicSky(t *testing.T) {
	// An evenly filled sky with every star counted (limit far below any V′):
	// the rest-frame equator θ = 90° maps to cos θ′ = β (aberration formula,
	// physics.md [cp]), so half of the stars lie within arccos β of the
	// heading and a fraction (1 + β)/2 of them is in the forward hemisphere
	// (cos θ′ ≥ 0 ⇔ cos θ ≥ −β for uniform cos θ).
	const n = 20000
	sky := fibonacciSky(n, 5772, 0)
	for _, beta := range []float64{0, 0.5, 0.9, 0.99} {
		tab, err := Census(sky, Betas(beta), CensusOptions{Heading: r3.Vec{Z: 1}, LimitMag: 1e6})
		if err != nil {
			t.Fatal(err)
		}
		r := tab.Rows[0]
		if r.Visible != n {
			t.Fatalf("β = %v: visible %d, want all %d", beta, r.Visible, n)
		}
		want := math.Acos(beta) * 180 / math.Pi
		// Lattice spacing: 2/n in cos θ, i.e. ≤ 0.01° in θ′ here.
		if !scalar.EqualWithinAbs(r.HalfAngle, want, 0.05) {
			t.Errorf("β = %v: half-count radius have %.4f°, want arccos β = %.4f°", beta, r.HalfAngle, want)
		}
		if f, want := float64(r.Forward)/n, (1+beta)/2; !scalar.EqualWithinAbs(f, want, 2.0/n) {
			t.Errorf("β = %v: forward fraction have %.5f, want (1+β)/2 = %.5f", beta, f, want)
		}
	}
}

func TestCensusHalfAngleHandMade(t *testing.T) {
	// Four visible stars at 10°, 20°, 30°, 40° from the heading and one
	// fainter than the limit at 5°: the smallest radius holding at least
	// half (2) of the visible stars is 20° (definition in doc.go).
	s := &catalog.Stars{Source: "hand-made"}
	h := r3.Vec{Z: 1}
	for _, th := range []float64{10, 20, 30, 40} {
		appendStar(s, dirAt(th), float32(math.Inf(1)), 1, 5772)
	}
	appendStar(s, dirAt(5), float32(math.Inf(1)), 9, 5772)
	tab, err := Census(s, Betas(0), CensusOptions{Heading: h, LimitMag: 6.5})
	if err != nil {
		t.Fatal(err)
	}
	r := tab.Rows[0]
	if r.Visible != 4 || r.Forward != 4 || r.Rear != 0 {
		t.Errorf("counts visible/forward/rear = %d/%d/%d, want 4/4/0", r.Visible, r.Forward, r.Rear)
	}
	if !scalar.EqualWithinAbs(r.HalfAngle, 20, 1e-5) {
		t.Errorf("half-count radius %v°, want 20°", r.HalfAngle)
	}
	if !scalar.EqualWithinAbs(r.Brightest, 1, 1e-6) {
		t.Errorf("brightest V′ %v, want 1 (catalogue V at rest)", r.Brightest)
	}
	// No star visible: NaN radius.
	tab, _ = Census(s, Betas(0), CensusOptions{Heading: h, LimitMag: -5})
	if r := tab.Rows[0]; r.Visible != 0 || !math.IsNaN(r.HalfAngle) {
		t.Errorf("limit −5: visible %d, radius %v; want 0 and NaN", r.Visible, r.HalfAngle)
	}
}

func TestCensusMovingAgreesWithPerStar(t *testing.T) {
	// At speed, the census's table photometry agrees with the per-star
	// Blackbody path (camera.Observer.See, FromV, Observed) star by star.
	sky := randomSky(400, 7)
	h := camera.FromRADec(30, 40)
	pos := r3.Vec{X: 1, Y: -2, Z: 0.5}
	for _, beam := range []spectrum.Beaming{spectrum.BeamingExact, spectrum.BeamingD4} {
		for _, beta := range []float64{0.6, 0.95} {
			tab, err := Census(sky, Betas(beta), CensusOptions{Heading: h, LimitMag: 5, Beaming: beam})
			if err != nil {
				t.Fatal(err)
			}
			b, _ := camera.NewBoost(h, beta)
			// Position only matters with finite distances; the sky has none,
			// so the same counts must come out from any position.
			tab2, err := Census(sky, Betas(beta), CensusOptions{Heading: h, Position: pos, LimitMag: 5, Beaming: beam})
			if err != nil {
				t.Fatal(err)
			}
			if tab2.Rows[0].Visible != tab.Rows[0].Visible {
				t.Errorf("infinitely far stars: visible %d from the Sun, %d from %v", tab.Rows[0].Visible, tab2.Rows[0].Visible, pos)
			}
			obs := camera.Observer{Boost: b}
			var vis, fwd int
			var lux float64
			brightest := math.Inf(1)
			for i := range sky.Len() {
				u := r3.Vec{X: float64(sky.X[i]), Y: float64(sky.Y[i]), Z: float64(sky.Z[i])}
				n, d, dil, _ := obs.See(r3.Unit(u), math.Inf(1))
				bb, _ := spectrum.FromV(float64(sky.Teff[i]), float64(sky.Vmag[i]))
				o := bb.Observed(d, beam)
				o.W *= dil
				_, y, _ := o.XYZ()
				lux += y
				if o.Vmag() <= 5 {
					vis++
					brightest = min(brightest, o.Vmag())
					if r3.Dot(n, h) >= 0 {
						fwd++
					}
				}
			}
			r := tab.Rows[0]
			if r.Visible != vis || r.Forward != fwd {
				t.Errorf("%v β = %v: visible/forward have %d/%d, want %d/%d", beam, beta, r.Visible, r.Forward, vis, fwd)
			}
			if !scalar.EqualWithinRel(r.Illuminance, lux, 1e-6) {
				t.Errorf("%v β = %v: illuminance have %.9g, want %.9g", beam, beta, r.Illuminance, lux)
			}
			// V′ itself, to the table's 1e-6 mag (spectrum doc).
			if !scalar.EqualWithinAbs(r.Brightest, brightest, 1e-6) {
				t.Errorf("%v β = %v: brightest V′ have %.9f, want %.9f", beam, beta, r.Brightest, brightest)
			}
		}
	}
}

func TestCensusAtStarAndSkipped(t *testing.T) {
	// A ship sitting on a star skips it; a star without a usable
	// temperature is left out and counted as skipped.
	s := &catalog.Stars{Source: "two"}
	appendStar(s, r3.Vec{X: 1}, 10, 1, 5772)
	appendStar(s, r3.Vec{Y: 1}, 10, 1, 5772)
	appendStar(s, r3.Vec{Z: 1}, 10, 1, 0)
	tab, err := Census(s, Betas(0, 0.5), CensusOptions{Position: r3.Vec{X: 10}, LimitMag: 30})
	if err != nil {
		t.Fatal(err)
	}
	if tab.Skipped != 1 || tab.Stars != 2 {
		t.Errorf("skipped %d, used %d; want 1, 2", tab.Skipped, tab.Stars)
	}
	for _, r := range tab.Rows {
		if r.Visible != 1 {
			t.Errorf("β = %v: visible %d, want 1 (the star under the ship is skipped)", r.Beta, r.Visible)
		}
	}
}

func TestCensusErrors(t *testing.T) {
	sky := fibonacciSky(10, 5772, 1)
	nan := math.NaN()
	cases := []struct {
		name   string
		stars  *catalog.Stars
		speeds []Speed
		opt    CensusOptions
		want   error
	}{
		{"no speeds", sky, nil, CensusOptions{}, ErrNoSpeeds},
		{"β = 1", sky, Betas(0, 1), CensusOptions{}, ErrSpeed},
		{"β < 0", sky, Betas(-0.5), CensusOptions{}, ErrSpeed},
		{"β NaN", sky, Betas(nan), CensusOptions{}, ErrSpeed},
		{"limit NaN", sky, Betas(0), CensusOptions{LimitMag: nan}, ErrLimit},
		{"limit Inf", sky, Betas(0), CensusOptions{LimitMag: math.Inf(1)}, ErrLimit},
		{"heading NaN", sky, Betas(0), CensusOptions{Heading: r3.Vec{X: nan}}, ErrHeading},
		{"nil stars", nil, Betas(0), CensusOptions{}, ErrNoStars},
		{"empty stars", &catalog.Stars{}, Betas(0), CensusOptions{}, ErrNoStars},
	}
	for _, c := range cases {
		if _, err := Census(c.stars, c.speeds, c.opt); !errors.Is(err, c.want) {
			t.Errorf("%s: error %v, want %v", c.name, err, c.want)
		}
	}
}

func TestCensusCSV(t *testing.T) {
	tab, err := Census(randomSky(300, 3), Betas(0, 0.5, 0.9), CensusOptions{LimitMag: 6})
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := tab.WriteCSV(&buf); err != nil {
		t.Fatal(err)
	}
	recs, err := csv.NewReader(&buf).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(recs) != 4 || len(recs[0]) != len(CensusColumns) {
		t.Fatalf("CSV %d rows × %d columns, want 4 × %d", len(recs), len(recs[0]), len(CensusColumns))
	}
	for i, r := range tab.Rows {
		rec := recs[i+1]
		if v, _ := strconv.Atoi(rec[2]); v != r.Visible {
			t.Errorf("row %d visible %q, want %d", i, rec[2], r.Visible)
		}
		if v, _ := strconv.ParseFloat(rec[5], 64); v != r.Illuminance {
			t.Errorf("row %d illuminance %q does not round-trip %v", i, rec[5], r.Illuminance)
		}
	}
}

func BenchmarkCensusBuiltIn(b *testing.B) {
	stars := catalog.BuiltIn()
	w := newCensusWork(stars)
	opt := CensusOptions{Heading: camera.FromGalacticLB(0, 0), LimitMag: 6.5}
	bo, _ := camera.NewBoost(opt.Heading, 0.9)
	obs := camera.Observer{Boost: bo}
	b.ReportAllocs()
	for b.Loop() {
		w.measure(obs, Speed{Beta: 0.9}, opt)
	}
	b.ReportMetric(float64(len(w.idx))*float64(b.N)/b.Elapsed().Seconds()/1e6, "Mstars/s")
}
