package main

import (
	"context"
	"io"
	"math"
	"strings"

	"github.com/spf13/pflag"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/frameopt"
	"github.com/skyframe/skyframe/names"
	"github.com/skyframe/skyframe/spectrum"
)

// physicsFlags are the options shared by every command that transforms the
// sky: the catalogue, the ship's velocity and position, the beaming convention.
type physicsFlags struct {
	catalog       string
	catalogFormat string
	speed         float64
	gamma         float64
	rapidity      float64
	toward        string
	position      string
	beaming       string
	epoch         float64
	columns       []string
	names         string
	skyDepth      skyDepthFlag

	// stream, when set, is the cache file the frame is rendered from in
	// chunks; the scene's stars then hold only the rows refs name (see
	// referencedStars).
	stream *catalog.ChunkReader
	refs   []string
}

// Default heading: the galactic centre (ICRS, ESA SP-1200 galactic pole and
// origin), so a default frame looks into the densest part of the sky.
const defaultToward = "266.405,-28.936"

func (p *physicsFlags) register(fs *pflag.FlagSet, defaultSpeed float64) {
	fs.StringVar(&p.catalog, "catalog", "", "star catalogue (BSC5, Hipparcos, Gaia CSV/ECSV, CSV/TSV, Parquet, skyframe cache; gzip ok): a file, a directory, a quoted glob or a comma-separated list, read as one; default: the built-in synthetic sky")
	fs.StringVar(&p.catalogFormat, "catalog-format", "", "catalogue format, overriding detection: "+formatNames())
	fs.Float64Var(&p.speed, "speed", defaultSpeed, "ship speed β = v/c, 0 ≤ β < 1")
	fs.Float64Var(&p.gamma, "gamma", 0, "Lorentz factor γ ≥ 1 instead of --speed (exact up to γ = 1e8 and beyond)")
	fs.Float64Var(&p.rapidity, "rapidity", 0, "rapidity φ = atanh β instead of --speed")
	fs.StringVar(&p.toward, "toward", defaultToward, "direction of motion as RA,DEC (ICRS degrees; the same apparent or as catalogue:RA,DEC, since aberration keeps the axis of motion), or a star id or name from the catalogue")
	fs.StringVar(&p.position, "position", "0,0,0", "ship position X,Y,Z in parsecs (ICRS axes, Sun at origin), or a star id or name; the Sun is a star of the sky from everywhere but the origin itself, where the view is the catalogue's own night sky without it; a position inside the Sun (within 695 700 km of the origin) or any star is refused")
	if fs.Lookup("beaming") == nil { // still takes it as a frame option (frameopt)
		fs.StringVar(&p.beaming, "beaming", "exact", "point-source beaming convention: exact (flux ∝ D²), d3, d4 (moving-source conventions of published figures)")
	}
	fs.StringSliceVar(&p.columns, "column", nil, "generic CSV/TSV column map, FIELD=NAME, repeatable (fields: "+strings.Join(catalog.ColumnFields, ", ")+"; add ra-hours if RA is in hours)")
	fs.Float64Var(&p.epoch, "epoch", 0, "propagate positions by proper motion to this Julian epoch (e.g. 2100); 0 keeps the catalogue epoch")
	registerNames(fs, &p.names)
	registerSkyDepth(fs, &p.skyDepth)
}

func formatNames() string {
	s := ""
	for f := catalog.FormatAuto + 1; ; f++ {
		name := f.String()
		if _, err := catalog.ParseFormat(name); err != nil || name == "" {
			break
		}
		if s != "" {
			s += ", "
		}
		s += name
	}
	return s
}

// scene is the resolved physical state of one observation.
type scene struct {
	stars *catalog.Stars
	index *names.Index // star lookup and label text over stars
	table *names.Table // the names table index was built with
	// depthV is the depth (V) to which the built-in sky was drawn for the
	// frame (frameDepth); 0 when not known or another catalogue.
	depthV float64
	// builtIn: the catalogue is the built-in sky (no --catalog).
	builtIn  bool
	observer camera.Observer
	beaming  spectrum.Beaming
	heading  r3.Vec // unit direction of motion (ICRS)
}

func (p *physicsFlags) resolve(e *env, fs *pflag.FlagSet) (*scene, error) {
	if err := checkFinite("epoch", p.epoch); err != nil {
		return nil, err
	}
	if fs.Changed("sky-depth") && p.catalog != "" {
		return nil, usagef("--sky-depth: only for the built-in sky, not with --catalog")
	}
	var stars *catalog.Stars
	table, err := loadNames(p.names)
	if err != nil {
		return nil, err
	}
	if p.stream != nil {
		if p.epoch != 0 {
			return nil, usagef("--epoch: %s is rendered from disk chunk by chunk (it is longer than one chunk of --memory), where proper motions are not propagated; raise --memory to load it", p.catalog)
		}
		stars, err = referencedStars(p.stream, p.refs, table)
	} else {
		stars, err = loadStars(e.ctx, e.stderr, p.catalog, p.catalogFormat, p.columns, p.epoch)
	}
	if err != nil {
		return nil, err
	}
	sc := &scene{stars: stars, index: names.NewIndex(stars, table), table: table}
	beaming := p.beaming
	if f := fs.Lookup("beaming"); f != nil {
		beaming = f.Value.String()
	}
	if sc.beaming, err = spectrum.ParseBeaming(beaming); err != nil {
		return nil, usagef("--beaming: %v", err)
	}
	pos, err := resolvePosition(sc.index, "position", p.position)
	if err != nil {
		return nil, err
	}
	sc.heading, err = resolveDirection(sc.index, "toward", p.toward, pos)
	if err != nil {
		return nil, err
	}
	sc.builtIn = p.catalog == "" && p.stream == nil
	if p.stream == nil {
		// The Sun is a star of every sky, except seen from the origin itself
		// (catalog.SunShown).
		if w := catalog.WithSun(sc.stars, [3]float64{pos.X, pos.Y, pos.Z}); w != sc.stars {
			sc.stars, sc.index = w, names.NewIndex(w, table)
		}
	}
	nset := 0
	for _, name := range []string{"speed", "gamma", "rapidity"} {
		if fs.Changed(name) {
			nset++
		}
	}
	if nset > 1 {
		return nil, usagef("give only one of --speed, --gamma, --rapidity")
	}
	var b camera.Boost
	switch {
	case fs.Changed("gamma"):
		if !(p.gamma >= 1) || math.IsInf(p.gamma, 0) {
			return nil, usagef("--gamma %v: want a finite γ ≥ 1", p.gamma)
		}
		b, err = camera.NewBoostGamma(sc.heading, p.gamma)
	case fs.Changed("rapidity"):
		if !(p.rapidity >= 0) || math.IsInf(p.rapidity, 0) {
			return nil, usagef("--rapidity %v: want a finite φ ≥ 0", p.rapidity)
		}
		b, err = camera.NewBoostRapidity(sc.heading, p.rapidity)
	default:
		if !(p.speed >= 0 && p.speed < 1) {
			return nil, usagef("--speed %v: β must satisfy 0 ≤ β < 1 (use --gamma for speeds closer to light)", p.speed)
		}
		b, err = camera.NewBoost(sc.heading, p.speed)
	}
	if err != nil {
		return nil, usageError{err}
	}
	sc.observer = camera.Observer{Position: pos, Boost: b}
	return sc, nil
}

func loadStars(ctx context.Context, warn io.Writer, path, format string, columns []string, epoch float64) (*catalog.Stars, error) {
	if path == "" {
		if format != "" {
			return nil, usagef("--catalog-format needs --catalog")
		}
		s := catalog.BuiltIn()
		if epoch != 0 {
			return nil, usagef("--epoch: the built-in sky has no proper motions")
		}
		return s, nil
	}
	opt, err := readOptions(format, columns)
	if err != nil {
		return nil, err
	}
	opt.Epoch = epoch
	stars, rep, err := openCatalog(ctx, []string{path}, opt, nil)
	if err != nil {
		return nil, err
	}
	printSkipped(warn, rep)
	return stars, nil
}

// resolvePosition reads X,Y,Z in parsecs or a star reference (names.Index.Find).
func resolvePosition(x *names.Index, flag, s string) (r3.Vec, error) {
	if v, err := parseFloats(flag, s, 3); err == nil {
		return r3.Vec{X: v[0], Y: v[1], Z: v[2]}, nil
	}
	i, err := findStar(x, flag, "X,Y,Z in parsecs", s)
	if err != nil {
		return r3.Vec{}, err
	}
	st := x.Stars().At(i)
	if math.IsInf(st.Dist, 0) {
		return r3.Vec{}, usagef("--%s %q: that star (%s) has no known distance", flag, s, x.Label(i))
	}
	return r3.Scale(st.Dist, r3.Vec{X: st.Dir[0], Y: st.Dir[1], Z: st.Dir[2]}), nil
}

// resolveDirection reads the direction of motion: RA,DEC (or
// catalogue:RA,DEC, the same direction) or a star reference (seen from pos).
func resolveDirection(x *names.Index, flag, s string, pos r3.Vec) (r3.Vec, error) {
	if rest, ok := strings.CutPrefix(s, frameopt.CataloguePrefix); ok {
		s = rest
	}
	if ra, dec, err := parseRADec(flag, s); err == nil {
		return camera.FromRADec(ra, dec), nil
	} else if _, ferr := parseFloats(flag, s, 2); ferr == nil {
		return r3.Vec{}, err
	}
	i, err := findStar(x, flag, "RA,DEC in degrees", s)
	if err != nil {
		return r3.Vec{}, err
	}
	st := x.Stars().At(i)
	u := r3.Vec{X: st.Dir[0], Y: st.Dir[1], Z: st.Dir[2]}
	if math.IsInf(st.Dist, 0) {
		return u, nil
	}
	d := r3.Sub(r3.Scale(st.Dist, u), pos)
	if r3.Norm(d) == 0 {
		return r3.Vec{}, usagef("--%s %q: the ship is at that star", flag, s)
	}
	return r3.Unit(d), nil
}
