package main

import (
	"fmt"
	"io"

	"github.com/spf13/pflag"

	"github.com/skyframe/skyframe/analysis"
	"github.com/skyframe/skyframe/render"
	"github.com/skyframe/skyframe/scene"
)

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
		if err := scene.CheckWritable("output", *out); err != nil {
			return err
		}
	}
	sc, err := p.resolve(e, fs)
	if err != nil {
		return err
	}
	warn, err := scene.TableDepthWarning(sc, betas)
	if err != nil {
		return usageError{err}
	}
	if warn != "" {
		fmt.Fprintln(e.stderr, warn)
	}
	write := func(w io.Writer) error {
		rows, beta, err := scene.StarTable(sc, betas, *limit)
		if err != nil {
			return usageError{err}
		}
		return analysis.WriteStarRows(w, rows, beta, *format, scene.NamesCredit(sc.Index, true))
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
