package flight

import (
	"errors"
	"fmt"
	"maps"
	"math"
	"path"
	"reflect"
	"regexp"
	"slices"
	"sort"
	"strconv"
	"strings"

	"github.com/BurntSushi/toml"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/frameopt"
)

// Errors wrapped by PlanError.
var (
	ErrPlanSyntax  = errors.New("flight: plan syntax")
	ErrUnknownKey  = errors.New("flight: unknown plan key")
	ErrPlanValue   = errors.New("flight: bad plan value")
	ErrPlanTooDeep = errors.New("flight: plan nested too deeply")
	ErrPlanTooBig  = errors.New("flight: plan file too large")
	ErrUnbound     = errors.New("flight: plan names stars; call Bind with a resolver first")
)

// Limits on plan files.
const (
	MaxPlanBytes = 1 << 20    // largest plan file accepted
	MaxPlanDepth = 6          // deepest key/table/array nesting accepted
	MaxLegs      = 1000       // most [[leg]] tables
	MaxLookKeys  = 10000      // most [[camera.look]] keys
	MaxFrames    = 10_000_000 // most frames in a video
)

// PlanError is a problem in a plan file, located by file, line and key.
type PlanError struct {
	File    string // plan name as given to ParsePlan
	Line    int    // 1-based; 0 when unknown
	Key     string // dotted key path, array elements as name[i] (0-based)
	Msg     string
	Suggest string // closest known key, for unknown keys
	Err     error  // ErrPlanSyntax, ErrUnknownKey, ErrPlanValue, ...
}

// Error formats the problem as "flight: file:line: key: message (did you mean ...?)".
func (e *PlanError) Error() string {
	var b strings.Builder
	b.WriteString("flight: ")
	b.WriteString(e.File)
	if e.Line > 0 {
		fmt.Fprintf(&b, ":%d", e.Line)
	}
	b.WriteString(": ")
	if e.Key != "" {
		b.WriteString(e.Key)
		b.WriteString(": ")
	}
	b.WriteString(e.Msg)
	if e.Suggest != "" {
		fmt.Fprintf(&b, " (did you mean %q?)", e.Suggest)
	}
	return b.String()
}

// Unwrap returns the sentinel error class.
func (e *PlanError) Unwrap() error { return e.Err }

// CatalogueSpec is the [catalogue] table: which star catalogue to read.
type CatalogueSpec struct {
	// Path of the catalogue file; empty or "builtin" for the built-in sky.
	Path string `toml:"path"`
	// Format of the file (left to the catalogue reader; empty: detect).
	Format string `toml:"format"`
	// Columns maps our column names (see CatalogueColumns) to the file's,
	// as given; ColumnMap is the same, parsed (catalog.ColumnMap.Set).
	Columns   map[string]string `toml:"columns"`
	ColumnMap catalog.ColumnMap `toml:"-"`
	// Names is the IAU Catalog of Star Names file for proper names in star
	// references and labels; empty: the fetched copy in the user cache, if
	// any; "none": no names table.
	Names string `toml:"names"`
}

// CatalogueColumns lists the column names a [catalogue.columns] map may set
// (catalog.ColumnFields; catalog.ColumnMap.Set also takes its aliases).
var CatalogueColumns = catalog.ColumnFields

// StartSpec is the [start] table: where and how the ship starts. Position is
// [x, y, z] in pc (ICRS, Sun at the origin) or Star; neither means the Sun.
// Speed is β along the heading RA/Dec (degrees), needed when Speed > 0.
type StartSpec struct {
	Position []float64 `toml:"position"`
	Star     string    `toml:"star"`
	Speed    float64   `toml:"speed"`
	RA       *float64  `toml:"ra"`
	Dec      *float64  `toml:"dec"`
}

// LegEntry is one [[leg]] table. Kind is "cruise", "boost" or "voyage".
// Acceleration is AccelG (in g₀) or Accel (m/s²). Durations: ShipYears or
// CatalogueYears (boost, cruise) or a distance DistancePc / DistanceLy
// (cruise). A voyage goes to ToStar or ToPosition ([x, y, z] pc) with an
// optional SpeedCap (β) or GammaCap, and ends StandOffAU au short of its
// destination (a star by default: where it is as bright as the Sun from
// Earth, √(L/L☉) au; a position: 0). RA/Dec (degrees) give a boost's thrust
// direction or a cruise heading; Speed (β) and From ([x, y, z] pc) are checks
// that the leg starts as the previous one ended.
type LegEntry struct {
	Kind           string    `toml:"kind"`
	AccelG         *float64  `toml:"accel_g"`
	Accel          *float64  `toml:"accel"`
	ShipYears      *float64  `toml:"ship_years"`
	CatalogueYears *float64  `toml:"catalogue_years"`
	DistancePc     *float64  `toml:"distance_pc"`
	DistanceLy     *float64  `toml:"distance_ly"`
	ToStar         string    `toml:"to_star"`
	ToPosition     []float64 `toml:"to_position"`
	StandOffAU     *float64  `toml:"standoff_au"`
	SpeedCap       *float64  `toml:"speed_cap"`
	GammaCap       *float64  `toml:"gamma_cap"`
	RA             *float64  `toml:"ra"`
	Dec            *float64  `toml:"dec"`
	Speed          *float64  `toml:"speed"`
	From           []float64 `toml:"from"`
}

// Spacing chooses which clock the flight frames are evenly spaced in.
type Spacing int

const (
	// SpacingShip spaces frames evenly in ship (proper) time.
	SpacingShip Spacing = iota
	// SpacingCatalogue spaces frames evenly in catalogue time.
	SpacingCatalogue
)

// String returns "ship" or "catalogue".
func (s Spacing) String() string {
	if s == SpacingCatalogue {
		return "catalogue"
	}
	return "ship"
}

// ShowSpec is the [show] table: how the flight maps onto video time. The
// video is HoldStart seconds on the start state, Seconds of flight, then
// HoldEnd seconds on the end state, at FPS frames per second (default 30).
// Spacing is "ship" (default) or "catalogue".
type ShowSpec struct {
	FPS       float64 `toml:"fps"`
	Seconds   float64 `toml:"seconds"`
	Spacing   string  `toml:"spacing"`
	HoldStart float64 `toml:"hold_start"`
	HoldEnd   float64 `toml:"hold_end"`
}

// LookKey is one [[camera.look]] key: from At (seconds of video) the
// camera takes the key's values of the keyed frame options (look, up, roll,
// fov, tilt, exposure; see frameopt.Defs). Look is "ahead", "behind", an
// apparent "RA,DEC", "catalogue:RA,DEC" or a star id/name; Frame holds the
// plan's [camera] values with the key's own on top, and Given lists the
// plan keys the key sets itself. Between keys the values are interpolated.
type LookKey struct {
	At    float64          `json:"at"`
	Look  string           `json:"look"`
	Roll  float64          `json:"roll"`
	Given []string         `json:"given,omitempty"`
	Frame frameopt.Options `json:"frame"`
}

// CameraSpec is the [camera] table's keys ([[camera.look]]); the frame
// options of [camera] and [overlays] are in Plan.Frame.
type CameraSpec struct {
	Look []LookKey
}

// OutputSpec is the [output] table. Frames is the frame-file pattern,
// relative to Dir, with one {frame} or {frame:0N} placeholder (default
// "frames/{frame:05}.png"); it may not be absolute or contain "..". PNG
// (default true), FITS and Sidecar (JSON metadata, default true) choose the
// files written per frame.
type OutputSpec struct {
	Dir     string `toml:"dir"`
	Frames  string `toml:"frames"`
	PNG     *bool  `toml:"png"`
	FITS    bool   `toml:"fits"`
	Sidecar *bool  `toml:"sidecar"`
	// OverlayLayer writes each frame's overlays alone to their own RGBA
	// PNG (the frame's name with .overlay.png), and the frame's PNG
	// without them.
	OverlayLayer bool `toml:"overlay_layer"`
	// EXR writes each frame as OpenEXR too (the frame's name with .exr;
	// content per the camera.exr_* keys).
	EXR bool `toml:"exr"`
}

// planFile is the whole file.
type planFile struct {
	Title     string         `toml:"title"`
	Catalogue CatalogueSpec  `toml:"catalogue"`
	Start     StartSpec      `toml:"start"`
	Legs      []LegEntry     `toml:"leg"`
	Show      ShowSpec       `toml:"show"`
	Camera    toml.Primitive `toml:"camera"`
	Output    OutputSpec     `toml:"output"`
	Overlays  toml.Primitive `toml:"overlays"`
}

// Plan is a parsed, validated plan file with defaults filled in.
type Plan struct {
	Name      string // as given to ParsePlan
	Title     string
	Catalogue CatalogueSpec
	Start     StartSpec
	Legs      []LegEntry
	Show      ShowSpec
	Camera    CameraSpec
	Output    OutputSpec
	// Frame holds the frame options of [camera] and [overlays] (the same
	// options as still's flags, frameopt.Defs); Given lists the keys set.
	Frame frameopt.Options
	Given []string
	// StandOff gives the default stand-off, pc, of a voyage to a star
	// (StarsStandOff); Bind uses it.
	StandOff func(star string) (pc float64, ok bool)

	spacing      Spacing
	nHold0, nFly int
	nHold1       int
	specs        []LegSpec
	needsStars   bool
	traj         *Trajectory
	looks        []cameraKey
	starPos      map[string]r3.Vec
	frameFmt     frameFormat
	lines        keyLines
}

// Trajectory returns the plan's trajectory, nil until it is bound (plans
// naming no stars are bound by ParsePlan).
func (p *Plan) Trajectory() *Trajectory { return p.traj }

// NeedsResolver reports whether the plan names stars, so that Bind must be
// called with a resolver before FrameState.
func (p *Plan) NeedsResolver() bool { return p.needsStars }

// Spacing returns the frame spacing mode.
func (p *Plan) Spacing() Spacing { return p.spacing }

// checker collects value errors with their lines.
type checker struct {
	file  string
	lines keyLines
	errs  []error
}

func (c *checker) fail(msg string, key ...string) {
	c.errs = append(c.errs, &PlanError{File: c.file, Line: c.lines.line(key...), Key: displayKey(key), Msg: msg, Err: ErrPlanValue})
}

// displayKey turns ["leg#1", "accel_g"] into "leg[1].accel_g".
func displayKey(key []string) string {
	parts := make([]string, len(key))
	for i, k := range key {
		if a, b, ok := strings.Cut(k, "#"); ok {
			k = a + "[" + b + "]"
		}
		parts[i] = k
	}
	return strings.Join(parts, ".")
}

// num checks lo ≤ v ≤ hi (open at lo when loOpen) and finiteness.
func (c *checker) num(v, lo, hi float64, loOpen bool, key ...string) bool {
	switch {
	case math.IsNaN(v):
		c.fail("is NaN", key...)
	case math.IsInf(v, 0):
		c.fail("is infinite", key...)
	case v < lo || v > hi || (loOpen && v == lo):
		op := "≤"
		if loOpen {
			op = "<"
		}
		c.fail(fmt.Sprintf("%v is out of range (want %v %s value ≤ %v)", v, lo, op, hi), key...)
	default:
		return true
	}
	return false
}

func (c *checker) vec(v []float64, limit float64, key ...string) (r3.Vec, bool) {
	if len(v) != 3 {
		c.fail(fmt.Sprintf("want [x, y, z] in parsecs, have %d numbers", len(v)), key...)
		return r3.Vec{}, false
	}
	ok := true
	for _, x := range v {
		ok = c.num(x, -limit, limit, false, key...) && ok
	}
	return r3.Vec{X: v[0], Y: v[1], Z: v[2]}, ok
}

func (c *checker) str(s string, key ...string) {
	if len(s) > 4096 {
		c.fail("string longer than 4096 bytes", key...)
	}
	for _, r := range s {
		if r < 0x20 && r != '\t' {
			c.fail("string holds a control character", key...)
			return
		}
	}
}

// ParsePlan decodes and validates a plan file. name labels errors (usually
// the file name). Unknown keys, values out of range, NaN/Inf and deep
// nesting are errors naming the key and line; several problems are joined.
// Plans whose legs or looks name stars are returned unbound: call Bind.
func ParsePlan(data []byte, name string) (*Plan, error) {
	if len(data) > MaxPlanBytes {
		return nil, &PlanError{File: name, Msg: fmt.Sprintf("%d bytes (limit %d)", len(data), MaxPlanBytes), Err: ErrPlanTooBig}
	}
	src := string(data)
	if d, line := nestingDepth(src); d > MaxPlanDepth {
		return nil, &PlanError{File: name, Line: line, Msg: fmt.Sprintf("nesting depth %d (limit %d)", d, MaxPlanDepth), Err: ErrPlanTooDeep}
	}
	var pf planFile
	md, err := toml.Decode(src, &pf)
	if err != nil {
		pe := &PlanError{File: name, Msg: err.Error(), Err: ErrPlanSyntax}
		var te toml.ParseError
		if errors.As(err, &te) {
			pe.Line = te.Position.Line
			pe.Msg = te.Message
		} else if m := tomlTypeErr.FindStringSubmatch(err.Error()); m != nil {
			// Type mismatches come as plain errors naming line and key.
			pe.Line, _ = strconv.Atoi(m[1])
			pe.Key, pe.Msg, pe.Err = m[2], m[3], ErrPlanValue
		}
		return nil, pe
	}
	lines := scanKeyLines(src)
	var camera, overlays map[string]any
	for _, t := range []struct {
		prim toml.Primitive
		dst  *map[string]any
		name string
	}{{pf.Camera, &camera, "camera"}, {pf.Overlays, &overlays, "overlays"}} {
		if !md.IsDefined(t.name) {
			continue
		}
		if err := md.PrimitiveDecode(t.prim, t.dst); err != nil {
			return nil, &PlanError{File: name, Line: lines.line(t.name), Key: t.name, Msg: err.Error(), Err: ErrPlanValue}
		}
	}
	// [camera] and [overlays] check their own keys (frameOptions).
	undecoded := slices.DeleteFunc(md.Undecoded(), func(k toml.Key) bool {
		return len(k) > 0 && (k[0] == "camera" || k[0] == "overlays")
	})
	if err := unknownKeys(undecoded, lines, name); err != nil {
		return nil, err
	}
	p := &Plan{Name: name, lines: lines}
	c := &checker{file: name, lines: lines}
	p.fill(&pf, c)
	p.frameOptions(camera, overlays, c)
	if len(c.errs) > 0 {
		return nil, errors.Join(c.errs...)
	}
	if !p.needsStars {
		if err := p.Bind(nil); err != nil {
			return nil, err
		}
	}
	return p, nil
}

// knownKeys lists the keys each table of planFile accepts, by table path.
var knownKeys = func() map[string][]string {
	out := map[string][]string{}
	var walk func(t reflect.Type, prefix string)
	walk = func(t reflect.Type, prefix string) {
		for i := 0; i < t.NumField(); i++ {
			f := t.Field(i)
			tag := f.Tag.Get("toml")
			if tag == "" {
				continue
			}
			out[prefix] = append(out[prefix], tag)
			ft := f.Type
			if ft.Kind() == reflect.Slice {
				ft = ft.Elem()
			}
			if ft.Kind() == reflect.Struct {
				walk(ft, strings.TrimPrefix(prefix+"."+tag, "."))
			}
		}
	}
	walk(reflect.TypeOf(planFile{}), "")
	out["catalogue.columns"] = CatalogueColumns
	out["camera"] = append(frameopt.InTable(frameopt.CameraTable), "look", "width", "height")
	out["camera.look"] = keyedKeys()
	out["overlays"] = frameopt.InTable(frameopt.OverlaysTable)
	return out
}()

// unknownKeys reports undecoded keys: only the outermost of nested unknown
// keys, each with its line and the closest known key.
func unknownKeys(keys []toml.Key, lines keyLines, file string) error {
	set := map[string]bool{}
	for _, k := range keys {
		set[k.String()] = true
	}
	var errs []*PlanError
	for _, k := range keys {
		outer := true
		for n := 1; n < len(k); n++ {
			if set[toml.Key(k[:n]).String()] {
				outer = false
			}
		}
		if !outer {
			continue
		}
		parent := strings.Join(k[:len(k)-1], ".")
		sug := closest(k[len(k)-1], knownKeys[parent])
		if sug != "" && parent != "" {
			sug = parent + "." + sug
		}
		msg := "unknown key"
		if len(knownKeys[parent]) == 0 {
			msg = "unknown key (this table takes no keys)"
		}
		errs = append(errs, &PlanError{File: file, Line: lines.line(k...), Key: k.String(), Msg: msg, Suggest: sug, Err: ErrUnknownKey})
	}
	if len(errs) == 0 {
		return nil
	}
	sort.SliceStable(errs, func(i, j int) bool { return errs[i].Line < errs[j].Line })
	out := make([]error, len(errs))
	for i, e := range errs {
		out[i] = e
	}
	return errors.Join(out...)
}

var tomlTypeErr = regexp.MustCompile(`^toml: line (\d+) \(last key "([^"]*)"\): (.*)$`)

// RADec returns the ICRS unit vector for right ascension and declination in
// degrees (camera.FromRADec, so plans and stills agree to the bit).
func RADec(ra, dec float64) r3.Vec { return camera.FromRADec(ra, dec) }

// heading parses an optional RA/Dec pair; both or neither must be set.
func (c *checker) heading(ra, dec *float64, key ...string) (r3.Vec, bool) {
	if ra == nil && dec == nil {
		return r3.Vec{}, false
	}
	if ra == nil || dec == nil {
		c.fail("give both ra and dec (degrees)", key...)
		return r3.Vec{}, false
	}
	ok := c.num(*ra, -360, 360, false, append(key, "ra")...)
	ok = c.num(*dec, -90, 90, false, append(key, "dec")...) && ok
	if !ok {
		return r3.Vec{}, false
	}
	return RADec(*ra, *dec), true
}

// fill validates pf, applies defaults and builds the leg specs.
func (p *Plan) fill(pf *planFile, c *checker) {
	c.str(pf.Title, "title")
	p.Title = pf.Title

	// Catalogue.
	cat := pf.Catalogue
	c.str(cat.Path, "catalogue", "path")
	c.str(cat.Format, "catalogue", "format")
	c.str(cat.Names, "catalogue", "names")
	for _, k := range slices.Sorted(maps.Keys(cat.Columns)) {
		v := cat.Columns[k]
		c.str(v, "catalogue", "columns", k)
		err := cat.ColumnMap.Set(k, v)
		switch {
		case errors.Is(err, catalog.ErrColumnField):
			c.errs = append(c.errs, &PlanError{File: c.file, Line: c.lines.line("catalogue", "columns", k),
				Key: "catalogue.columns." + k, Msg: "unknown column name",
				Suggest: "catalogue.columns." + closest(k, CatalogueColumns), Err: ErrUnknownKey})
		case err != nil:
			c.fail(err.Error(), "catalogue", "columns", k)
		}
	}
	p.Catalogue = cat

	// Start.
	st := pf.Start
	startOK := true
	if st.Position != nil && st.Star != "" {
		c.fail("give position or star, not both", "start")
		startOK = false
	}
	var startPos r3.Vec
	if st.Position != nil {
		var ok bool
		startPos, ok = c.vec(st.Position, 1e7, "start", "position")
		startOK = startOK && ok
	}
	if st.Star != "" {
		c.str(st.Star, "start", "star")
		p.needsStars = true
	}
	hd, hasHd := c.heading(st.RA, st.Dec, "start")
	if c.num(st.Speed, 0, 1, false, "start", "speed") {
		if st.Speed >= 1 {
			c.fail("speed must be below 1 (fraction of c)", "start", "speed")
			startOK = false
		} else if st.Speed > 0 && !hasHd {
			c.fail("a moving start needs a heading (ra, dec)", "start")
			startOK = false
		}
	} else {
		startOK = false
	}
	if startOK {
		if _, err := MovingAt(startPos, hd, st.Speed); err != nil {
			c.fail(err.Error(), "start")
		}
	}
	p.Start = st

	// Legs.
	if len(pf.Legs) == 0 {
		c.fail("a plan needs at least one [[leg]]", "leg")
	}
	if len(pf.Legs) > MaxLegs {
		c.fail(fmt.Sprintf("%d legs (limit %d)", len(pf.Legs), MaxLegs), "leg")
	}
	for i := range pf.Legs {
		if sp := p.legSpec(&pf.Legs[i], i, c); sp != nil {
			p.specs = append(p.specs, sp)
		}
	}
	p.Legs = pf.Legs

	// Show.
	sh := pf.Show
	if sh.FPS == 0 {
		sh.FPS = 30
	}
	c.num(sh.FPS, 0, 1000, true, "show", "fps")
	c.num(sh.Seconds, 0, 1e6, true, "show", "seconds")
	c.num(sh.HoldStart, 0, 1e5, false, "show", "hold_start")
	c.num(sh.HoldEnd, 0, 1e5, false, "show", "hold_end")
	switch sh.Spacing {
	case "", "ship":
		sh.Spacing, p.spacing = "ship", SpacingShip
	case "catalogue":
		p.spacing = SpacingCatalogue
	default:
		c.fail(fmt.Sprintf("%q (want \"ship\" or \"catalogue\")", sh.Spacing), "show", "spacing")
	}
	if len(c.errs) == 0 {
		p.nHold0 = int(math.Round(sh.FPS * sh.HoldStart))
		p.nFly = max(1, int(math.Round(sh.FPS*sh.Seconds)))
		p.nHold1 = int(math.Round(sh.FPS * sh.HoldEnd))
		if n := int64(p.nHold0) + int64(p.nFly) + int64(p.nHold1); n > MaxFrames {
			c.fail(fmt.Sprintf("%d frames (limit %d)", n, MaxFrames), "show")
		}
	}
	p.Show = sh

	// Output.
	out := pf.Output
	if out.Dir == "" {
		out.Dir = "out"
	}
	c.str(out.Dir, "output", "dir")
	if out.Frames == "" {
		out.Frames = "frames/{frame:05}.png"
	}
	ff, err := parseFramePattern(out.Frames)
	if err != nil {
		c.fail(err.Error(), "output", "frames")
	}
	p.frameFmt = ff
	t := true
	if out.PNG == nil {
		out.PNG = &t
	}
	if out.Sidecar == nil {
		s := true
		out.Sidecar = &s
	}
	p.Output = out

}

// legSpec validates one [[leg]] and returns its LegSpec (nil on error).
func (p *Plan) legSpec(e *LegEntry, i int, c *checker) LegSpec {
	key := []string{"leg#" + strconv.Itoa(i)}
	sub := func(k string) []string { return append(append([]string{}, key...), k) }
	n0 := len(c.errs)
	kind, err := ParseLegKind(e.Kind)
	if err != nil {
		c.errs = append(c.errs, &PlanError{File: c.file, Line: c.lines.line(sub("kind")...), Key: displayKey(sub("kind")),
			Msg: fmt.Sprintf("leg kind %q (want cruise, boost or voyage)", e.Kind), Suggest: closest(e.Kind, legKindNames[:]), Err: ErrPlanValue})
		return nil
	}
	set := map[string]bool{}
	opt := func(name string, v *float64, lo, hi float64, loOpen bool) float64 {
		if v == nil {
			return 0
		}
		set[name] = true
		if c.num(*v, lo, hi, loOpen, sub(name)...) {
			return *v
		}
		return 0
	}
	var accel float64
	if e.AccelG != nil && e.Accel != nil {
		c.fail("give accel_g or accel, not both", key...)
	}
	if e.AccelG != nil {
		set["accel_g"] = true
		if *e.AccelG <= 0 && !math.IsNaN(*e.AccelG) {
			c.fail(fmt.Sprintf("acceleration %v g must be positive", *e.AccelG), sub("accel_g")...)
		} else if c.num(*e.AccelG, 0, 1e4, true, sub("accel_g")...) {
			accel = AccelFromG(*e.AccelG)
		}
	}
	if e.Accel != nil {
		set["accel"] = true
		if *e.Accel <= 0 && !math.IsNaN(*e.Accel) {
			c.fail(fmt.Sprintf("acceleration %v m/s² must be positive", *e.Accel), sub("accel")...)
		} else if c.num(*e.Accel, 0, 1e4*G0, true, sub("accel")...) {
			accel = *e.Accel
		}
	}
	ship := opt("ship_years", e.ShipYears, 0, 1e9, true)
	cat := opt("catalogue_years", e.CatalogueYears, 0, 1e9, true)
	dpc := opt("distance_pc", e.DistancePc, 0, 1e7, true)
	dly := opt("distance_ly", e.DistanceLy, 0, 1e7/LightYearPc, true)
	capB := opt("speed_cap", e.SpeedCap, 0, 1, true)
	if capB >= 1 {
		c.fail("speed cap must be below 1 (fraction of c)", sub("speed_cap")...)
	}
	capG := opt("gamma_cap", e.GammaCap, 1, 1e12, true)
	var speed *float64
	if e.Speed != nil {
		set["speed"] = true
		if c.num(*e.Speed, 0, 1, false, sub("speed")...) && *e.Speed < 1 {
			speed = e.Speed
		} else if *e.Speed >= 1 {
			c.fail("speed must be below 1 (fraction of c)", sub("speed")...)
		}
	}
	var from *r3.Vec
	if e.From != nil {
		set["from"] = true
		if v, ok := c.vec(e.From, 1e7, sub("from")...); ok {
			from = &v
		}
	}
	var to *r3.Vec
	if e.ToPosition != nil {
		set["to_position"] = true
		if v, ok := c.vec(e.ToPosition, 1e7, sub("to_position")...); ok {
			to = &v
		}
	}
	if e.ToStar != "" {
		set["to_star"] = true
		c.str(e.ToStar, sub("to_star")...)
	}
	standOff := -1.0 // the default
	if e.StandOffAU != nil {
		set["standoff_au"] = true
		if v := *e.StandOffAU; !(v > 0) && !math.IsNaN(v) {
			c.fail(fmt.Sprintf("stand-off %v au must be positive (the ship stops this far short of the destination)", v), sub("standoff_au")...)
		} else if c.num(v, 0, 1e12, true, sub("standoff_au")...) {
			standOff = v * AUPc
		}
	}
	dir, hasDir := c.heading(e.RA, e.Dec, key...)
	if hasDir {
		set["ra"], set["dec"] = true, true
	}
	allowed := map[LegKind][]string{
		LegCruise: {"ship_years", "catalogue_years", "distance_pc", "distance_ly", "speed", "ra", "dec", "from"},
		LegBoost:  {"accel_g", "accel", "ship_years", "catalogue_years", "ra", "dec", "from"},
		LegVoyage: {"accel_g", "accel", "to_star", "to_position", "standoff_au", "speed_cap", "gamma_cap", "from"},
	}[kind]
	for name := range set {
		ok := false
		for _, a := range allowed {
			ok = ok || a == name
		}
		if !ok {
			c.fail(fmt.Sprintf("does not apply to a %s leg (it takes %s)", kind, strings.Join(allowed, ", ")), sub(name)...)
		}
	}
	count := func(names ...string) int {
		n := 0
		for _, nm := range names {
			if set[nm] {
				n++
			}
		}
		return n
	}
	switch kind {
	case LegCruise:
		if count("ship_years", "catalogue_years", "distance_pc", "distance_ly") != 1 {
			c.fail("a cruise needs exactly one of ship_years, catalogue_years, distance_pc, distance_ly", key...)
		}
	case LegBoost:
		if count("accel_g", "accel") != 1 {
			c.fail("a boost needs accel_g or accel", key...)
		}
		if count("ship_years", "catalogue_years") != 1 {
			c.fail("a boost needs exactly one of ship_years, catalogue_years", key...)
		}
	case LegVoyage:
		if count("accel_g", "accel") != 1 {
			c.fail("a voyage needs accel_g or accel", key...)
		}
		if count("to_star", "to_position") != 1 {
			c.fail("a voyage needs exactly one of to_star, to_position", key...)
		}
		if count("speed_cap", "gamma_cap") > 1 {
			c.fail("give speed_cap or gamma_cap, not both", key...)
		}
		if set["to_star"] {
			p.needsStars = true
		}
	}
	if len(c.errs) > n0 {
		return nil
	}
	switch kind {
	case LegCruise:
		return CruiseSpec{ShipYears: ship, CatalogueYears: cat, Distance: dpc + dly*LightYearPc, Beta: speed, Dir: dir, From: from}
	case LegBoost:
		return BoostSpec{Accel: accel, Dir: dir, ShipYears: ship, CatalogueYears: cat, From: from}
	default:
		if standOff < 0 && e.ToStar == "" {
			standOff = 0 // a position: arrive at it
		}
		return VoyageSpec{Accel: accel, To: to, Star: e.ToStar, StandOff: standOff, BetaCap: capB, GammaCap: capG, From: from}
	}
}

// Bind builds the trajectory and resolves star look targets, looking star
// names up with resolve (which may be nil for plans that name no stars).
// Errors name the leg or key and its line.
//
// A voyage to a star without standoff_au stops at the star's default
// stand-off, from p.StandOff (StarsStandOff); without that function, or
// for a star it does not know, it arrives at the star's centre.
func (p *Plan) Bind(resolve Resolver) error {
	start, err := p.startState(resolve)
	if err != nil {
		return err
	}
	for i, sp := range p.specs {
		v, ok := sp.(VoyageSpec)
		if !ok || v.StandOff >= 0 || v.Star == "" {
			continue
		}
		so, ok := 0.0, false
		if p.StandOff != nil {
			so, ok = p.StandOff(v.Star)
		}
		if !ok {
			so = 0 // arrive at the star; an unknown one is reported below
		}
		v.StandOff = so
		p.specs[i] = v
	}
	tr, err := NewTrajectory(start, p.specs, resolve)
	if err != nil {
		pe := &PlanError{File: p.Name, Msg: err.Error(), Err: err}
		var le *LegError
		if errors.As(err, &le) {
			key := []string{"leg#" + strconv.Itoa(le.Leg-1)}
			pe.Line, pe.Key, pe.Msg = p.lines.line(key...), displayKey(key), strings.TrimPrefix(le.Err.Error(), "flight: ")
		}
		return pe
	}
	if err := p.bindStars(resolve); err != nil {
		return err
	}
	p.traj = tr
	return nil
}

func (p *Plan) startState(resolve Resolver) (State, error) {
	st := p.Start
	pos := r3.Vec{}
	if st.Position != nil {
		pos = r3.Vec{X: st.Position[0], Y: st.Position[1], Z: st.Position[2]}
	}
	if st.Star != "" {
		ok := false
		if resolve != nil {
			pos, ok = resolve(st.Star)
		}
		if !ok || !finiteVec(pos) {
			return State{}, &PlanError{File: p.Name, Line: p.lines.line("start", "star"), Key: "start.star",
				Msg: fmt.Sprintf("unknown star %q", st.Star), Err: ErrUnknownDestination}
		}
	}
	var hd r3.Vec
	if st.RA != nil && st.Dec != nil {
		hd = RADec(*st.RA, *st.Dec)
	}
	s, err := MovingAt(pos, hd, st.Speed)
	if err != nil {
		return State{}, &PlanError{File: p.Name, Line: p.lines.line("start"), Key: "start", Msg: err.Error(), Err: ErrPlanValue}
	}
	return s, nil
}

// frameFormat is a parsed frame-name pattern.
type frameFormat struct {
	prefix, suffix string
	width          int // zero-padded width; 0 for none
}

var framePlaceholder = regexp.MustCompile(`\{frame(?::0([1-9]))?\}`)

// parseFramePattern validates a frame-name pattern: relative, no "..", one
// {frame} or {frame:0N} placeholder, no other braces or control characters.
func parseFramePattern(s string) (frameFormat, error) {
	var ff frameFormat
	if strings.ContainsAny(s, "\\\x00") {
		return ff, fmt.Errorf("%q: use forward slashes and no NUL bytes", s)
	}
	for _, r := range s {
		if r < 0x20 {
			return ff, fmt.Errorf("%q holds a control character", s)
		}
	}
	if path.IsAbs(s) || (len(s) >= 2 && s[1] == ':') {
		return ff, fmt.Errorf("%q is absolute; frame names are relative to the output directory", s)
	}
	for _, part := range strings.Split(s, "/") {
		if part == ".." {
			return ff, fmt.Errorf("%q contains \"..\" and could escape the output directory", s)
		}
	}
	locs := framePlaceholder.FindAllStringSubmatchIndex(s, -1)
	if len(locs) != 1 {
		return ff, fmt.Errorf("%q needs exactly one {frame} or {frame:05}-style placeholder", s)
	}
	l := locs[0]
	ff.prefix, ff.suffix = s[:l[0]], s[l[1]:]
	if l[2] >= 0 {
		ff.width = int(s[l[2]] - '0')
	}
	if strings.ContainsAny(ff.prefix+ff.suffix, "{}") {
		return ff, fmt.Errorf("%q has braces other than the {frame} placeholder", s)
	}
	if strings.HasSuffix(s, "/") || path.Base(s) == "." {
		return ff, fmt.Errorf("%q does not name a file", s)
	}
	return ff, nil
}

// FrameName returns the file name of frame i relative to the output
// directory (slash-separated), with the extension of its last element
// replaced by ext (such as ".fits") when ext is not empty: for
// "{frame:05}/img.png" that is 00000/img.fits. Names of different
// extensions can still coincide ("frames/{frame}.json" names the PNG
// 00000.json, the sidecar's name); callers check the set of names a frame
// writes.
func (p *Plan) FrameName(i int, ext string) string {
	ff := p.frameFmt
	name := ff.prefix + fmt.Sprintf("%0*d", ff.width, i) + ff.suffix
	if ext != "" {
		name = strings.TrimSuffix(name, path.Ext(name)) + ext
	}
	return name
}
