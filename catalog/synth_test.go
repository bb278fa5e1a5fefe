package catalog

import (
	"bufio"
	"github.com/skyframe/skyframe/internal/sharedcat"
	"math"
	"math/rand/v2"
	"os"
	"runtime"
	"sort"
	"strconv"
	"strings"
	"testing"
)

// synthBSCRow is the part of a Bright Star Catalogue record the statistics need.
type synthBSCRow struct {
	v, bv, glat float64 // bv is NaN when blank
}

// synthFindBSC walks up from the package directory to a directory holding
// shared/catalogs/bsc5.dat.
func synthFindBSC(t testing.TB) string {
	return sharedcat.BSC5(t)
}

// synthReadBSC parses Vmag (bytes 103–107), B−V (110–114) and GLAT (97–102),
// 1-based inclusive, from the byte-by-byte description of CDS V/50
// (shared/catalogs/README.md). Records without V are skipped.
func synthReadBSC(t testing.TB) []synthBSCRow {
	t.Helper()
	f, err := os.Open(synthFindBSC(t))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var rows []synthBSCRow
	sc := bufio.NewScanner(f)
	field := func(line string, a, b int) string { return strings.TrimSpace(line[a-1 : b]) }
	for sc.Scan() {
		line := sc.Text()
		if len(line) < 200 {
			line += strings.Repeat(" ", 200-len(line))
		}
		vs := field(line, 103, 107)
		if vs == "" {
			continue
		}
		v, err := strconv.ParseFloat(vs, 64)
		if err != nil {
			t.Fatalf("bsc5.dat: bad Vmag %q", vs)
		}
		glat, err := strconv.ParseFloat(field(line, 97, 102), 64)
		if err != nil {
			t.Fatalf("bsc5.dat: bad GLAT in %q", line[:20])
		}
		bv := math.NaN()
		if s := field(line, 110, 114); s != "" {
			if bv, err = strconv.ParseFloat(s, 64); err != nil {
				t.Fatalf("bsc5.dat: bad B-V %q", s)
			}
		}
		rows = append(rows, synthBSCRow{v: v, bv: bv, glat: glat})
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	return rows
}

// synthSkyStats are the statistics compared between the synthetic and real skies,
// over stars with V ≤ 6.5.
type synthSkyStats struct {
	bins     []int   // counts per bin of synthStatBins
	n        int     // all stars with V ≤ 6.5
	lowShare float64 // share with |b| < 20°
	medianBV float64
}

// synthStatBins are the upper edges of the V bins: (−∞, 2], (2, 3], … (5, 6],
// (6, 6.5]. The issue asks for 1-mag bins to V = 6.5; the real sky has only
// 15 stars with V ≤ 1 and 35 in (1, 2], where Poisson noise alone (±26 %,
// ±17 %) exceeds the 20 % tolerance, so V ≤ 2 is one bin (50 stars, ±14 %).
var synthStatBins = []float64{2, 3, 4, 5, 6, 6.5}

func synthBinOf(v float64) int {
	for i, e := range synthStatBins {
		if v <= e {
			return i
		}
	}
	return -1
}

func synthStatsOf(v, bv, glat []float64) synthSkyStats {
	st := synthSkyStats{bins: make([]int, len(synthStatBins))}
	var bvs []float64
	low := 0
	for i := range v {
		b := synthBinOf(v[i])
		if b < 0 {
			continue
		}
		st.bins[b]++
		st.n++
		if math.Abs(glat[i]) < 20 {
			low++
		}
		if !math.IsNaN(bv[i]) {
			bvs = append(bvs, bv[i])
		}
	}
	st.lowShare = float64(low) / float64(st.n)
	sort.Float64s(bvs)
	if len(bvs) > 0 {
		st.medianBV = bvs[len(bvs)/2]
	}
	return st
}

func synthBSCStats(t testing.TB) synthSkyStats {
	rows := synthReadBSC(t)
	v, bv, gl := make([]float64, len(rows)), make([]float64, len(rows)), make([]float64, len(rows))
	for i, r := range rows {
		v[i], bv[i], gl[i] = r.v, r.bv, r.glat
	}
	return synthStatsOf(v, bv, gl)
}

func synthStats(s *Stars) synthSkyStats {
	n := s.Len()
	v, bv, gl := make([]float64, n), make([]float64, n), make([]float64, n)
	for i := 0; i < n; i++ {
		v[i], bv[i] = float64(s.Vmag[i]), float64(s.BV[i])
		_, _, gz := icrsToGalactic(float64(s.X[i]), float64(s.Y[i]), float64(s.Z[i]))
		gl[i] = math.Asin(math.Max(-1, math.Min(1, gz))) * 180 / math.Pi
	}
	return synthStatsOf(v, bv, gl)
}

func TestSyntheticMatchesBSC(t *testing.T) {
	real := synthBSCStats(t)
	syn := synthStats(BuiltIn())
	lo := math.Inf(-1)
	for i, e := range synthStatBins {
		have, want := syn.bins[i], real.bins[i]
		rel := float64(have-want) / float64(want)
		t.Logf("V in (%g, %g]: synthetic %d, BSC5 %d (%+.1f %%)", lo, e, have, want, 100*rel)
		// Tolerance 20 % is the requirement [cp].
		if math.Abs(rel) > 0.20 {
			t.Errorf("V in (%g, %g]: have %d stars, want %d ± 20 %% (BSC5)", lo, e, have, want)
		}
		lo = e
	}
	t.Logf("V ≤ 6.5: synthetic %d, BSC5 %d", syn.n, real.n)
	t.Logf("|b| < 20°: synthetic %.3f, BSC5 %.3f", syn.lowShare, real.lowShare)
	if rel := syn.lowShare/real.lowShare - 1; math.Abs(rel) > 0.20 {
		t.Errorf("share at |b| < 20°: have %.3f, want %.3f ± 20 %% (BSC5)", syn.lowShare, real.lowShare)
	}
	t.Logf("median B−V: synthetic %.3f, BSC5 %.3f", syn.medianBV, real.medianBV)
	if d := syn.medianBV - real.medianBV; math.Abs(d) > 0.1 {
		t.Errorf("median B−V: have %.3f, want %.3f ± 0.1 (BSC5)", syn.medianBV, real.medianBV)
	}
}

// BenchmarkBuiltInBuild measures what the first BuiltIn call costs: building
// the default sky (BuiltIn itself caches, so the benchmark calls Synthetic).
func BenchmarkBuiltInBuild(b *testing.B) {
	b.ReportAllocs()
	for b.Loop() {
		s := Synthetic(SynthOptions{})
		if s.Len() == 0 {
			b.Fatal("empty sky")
		}
	}
}

// TestGalacticRotation checks the private ICRS↔galactic rotation against the
// defining constants and the position of the galactic centre.
func TestGalacticRotation(t *testing.T) {
	radec := func(x, y, z float64) (float64, float64) {
		ra := math.Atan2(y, x) * 180 / math.Pi
		if ra < 0 {
			ra += 360
		}
		return ra, math.Asin(z) * 180 / math.Pi
	}
	cases := []struct {
		name          string
		l, b          float64
		wantRA, wantD float64
		tol           float64 // degrees
		src           string
	}{
		// Defining constants, ESA SP-1200 Vol. 1 §1.5.3 [pub].
		{"north galactic pole", 0, 90, 192.85948, 27.12825, 1e-7, "ESA SP-1200 §1.5.3 [pub]"},
		// Galactic centre (l, b) = (0, 0) at α = 266.40499°, δ = −28.93617°
		// (ESA SP-1200 Vol. 1 §1.5.3, Eq. 1.5.11) [mem].
		{"galactic centre", 0, 0, 266.40499, -28.93617, 1e-4, "ESA SP-1200 §1.5.3 [mem]"},
	}
	for _, c := range cases {
		gx, gy, gz := galacticLB(c.l, c.b)
		ra, dec := radec(galacticToICRS(gx, gy, gz))
		if c.b == 90 {
			ra = math.Mod(ra+360, 360)
		}
		if math.Abs(ra-c.wantRA) > c.tol || math.Abs(dec-c.wantD) > c.tol {
			t.Errorf("%s: have (α, δ) = (%.6f, %.6f), want (%.6f, %.6f) (%s)", c.name, ra, dec, c.wantRA, c.wantD, c.src)
		}
	}
	// The north celestial pole lies at galactic longitude 122.93192° and
	// latitude δ_NGP = 27.12825° (ESA SP-1200 §1.5.3) [pub].
	gx, gy, gz := icrsToGalactic(0, 0, 1)
	l := math.Atan2(gy, gx) * 180 / math.Pi
	b := math.Asin(gz) * 180 / math.Pi
	if math.Abs(l-122.93192) > 1e-7 || math.Abs(b-27.12825) > 1e-7 {
		t.Errorf("NCP: have (l, b) = (%.7f, %.7f), want (122.93192, 27.12825) (ESA SP-1200 §1.5.3)", l, b)
	}
	// Round trip [cp]: the rotation is orthogonal.
	for _, lb := range [][2]float64{{10, 5}, {200, -60}, {300, 33}} {
		gx, gy, gz := galacticLB(lb[0], lb[1])
		hx, hy, hz := icrsToGalactic(galacticToICRS(gx, gy, gz))
		if d := math.Abs(hx-gx) + math.Abs(hy-gy) + math.Abs(hz-gz); d > 1e-14 {
			t.Errorf("round trip of (l, b) = %v: error %g, want < 1e-14", lb, d)
		}
	}
}

func TestBuiltInSharedAndDeterministic(t *testing.T) {
	a, b := BuiltIn(), BuiltIn()
	if a != b {
		t.Fatal("BuiltIn returned two different catalogues; want one shared value")
	}
	c := Synthetic(SynthOptions{})
	if c.Len() != a.Len() {
		t.Fatalf("Synthetic(zero options) has %d stars, BuiltIn %d; want equal", c.Len(), a.Len())
	}
	for i := 0; i < a.Len(); i++ {
		if a.ID[i] != c.ID[i] || a.X[i] != c.X[i] || a.Vmag[i] != c.Vmag[i] || a.BV[i] != c.BV[i] || a.Dist[i] != c.Dist[i] {
			t.Fatalf("row %d differs between two builds with the same options", i)
		}
	}
	d := Synthetic(SynthOptions{Seed: 12345})
	same := d.Len() == a.Len()
	for i := len(nearbyStars); same && i < a.Len(); i++ {
		same = a.X[i] == d.X[i] && a.Vmag[i] == d.Vmag[i]
	}
	if same {
		t.Error("seed 12345 gave the same sky as the default seed")
	}
}

func TestSyntheticInvariants(t *testing.T) {
	for _, opt := range []SynthOptions{{}, {MagLimit: 6, NoExtinction: true, Seed: 7}, {MagLimit: 4.5, NoNearby: true}} {
		s := Synthetic(opt)
		if err := s.Validate(); err != nil {
			t.Fatalf("%+v: Validate: %v", opt, err)
		}
		if s.Epoch != 2000 || s.Source != SyntheticSource || s.Format != SyntheticFormat {
			t.Errorf("%+v: epoch/source/format = %v/%q/%q", opt, s.Epoch, s.Source, s.Format)
		}
		first := len(nearbyStars)
		if opt.NoNearby {
			first = 0
		}
		if opt.NoNearby && len(s.Names) != 0 {
			t.Errorf("%+v: %d named stars, want none", opt, len(s.Names))
		}
		lim := opt.magLimit()
		seen := map[int64]bool{}
		for i := first; i < s.Len(); i++ {
			// Identifiers are unique and name the star's magnitude slice.
			id := s.ID[i]
			if seen[id] || id < SyntheticIDBase || id >= NearbyIDBase {
				t.Fatalf("%+v: row %d has id %d, duplicate or outside the synthetic range", opt, i, id)
			}
			seen[id] = true
			if sl := int((id - SyntheticIDBase) / synthSliceStride); sl != synthSliceOf(float64(s.Vmag[i])) {
				t.Fatalf("%+v: row %d (V = %v) has id %d of slice %d, want slice %d", opt, i, s.Vmag[i], id, sl, synthSliceOf(float64(s.Vmag[i])))
			}
			// Every sampled star is brighter than the limit and outside the
			// 5 pc sphere (float32 rounding allowed).
			if float64(s.Vmag[i]) > lim+1e-5 {
				t.Fatalf("%+v: row %d has V = %v, fainter than the limit %v", opt, i, s.Vmag[i], lim)
			}
			if d := float64(s.Dist[i]); d < synthRMin*(1-1e-6) || math.IsInf(d, 0) {
				t.Fatalf("%+v: row %d has distance %v pc, want ≥ %v pc and finite", opt, i, d, synthRMin)
			}
			if n := float64(s.X[i])*float64(s.X[i]) + float64(s.Y[i])*float64(s.Y[i]) + float64(s.Z[i])*float64(s.Z[i]); math.Abs(n-1) > 1e-6 {
				t.Fatalf("%+v: row %d direction has |n|² = %v, want 1", opt, i, n)
			}
			if math.IsNaN(float64(s.BV[i])) {
				t.Fatalf("%+v: row %d has no B−V", opt, i)
			}
			// Without dust, B−V is the intrinsic colour and Teff must be its
			// Ballesteros (2012) temperature [pub].
			if opt.NoExtinction {
				want := TeffFromBV(float64(s.BV[i]))
				if math.Abs(float64(s.Teff[i])-want) > 1e-3*want {
					t.Fatalf("%+v: row %d: Teff = %v for B−V = %v, want %v (Ballesteros 2012)", opt, i, s.Teff[i], s.BV[i], want)
				}
			}
		}
	}
}

func TestSyntheticMagLimitOption(t *testing.T) {
	cases := []struct {
		in, want float64
	}{
		{0, DefaultSynthMagLimit}, {math.NaN(), DefaultSynthMagLimit}, {-40, MinSynthMagLimit},
		{99, MaxSynthMagLimit}, {math.Inf(1), MaxSynthMagLimit}, {5.5, 5.5},
	}
	for _, c := range cases {
		if have := (SynthOptions{MagLimit: c.in}).magLimit(); have != c.want {
			t.Errorf("MagLimit %v: have limit %v, want %v", c.in, have, c.want)
		}
	}
	// A very bright limit must work and give (almost) no sampled stars.
	s := Synthetic(SynthOptions{MagLimit: -40, NoNearby: true})
	if s.Len() > 10 {
		t.Errorf("MagLimit −40 (clamped to %v): %d stars, want a handful at most", MinSynthMagLimit, s.Len())
	}
}

// synthCountSubset counts the stars to V of every k-th column of cells in
// galactic longitude (all latitudes), scaled by k: a whole-sky count without
// drawing the whole sky.
func synthCountSubset(v float64, k int) float64 {
	s := Synthetic(SynthOptions{MagLimit: v, NoNearby: true, CellLimit: func(c SynthCell) float64 {
		gx, gy, _ := icrsToGalactic(c.Dir[0], c.Dir[1], c.Dir[2])
		l := math.Atan2(gy, gx) * 180 / math.Pi
		if l < 0 {
			l += 360
		}
		if int(l*synthNL/360)%k != 0 {
			return math.Inf(-1)
		}
		return math.NaN()
	}})
	return float64(s.Len() * k)
}

// spaceMathCount is the whole-sky number of stars brighter than V = m of
// the star-count relation published by NASA's Space Math programme (S.
// Odenwald, Space Math @ NASA, http://spacemath.gsfc.nasa.gov, "Exploring
// Stars in the Milky Way", problem 103 "How many stars are in the sky?";
// stored copy https://www.scribd.com/document/525564108/6Page103) [pub]:
//
//	log10 N(m) = −0.0003 m³ + 0.0019 m² + 0.484 m − 3.82
//
// stars per square degree brighter than m, "valid over the range [+4.0,
// +25.0]", times the 41 253 square degrees of the sky (the sheet's own
// figure; 4π sr is 41 252.96 deg²). The sheet calls the relation an
// approximation of star-count models and gives no uncertainty.
func spaceMathCount(m float64) float64 {
	return 41253 * math.Pow(10, -0.0003*m*m*m+0.0019*m*m+0.484*m-3.82)
}

// TestSpaceMathCountRelation pins spaceMathCount to the sheet's own worked
// example ("Log10N(6) = −0.912 … 0.12 stars per square degree") and to the
// whole-sky table computed from the same relation at
// https://cosmicreflections.skythisweek.info/2020/02/ ("Counting Stars":
// 5 042 stars to m = 6.0, 334 965 to 10.0, 13 188 640 to 14.0) [pub]; the
// table rounds the constant and sky area differently, hence 1 %.
func TestSpaceMathCountRelation(t *testing.T) {
	if lg := math.Log10(spaceMathCount(6) / 41253); math.Abs(lg-(-0.912)) > 0.001 {
		t.Errorf("log10 N(6) per deg² = %.4f, want −0.912 (Space Math problem 103)", lg)
	}
	for _, c := range []struct{ m, want float64 }{{6, 5042}, {10, 334965}, {14, 13188640}} {
		if n := spaceMathCount(c.m); math.Abs(n/c.want-1) > 0.01 {
			t.Errorf("N(<%g) = %.0f from the relation, the published table has %.0f", c.m, n, c.want)
		}
	}
}

// TestSyntheticCounts compares the whole-sky counts N(<V) of the built-in
// sky at V = 6, 8, 10, 12 and 14 with the published star-count relation of
// spaceMathCount (5 050, 43 200, 3.35·10⁵, 2.28·10⁶ and 1.32·10⁷ stars),
// each within 20 % (the tolerance; the source states none). These
// agree within 10 % with the figures this test used before, quoted from
// memory from Allen's Astrophysical Quantities (4 800, 41 000, 3.3·10⁵,
// 2.3·10⁶, 1.3·10⁷). From V = 10 on, every 4th (V = 12: 8th, V = 14: 16th)
// column of cells in longitude is drawn and the count scaled.
func TestSyntheticCounts(t *testing.T) {
	cases := []struct {
		v float64
		k int
	}{{6, 1}, {8, 1}, {10, 4}, {12, 8}, {14, 16}}
	if testing.Short() {
		cases = cases[:3]
	}
	for _, c := range cases {
		n := synthCountSubset(c.v, c.k)
		want := spaceMathCount(c.v)
		t.Logf("N(<%g) = %.0f (Space Math relation: %.4g, %+.1f %%)", c.v, n, want, 100*(n/want-1))
		if rel := n/want - 1; math.Abs(rel) > 0.2 {
			t.Errorf("V ≤ %g: have %.0f stars, want %.4g ± 20 %% (Space Math @ NASA problem 103 star-count relation)", c.v, n, want)
		}
	}
}

// TestSyntheticCountsNakedEyeBinocular compares the counts with the figures
// of Sky & Telescope, "If you combine the magnitudes of all visible stars,
// how bright a star will you come up with?" (Astronomy Questions & Answers,
// http://www.skyandtelescope.com/astronomy-resources/astronomy-questions-answers/if-you-combine-the-magnitudes-of-all-visible-stars-how-bright-a-star-will-you-come-up-with/)
// [pub]: "About 9,000 stars are brighter than magnitude 6.5" and "The number
// of stars that are brighter than magnitude 10.5 … is about 600,000"; each
// within 20 % (the tolerance; the article rounds and states none).
func TestSyntheticCountsNakedEyeBinocular(t *testing.T) {
	cases := []struct {
		v, want float64
		k       int
	}{{6.5, 9000, 1}, {10.5, 600000, 4}}
	if testing.Short() {
		cases = cases[:1]
	}
	for _, c := range cases {
		n := synthCountSubset(c.v, c.k)
		t.Logf("N(<%g) = %.0f (Sky & Telescope: about %.0f, %+.1f %%)", c.v, n, c.want, 100*(n/c.want-1))
		if rel := n/c.want - 1; math.Abs(rel) > 0.2 {
			t.Errorf("V ≤ %g: have %.0f stars, want about %.0f ± 20 %% (Sky & Telescope)", c.v, n, c.want)
		}
	}
}

// TestSyntheticCountsHipparcos compares the bright end with counts from
// the Hipparcos catalogue (ESA 1997), as tabulated in the OEIS, sequence
// A053406 ("Number of stars brighter than visual magnitude n−1", J.
// Fontaine 2000) [pub]: 4 968 stars brighter than V = 6, 15 328 than 7 and
// 40 858 than 8, where Hipparcos is nearly complete; each within 20 % (the
// issue's tolerance). The model counts V ≤ v (the difference of a boundary
// is far below the tolerance).
func TestSyntheticCountsHipparcos(t *testing.T) {
	for _, c := range []struct{ v, want float64 }{{6, 4968}, {7, 15328}, {8, 40858}} {
		n := synthCountSubset(c.v, 1)
		t.Logf("N(<%g) = %.0f (Hipparcos, OEIS A053406: %.0f, %+.1f %%)", c.v, n, c.want, 100*(n/c.want-1))
		if rel := n/c.want - 1; math.Abs(rel) > 0.2 {
			t.Errorf("V ≤ %g: have %.0f stars, want %.0f ± 20 %% (Hipparcos counts, OEIS A053406)", c.v, n, c.want)
		}
	}
}

// TestSyntheticDepthStable: a star of the built-in sky keeps its identifier,
// position, distance, magnitude and colour whatever depth is asked for,
// whether by MagLimit or per cell, and whatever the number of goroutines;
// a deeper sky only adds fainter stars.
func TestSyntheticDepthStable(t *testing.T) {
	deep := Synthetic(SynthOptions{MagLimit: 9.5})
	byID := map[int64]int{}
	for i := 0; i < deep.Len(); i++ {
		byID[deep.ID[i]] = i
	}
	same := func(name string, s *Stars, lim func(i int) float64) {
		t.Helper()
		kept := 0
		for i := 0; i < s.Len(); i++ {
			j, ok := byID[s.ID[i]]
			if !ok {
				t.Fatalf("%s: star %s is not in the V = 9.5 sky", name, DisplayID(s.ID[i]))
			}
			if s.X[i] != deep.X[j] || s.Y[i] != deep.Y[j] || s.Z[i] != deep.Z[j] || s.Dist[i] != deep.Dist[j] ||
				s.Vmag[i] != deep.Vmag[j] || s.Teff[i] != deep.Teff[j] || s.BV[i] != deep.BV[j] || s.Flags[i] != deep.Flags[j] {
				t.Fatalf("%s: star %s differs from the same star of the V = 9.5 sky", name, DisplayID(s.ID[i]))
			}
			kept++
		}
		// And nothing of the deep sky within the shallower limit is missing.
		want := 0
		for j := 0; j < deep.Len(); j++ {
			if float64(deep.Vmag[j]) <= lim(j) {
				want++
			}
		}
		if kept != want {
			t.Errorf("%s: %d stars, want the %d stars of the V = 9.5 sky within its limits", name, kept, want)
		}
	}
	same("MagLimit 7", Synthetic(SynthOptions{MagLimit: 7}), func(j int) float64 {
		if j < len(nearbyStars) {
			return math.Inf(1)
		}
		return 7
	})
	// Per cell: the northern galactic hemisphere to 9.5, the rest to 6.
	north := func(x, y, z float64) bool { _, _, gz := icrsToGalactic(x, y, z); return gz > 0 }
	cellLim := func(c SynthCell) float64 {
		if north(c.Dir[0], c.Dir[1], c.Dir[2]) {
			return 9.5
		}
		return 6
	}
	same("CellLimit", Synthetic(SynthOptions{MagLimit: 9.5, CellLimit: cellLim}), func(j int) float64 {
		if j < len(nearbyStars) {
			return math.Inf(1)
		}
		// Cells do not straddle b = 0 (40 cells in sin b).
		if north(float64(deep.X[j]), float64(deep.Y[j]), float64(deep.Z[j])) {
			return 9.5
		}
		return 6
	})
	// One goroutine gives the same sky, row for row.
	old := runtime.GOMAXPROCS(1)
	one := Synthetic(SynthOptions{MagLimit: 9.5})
	runtime.GOMAXPROCS(old)
	if one.Len() != deep.Len() {
		t.Fatalf("GOMAXPROCS 1: %d stars, want %d", one.Len(), deep.Len())
	}
	for i := 0; i < one.Len(); i++ {
		if one.ID[i] != deep.ID[i] || one.X[i] != deep.X[i] || one.Vmag[i] != deep.Vmag[i] || one.Teff[i] != deep.Teff[i] {
			t.Fatalf("GOMAXPROCS 1: row %d differs", i)
		}
	}
}

// BenchmarkSyntheticDeep measures generation speed (stars per second) of the
// whole sky to V = 11 (about 8·10⁵ stars).
func BenchmarkSyntheticDeep(b *testing.B) {
	b.ReportAllocs()
	n := 0
	for b.Loop() {
		n = Synthetic(SynthOptions{MagLimit: 11, NoNearby: true}).Len()
	}
	b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds(), "stars/s")
}

// TestSyntheticSeedsRobust checks that other seeds pass the statistics that
// are not dominated by small numbers: the 1-mag bins fainter than V = 3
// within 20 %, the low-latitude share within 20 % and the median B−V within
// 0.1 mag of BSC5 (tolerances as in TestSyntheticMatchesBSC [cp]).
func TestSyntheticSeedsRobust(t *testing.T) {
	real := synthBSCStats(t)
	seeds := []uint64{1, 2, 3, 4, 5}
	if testing.Short() {
		seeds = seeds[:2]
	}
	for _, seed := range seeds {
		syn := synthStats(Synthetic(SynthOptions{Seed: seed}))
		for i, e := range synthStatBins {
			if e <= 3 {
				continue
			}
			if rel := float64(syn.bins[i])/float64(real.bins[i]) - 1; math.Abs(rel) > 0.2 {
				t.Errorf("seed %d, bin ending at V = %g: have %d, want %d ± 20 %% (BSC5)", seed, e, syn.bins[i], real.bins[i])
			}
		}
		if rel := syn.lowShare/real.lowShare - 1; math.Abs(rel) > 0.2 {
			t.Errorf("seed %d: share at |b| < 20° have %.3f, want %.3f ± 20 %% (BSC5)", seed, syn.lowShare, real.lowShare)
		}
		if d := syn.medianBV - real.medianBV; math.Abs(d) > 0.1 {
			t.Errorf("seed %d: median B−V have %.3f, want %.3f ± 0.1 (BSC5)", seed, syn.medianBV, real.medianBV)
		}
	}
}

// TestPoisson checks the sampler's mean and variance, both λ for a Poisson
// distribution [cp], in each of its regimes.
func TestPoisson(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for _, lam := range []float64{0.3, 7, 120, 2000} {
		const n = 20000
		var sum, sum2 float64
		for i := 0; i < n; i++ {
			k := float64(poisson(rng, lam))
			sum += k
			sum2 += k * k
		}
		mean := sum / n
		vari := sum2/n - mean*mean
		// 5 standard errors of the mean; 10 % on the variance.
		if math.Abs(mean-lam) > 5*math.Sqrt(lam/n) || math.Abs(vari/lam-1) > 0.1 {
			t.Errorf("λ = %v: have mean %.4f, variance %.4f, want both %v", lam, mean, vari, lam)
		}
	}
	if poisson(rng, 0) != 0 || poisson(rng, -1) != 0 || poisson(rng, math.NaN()) != 0 {
		t.Error("poisson of a non-positive or NaN mean must be 0")
	}
}
