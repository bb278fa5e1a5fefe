package main

import (
	"context"
	"encoding/csv"
	"encoding/json"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"

	"github.com/parquet-go/parquet-go"
	"github.com/spf13/pflag"

	"github.com/skyframe/skyframe/analysis"
	"github.com/skyframe/skyframe/internal/sharedcat"
	"github.com/skyframe/skyframe/spectrum"
)

func starsJSON(t *testing.T, args ...string) []analysis.SpeedRow {
	t.Helper()
	out, errs, code := runCmd(t, append([]string{"stars", "--format", "json"}, args...)...)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var rows []analysis.SpeedRow
	if err := json.Unmarshal([]byte(out), &rows); err != nil {
		t.Fatal(err)
	}
	return rows
}

// θ and θ′ against the aberration formula cos θ′ = (cos θ + β)/(1 + β cos θ)
// (Einstein 1905; README physics table), for the real Bright Star
// Catalogue seen from the Sun at several speeds; bv_obs against the colour
// of a blackbody at D·T (spectrum.BV, itself checked against a direct
// integration of Planck's law through the passbands in
// spectrum.TestBVAgainstDirect); the name column from the IAU table.
func TestStarsAngles(t *testing.T) {
	bsc, csn := sharedcat.BSC5(t), sharedcat.IAUCSN(t)
	rows := starsJSON(t, "--catalog", bsc, "--names", csn, "--speeds", "0.3,0.9,0.999", "--toward", "Betelgeuse")
	if len(rows) != 3*9096 {
		t.Fatalf("%d rows, want 3 × 9096", len(rows))
	}
	named := 0
	for _, r := range rows {
		b := r.Beta
		ct := math.Cos(r.Theta * math.Pi / 180)
		want := (ct + b) / (1 + b*ct)
		if have := math.Cos(r.ThetaObs * math.Pi / 180); math.Abs(have-want) > 1e-9 {
			t.Fatalf("β %v HR %d: cos θ′ %.12f, formula %.12f (θ %v°)", b, r.ID, have, want, r.Theta)
		}
		// D = γ(1 + β cos θ) = 1/(γ(1 − β cos θ′)) (README physics table).
		g := 1 / math.Sqrt(1-b*b)
		if d := g * (1 + b*ct); math.Abs(r.Doppler-d) > 1e-9*d {
			t.Fatalf("β %v HR %d: D %v, γ(1+β cos θ) %v", b, r.ID, r.Doppler, d)
		}
		if bv := spectrum.BV(r.TempObs); r.BVObs != bv {
			t.Fatalf("HR %d: bv_obs %v, B−V(D·T) %v", r.ID, r.BVObs, bv)
		}
		if r.Name != "" {
			named++
		}
		if r.ID == 2061 && (r.Name != "Betelgeuse" || r.Theta != 0) {
			t.Errorf("HR 2061: name %q θ %v, want Betelgeuse at 0°", r.Name, r.Theta)
		}
	}
	if named < 3*3000 {
		t.Errorf("%d named rows; BSC5 has Bayer or Flamsteed names for about 3700 stars", named)
	}
}

// A --speeds run equals the single-speed runs row for row (the beta column
// aside), in CSV text; speeds print in shortest form (0.27, not
// 0.27000000000000002); at β = 0 every observed V equals the catalogue V.
func TestStarsSpeedsEqualSingleRuns(t *testing.T) {
	bsc := sharedcat.BSC5(t)
	multi, errs, code := runCmd(t, "stars", "--catalog", bsc, "--speeds", "0,0.27,0.9", "--limit", "400")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	mrecs, err := csv.NewReader(strings.NewReader(multi)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(mrecs[0], append([]string{"beta"}, analysis.StarColumns...)) {
		t.Fatalf("header %v", mrecs[0])
	}
	k := 1
	for _, b := range []string{"0", "0.27", "0.9"} {
		single, errs, code := runCmd(t, "stars", "--catalog", bsc, "--speed", b, "--limit", "400")
		if code != 0 {
			t.Fatalf("exit %d: %s", code, errs)
		}
		srecs, _ := csv.NewReader(strings.NewReader(single)).ReadAll()
		for _, s := range srecs[1:] {
			m := mrecs[k]
			k++
			if m[0] != b || !slices.Equal(m[1:], s) {
				t.Fatalf("β %s: multi-speed row %v, single run %v", b, m, s)
			}
			if b == "0" && s[6] != s[13] {
				t.Fatalf("β = 0: vmag_obs %s, vmag %s: want equal", s[13], s[6])
			}
		}
	}
	if k != len(mrecs) {
		t.Errorf("%d multi-speed rows, single runs gave %d", len(mrecs)-1, k-1)
	}
	for _, r := range starsJSON(t, "--catalog", bsc, "--speed", "0") {
		if r.VmagObs != r.Vmag || r.FluxRatio != 1 || r.Doppler != 1 {
			t.Fatalf("HR %d at rest: V′ %v V %v, flux ratio %v, D %v", r.ID, r.VmagObs, r.Vmag, r.FluxRatio, r.Doppler)
		}
	}
}

// The table's photometry is the renderer's and the census's
// (spectrum.Observe, checked against direct integration of the V passband
// in the spectrum tests): at speed, each row's vmag_obs equals the W-based
// Blackbody path, FromV(T, V).Observed(D, beaming).Vmag() [pub:
// physics.md, T′ = D T, W′ = W·WScale(D)], to 1e-9 mag, and its colour is
// the chromaticity of a blackbody at D·T to 1e-9; the built-in sky (no
// shared data needed), seen from the Sun. A 0.004 mag error fails.
func TestStarsPhotometryMatchesBlackbody(t *testing.T) {
	for _, c := range []struct {
		beam string
		b    spectrum.Beaming
	}{{"exact", spectrum.BeamingExact}, {"d4", spectrum.BeamingD4}} {
		rows := starsJSON(t, "--speeds", "0.5,0.99", "--beaming", c.beam, "--limit", "300")
		if len(rows) != 600 {
			t.Fatalf("%d rows, want 600", len(rows))
		}
		for _, r := range rows {
			bb, err := spectrum.FromV(r.Temp, r.Vmag)
			if err != nil {
				t.Fatal(err)
			}
			o := bb.Observed(r.Doppler, c.b)
			if want := o.Vmag(); math.Abs(r.VmagObs-want) > 1e-9 {
				t.Fatalf("%s β %v id %d (T %v, D %v): vmag_obs %.12f, Blackbody path %.12f", c.beam, r.Beta, r.ID, r.Temp, r.Doppler, r.VmagObs, want)
			}
			if x, y := spectrum.Chromaticity(o.T); math.Abs(r.CIEx-x) > 1e-9 || math.Abs(r.CIEy-y) > 1e-9 {
				t.Fatalf("%s β %v id %d: colour (%v, %v), blackbody at D·T (%v, %v)", c.beam, r.Beta, r.ID, r.CIEx, r.CIEy, x, y)
			}
		}
	}
}

// Parquet read back by parquet-go gives the JSON table's values exactly,
// with and without --speeds; without a file it is refused with exit 2.
func TestStarsParquet(t *testing.T) {
	bsc, csn := sharedcat.BSC5(t), sharedcat.IAUCSN(t)
	dir := t.TempDir()
	args := []string{"--catalog", bsc, "--names", csn, "--speeds", "0.5,0.99", "--limit", "300"}
	want := starsJSON(t, args...)
	pq := filepath.Join(dir, "s.parquet")
	if _, errs, code := runCmd(t, append([]string{"stars", "--format", "parquet", "-o", pq}, args...)...); code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	f, err := os.Open(pq)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	st, _ := f.Stat()
	// A flat struct: parquet-go (v0.32) reads a null optional column of an
	// embedded struct as a pointer to 0, though the file holds the null.
	type flatRow struct {
		Beta      float64  `parquet:"beta"`
		ID        int64    `parquet:"id"`
		Name      string   `parquet:"name"`
		RA        float64  `parquet:"ra_deg"`
		Dec       float64  `parquet:"dec_deg"`
		Dist      *float64 `parquet:"dist_pc,optional"`
		Temp      float64  `parquet:"temp_k"`
		Vmag      float64  `parquet:"vmag"`
		Theta     float64  `parquet:"theta_deg"`
		ThetaObs  float64  `parquet:"theta_obs_deg"`
		RAObs     float64  `parquet:"ra_obs_deg"`
		DecObs    float64  `parquet:"dec_obs_deg"`
		Doppler   float64  `parquet:"doppler"`
		TempObs   float64  `parquet:"temp_obs_k"`
		VmagObs   float64  `parquet:"vmag_obs"`
		BVObs     float64  `parquet:"bv_obs"`
		FluxRatio float64  `parquet:"flux_ratio"`
		CIEx      float64  `parquet:"cie_x"`
		CIEy      float64  `parquet:"cie_y"`
	}
	flat, err := parquet.Read[flatRow](f, st.Size())
	if err != nil {
		t.Fatal(err)
	}
	have := make([]analysis.SpeedRow, len(flat))
	for i, r := range flat {
		have[i] = analysis.SpeedRow{Beta: r.Beta, StarRow: analysis.StarRow{ID: r.ID, Name: r.Name, RA: r.RA, Dec: r.Dec,
			Dist: r.Dist, Temp: r.Temp, Vmag: r.Vmag, Theta: r.Theta, ThetaObs: r.ThetaObs, RAObs: r.RAObs,
			DecObs: r.DecObs, Doppler: r.Doppler, TempObs: r.TempObs, VmagObs: r.VmagObs, BVObs: r.BVObs,
			FluxRatio: r.FluxRatio, CIEx: r.CIEx, CIEy: r.CIEy}}
	}
	if len(have) != len(want) {
		t.Fatalf("%d rows, want %d", len(have), len(want))
	}
	for i := range have {
		h, w := have[i], want[i]
		if (h.Dist == nil) != (w.Dist == nil) || (h.Dist != nil && *h.Dist != *w.Dist) {
			t.Fatalf("row %d: dist %v, want %v", i, h.Dist, w.Dist)
		}
		h.Dist, w.Dist = nil, nil
		if h != w {
			t.Fatalf("row %d: parquet %+v, json %+v", i, h, w)
		}
	}
	pf, _ := parquet.OpenFile(f, st.Size())
	if v, ok := pf.Lookup("star_names"); !ok || !strings.Contains(v, "WGSN") {
		t.Errorf("Parquet metadata star_names = %q", v)
	}
	one := filepath.Join(dir, "one.parquet")
	if _, errs, code := runCmd(t, "stars", "--catalog", bsc, "--speed", "0.5", "--format", "parquet", "-o", one, "--limit", "5"); code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if rows, err := parquet.ReadFile[analysis.StarRow](one); err != nil || len(rows) != 5 {
		t.Errorf("single-speed parquet: %d rows, %v", len(rows), err)
	}
	if _, _, code := runCmd(t, "stars", "--format", "parquet"); code != 2 {
		t.Errorf("parquet to standard output: exit %d, want 2", code)
	}
	if _, _, code := runCmd(t, "stars", "--speeds", "0.5,1.2", "-o", filepath.Join(dir, "x.csv")); code != 2 {
		t.Errorf("--speeds with β ≥ 1: exit %d, want 2", code)
	}
	if _, err := os.Stat(filepath.Join(dir, "x.csv")); err == nil {
		t.Error("a refused run wrote its output")
	}
}

// census: range speeds print as written (0.27), a star exactly at the limit
// is counted exactly when stars prints it at the limit, and --parquet
// writes the same table.
func TestCensusCleanAndConsistent(t *testing.T) {
	dir := t.TempDir()
	cat := filepath.Join(dir, "c.csv")
	// Invented stars: one exactly at V = 6.5, one just fainter, one brighter.
	os.WriteFile(cat, []byte("id,ra,dec,vmag,bv\n1,10,20,6.5,0.6\n2,50,-10,6.5001,0.3\n3,200,40,3,1.2\n"), 0o644)
	out, errs, code := runCmd(t, "census", "--catalog", cat, "--from", "0", "--to", "0.99", "--steps", "12", "--limit-mag", "6.5")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	recs, _ := csv.NewReader(strings.NewReader(out)).ReadAll()
	var betas []string
	for _, r := range recs[1:] {
		betas = append(betas, r[0])
	}
	if want := []string{"0", "0.09", "0.18", "0.27", "0.36", "0.45", "0.54", "0.63", "0.72", "0.81", "0.9", "0.99"}; !slices.Equal(betas, want) {
		t.Errorf("speeds %v, want %v", betas, want)
	}
	if recs[1][2] != "2" {
		t.Errorf("β = 0: %s visible, want 2 (V = 3 and the star exactly at 6.5)", recs[1][2])
	}
	rows := starsJSON(t, "--catalog", cat, "--speed", "0")
	at := 0
	for _, r := range rows {
		if r.VmagObs <= 6.5 {
			at++
		}
	}
	if strconv.Itoa(at) != recs[1][2] {
		t.Errorf("stars has %d rows with V′ ≤ 6.5, census counts %s", at, recs[1][2])
	}
	pq := filepath.Join(dir, "c.parquet")
	if _, errs, code := runCmd(t, "census", "--catalog", cat, "--speeds", "0,0.5", "--parquet", pq, "--csv", filepath.Join(dir, "c.out.csv")); code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	f, err := parquet.ReadFile[struct {
		Beta    float64 `parquet:"beta"`
		Visible int64   `parquet:"visible"`
	}](pq)
	if err != nil || len(f) != 2 || f[1].Beta != 0.5 || f[0].Visible != 2 {
		t.Errorf("census parquet: %+v %v", f, err)
	}
}

// BenchmarkObserveStars: the stars table's per-star loop over the built-in
// sky at 0.9 c.
func BenchmarkObserveStars(b *testing.B) {
	var p physicsFlags
	fs := pflag.NewFlagSet("b", pflag.ContinueOnError)
	p.register(fs, 0.9)
	sc, err := p.resolve(&env{ctx: context.Background(), stdout: io.Discard, stderr: io.Discard, getenv: os.Getenv}, fs)
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		analysis.ObserveStars(sc.Stars, sc.Index.Name, sc.Heading, sc.Beaming, sc.Observer)
	}
	b.ReportMetric(float64(sc.Stars.Len())*float64(b.N)/b.Elapsed().Seconds()/1e6, "Mstars/s")
}
