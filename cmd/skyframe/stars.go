package main

import (
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"sort"
	"strconv"

	"github.com/spf13/pflag"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/spectrum"
)

// starColumns are the columns of `skyframe stars`, in order.
var starColumns = []string{"id", "ra_deg", "dec_deg", "dist_pc", "temp_k", "vmag",
	"ra_obs_deg", "dec_obs_deg", "doppler", "temp_obs_k", "vmag_obs", "flux_ratio", "cie_x", "cie_y"}

const starsHelp = `Usage: skyframe stars [options]

Print, for every star, where it appears from the ship, its Doppler factor,
observed temperature, magnitude, bolometric flux ratio and chromaticity,
sorted by observed V magnitude (brightest first).

Columns: id, ra_deg, dec_deg, dist_pc, temp_k, vmag (catalogue values; dist_pc
empty when unknown), ra_obs_deg, dec_obs_deg (apparent ICRS direction from the
ship), doppler (D), temp_obs_k (D·T), vmag_obs, flux_ratio (observed over the
catalogue's bolometric flux, under the chosen beaming convention, including
the change of distance), cie_x, cie_y (CIE 1931 chromaticity of the observed
blackbody).

Examples:
  skyframe stars --speed 0.9 --limit 20
  skyframe stars --catalog ../shared/catalogs/bsc5.dat --gamma 10 --format json
  skyframe stars --speed 0.5 --toward 83.6,22.0 --beaming d4 --format tsv

Options:
`

// starRow is one output row of `skyframe stars`.
type starRow struct {
	ID        int64    `json:"id"`
	RA        float64  `json:"ra_deg"`
	Dec       float64  `json:"dec_deg"`
	Dist      *float64 `json:"dist_pc"`
	Temp      float64  `json:"temp_k"`
	Vmag      float64  `json:"vmag"`
	RAObs     float64  `json:"ra_obs_deg"`
	DecObs    float64  `json:"dec_obs_deg"`
	Doppler   float64  `json:"doppler"`
	TempObs   float64  `json:"temp_obs_k"`
	VmagObs   float64  `json:"vmag_obs"`
	FluxRatio float64  `json:"flux_ratio"`
	CIEx      float64  `json:"cie_x"`
	CIEy      float64  `json:"cie_y"`
}

func runStars(e *env, args []string) error {
	fs := pflag.NewFlagSet("stars", pflag.ContinueOnError)
	fs.SetOutput(e.stderr)
	var p physicsFlags
	p.register(fs, 0.9)
	limit := fs.Int("limit", 0, "print only the N brightest apparent stars (0: all)")
	format := fs.String("format", "csv", "output format: csv, tsv or json")
	fs.Usage = func() {
		fmt.Fprint(e.stdout, starsHelp)
		fs.SetOutput(e.stdout)
		fs.PrintDefaults()
		fmt.Fprint(e.stdout, exitStatusHelp)
	}
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	if *limit < 0 {
		return usagef("--limit %d: want N ≥ 0", *limit)
	}
	switch *format {
	case "csv", "tsv", "json":
	default:
		return usagef("--format %q: want csv, tsv or json", *format)
	}
	sc, err := p.resolve(e.ctx, fs)
	if err != nil {
		return err
	}
	rows := observeStars(sc)
	if *limit > 0 && len(rows) > *limit {
		rows = rows[:*limit]
	}
	return writeStarRows(e.stdout, rows, *format)
}

// parseFlags parses args and turns --help and stray arguments into the
// right errors.
func parseFlags(fs *pflag.FlagSet, args []string) error {
	if err := fs.Parse(args); err != nil {
		if err == pflag.ErrHelp {
			return errHelp
		}
		return usageError{err}
	}
	if fs.NArg() > 0 {
		return usagef("unexpected argument %q (see --help)", fs.Arg(0))
	}
	return nil
}

// observeStars computes every star's apparent state, sorted by observed V.
func observeStars(sc *scene) []starRow {
	s := sc.stars
	rows := make([]starRow, 0, s.Len())
	for i := 0; i < s.Len(); i++ {
		st := s.At(i)
		u := r3.Vec{X: st.Dir[0], Y: st.Dir[1], Z: st.Dir[2]}
		n, d, dil, r := sc.observer.See(u, st.Dist)
		if r == 0 {
			continue // the ship is at this star
		}
		bb, err := spectrum.FromV(st.Teff, st.Vmag)
		if err != nil {
			continue
		}
		obs := bb.Observed(d, sc.beaming)
		obs.W *= dil
		raObs, decObs := camera.RADec(n)
		cx, cy := spectrum.Chromaticity(obs.T)
		row := starRow{
			ID: st.ID, RA: st.RA, Dec: st.Dec, Temp: short32(st.Teff), Vmag: short32(st.Vmag),
			RAObs: raObs, DecObs: decObs, Doppler: d, TempObs: obs.T,
			VmagObs: obs.Vmag(), FluxRatio: obs.Bolometric() / bb.Bolometric(),
			CIEx: cx, CIEy: cy,
		}
		if !math.IsInf(st.Dist, 0) {
			dist := short32(st.Dist)
			row.Dist = &dist
		}
		rows = append(rows, row)
	}
	sort.SliceStable(rows, func(a, b int) bool {
		if rows[a].VmagObs != rows[b].VmagObs {
			return rows[a].VmagObs < rows[b].VmagObs
		}
		return rows[a].ID < rows[b].ID
	})
	return rows
}

func writeStarRows(w io.Writer, rows []starRow, format string) error {
	if format == "json" {
		enc := json.NewEncoder(w)
		enc.SetIndent("", "  ")
		return enc.Encode(rows)
	}
	cw := csv.NewWriter(w)
	if format == "tsv" {
		cw.Comma = '\t'
	}
	if err := cw.Write(starColumns); err != nil {
		return err
	}
	g := func(v float64) string { return strconv.FormatFloat(v, 'g', 10, 64) }
	for _, r := range rows {
		dist := ""
		if r.Dist != nil {
			dist = g(*r.Dist)
		}
		rec := []string{strconv.FormatInt(r.ID, 10), g(r.RA), g(r.Dec), dist, g(r.Temp), g(r.Vmag),
			g(r.RAObs), g(r.DecObs), g(r.Doppler), g(r.TempObs), g(r.VmagObs), g(r.FluxRatio), g(r.CIEx), g(r.CIEy)}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

var _ = catalog.FlagNoDistance

// short32 returns the float64 nearest to the shortest decimal that reads
// back as the float32 v: catalogue columns are stored as float32, and
// -1.46 should print as -1.46, not -1.4600000381469727.
func short32(v float64) float64 {
	f, err := strconv.ParseFloat(strconv.FormatFloat(v, 'g', -1, 32), 64)
	if err != nil {
		return v
	}
	return f
}
