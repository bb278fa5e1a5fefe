package flight

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"math"
	"os"
	"reflect"
	"strconv"
	"strings"
	"testing"

	"github.com/skyframe/skyframe/catalog"
	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/spatial/r3"
)

func readPlan(t *testing.T, name string) []byte {
	t.Helper()
	b, err := os.ReadFile("../testdata/plans/" + name)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

func TestParseExamplePlan(t *testing.T) {
	p, err := ParsePlan(readPlan(t, "voyage.toml"), "voyage.toml")
	if err != nil {
		t.Fatal(err)
	}
	// 24 fps × (1 + 20 + 2) s.
	if p.Frames() != 24*23 {
		t.Errorf("frames: have %d, want %d", p.Frames(), 24*23)
	}
	first, _ := p.FrameState(0)
	fly0, _ := p.FrameState(24)
	last, _ := p.FrameState(24 + 480 - 1)
	end, _ := p.FrameState(p.Frames() - 1)
	if first.Phase != PhaseHoldStart || fly0.Phase != PhaseFlight || end.Phase != PhaseHoldEnd {
		t.Errorf("phases %v %v %v", first.Phase, fly0.Phase, end.Phase)
	}
	if fly0.State != first.State || last.State != end.State {
		t.Errorf("flight frames must start at the start state and end at arrival")
	}
	if end.State.Pos != (r3.Vec{X: 1.5}) || end.State.Beta != 0 {
		t.Errorf("arrival: %+v", end.State)
	}
	// Ship-time spacing: equal steps in τ.
	a, _ := p.FrameState(100)
	b, _ := p.FrameState(101)
	c, _ := p.FrameState(102)
	if !scalar.EqualWithinRel(b.State.Tau-a.State.Tau, c.State.Tau-b.State.Tau, 1e-9) {
		t.Errorf("uneven ship-time steps: %v, %v", b.State.Tau-a.State.Tau, c.State.Tau-b.State.Tau)
	}
	// Look keys: "behind" from 8 s, interpolating toward RA/Dec by 14 s.
	at8, _ := p.FrameState(8 * 24)
	if at8.Look.Look != "behind" || r3.Dot(at8.LookDir, at8.State.Dir) > -1+1e-12 {
		t.Errorf("at 8 s look %q dir %v, ship dir %v", at8.Look.Look, at8.LookDir, at8.State.Dir)
	}
	at14, _ := p.FrameState(14 * 24)
	if want := RADec(219.9, -60.8); r3.Norm(r3.Sub(at14.LookDir, want)) > 1e-12 {
		t.Errorf("at 14 s look dir %v, want %v", at14.LookDir, want)
	}
	// Determinism: the same index gives the same state.
	again, _ := p.FrameState(101)
	if !reflect.DeepEqual(again, b) {
		t.Errorf("FrameState not deterministic")
	}
	if p.FrameName(7, "") != "frames/00007.png" || p.FrameName(7, ".fits") != "frames/00007.fits" {
		t.Errorf("frame names %q %q", p.FrameName(7, ""), p.FrameName(7, ".fits"))
	}
	if _, err := p.FrameState(p.Frames()); !errors.Is(err, ErrRange) {
		t.Errorf("frame past the end: %v", err)
	}
}

func TestPlanHashStable(t *testing.T) {
	a := `
[[leg]]
kind = "cruise"   # comment
ship_years = 1.0
[show]
seconds = 5
fps = 30
[camera]
width = 320
height = 200
`
	b := `[camera]
height=200
width=320

[show]
fps=30.0
seconds=5

[[leg]]
ship_years=1
kind="cruise"
`
	c := strings.Replace(a, "seconds = 5", "seconds = 6", 1)
	pa, err := ParsePlan([]byte(a), "a")
	if err != nil {
		t.Fatal(err)
	}
	pb, err := ParsePlan([]byte(b), "b")
	if err != nil {
		t.Fatal(err)
	}
	pc, err := ParsePlan([]byte(c), "c")
	if err != nil {
		t.Fatal(err)
	}
	if pa.Hash() != pb.Hash() {
		t.Errorf("same plan, different layout: %s vs %s", pa.Hash(), pb.Hash())
	}
	if pa.Hash() == pc.Hash() {
		t.Errorf("different plans share a hash")
	}
	if len(pa.Hash()) != 64 {
		t.Errorf("hash %q is not hex SHA-256", pa.Hash())
	}
}

func TestPlanErrors(t *testing.T) {
	base := "[[leg]]\nkind = \"cruise\"\nship_years = 1\n[show]\nseconds = 5\n"
	for _, c := range []struct {
		name, src       string
		want            error
		line            int
		key, suggestion string
	}{
		{"unknown key in table", base + "[camera]\nwidht = 100\n", ErrUnknownKey, 7, "camera.widht", "camera.width"},
		{"unknown key in leg", "[[leg]]\nkind = \"boost\"\nacel_g = 1\nship_years = 1\n[show]\nseconds = 5\n", ErrUnknownKey, 3, "leg.acel_g", "leg.accel_g"},
		{"unknown table", base + "[camra]\nwidth = 100\n", ErrUnknownKey, 6, "camra", "camera"},
		{"unknown column", base + "[catalogue.columns]\nvmg = \"Vmag\"\n", ErrUnknownKey, 7, "catalogue.columns.vmg", "catalogue.columns.vmag"},
		{"Gaia column", base + "[catalogue]\npath = \"t.csv\"\n[catalogue.columns]\nvmag = \"V\"\ng = \"G\"\n", ErrPlanValue, 10, "catalogue.columns.g", ""},
		{"empty column", base + "[catalogue.columns]\nvmag = \"\"\n", ErrPlanValue, 7, "catalogue.columns.vmag", ""},
		{"NaN", base + "[camera]\nfov = nan\n", ErrPlanValue, 7, "camera.fov", ""},
		{"Inf", strings.Replace(base, "seconds = 5", "seconds = inf", 1), ErrPlanValue, 5, "show.seconds", ""},
		{"absurd size", base + "[camera]\nwidth = 100000\nheight = 10\n", ErrPlanValue, 7, "camera.width", ""},
		{"bad kind", "[[leg]]\nkind = \"cruize\"\nship_years = 1\n[show]\nseconds = 5\n", ErrPlanValue, 2, "leg[0].kind", "cruise"},
		{"second leg field", base + "[[leg]]\nkind = \"voyage\"\naccel_g = 1\nto_position = [1,0,0]\nship_years = 2\n", ErrPlanValue, 10, "leg[1].ship_years", ""},
		{"escape", base + "[output]\nframes = \"../x/{frame:05}.png\"\n", ErrPlanValue, 7, "output.frames", ""},
		{"absolute", base + "[output]\nframes = \"/tmp/{frame}.png\"\n", ErrPlanValue, 7, "output.frames", ""},
		{"no placeholder", base + "[output]\nframes = \"frame.png\"\n", ErrPlanValue, 7, "output.frames", ""},
		{"overlay type", base + "[overlays]\ngrid = 3\n", ErrPlanValue, 7, "overlays.grid", ""},
		{"syntax", base + "[camera]\nwidth = = 3\n", ErrPlanSyntax, 7, "", ""},
		{"deep", base + "x = [[[[[[[1]]]]]]]\n", ErrPlanTooDeep, 6, "", ""},
		{"speed cap c", "[[leg]]\nkind = \"voyage\"\naccel_g = 1\nto_position = [1,0,0]\nspeed_cap = 1.0\n[show]\nseconds = 5\n", ErrPlanValue, 5, "leg[0].speed_cap", ""},
		{"wrong type", strings.Replace(base, "ship_years = 1", "ship_years = \"one\"", 1), ErrPlanValue, 3, "leg.ship_years", ""},
		{"look order", base + "[[camera.look]]\nat = 2\n[[camera.look]]\nat = 1\n", ErrPlanValue, 9, "camera.look[1].at", ""},
	} {
		_, err := ParsePlan([]byte(c.src), "t.toml")
		if !errors.Is(err, c.want) {
			t.Errorf("%s: have %v, want %v", c.name, err, c.want)
			continue
		}
		var pe *PlanError
		if !errors.As(err, &pe) {
			t.Errorf("%s: %v is not a *PlanError", c.name, err)
			continue
		}
		if pe.Line != c.line || pe.Key != c.key || pe.Suggest != c.suggestion {
			t.Errorf("%s: have line %d key %q suggestion %q, want %d %q %q (%v)", c.name, pe.Line, pe.Key, pe.Suggest, c.line, c.key, c.suggestion, err)
		}
		if !strings.Contains(err.Error(), "t.toml:"+strconv.Itoa(c.line)) {
			t.Errorf("%s: message %q lacks file:line", c.name, err)
		}
	}
}

func TestBrokenPlanFiles(t *testing.T) {
	for _, c := range []struct {
		file string
		want []string
	}{
		{"bad_unknown_key.toml", []string{"bad_unknown_key.toml:12", "camera.lok", `did you mean "camera.look"`}},
		{"bad_legs.toml", []string{"bad_legs.toml:5: leg[0].accel_g", "bad_legs.toml:7: leg[0].speed_cap", "bad_legs.toml:9: leg[1]"}},
		{"bad_frames_escape.toml", []string{"bad_frames_escape.toml:10: output.frames", `".."`}},
	} {
		_, err := ParsePlan(readPlan(t, c.file), c.file)
		if err == nil {
			t.Errorf("%s: accepted", c.file)
			continue
		}
		for _, w := range c.want {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("%s: error %q lacks %q", c.file, err, w)
			}
		}
	}
}

func TestFramePatterns(t *testing.T) {
	for _, c := range []struct {
		pat string
		ok  bool
	}{
		{"frames/{frame:05}.png", true},
		{"{frame}.png", true},
		{"a/b/f{frame:03}", true},
		{"../{frame}.png", false},
		{"a/../../{frame}.png", false},
		{"/abs/{frame}.png", false},
		{"C:/x/{frame}.png", false},
		{`a\{frame}.png`, false},
		{"{frame}{frame}.png", false},
		{"{frame:5}.png", false},
		{"{frame}/", false},
		{"x{y}{frame}.png", false},
	} {
		_, err := parseFramePattern(c.pat)
		if (err == nil) != c.ok {
			t.Errorf("%q: have error %v, want ok=%v", c.pat, err, c.ok)
		}
	}
}

func TestBindStars(t *testing.T) {
	src := `
[start]
star = "Home"
[[leg]]
kind = "voyage"
accel_g = 1
to_star = "Far"
[show]
seconds = 2
fps = 10
[[camera.look]]
look = "Far"
`
	p, err := ParsePlan([]byte(src), "s.toml")
	if err != nil {
		t.Fatal(err)
	}
	if !p.NeedsResolver() {
		t.Fatal("plan naming stars must need a resolver")
	}
	if _, err := p.FrameState(0); !errors.Is(err, ErrUnbound) {
		t.Errorf("unbound FrameState: %v", err)
	}
	stars := map[string]r3.Vec{"Home": {X: 1}, "Far": {X: 1, Y: 2}}
	res := func(n string) (r3.Vec, bool) { v, ok := stars[n]; return v, ok }
	if err := p.Bind(func(string) (r3.Vec, bool) { return r3.Vec{}, false }); !errors.Is(err, ErrUnknownDestination) {
		t.Errorf("unknown star: %v", err)
	}
	if err := p.Bind(res); err != nil {
		t.Fatal(err)
	}
	fs, _ := p.FrameState(0)
	if fs.State.Pos != (r3.Vec{X: 1}) || r3.Norm(r3.Sub(fs.LookDir, r3.Vec{Y: 1})) > 1e-15 {
		t.Errorf("start %v look %v", fs.State.Pos, fs.LookDir)
	}
	if e := p.Trajectory().End(); e.Pos != (r3.Vec{X: 1, Y: 2}) {
		t.Errorf("end %v", e.Pos)
	}
}

// The dry-run table at β = 0.6 [cp]: γ = 1.25, Doppler ahead 2, behind 0.5;
// home straight behind ticks at 0.5 per second, the destination ahead at 2.
func TestDryRunCSV(t *testing.T) {
	src := `
[start]
speed = 0.6
ra = 0
dec = 0
[[leg]]
kind = "cruise"
distance_ly = 4
[show]
seconds = 1
fps = 5
`
	p, err := ParsePlan([]byte(src), "d.toml")
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := WriteDryRunCSV(&buf, p, Range{1, 3}); err != nil {
		t.Fatal(err)
	}
	rows, err := csv.NewReader(&buf).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if strings.Join(rows[0], ",") != "frame,tau_yr,t_yr,beta,gamma,x_pc,y_pc,z_pc,doppler_ahead,doppler_behind,rate_home,rate_dest,camera_deg_s,centre_px_frame" {
		t.Fatalf("header %v", rows[0])
	}
	if len(rows) != 4 {
		t.Fatalf("have %d rows, want header + 3", len(rows))
	}
	want := map[string]float64{"beta": 0.6, "gamma": 1.25, "doppler_ahead": 2, "doppler_behind": 0.5, "rate_home": 0.5, "rate_dest": 2}
	for _, r := range rows[1:] {
		for col, w := range want {
			j := -1
			for k, n := range rows[0] {
				if n == col {
					j = k
				}
			}
			v, err := strconv.ParseFloat(r[j], 64)
			if err != nil || !scalar.EqualWithinRel(v, w, 1e-9) {
				t.Errorf("frame %s %s: have %s, want %v", r[0], col, r[j], w)
			}
		}
	}
	// Catalogue time over the whole flight is 4/0.6 yr [cp].
	if e := p.Trajectory().End(); !scalar.EqualWithinRel(e.T, 4/0.6, 1e-12) {
		t.Errorf("t = %v, want %v", e.T, 4/0.6)
	}
}

func TestStarsResolver(t *testing.T) {
	stars := &catalog.Stars{ID: []int64{1, 2}, X: []float32{0, 1}, Y: []float32{1, 0}, Z: []float32{0, 0},
		Dist: []float32{2, float32(math.Inf(1))}}
	find := func(s string) (int, bool) {
		switch s {
		case "near":
			return 0, true
		case "far":
			return 1, true
		}
		return 0, false
	}
	r := StarsResolver(stars, find)
	if p, ok := r("near"); !ok || p != (r3.Vec{Y: 2}) {
		t.Errorf("near: have %v %v, want (0,2,0) true", p, ok)
	}
	if _, ok := r("far"); ok {
		t.Errorf("a star at unknown distance must not resolve")
	}
	if _, ok := r("none"); ok {
		t.Errorf("unknown name resolved")
	}
}

func TestCatalogueSpacing(t *testing.T) {
	src := `
[[leg]]
kind = "voyage"
accel_g = 1
to_position = [0, 0, 2]
[show]
seconds = 2
fps = 10
spacing = "catalogue"
`
	p, err := ParsePlan([]byte(src), "c.toml")
	if err != nil {
		t.Fatal(err)
	}
	end := p.Trajectory().End()
	for _, i := range []int{0, 5, 11, 19} {
		fs, err := p.FrameState(i)
		if err != nil {
			t.Fatal(err)
		}
		want := end.T * float64(i) / 19
		if !scalar.EqualWithinAbs(fs.State.T, want, 1e-12*end.T) {
			t.Errorf("frame %d: t = %v, want %v (even catalogue-time steps)", i, fs.State.T, want)
		}
	}
}

// ParsePlan must return errors, never panic, on any input.
func FuzzParsePlan(f *testing.F) {
	for _, name := range []string{"voyage.toml", "bad_unknown_key.toml", "bad_legs.toml", "bad_frames_escape.toml"} {
		b, err := os.ReadFile("../testdata/plans/" + name)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
	}
	f.Add([]byte("a.b.c.d.e.f.g.h = 1\n"))
	f.Add([]byte("[[leg]]\nkind='boost'\naccel=1e300\nship_years=1e9\nra=0\ndec=0\n[show]\nseconds=1\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		p, err := ParsePlan(data, "fuzz.toml")
		if err != nil || p == nil {
			return
		}
		_ = p.Hash()
		if p.Trajectory() != nil && p.Frames() > 0 {
			if _, err := p.FrameState(p.Frames() - 1); err != nil {
				t.Fatalf("last frame: %v", err)
			}
		}
	})
}

// The plan's [catalogue.columns] is parsed by catalog.ColumnMap.Set, the
// parser of --column: dist and its alias distance both work, and a Gaia
// column is refused at parse time with the catalogue's own message.
func TestPlanColumns(t *testing.T) {
	base := "[catalogue]\npath = \"t.csv\"\n[catalogue.columns]\n%s\n[[leg]]\nkind = \"cruise\"\nship_years = 1\n[show]\nseconds = 5\n"
	for _, c := range []struct {
		cols string
		want catalog.ColumnMap
	}{
		{"dist = \"D\"\nvmag = \"V\"", catalog.ColumnMap{Dist: "D", Vmag: "V"}},
		{"distance = \"D\"", catalog.ColumnMap{Dist: "D"}},
		{"plx = \"p\"\nra_hours = \"true\"", catalog.ColumnMap{Parallax: "p", RAHours: true}},
	} {
		p, err := ParsePlan([]byte(fmt.Sprintf(base, c.cols)), "t.toml")
		if err != nil {
			t.Errorf("%q: %v", c.cols, err)
			continue
		}
		if p.Catalogue.ColumnMap != c.want {
			t.Errorf("%q: have %+v, want %+v", c.cols, p.Catalogue.ColumnMap, c.want)
		}
	}
	_, err := ParsePlan([]byte(fmt.Sprintf(base, "g = \"G\"")), "t.toml")
	if err == nil || !strings.Contains(err.Error(), catalog.ErrGaiaColumn.Error()) {
		t.Errorf("g column: %v, want the catalogue's message %q", err, catalog.ErrGaiaColumn)
	}
}

// TestPlanFOVFollowsProjection: a plan's field of view is checked against
// the range of the projection the same plan names, whatever the order of
// its keys — the documented defaults are 60° pinhole and 180° fisheye
// (frameopt.Defs), so `projection = "fisheye"` with `fov = 180` is valid.
// Before the fix each value was checked as it was stored, keys in
// alphabetical order, so fov met the default pinhole projection and a
// fisheye plan of 180° was refused with the pinhole range. Genuine errors
// still name file, line and key, with the range of the plan's projection.
func TestPlanFOVFollowsProjection(t *testing.T) {
	base := "[[leg]]\nkind = \"cruise\"\nship_years = 1\n[show]\nseconds = 5\n"
	for _, c := range []struct {
		name, camera string
		fovs         []float64 // per frame key: the fov the plan resolves (base key when no keys)
		line         int       // of the error, 0 when valid
		key, msg     string
	}{
		{"fisheye 180", "projection = \"fisheye\"\nfov = 180\nsize = \"256x256\"\n", []float64{180}, 0, "", ""},
		{"fisheye 180, fov first", "fov = 180\nprojection = \"fisheye\"\n", []float64{180}, 0, "", ""},
		{"fisheye 360", "projection = \"fisheye\"\nfov = 360\n", []float64{360}, 0, "", ""},
		{"fisheye keys", "projection = \"fisheye\"\nfov = 180\n[[camera.look]]\nat = 0\nfov = 200\n[[camera.look]]\nat = 1\nfov = 180\n", []float64{200, 180}, 0, "", ""},
		{"fisheye too wide", "projection = \"fisheye\"\nfov = 400\n", nil, 8, "camera.fov", "for fisheye"},
		{"fisheye key too wide", "projection = \"fisheye\"\n[[camera.look]]\nat = 0\nfov = 400\n", nil, 10, "camera.look[0].fov", "for fisheye"},
		{"pinhole 180", "projection = \"pinhole\"\nfov = 180\n", nil, 8, "camera.fov", "for pinhole"},
		{"default pinhole 180", "fov = 180\n", nil, 7, "camera.fov", "for pinhole"},
	} {
		p, err := ParsePlan([]byte(base+"[camera]\n"+c.camera), "t.toml")
		if c.line == 0 {
			if err != nil {
				t.Errorf("%s: %v", c.name, err)
				continue
			}
			var got []float64
			for _, k := range p.looks {
				got = append(got, k.fov)
			}
			if !reflect.DeepEqual(got, c.fovs) {
				t.Errorf("%s: key fovs %v, want %v", c.name, got, c.fovs)
			}
			continue
		}
		var pe *PlanError
		if !errors.As(err, &pe) || !errors.Is(err, ErrPlanValue) {
			t.Errorf("%s: have %v, want a *PlanError", c.name, err)
			continue
		}
		if pe.Line != c.line || pe.Key != c.key || !strings.Contains(pe.Msg, c.msg) || !strings.Contains(err.Error(), "t.toml:"+strconv.Itoa(c.line)) {
			t.Errorf("%s: have %v (line %d key %q), want line %d key %q saying %q", c.name, err, pe.Line, pe.Key, c.line, c.key, c.msg)
		}
	}
}
