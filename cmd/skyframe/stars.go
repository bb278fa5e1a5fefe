package main

import (
	"cmp"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"slices"
	"strconv"

	"github.com/parquet-go/parquet-go"
	"github.com/spf13/pflag"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/render"
	"github.com/skyframe/skyframe/sky"
	"github.com/skyframe/skyframe/spectrum"
)

// starColumns are the columns of `skyframe stars`, in order; --speeds puts
// "beta" in front of them.
var starColumns = []string{"id", "name", "ra_deg", "dec_deg", "dist_pc", "temp_k", "vmag",
	"theta_deg", "theta_obs_deg", "ra_obs_deg", "dec_obs_deg", "doppler", "temp_obs_k", "vmag_obs",
	"bv_obs", "flux_ratio", "cie_x", "cie_y"}

const starsHelp = `Usage: skyframe stars [options]

Print, for every star, where it appears from the ship, its Doppler factor,
observed temperature, magnitude, colour, bolometric flux ratio and
chromaticity, sorted by observed V magnitude (brightest first).

Columns: id, name (proper name from the names table, else Bayer or Flamsteed
designation, else the catalogue's name; empty when there is none), ra_deg,
dec_deg, dist_pc, temp_k, vmag (catalogue values; dist_pc empty when
unknown), theta_deg (angle between the star, seen from the ship's position,
and the direction of motion, catalogue frame), theta_obs_deg (the same angle
as seen from the ship, after aberration: cos θ′ = (cos θ + β)/(1 + β cos θ)),
ra_obs_deg, dec_obs_deg (apparent ICRS direction from the ship), doppler (D),
temp_obs_k (D·T), vmag_obs, bv_obs (B−V of the observed blackbody at D·T
through Bessell's B and V passbands), flux_ratio (observed over the
catalogue's bolometric flux, under the chosen beaming convention, including
the change of distance), cie_x, cie_y (CIE 1931 chromaticity of the observed
blackbody). Numbers are printed in the shortest form that reads back to the
same value; at β = 0 from the Sun, vmag_obs equals vmag exactly.

--speeds β1,β2,... computes the table at each speed in one run and adds a
first column beta (each speed's rows as a run with --speed would give them).

Examples:
  skyframe stars --speed 0.9 --limit 20
  skyframe stars --catalog ../shared/catalogs/bsc5.dat --gamma 10 --format json
  skyframe stars --catalog ../shared/catalogs/bsc5.dat --speeds 0,0.5,0.9,0.99 --format parquet -o stars.parquet

Options:
`

// starRow is one output row of `skyframe stars`.
type starRow struct {
	ID        int64    `json:"id" parquet:"id"`
	Name      string   `json:"name" parquet:"name"`
	RA        float64  `json:"ra_deg" parquet:"ra_deg"`
	Dec       float64  `json:"dec_deg" parquet:"dec_deg"`
	Dist      *float64 `json:"dist_pc" parquet:"dist_pc,optional"`
	Temp      float64  `json:"temp_k" parquet:"temp_k"`
	Vmag      float64  `json:"vmag" parquet:"vmag"`
	Theta     float64  `json:"theta_deg" parquet:"theta_deg"`
	ThetaObs  float64  `json:"theta_obs_deg" parquet:"theta_obs_deg"`
	RAObs     float64  `json:"ra_obs_deg" parquet:"ra_obs_deg"`
	DecObs    float64  `json:"dec_obs_deg" parquet:"dec_obs_deg"`
	Doppler   float64  `json:"doppler" parquet:"doppler"`
	TempObs   float64  `json:"temp_obs_k" parquet:"temp_obs_k"`
	VmagObs   float64  `json:"vmag_obs" parquet:"vmag_obs"`
	BVObs     float64  `json:"bv_obs" parquet:"bv_obs"`
	FluxRatio float64  `json:"flux_ratio" parquet:"flux_ratio"`
	CIEx      float64  `json:"cie_x" parquet:"cie_x"`
	CIEy      float64  `json:"cie_y" parquet:"cie_y"`
}

// speedRow is a row of a --speeds table: the speed, then the star.
type speedRow struct {
	Beta float64 `json:"beta" parquet:"beta"`
	starRow
}

func runStars(e *env, args []string) error {
	fs := pflag.NewFlagSet("stars", pflag.ContinueOnError)
	fs.SetOutput(e.stderr)
	var p physicsFlags
	p.register(fs, 0.9)
	limit := fs.Int("limit", 0, "print only the N brightest apparent stars (0: all; per speed with --speeds)")
	format := fs.String("format", "csv", "output format: csv, tsv, json or parquet (parquet needs --output)")
	speeds := fs.String("speeds", "", "comma-separated speeds β (0 ≤ β < 1): one table for all, with a beta column")
	out := fs.StringP("output", "o", "-", "output file ('-': standard output), written whole or not at all")
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
	case "parquet":
		if *out == "-" {
			return usagef("--format parquet: give a file with --output (Parquet is binary)")
		}
	default:
		return usagef("--format %q: want csv, tsv, json or parquet", *format)
	}
	var betas []float64
	if fs.Changed("speeds") {
		for _, n := range []string{"speed", "gamma", "rapidity"} {
			if fs.Changed(n) {
				return usagef("give either --speeds or --%s", n)
			}
		}
		var err error
		if betas, err = parseList("speeds", *speeds); err != nil {
			return err
		}
		for _, b := range betas {
			if !(b >= 0 && b < 1) {
				return usagef("--speeds: β = %v: want 0 ≤ β < 1", b)
			}
		}
	}
	if *out != "-" {
		if err := checkWritable("output", *out); err != nil {
			return err
		}
	}
	sc, err := p.resolve(e, fs)
	if err != nil {
		return err
	}
	if err := warnTableDepth(e.stderr, sc, betas); err != nil {
		return err
	}
	write := func(w io.Writer) error {
		if betas == nil {
			rows := observeStars(sc, sc.observer)
			if *limit > 0 && len(rows) > *limit {
				rows = rows[:*limit]
			}
			return writeStarRows(w, rows, nil, *format, namesCredit(sc.index, true))
		}
		var all []starRow
		var beta []float64
		for _, b := range betas {
			bo, err := camera.NewBoost(sc.heading, b)
			if err != nil {
				return usageError{err}
			}
			rows := observeStars(sc, camera.Observer{Position: sc.observer.Position, Boost: bo})
			if *limit > 0 && len(rows) > *limit {
				rows = rows[:*limit]
			}
			all = append(all, rows...)
			for range rows {
				beta = append(beta, b)
			}
		}
		return writeStarRows(w, all, beta, *format, namesCredit(sc.index, true))
	}
	if *out == "-" {
		return write(e.stdout)
	}
	return render.WriteFileAtomic(*out, write)
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

// observeStars computes every star's apparent state for observer obs
// (sc gives the catalogue, names, heading and beaming), sorted by observed V.
//
// Catalogue values are taken at their printed precision (short32). The
// observed V and colour are spectrum.Observe's (the photometry the renderer
// and the census use): the catalogue V plus the change in magnitude,
// −2.5 log₁₀ of (W′/W)·(V flux per unit W at D·T)/(at T), so that no change
// (β = 0, at the Sun) leaves V exactly as it is.
func observeStars(sc *scene, obs camera.Observer) []starRow {
	s := sc.stars
	heading := sc.heading
	rows := make([]starRow, 0, s.Len())
	for i := 0; i < s.Len(); i++ {
		st := s.At(i)
		u := r3.Vec{X: st.Dir[0], Y: st.Dir[1], Z: st.Dir[2]}
		n, d, dil, r := obs.See(u, st.Dist)
		if r == 0 || !(d > 0) || math.IsInf(d, 1) {
			continue // the ship is at this star
		}
		T, V := short32(st.Teff), short32(st.Vmag)
		if !(T > 0) || math.IsInf(T, 0) || math.IsNaN(V) || math.IsInf(V, 0) {
			continue
		}
		from := u // direction from the ship, catalogue frame
		if !math.IsInf(st.Dist, 0) {
			from = r3.Unit(r3.Sub(r3.Scale(st.Dist, u), obs.Position))
		}
		ph := spectrum.Observe(V, T, d, dil, sc.beaming)
		vObs, cx, cy := ph.V, ph.X, ph.Y
		wScale := dil * sc.beaming.WScale(d)
		raObs, decObs := camera.RADec(n)
		tObs := d * T
		row := starRow{
			ID: st.ID, Name: sc.index.Name(i), RA: st.RA, Dec: st.Dec, Temp: T, Vmag: V,
			Theta: angleDeg(from, heading), ThetaObs: angleDeg(n, heading),
			RAObs: raObs, DecObs: decObs, Doppler: d, TempObs: tObs, VmagObs: vObs,
			BVObs: spectrum.BV(tObs), FluxRatio: wScale * d * d * d * d, CIEx: cx, CIEy: cy,
		}
		if !math.IsInf(st.Dist, 0) {
			dist := short32(st.Dist)
			row.Dist = &dist
		}
		rows = append(rows, row)
	}
	// Sort an index, not the 170-byte rows (moving them was most of the
	// time); ties in V′ by id, then by catalogue order.
	idx := make([]int, len(rows))
	for k := range idx {
		idx[k] = k
	}
	slices.SortFunc(idx, func(a, b int) int {
		if c := cmp.Compare(rows[a].VmagObs, rows[b].VmagObs); c != 0 {
			return c
		}
		if c := cmp.Compare(rows[a].ID, rows[b].ID); c != 0 {
			return c
		}
		return cmp.Compare(a, b)
	})
	out := make([]starRow, len(rows))
	for k, i := range idx {
		out[k] = rows[i]
	}
	return out
}

// angleDeg is the angle between unit vectors a and b in degrees, from
// atan2(|a×b|, a·b) (accurate near 0° and 180°).
func angleDeg(a, b r3.Vec) float64 {
	return math.Atan2(r3.Norm(r3.Cross(a, b)), r3.Dot(a, b)) * 180 / math.Pi
}

// fmtShort writes v in the shortest form that reads back to v.
func fmtShort(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// writeStarRows writes rows in format; beta, when not nil, holds each
// row's speed and adds the beta column; credit, when not empty, is
// recorded in Parquet metadata (key star_names).
func writeStarRows(w io.Writer, rows []starRow, beta []float64, format, credit string) error {
	var meta []parquet.WriterOption
	if credit != "" {
		meta = append(meta, parquet.KeyValueMetadata("star_names", credit))
	}
	switch format {
	case "json":
		enc := json.NewEncoder(w)
		enc.SetIndent("", "  ")
		if beta == nil {
			return enc.Encode(rows)
		}
		return enc.Encode(withSpeeds(rows, beta))
	case "parquet":
		if beta == nil {
			pw := parquet.NewGenericWriter[starRow](w, meta...)
			if _, err := pw.Write(rows); err != nil {
				return err
			}
			return pw.Close()
		}
		pw := parquet.NewGenericWriter[speedRow](w, meta...)
		if _, err := pw.Write(withSpeeds(rows, beta)); err != nil {
			return err
		}
		return pw.Close()
	}
	cw := csv.NewWriter(w)
	if format == "tsv" {
		cw.Comma = '\t'
	}
	head := starColumns
	if beta != nil {
		head = append([]string{"beta"}, starColumns...)
	}
	if err := cw.Write(head); err != nil {
		return err
	}
	g := fmtShort
	for k, r := range rows {
		dist := ""
		if r.Dist != nil {
			dist = g(*r.Dist)
		}
		rec := []string{strconv.FormatInt(r.ID, 10), r.Name, g(r.RA), g(r.Dec), dist, g(r.Temp), g(r.Vmag),
			g(r.Theta), g(r.ThetaObs), g(r.RAObs), g(r.DecObs), g(r.Doppler), g(r.TempObs), g(r.VmagObs),
			g(r.BVObs), g(r.FluxRatio), g(r.CIEx), g(r.CIEy)}
		if beta != nil {
			rec = append([]string{g(beta[k])}, rec...)
		}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

func withSpeeds(rows []starRow, beta []float64) []speedRow {
	out := make([]speedRow, len(rows))
	for k, r := range rows {
		out[k] = speedRow{Beta: beta[k], starRow: r}
	}
	return out
}

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

// tableLimit is the observed V to which the completeness of a star table
// is judged: the naked-eye limit (common practice), the still's naked-eye
// preset.
const tableLimit = 6.5

// warnTableDepth writes the completeness warning of a star table to w
// when the catalogue cannot list every star that reaches V′ = tableLimit
// anywhere in the sky at the table's speed (with --speeds, the fastest):
// the catalogue's depth and the depth needed, the estimated share of stars
// and light missing, and the V′ to which the rows are complete.
func warnTableDepth(w io.Writer, sc *scene, betas []float64) error {
	b := sc.observer.Boost
	what := fmt.Sprintf("a whole-sky list to V′ = %g (the naked-eye limit)", tableLimit)
	if len(betas) > 0 {
		fast := slices.Max(betas)
		var err error
		if b, err = camera.NewBoost(sc.heading, fast); err != nil {
			return usageError{err}
		}
		if len(betas) > 1 {
			what += fmt.Sprintf(" at β = %s (the fastest of --speeds)", fmtBeta(fast))
		}
	}
	rep := sky.WholeSky(catalog.EstimateDepth(sc.stars), sc.builtIn, b, tableLimit, sc.beaming)
	rep.Hint = fmt.Sprintf("rows fainter than V′ ≈ %.1f may lack stars; a deeper catalogue lists them", rep.Have+rep.Needed.DeltaV)
	if msg := rep.Warning("stars", what); msg != "" {
		fmt.Fprintln(w, msg)
	}
	return nil
}
