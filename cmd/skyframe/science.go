package main

import (
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/spf13/pflag"
	"gonum.org/v1/plot/vg"

	"github.com/skyframe/skyframe/analysis"
	"github.com/skyframe/skyframe/names"
	"github.com/skyframe/skyframe/render"
	"github.com/skyframe/skyframe/scene"
	"github.com/skyframe/skyframe/sky"
	"github.com/skyframe/skyframe/spectrum"
)

const curvesHelp = `Usage: skyframe curves [options]

Plot the per-star transform against angle, for several ship speeds, and
write the numbers behind every figure as CSV beside it:

  aberration   apparent angle θ′ against rest-frame angle θ
  doppler      Doppler factor D = 1/(γ(1 − β cos θ′)) against θ′ (log scale)
  dv           ΔV = V′ − V against θ′ for blackbody stars of several
               temperatures, one panel per speed (exact beaming; negative =
               brighter), with the T → ∞ limit +2.5 log10 D
  brightening  bolometric (D²) and V-band flux ratios against D, with the
               Rayleigh–Jeans limit 1/D: hot stars ahead fade in V
  conventions  bolometric flux ratio and ΔV under the exact (D²), D³ and D⁴
               point-source conventions at one speed, to tell which one a
               published figure used

Files are named OUTPUT + NAME + .png (and .svg with --svg, .csv always); when
OUTPUT is a directory or ends in '/', the files go inside it.

Examples:
  skyframe curves
  skyframe curves --speeds 0.5,0.9,0.999 --temps 4000,20000 --output figs/ --svg
  skyframe curves --gammas 2,10,100 --convention-speed 0.9 --dpi 100

Options:
`

const censusHelp = `Usage: skyframe census [options]

Count and measure the sky seen from the ship against speed: for each speed,
the number of stars with observed V′ ≤ --limit-mag over the whole sky and in
the forward (θ′ ≤ 90°) and rear hemispheres of the ship frame, the total
illuminance of the starlight (lux; all stars, and the visible ones), the CIE
1931 chromaticity (x, y) of the integrated starlight, the half-count radius
(the smallest angle about the direction of motion holding half of the visible
stars) and the brightest V′. Uses the catalogue given by --catalog, else the
built-in sky.

Speeds: --speeds β1,β2,... (default below), --gammas γ1,γ2,..., or --from,
--to and --steps (evenly spaced in β, ends included).

Output: CSV on standard output (or --csv FILE); --plot FILE.png or FILE.svg
draws the four quantities against speed.

Columns: ` + "beta, gamma, visible, forward, rear, illuminance_lux, visible_illuminance_lux, cie_x, cie_y, half_angle_deg, brightest_vmag" + `

Examples:
  skyframe census
  skyframe census --catalog ../shared/catalogs/bsc5.dat --from 0 --to 0.99 --steps 12 --plot census.png
  skyframe census --gammas 1,2,5,10,100 --limit-mag 4 --csv census.csv

Options:
`

const defaultCensusSpeeds = "0,0.2,0.4,0.6,0.8,0.9,0.95,0.99"

// parseList reads a comma-separated list of finite numbers; an empty list
// or an empty item is an error naming the flag.
func parseList(flag, s string) ([]float64, error) {
	if strings.TrimSpace(s) == "" {
		return nil, usagef("--%s %q: empty list; want comma-separated numbers", flag, s)
	}
	parts := strings.Split(s, ",")
	out := make([]float64, 0, len(parts))
	for _, p := range parts {
		p = strings.TrimSpace(p)
		v, err := strconv.ParseFloat(p, 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, usagef("--%s %q: %q is not a finite number", flag, s, p)
		}
		out = append(out, v)
	}
	return out, nil
}

// parseSpeeds reads --speeds (β) or --gammas (γ), refusing both at once.
func parseSpeeds(fs *pflag.FlagSet, speeds, gammas string) ([]analysis.Speed, error) {
	if fs.Changed("speeds") && fs.Changed("gammas") {
		return nil, usagef("give only one of --speeds and --gammas")
	}
	var out []analysis.Speed
	if fs.Changed("gammas") {
		g, err := parseList("gammas", gammas)
		if err != nil {
			return nil, err
		}
		out = analysis.Gammas(g...)
	} else {
		b, err := parseList("speeds", speeds)
		if err != nil {
			return nil, err
		}
		out = analysis.Betas(b...)
	}
	for _, s := range out {
		if err := s.Validate(); err != nil {
			if s.Gamma != 0 {
				return nil, usagef("--gammas: γ = %v: want a finite γ ≥ 1", s.Gamma)
			}
			return nil, usagef("--speeds: β = %v: want 0 ≤ β < 1 (use --gammas for speeds closer to light)", s.Beta)
		}
	}
	return out, nil
}

// figureSize reads --size WxH in inches ("" keeps each figure's default).
func figureSize(s string, dpi int) (analysis.Size, error) {
	if dpi < 10 || dpi > 1200 {
		return analysis.Size{}, usagef("--dpi %d: want 10..1200", dpi)
	}
	sz := analysis.Size{DPI: dpi}
	if s == "" {
		return sz, nil
	}
	a, b, ok := strings.Cut(strings.ToLower(s), "x")
	w, err1 := strconv.ParseFloat(strings.TrimSpace(a), 64)
	h, err2 := strconv.ParseFloat(strings.TrimSpace(b), 64)
	if !ok || err1 != nil || err2 != nil || !(w >= 1 && w <= 40) || !(h >= 1 && h <= 40) {
		return analysis.Size{}, usagef("--size %q: want WIDTHxHEIGHT in inches, each 1..40, e.g. 6x4", s)
	}
	sz.Width, sz.Height = vg.Length(w)*vg.Inch, vg.Length(h)*vg.Inch
	return sz, nil
}

func runCurves(e *env, args []string) error {
	fs := pflag.NewFlagSet("curves", pflag.ContinueOnError)
	fs.SetOutput(e.stderr)
	speeds := fs.String("speeds", "0.3,0.6,0.9,0.99", "ship speeds β, comma-separated, each 0 ≤ β < 1")
	gammas := fs.String("gammas", "", "ship speeds as Lorentz factors γ ≥ 1 instead of --speeds")
	temps := fs.String("temps", "3000,5772,10000,30000", "blackbody temperatures for the ΔV and brightening curves, K")
	output := fs.String("output", "curves-", "file name prefix, or a directory (ending in '/' or existing)")
	svg := fs.Bool("svg", false, "also write every figure as SVG")
	dpi := fs.Int("dpi", analysis.DefaultDPI, "PNG resolution, dots per inch")
	size := fs.String("size", "", "figure size WIDTHxHEIGHT in inches (default: 6x4 per single-panel figure, larger for panel grids)")
	points := fs.Int("points", analysis.DefaultPoints, "samples per curve")
	convSpeed := fs.Float64("convention-speed", 0, "speed β of the beaming-convention comparison (0: the fastest of the speeds)")
	convTemp := fs.Float64("convention-temp", analysis.DefaultConventionTemp, "temperature of the convention comparison's ΔV, K")
	fs.Usage = func() {
		fmt.Fprint(e.stdout, curvesHelp)
		fs.SetOutput(e.stdout)
		fs.PrintDefaults()
		fmt.Fprint(e.stdout, exitStatusHelp)
	}
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	sp, err := parseSpeeds(fs, *speeds, *gammas)
	if err != nil {
		return err
	}
	tl, err := parseList("temps", *temps)
	if err != nil {
		return err
	}
	for _, t := range tl {
		if !(t > 0) {
			return usagef("--temps: T = %v K: want T > 0", t)
		}
	}
	if *points < 2 || *points > 100000 {
		return usagef("--points %d: want 2..100000", *points)
	}
	if !(*convSpeed >= 0 && *convSpeed < 1) {
		return usagef("--convention-speed %v: want 0 ≤ β < 1", *convSpeed)
	}
	if !(*convTemp > 0) || math.IsInf(*convTemp, 0) {
		return usagef("--convention-temp %v: want a finite T > 0", *convTemp)
	}
	sz, err := figureSize(*size, *dpi)
	if err != nil {
		return err
	}
	cs, err := analysis.Curves(analysis.CurveOptions{
		Speeds: sp, Temps: tl, Points: *points,
		ConventionSpeed: analysis.Speed{Beta: *convSpeed}, ConventionTemp: *convTemp,
	})
	if err != nil {
		return usageError{err}
	}
	figs, err := cs.Figures()
	if err != nil {
		return err
	}
	if dir := filepath.Dir(analysis.OutputPath(*output, "x")); dir != "" {
		if err := os.MkdirAll(dir, 0o755); err != nil {
			return fmt.Errorf("curves: %w", err)
		}
	}
	for _, f := range figs {
		if err := writeFigure(e, f, analysis.OutputPath(*output, f.Name+".png"), sz, false); err != nil {
			return err
		}
		if *svg {
			if err := writeFigure(e, f, analysis.OutputPath(*output, f.Name+".svg"), sz, true); err != nil {
				return err
			}
		}
	}
	for _, t := range cs.Tables() {
		path := analysis.OutputPath(*output, t.Name+".csv")
		if err := render.WriteFileAtomic(path, t.WriteCSV); err != nil {
			return err
		}
		fmt.Fprintln(e.stdout, path)
	}
	return nil
}

func writeFigure(e *env, f *analysis.Figure, path string, sz analysis.Size, svg bool) error {
	err := render.WriteFileAtomic(path, func(w io.Writer) error {
		if svg {
			return f.WriteSVG(w, sz)
		}
		return f.WritePNG(w, sz)
	})
	if err != nil {
		return err
	}
	fmt.Fprintln(e.stdout, path)
	return nil
}

func runCensus(e *env, args []string) error {
	fs := pflag.NewFlagSet("census", pflag.ContinueOnError)
	fs.SetOutput(e.stderr)
	var p physicsFlags
	fs.StringVar(&p.Catalog, "catalog", "", "star catalogue (BSC5, Hipparcos, Gaia CSV/ECSV, CSV/TSV, Parquet, skyframe cache; gzip ok): a file, a directory, a quoted glob or a comma-separated list, read as one; default: the built-in synthetic sky")
	fs.StringVar(&p.CatalogFormat, "catalog-format", "", "catalogue format, overriding detection: "+formatNames())
	fs.StringSliceVar(&p.Columns, "column", nil, "generic CSV/TSV column map, FIELD=NAME, repeatable")
	fs.Float64Var(&p.Epoch, "epoch", 0, "propagate positions by proper motion to this Julian epoch; 0 keeps the catalogue epoch")
	fs.StringVar(&p.Toward, "toward", defaultToward, "direction of motion as RA,DEC (ICRS degrees), or a star id or name")
	fs.StringVar(&p.Position, "position", "0,0,0", "ship position X,Y,Z in parsecs (ICRS axes, Sun at origin), or a star id or name")
	fs.StringVar(&p.Beaming, "beaming", "exact", "point-source beaming convention: exact (flux ∝ D²), d3, d4")
	registerNames(fs, &p.Names)
	speeds := fs.String("speeds", defaultCensusSpeeds, "ship speeds β, comma-separated, each 0 ≤ β < 1")
	gammas := fs.String("gammas", "", "ship speeds as Lorentz factors γ ≥ 1 instead of --speeds")
	from := fs.Float64("from", 0, "first speed β of an evenly spaced range (with --to, --steps)")
	to := fs.Float64("to", 0.99, "last speed β of the range")
	steps := fs.Int("steps", 12, "number of speeds in the range (≥ 2)")
	limit := fs.Float64("limit-mag", analysis.DefaultLimitMag, "limiting magnitude: count stars with observed V′ ≤ this")
	csvPath := fs.String("csv", "-", "CSV output file ('-': standard output)")
	pqPath := fs.String("parquet", "", "also write the census as Apache Parquet to this file (same columns)")
	plotPath := fs.String("plot", "", "also draw the census to this file (.png or .svg)")
	dpi := fs.Int("dpi", analysis.DefaultDPI, "PNG resolution of --plot, dots per inch")
	size := fs.String("size", "", "plot size WIDTHxHEIGHT in inches (default 10x7.2)")
	fs.Usage = func() {
		fmt.Fprint(e.stdout, censusHelp)
		fs.SetOutput(e.stdout)
		fs.PrintDefaults()
		fmt.Fprint(e.stdout, exitStatusHelp)
	}
	if err := parseFlags(fs, args); err != nil {
		return err
	}
	var sp []analysis.Speed
	rangeGiven := fs.Changed("from") || fs.Changed("to") || fs.Changed("steps")
	if rangeGiven {
		if fs.Changed("speeds") || fs.Changed("gammas") {
			return usagef("give either --speeds/--gammas or --from/--to/--steps, not both")
		}
		if !(*from >= 0 && *from < 1) || !(*to >= 0 && *to < 1) {
			return usagef("--from %v --to %v: want 0 ≤ β < 1 at both ends", *from, *to)
		}
		if !(*to > *from) {
			return usagef("--from %v --to %v: want --to greater than --from", *from, *to)
		}
		if *steps < 2 || *steps > 10000 {
			return usagef("--steps %d: want 2..10000", *steps)
		}
		for i := range *steps {
			sp = append(sp, analysis.Speed{Beta: analysis.RangeSpeed(*from, *to, i, *steps)})
		}
	} else {
		var err error
		if sp, err = parseSpeeds(fs, *speeds, *gammas); err != nil {
			return err
		}
	}
	if math.IsNaN(*limit) || math.IsInf(*limit, 0) {
		return usagef("--limit-mag %v: want a finite magnitude", *limit)
	}
	if *pqPath != "" {
		if err := scene.CheckWritable("parquet", *pqPath); err != nil {
			return err
		}
	}
	if *plotPath != "" {
		switch strings.ToLower(filepath.Ext(*plotPath)) {
		case ".png", ".svg":
		default:
			return usagef("--plot %q: want a .png or .svg file name", *plotPath)
		}
	}
	sz, err := figureSize(*size, *dpi)
	if err != nil {
		return err
	}
	beam, err := spectrum.ParseBeaming(p.Beaming)
	if err != nil {
		return usagef("--beaming: %v", err)
	}
	stars, err := scene.LoadStars(e.ctx, e.stderr, p.Catalog, p.CatalogFormat, p.Columns, p.Epoch)
	if err != nil {
		return err
	}
	table, err := scene.LoadNames(p.Names)
	if err != nil {
		return err
	}
	index := names.NewIndex(stars, table)
	pos, err := scene.ResolvePosition(index, "position", p.Position)
	if err != nil {
		return err
	}
	heading, err := scene.ResolveDirection(index, "toward", p.Toward, pos)
	if err != nil {
		return err
	}
	builtIn := p.Catalog == ""
	tab, need, depthV, err := sky.Census(stars, builtIn, sp, analysis.CensusOptions{
		Heading: heading, Position: pos, LimitMag: *limit, Beaming: beam,
	})
	var speedErr *sky.SpeedError
	if err != nil {
		if errors.Is(err, analysis.ErrNoStars) || errors.Is(err, analysis.ErrSpeed) || errors.Is(err, analysis.ErrLimit) || errors.Is(err, analysis.ErrHeading) || errors.As(err, &speedErr) {
			return usageError{err}
		}
		return err
	}
	var incomplete []string
	for i := range tab.Rows {
		if tab.Incomplete(i) {
			incomplete = append(incomplete, fmtBeta(tab.Rows[i].Beta))
		}
	}
	if len(incomplete) > 0 {
		what := "the catalogue"
		if builtIn {
			what = "the built-in sky"
		}
		fmt.Fprintf(e.stderr, "skyframe census: warning: %s is complete to V ≈ %.1f, but at β = %s the census needs stars to V ≈ %.1f (the CSV's complete column and the plot mark those speeds); use a deeper catalogue\n",
			what, depthV, strings.Join(incomplete, ", "), need[len(need)-1])
	}
	if *pqPath != "" {
		if err := render.WriteFileAtomic(*pqPath, tab.WriteParquet); err != nil {
			return err
		}
	}
	if *csvPath == "-" {
		if err := tab.WriteCSV(e.stdout); err != nil {
			return err
		}
	} else if err := render.WriteFileAtomic(*csvPath, tab.WriteCSV); err != nil {
		return err
	}
	if *plotPath != "" {
		f, err := tab.Figure()
		if err != nil {
			return err
		}
		svg := strings.EqualFold(filepath.Ext(*plotPath), ".svg")
		err = render.WriteFileAtomic(*plotPath, func(w io.Writer) error {
			if svg {
				return f.WriteSVG(w, sz)
			}
			return f.WritePNG(w, sz)
		})
		if err != nil {
			return err
		}
		if *csvPath != "-" {
			fmt.Fprintln(e.stdout, *plotPath)
		}
	}
	return nil
}

func fmtBeta(b float64) string { return strconv.FormatFloat(b, 'g', 6, 64) }
