package scene

import (
	"context"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/frameopt"
	"github.com/skyframe/skyframe/names"
	"github.com/skyframe/skyframe/sky"
	"github.com/skyframe/skyframe/spectrum"
	"gonum.org/v1/gonum/spatial/r3"
)

// Physics are the options shared by every command that transforms the
// sky, as given (the command's flags): the catalogue, the ship's velocity
// and position, the beaming convention. Changed reports whether an option
// was given (by its flag name: speed, gamma, rapidity, sky-depth); nil
// means none was.
type Physics struct {
	Catalog       string
	CatalogFormat string
	Speed         float64
	Gamma         float64
	Rapidity      float64
	Toward        string
	Position      string
	Beaming       string
	Epoch         float64
	Columns       []string
	Names         string

	// Stream, when set, is the cache file the frame is rendered from in
	// chunks; the scene's stars then hold only the rows Refs name (see
	// referencedStars).
	Stream *catalog.ChunkReader
	Refs   []string

	// Changed reports whether an option was given, by flag name.
	Changed func(name string) bool

	// Maps keeps the unresolved-light maps a frame's layers use; nil
	// builds them for each frame.
	Maps *sky.UnresolvedMaps
}

// Scene is the resolved physical state of one observation.
type Scene struct {
	Stars *catalog.Stars
	Index *names.Index // star lookup and label text over Stars
	Table *names.Table // the names table Index was built with
	// DepthV is the depth (V) to which the built-in sky was drawn for the
	// frame (FrameDepth); 0 when not known or another catalogue.
	DepthV float64
	// BuiltIn: the catalogue is the built-in sky (no --catalog).
	BuiltIn  bool
	Observer camera.Observer
	Beaming  spectrum.Beaming
	Heading  r3.Vec // unit direction of motion (ICRS)
	// Maps: see Physics.Maps.
	Maps *sky.UnresolvedMaps
}

// Resolve reads the catalogue (rows it skips are reported on warn) and the
// names table and resolves the ship's position, heading and velocity into
// a Scene. Errors name the flag (*InputError).
func (p *Physics) Resolve(ctx context.Context, warn io.Writer) (*Scene, error) {
	changed := p.Changed
	if changed == nil {
		changed = func(string) bool { return false }
	}
	if err := checkFinite("epoch", p.Epoch); err != nil {
		return nil, err
	}
	if changed("sky-depth") && p.Catalog != "" {
		return nil, usagef("--sky-depth: only for the built-in sky, not with --catalog")
	}
	var stars *catalog.Stars
	table, err := LoadNames(p.Names)
	if err != nil {
		return nil, err
	}
	if p.Stream != nil {
		if p.Epoch != 0 {
			return nil, usagef("--epoch: %s is rendered from disk chunk by chunk (it is longer than one chunk of --memory), where proper motions are not propagated; raise --memory to load it", p.Catalog)
		}
		stars, err = referencedStars(p.Stream, p.Refs, table)
	} else {
		stars, err = LoadStars(ctx, warn, p.Catalog, p.CatalogFormat, p.Columns, p.Epoch)
	}
	if err != nil {
		return nil, err
	}
	sc := &Scene{Stars: stars, Index: names.NewIndex(stars, table), Table: table, Maps: p.Maps}
	if sc.Beaming, err = spectrum.ParseBeaming(p.Beaming); err != nil {
		return nil, usagef("--beaming: %v", err)
	}
	pos, err := ResolvePosition(sc.Index, "position", p.Position)
	if err != nil {
		return nil, err
	}
	sc.Heading, err = ResolveDirection(sc.Index, "toward", p.Toward, pos)
	if err != nil {
		return nil, err
	}
	sc.BuiltIn = p.Catalog == "" && p.Stream == nil
	if p.Stream == nil {
		// The Sun is a star of every sky, except seen from the origin itself
		// (catalog.SunShown).
		if w := catalog.WithSun(sc.Stars, [3]float64{pos.X, pos.Y, pos.Z}); w != sc.Stars {
			sc.Stars, sc.Index = w, names.NewIndex(w, table)
		}
	}
	nset := 0
	for _, name := range []string{"speed", "gamma", "rapidity"} {
		if changed(name) {
			nset++
		}
	}
	if nset > 1 {
		return nil, usagef("give only one of --speed, --gamma, --rapidity")
	}
	var b camera.Boost
	switch {
	case changed("gamma"):
		if !(p.Gamma >= 1) || math.IsInf(p.Gamma, 0) {
			return nil, usagef("--gamma %v: want a finite γ ≥ 1", p.Gamma)
		}
		b, err = camera.NewBoostGamma(sc.Heading, p.Gamma)
	case changed("rapidity"):
		if !(p.Rapidity >= 0) || math.IsInf(p.Rapidity, 0) {
			return nil, usagef("--rapidity %v: want a finite φ ≥ 0", p.Rapidity)
		}
		b, err = camera.NewBoostRapidity(sc.Heading, p.Rapidity)
	default:
		if !(p.Speed >= 0 && p.Speed < 1) {
			return nil, usagef("--speed %v: β must satisfy 0 ≤ β < 1 (use --gamma for speeds closer to light)", p.Speed)
		}
		b, err = camera.NewBoost(sc.Heading, p.Speed)
	}
	if err != nil {
		return nil, &InputError{err}
	}
	sc.Observer = camera.Observer{Position: pos, Boost: b}
	return sc, nil
}

// LoadStars reads the catalogue at path ("" for the built-in sky) with
// the format and column map given, propagated to epoch (0: as read); rows
// it skips are reported on warn.
func LoadStars(ctx context.Context, warn io.Writer, path, format string, columns []string, epoch float64) (*catalog.Stars, error) {
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
	opt, err := ReadOptions(format, columns)
	if err != nil {
		return nil, err
	}
	opt.Epoch = epoch
	stars, rep, err := OpenCatalog(ctx, []string{path}, opt, nil)
	if err != nil {
		return nil, err
	}
	WriteSkipped(warn, rep)
	return stars, nil
}

// ResolvePosition reads X,Y,Z in parsecs or a star reference (names.Index.Find).
func ResolvePosition(x *names.Index, flag, s string) (r3.Vec, error) {
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

// ResolveDirection reads the direction of motion: RA,DEC (or
// catalogue:RA,DEC, the same direction) or a star reference (seen from pos).
func ResolveDirection(x *names.Index, flag, s string, pos r3.Vec) (r3.Vec, error) {
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

// parseFloats splits "a,b[,c]" into exactly n finite numbers, naming the flag
// in any error.
func parseFloats(flag, s string, n int) ([]float64, error) {
	parts := strings.Split(s, ",")
	if len(parts) != n {
		return nil, usagef("--%s %q: want %d comma-separated numbers", flag, s, n)
	}
	out := make([]float64, n)
	for i, p := range parts {
		v, err := strconv.ParseFloat(strings.TrimSpace(p), 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, usagef("--%s %q: %q is not a finite number", flag, s, p)
		}
		out[i] = v
	}
	return out, nil
}

// parseRADec reads "RA,DEC" in ICRS degrees.
func parseRADec(flag, s string) (ra, dec float64, err error) {
	v, err := parseFloats(flag, s, 2)
	if err != nil {
		return 0, 0, err
	}
	if v[1] < -90 || v[1] > 90 {
		return 0, 0, usagef("--%s %q: declination %g is outside [-90, 90]", flag, s, v[1])
	}
	return math.Mod(math.Mod(v[0], 360)+360, 360), v[1], nil
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// checkFinite names a flag whose value is NaN or infinite.
func checkFinite(flag string, v float64) error {
	if !finite(v) {
		return usagef("--%s %v: want a finite number", flag, v)
	}
	return nil
}
