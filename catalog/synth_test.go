package catalog

import (
	"bufio"
	"math"
	"os"
	"path/filepath"
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
	t.Helper()
	dir, err := os.Getwd()
	if err != nil {
		t.Fatal(err)
	}
	for {
		p := filepath.Join(dir, "shared", "catalogs", "bsc5.dat")
		if _, err := os.Stat(p); err == nil {
			return p
		}
		parent := filepath.Dir(dir)
		if parent == dir {
			t.Skip("shared/catalogs/bsc5.dat not found in any parent directory; skipping comparison with the Bright Star Catalogue")
		}
		dir = parent
	}
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

func BenchmarkSynthetic(b *testing.B) {
	b.ReportAllocs()
	for b.Loop() {
		s := Synthetic(SynthOptions{})
		if s.Len() == 0 {
			b.Fatal("empty sky")
		}
	}
}
