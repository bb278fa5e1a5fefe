package main

import (
	"encoding/csv"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"testing"

	"github.com/skyframe/skyframe/analysis"
)

// --epoch propagates positions the same way whatever file the catalogue
// comes in: a CSV table, the skyframe cache and Parquet packed from it
// give the same positions at epoch 2100, and the star with a proper motion of
// 36″/yr in declination has moved 1° north. Expected value: a constant
// space velocity across the line of sight moves a star by atan(μ·Δt) on
// the sky (rigorous linear propagation, ESA 1997, The Hipparcos and Tycho
// Catalogues, vol. 1, sec. 1.5.5; with μ·Δt = 3600″ = 0.0174533 rad that
// is 0.99990°); the other star, without proper motion, does not move.
func TestEpochOnCacheAndParquet(t *testing.T) {
	dir := t.TempDir()
	src := filepath.Join(dir, "pm.csv")
	if err := os.WriteFile(src, []byte("id,ra,dec,vmag,bv,dist,pmra,pmdec,rv\n1,10,20,3,0.6,5,0,36000,0\n2,30,-40,4,1.0,12,0,0,0\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	files := map[string]string{"csv": src}
	for _, to := range []string{"cache", "parquet"} {
		out := filepath.Join(dir, "pm."+to)
		if _, errs, code := runCmd(t, "catalog", "pack", src, "--to", to, "-o", out); code != exitOK {
			t.Fatalf("pack --to %s: status %d: %s", to, code, errs)
		}
		files[to] = out
	}
	table := func(path string, epoch string) map[string][]string {
		t.Helper()
		args := []string{"stars", "--catalog", path, "--speed", "0", "--names", "none"}
		if epoch != "" {
			args = append(args, "--epoch", epoch)
		}
		out, errs, code := runCmd(t, args...)
		if code != exitOK {
			t.Fatalf("%v: status %d: %s", args, code, errs)
		}
		recs, err := csv.NewReader(strings.NewReader(out)).ReadAll()
		if err != nil || len(recs) != 3 {
			t.Fatalf("%v: %d records, %v", args, len(recs), err)
		}
		rows := map[string][]string{}
		for _, r := range recs[1:] {
			rows[r[0]] = r[2:4] // ra_deg, dec_deg
		}
		return rows
	}
	// The packed files hold the float32 unit vectors the CSV reader
	// stored (2⁻²⁴ rad ≈ 3.4e-6° per component) and propagate from them,
	// the CSV reader from its float64 input: they agree to 1e-5°.
	want := table(src, "2100")
	for kind, path := range files {
		have := table(path, "2100")
		for id, w := range want {
			for c := range w {
				a, _ := strconv.ParseFloat(have[id][c], 64)
				b, _ := strconv.ParseFloat(w[c], 64)
				if math.Abs(a-b) > 1e-5 {
					t.Errorf("%s at 2100: star %s %v, the CSV gives %v", kind, id, have[id], w)
				}
			}
		}
	}
	then := table(src, "")
	dec := func(rows map[string][]string, id string) float64 {
		v, err := strconv.ParseFloat(rows[id][1], 64)
		if err != nil {
			t.Fatal(err)
		}
		return v
	}
	moved := dec(want, "1") - dec(then, "1")
	wantMoved := math.Atan(3600.0/206264.806247) * 180 / math.Pi
	if math.Abs(moved-wantMoved) > 2e-5 {
		t.Errorf("star 1 moved %.6f° in dec by 2100, want %.6f°", moved, wantMoved)
	}
	if d := dec(want, "2") - dec(then, "2"); math.Abs(d) > 1e-9 {
		t.Errorf("star 2 without proper motion moved %g°", d)
	}
}

// The CSV and TSV writers of stars give the JSON writer's table: the same
// header (analysis.StarColumns, with beta first for --speeds) and every value
// reading back to the JSON's number, empty dist_pc where JSON has null.
func TestStarsCSVAndTSV(t *testing.T) {
	for _, extra := range [][]string{{"--speed", "0.7"}, {"--speeds", "0,0.99"}} {
		rows := starsJSON(t, append([]string{"--limit", "40"}, extra...)...)
		for _, f := range []struct {
			name  string
			comma rune
		}{{"csv", ','}, {"tsv", '\t'}} {
			out, errs, code := runCmd(t, append([]string{"stars", "--limit", "40", "--format", f.name}, extra...)...)
			if code != exitOK {
				t.Fatalf("%s: status %d: %s", f.name, code, errs)
			}
			r := csv.NewReader(strings.NewReader(out))
			r.Comma = f.comma
			recs, err := r.ReadAll()
			if err != nil {
				t.Fatalf("%s: %v", f.name, err)
			}
			head := analysis.StarColumns
			speeds := extra[0] == "--speeds"
			if speeds {
				head = append([]string{"beta"}, analysis.StarColumns...)
			}
			if !reflect.DeepEqual(recs[0], head) {
				t.Fatalf("%s header %v, want %v", f.name, recs[0], head)
			}
			if len(recs)-1 != len(rows) {
				t.Fatalf("%s: %d rows, JSON %d", f.name, len(recs)-1, len(rows))
			}
			for k, rec := range recs[1:] {
				j := rows[k]
				num := []float64{j.RA, j.Dec, math.NaN(), j.Temp, j.Vmag, j.Theta, j.ThetaObs, j.RAObs, j.DecObs,
					j.Doppler, j.TempObs, j.VmagObs, j.BVObs, j.FluxRatio, j.CIEx, j.CIEy}
				if speeds {
					if v, err := strconv.ParseFloat(rec[0], 64); err != nil || v != j.Beta {
						t.Fatalf("%s row %d: beta %q, JSON %v", f.name, k, rec[0], j.Beta)
					}
					rec = rec[1:]
				}
				if rec[0] != strconv.FormatInt(j.ID, 10) || rec[1] != j.Name {
					t.Fatalf("%s row %d: id/name %q %q, JSON %d %q", f.name, k, rec[0], rec[1], j.ID, j.Name)
				}
				if j.Dist == nil && rec[4] != "" || j.Dist != nil && rec[4] != strconv.FormatFloat(*j.Dist, 'g', -1, 64) {
					t.Fatalf("%s row %d: dist_pc %q, JSON %v", f.name, k, rec[4], j.Dist)
				}
				for c, want := range num {
					if math.IsNaN(want) {
						continue
					}
					if v, err := strconv.ParseFloat(rec[2+c], 64); err != nil || v != want {
						t.Fatalf("%s row %d column %s: %q, JSON %v", f.name, k, analysis.StarColumns[2+c], rec[2+c], want)
					}
				}
			}
		}
	}
}
