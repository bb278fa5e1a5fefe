package main

import (
	"fmt"
	"io"
	"math"
	"net/http"
	"os"
	"path/filepath"
	"slices"
	"sort"
	"strconv"
	"strings"
	"time"

	"github.com/schollz/progressbar/v3"
	"github.com/spf13/pflag"
	"golang.org/x/term"

	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/names"
	"github.com/skyframe/skyframe/render"
	"github.com/skyframe/skyframe/scene"
)

const catalogHelp = `Usage: skyframe catalog <inspect|pack|fetch> [options] ...

  inspect FILE          report the format, rows read and skipped (with reasons and
                        first line numbers), the magnitude, colour and
                        distance ranges, and the named stars; FILE builtin
                        reports the built-in synthetic sky
  pack FILE -o OUT      convert any catalogue into skyframe's compact, versioned,
                        checksummed binary cache (loads fast; use it with --catalog);
                        --to parquet writes Apache Parquet instead
  fetch NAME            download a catalogue from the CDS archive (or, for
                        names, the IAU Catalog of Star Names from the IAU WGSN)
                        into the user cache directory, verify it, print its path.
                        NAME: ` + "%s" + `

Examples:
  skyframe catalog inspect ../shared/catalogs/bsc5.dat
  skyframe catalog pack hip_main.dat.gz -o hip.skyc
  skyframe catalog fetch bsc5
`

func sourceNames() string {
	var list []string
	for k := range catalog.KnownSources {
		list = append(list, k)
	}
	list = append(list, "names")
	sort.Strings(list)
	return strings.Join(list, ", ")
}

func runCatalog(e *env, args []string) error {
	if len(args) == 0 || args[0] == "-h" || args[0] == "--help" {
		fmt.Fprintf(e.stdout, catalogHelp, sourceNames())
		fmt.Fprint(e.stdout, exitStatusHelp)
		if len(args) == 0 {
			return usagef("catalog: missing subcommand (inspect, pack or fetch)")
		}
		return errHelp
	}
	switch args[0] {
	case "inspect":
		return catalogInspect(e, args[1:])
	case "pack":
		return catalogPack(e, args[1:])
	case "fetch":
		return catalogFetch(e, args[1:])
	}
	return usagef("catalog: unknown subcommand %q (want inspect, pack or fetch)", args[0])
}

func catalogFlagSet(e *env, name, usage string) *pflag.FlagSet {
	fs := pflag.NewFlagSet("catalog "+name, pflag.ContinueOnError)
	fs.SetOutput(e.stderr)
	fs.Usage = func() {
		fmt.Fprint(e.stdout, usage)
		fs.SetOutput(e.stdout)
		fs.PrintDefaults()
		fmt.Fprint(e.stdout, exitStatusHelp)
	}
	return fs
}

func catalogInspect(e *env, args []string) error {
	fs := catalogFlagSet(e, "inspect", "Usage: skyframe catalog inspect [options] FILE...\n\nFILE: a file, a directory, a glob or builtin; several are read as one catalogue.\n\nOptions:\n")
	format := fs.String("catalog-format", "", "format, overriding detection")
	cols := fs.StringSlice("column", nil, "generic CSV/TSV column map, FIELD=NAME (fields: "+strings.Join(catalog.ColumnFields, ", ")+")")
	var namesPath string
	registerNames(fs, &namesPath)
	if err := fs.Parse(args); err != nil {
		if err == pflag.ErrHelp {
			return errHelp
		}
		return usageError{err}
	}
	if fs.NArg() < 1 || fs.NArg() > 1 && slices.Contains(fs.Args(), "builtin") {
		return usagef("catalog inspect: want FILE... (or builtin alone)")
	}
	table, err := scene.LoadNames(namesPath)
	if err != nil {
		return err
	}
	start := time.Now()
	var stars *catalog.Stars
	var rep *catalog.Report
	if fs.Arg(0) == "builtin" {
		if *format != "" || len(*cols) > 0 {
			return usagef("catalog inspect builtin: --catalog-format and --column are for files")
		}
		stars = catalog.BuiltIn()
		rep = catalog.Summary(stars)
	} else {
		opt, err := scene.ReadOptions(*format, *cols)
		if err != nil {
			return err
		}
		if stars, rep, err = scene.OpenCatalog(e.ctx, fs.Args(), opt, nil); err != nil {
			return err
		}
	}
	printReport(e.stdout, stars, rep, time.Since(start))
	printNamed(e.stdout, names.NewIndex(stars, table))
	return nil
}

// printNamed lists the stars with a proper name: all of them in the
// built-in sky (its invented names), a count for a real catalogue.
func printNamed(w io.Writer, x *names.Index) {
	s := x.Stars()
	named := x.Named()
	if s.Format != catalog.SyntheticFormat {
		if x.Table() == nil {
			fmt.Fprintln(w, "named stars: no names table (--names FILE, or `skyframe catalog fetch names`)")
			return
		}
		fmt.Fprintf(w, "named stars: %d of the %d in %s\n", len(named), len(x.Table().Entries), x.Table().Source)
		fmt.Fprintf(w, "             %s\n", names.Credit)
		return
	}
	var nearby []int
	for i := range s.Names {
		if i >= 0 && i < s.Len() {
			nearby = append(nearby, i)
		}
	}
	sort.Ints(nearby)
	sort.SliceStable(named, func(a, b int) bool { return s.Vmag[named[a]] < s.Vmag[named[b]] })
	fmt.Fprintf(w, "named stars: %d invented nearby stars and the %d sampled stars of V ≤ %g (invented names; no real star is meant)\n", len(nearby), len(named), names.InventedVLimit)
	for _, i := range append(nearby, named...) {
		st := s.At(i)
		dist := "—"
		if !math.IsInf(st.Dist, 0) {
			dist = strconv.FormatFloat(st.Dist, 'g', 4, 64) + " pc"
		}
		fmt.Fprintf(w, "  %-14s %-17s V = %5.2f  RA %7.3f°  Dec %+7.3f°  %s\n", x.Label(i), catalog.DisplayID(st.ID), st.Vmag, st.RA, st.Dec, dist)
	}
}

func printReport(w io.Writer, s *catalog.Stars, r *catalog.Report, took time.Duration) {
	fmt.Fprintf(w, "file:        %s\n", r.Source)
	comp := ""
	if r.Compressed {
		comp = " (gzip)"
	}
	format := r.Format.String()
	if s != nil && s.Format == catalog.SyntheticFormat {
		format = catalog.SyntheticFormat
	}
	fmt.Fprintf(w, "format:      %s%s\n", format, comp)
	fmt.Fprintf(w, "lines:       %d\n", r.Lines)
	fmt.Fprintf(w, "stars kept:  %d\n", r.Rows)
	fmt.Fprintf(w, "rows skipped: %d\n", r.Skipped)
	for _, sk := range r.Skips {
		fmt.Fprintf(w, "  %-28s %7d  (first at line %d)\n", sk.Reason, sk.Count, sk.FirstLine)
	}
	rng := func(name, unit string, q catalog.Range) {
		if q.N == 0 {
			fmt.Fprintf(w, "%-12s none\n", name+":")
			return
		}
		fmt.Fprintf(w, "%-12s %.2f … %.2f%s (%d stars)\n", name+":", q.Min, q.Max, unit, q.N)
	}
	rng("V", " mag", r.V)
	rng("B−V", " mag", r.BV)
	rng("distance", " pc", r.Dist)
	fmt.Fprintf(w, "flags:       %d without distance (infinitely far), %d without colour (T = %d K), %d with catalogue Teff, %d with colour outside the relation's range\n",
		r.NoDistance, r.NoColour, catalog.DefaultTeff, r.TeffFromCatalogue, r.TeffExtrapolated)
	fmt.Fprintf(w, "epoch:       J%.2f\n", r.Epoch)
	fmt.Fprintf(w, "read in:     %v\n", took.Round(time.Millisecond))
}

func catalogPack(e *env, args []string) error {
	fs := catalogFlagSet(e, "pack", "Usage: skyframe catalog pack [options] FILE... -o OUT\n\nFILE: files, directories (their files) or quoted glob patterns, e.g. 'gaia/GaiaSource_*.csv.gz',\nread in parallel as one catalogue. A cache is written sorted by V with a magnitude index,\nso frames read only the stars they can show.\n\nOptions:\n")
	format := fs.String("catalog-format", "", "input format, overriding detection")
	cols := fs.StringSlice("column", nil, "generic CSV/TSV column map, FIELD=NAME")
	out := fs.StringP("output", "o", "", "cache file to write (required)")
	to := fs.String("to", "cache", "output format: cache (skyframe's binary cache) or parquet (Apache Parquet, exact Stars columns)")
	maxV := fs.Float64("max-v", 0, "keep only stars with catalogue V ≤ this (0: all); stars fainter are dropped while reading")
	if err := fs.Parse(args); err != nil {
		if err == pflag.ErrHelp {
			return errHelp
		}
		return usageError{err}
	}
	if fs.NArg() < 1 {
		return usagef("catalog pack: want at least one input FILE")
	}
	if *out == "" {
		return usagef("catalog pack: --output/-o is required")
	}
	if fs.Changed("max-v") && !(*maxV >= -30 && *maxV <= 40) {
		return usagef("catalog pack: --max-v %v: want a V magnitude from -30 to 40", *maxV)
	}
	write := catalog.WriteCache
	switch *to {
	case "cache":
	case "parquet":
		write = catalog.WriteParquet
	default:
		return usagef("catalog pack: --to %q (want cache or parquet)", *to)
	}
	if err := scene.CheckWritable("output", *out); err != nil {
		return err
	}
	for _, a := range fs.Args() {
		if scene.SameFile(a, *out) {
			return usagef("catalog pack: --output %s is the input file %s; write to another file", *out, a)
		}
	}
	opt, err := scene.ReadOptions(*format, *cols)
	if err != nil {
		return err
	}
	opt.MaxV = *maxV
	var bar *byteProgress
	stars, rep, err := scene.OpenCatalog(e.ctx, fs.Args(), opt, func(label string, done, total int64) {
		if bar == nil {
			bar = newByteProgress(e.stderr, label)
		}
		bar.update(done, total)
	})
	if bar != nil {
		bar.finish()
	}
	if err != nil {
		return err
	}
	if *to == "cache" {
		// Canonical order: frames read from it only as deep as they need
		// are bit-identical to its full read.
		stars = catalog.SortByV(stars)
	}
	err = render.WriteFileAtomic(*out, func(w io.Writer) error { return write(ctxWriter{e.ctx, w}, stars) })
	if err != nil {
		return err
	}
	sorted := ""
	if *to == "cache" {
		sorted = ", sorted by V"
	}
	fmt.Fprintf(e.stdout, "%s: %d stars from %s (%s, %d rows skipped%s)\n", *out, stars.Len(), rep.Source, rep.Format, rep.Skipped, sorted)
	scene.WriteSkipped(e.stderr, rep)
	return nil
}

func catalogFetch(e *env, args []string) error {
	fs := catalogFlagSet(e, "fetch", "Usage: skyframe catalog fetch [options] NAME\n\nNAME: "+sourceNames()+"\n\nOptions:\n")
	url := fs.String("url", "", "download from this address instead of the CDS archive (a mirror)")
	out := fs.StringP("output", "o", "", "file to write (default: the user cache directory)")
	size := fs.Int64("size", 0, "expected length in bytes of the file as served (pins another edition: replaces the published sizes and digests)")
	sum := fs.String("sha256", "", "expected SHA-256 of the file as served (hex), e.g. as printed by an earlier fetch (pins another edition: replaces the published sizes and digests; the published record count and length still apply)")
	if err := fs.Parse(args); err != nil {
		if err == pflag.ErrHelp {
			return errHelp
		}
		return usageError{err}
	}
	if fs.NArg() != 1 {
		return usagef("catalog fetch: want one NAME (%s)", sourceNames())
	}
	if fs.Arg(0) == "names" {
		if *size < 0 {
			return usagef("--size %d: want a length in bytes", *size)
		}
		return fetchNames(e, *url, *out, *size, *sum)
	}
	src, ok := catalog.KnownSources[fs.Arg(0)]
	if !ok {
		return usagef("catalog fetch: unknown catalogue %q (want %s)", fs.Arg(0), sourceNames())
	}
	dst := *out
	if dst == "" {
		dir, err := catalog.CacheDir()
		if err != nil {
			return err
		}
		if err := os.MkdirAll(dir, 0o755); err != nil {
			return err
		}
		dst = filepath.Join(dir, src.File)
	}
	if err := scene.CheckWritable("output", dst); err != nil {
		return err
	}
	progress := newByteProgress(e.stderr, "fetch "+src.Name)
	client := &http.Client{Timeout: 30 * time.Minute}
	if *size < 0 {
		return usagef("--size %d: want a length in bytes", *size)
	}
	var digest string
	err := catalog.FetchSource(e.ctx, client, src, *url, dst, progress.update, catalog.FetchOptions{Size: *size, SHA256: *sum, Digest: &digest})
	progress.finish()
	if err != nil {
		return err
	}
	fmt.Fprintln(e.stdout, dst)
	fmt.Fprintf(e.stderr, "sha256 %s (pin it with --sha256 for later fetches)\n", digest)
	return nil
}

// byteProgress shows download progress: a bar on a terminal, plain lines
// otherwise.
type byteProgress struct {
	w     io.Writer
	label string
	bar   *progressbar.ProgressBar
	tty   bool
	last  time.Time
}

func newByteProgress(w io.Writer, label string) *byteProgress {
	p := &byteProgress{w: w, label: label}
	if f, ok := w.(*os.File); ok && term.IsTerminal(int(f.Fd())) {
		p.tty = true
	}
	return p
}

func (p *byteProgress) update(done, total int64) {
	if p.tty {
		if p.bar == nil {
			p.bar = progressbar.NewOptions64(total, progressbar.OptionSetWriter(p.w),
				progressbar.OptionSetDescription(p.label), progressbar.OptionShowBytes(true),
				progressbar.OptionShowCount(), progressbar.OptionSetPredictTime(true))
		}
		_ = p.bar.Set64(done)
		return
	}
	if now := time.Now(); now.Sub(p.last) >= 5*time.Second || done == total {
		p.last = now
		if total > 0 {
			fmt.Fprintf(p.w, "%s: %d / %d bytes (%.0f%%)\n", p.label, done, total, 100*float64(done)/float64(total))
		} else {
			fmt.Fprintf(p.w, "%s: %d bytes\n", p.label, done)
		}
	}
}

func (p *byteProgress) finish() {
	if p.bar != nil {
		_ = p.bar.Finish()
		fmt.Fprintln(p.w)
	}
}

// fetchNames downloads the IAU Catalog of Star Names into the user cache
// (or out), where --names finds it by default.
func fetchNames(e *env, url, out string, size int64, sum string) error {
	dst := out
	if dst == "" {
		dir, err := catalog.CacheDir()
		if err != nil {
			return err
		}
		if err := os.MkdirAll(dir, 0o755); err != nil {
			return err
		}
		dst = filepath.Join(dir, names.Published.File)
	}
	if err := scene.CheckWritable("output", dst); err != nil {
		return err
	}
	client := &http.Client{Timeout: 5 * time.Minute}
	src := names.Published
	src.Size, src.SHA256 = size, sum
	digest, err := names.Fetch(e.ctx, client, src, url, dst)
	if err != nil {
		return err
	}
	fmt.Fprintln(e.stdout, dst)
	fmt.Fprintln(e.stderr, names.Credit)
	fmt.Fprintf(e.stderr, "sha256 %s (pin it with --sha256 for later fetches)\n", digest)
	return nil
}
