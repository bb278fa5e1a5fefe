package main

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// Hostile input at the command level: every case runs the command
// in-process, must exit with status 2 (usage or input error, as --help
// documents), must name the file, line, field or flag at fault, and must
// leave nothing behind in the output directory (no image, no sidecar, no
// temporary file).

// hostileFixtures is the repository's catalogue fixture directory.
const hostileFixtures = "../../testdata/catalogs"

// hostileRun runs skyframe in-process and returns its exit status and stderr.
func hostileRun(t *testing.T, args ...string) (int, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(context.Background(), args, &out, &errb)
	return code, errb.String()
}

// hostileExpect checks the status, that the message names every want, and
// that dir holds exactly the entries in keep (names relative to dir).
func hostileExpect(t *testing.T, code int, msg string, want []string, dir string, keep ...string) {
	t.Helper()
	if code != exitUsage {
		t.Errorf("status %d, want %d (usage or input error)\nstderr: %s", code, exitUsage, msg)
	}
	for _, w := range want {
		if !strings.Contains(msg, w) {
			t.Errorf("message %q lacks %q", strings.TrimSpace(msg), w)
		}
	}
	allowed := map[string]bool{".": true}
	for _, k := range keep {
		allowed[filepath.Clean(k)] = true
	}
	filepath.WalkDir(dir, func(p string, d os.DirEntry, err error) error {
		if err != nil {
			return nil
		}
		rel, _ := filepath.Rel(dir, p)
		if !allowed[rel] {
			t.Errorf("left behind: %s", rel)
		}
		return nil
	})
}

// hostileFile writes body to dir/name and returns its path.
func hostileFile(t *testing.T, dir, name string, body []byte) string {
	t.Helper()
	p := filepath.Join(dir, name)
	if err := os.WriteFile(p, body, 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// hostileSparse writes head and extends the file to size bytes with a hole
// (reads as NULs; costs no disk).
func hostileSparse(t *testing.T, dir, name string, head []byte, size int64) string {
	t.Helper()
	p := filepath.Join(dir, name)
	f, err := os.Create(p)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := f.Write(head); err != nil {
		t.Fatal(err)
	}
	if err := f.Truncate(size); err != nil {
		f.Close()
		t.Skipf("cannot make a %d-byte sparse file here: %v", size, err)
	}
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}
	return p
}

// hostileReplace returns fixture name with line lineNo (1-based) edited by
// edit, which must change it.
func hostileReplace(t *testing.T, name string, lineNo int, edit func(string) string) []byte {
	t.Helper()
	b, err := os.ReadFile(filepath.Join(hostileFixtures, name))
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(string(b), "\n")
	old := lines[lineNo-1]
	lines[lineNo-1] = edit(old)
	if lines[lineNo-1] == old {
		t.Fatalf("%s:%d: edit changed nothing", name, lineNo)
	}
	return []byte(strings.Join(lines, "\n"))
}

// splice replaces the 1-based byte columns [from, to] of a fixed-width
// record by v, right-aligned (the CDS byte-by-byte convention).
func splice(line string, from, to int, v string) string {
	w := to - from + 1
	return line[:from-1] + strings.Repeat(" ", w-len(v)) + v + line[to:]
}

// field replaces the i-th (0-based) sep-separated field of a record.
func field(line, sep string, i int, v string) string {
	p := strings.Split(line, sep)
	p[i] = v
	return strings.Join(p, sep)
}

// stillIn returns the arguments of a tiny still render into dir/out.
func stillIn(dir string, extra ...string) []string {
	return append([]string{"still", "--size", "16x16", "-o", filepath.Join(dir, "out", "x.png")}, extra...)
}

// TestHostileCatalogues feeds hostile catalogues to "still --catalog".
func TestHostileCatalogues(t *testing.T) {
	type hcase struct {
		name string
		make func(t *testing.T, dir string) string // writes the catalogue, returns its path
		want []string
		fast time.Duration // the read must give up within this (0: no bound)
	}
	fixture := func(name string) func(*testing.T, string) string {
		return func(*testing.T, string) string { return filepath.Join(hostileFixtures, name) }
	}
	edited := func(out, fix string, line int, edit func(string) string) func(*testing.T, string) string {
		return func(t *testing.T, dir string) string {
			return hostileFile(t, dir, out, hostileReplace(t, fix, line, edit))
		}
	}
	cases := []hcase{
		// A 2 GiB file whose second "line" is 2 GiB of NULs with no newline:
		// the reader must stop at the 1 MiB line limit, not read 2 GiB.
		{"2 GiB sparse line", func(t *testing.T, dir string) string {
			return hostileSparse(t, dir, "huge.csv", []byte("id,ra,dec,vmag\n"), 2<<30)
		}, []string{"huge.csv:2:", "line too long"}, 5 * time.Second},
		// The same size with no header at all: nothing to sniff.
		{"2 GiB of NULs", func(t *testing.T, dir string) string {
			return hostileSparse(t, dir, "nul.dat", nil, 2<<30)
		}, []string{"nul.dat:1:", "unknown catalogue format"}, 5 * time.Second},
		{"3 MiB line after a good row", func(t *testing.T, dir string) string {
			body := "id,ra,dec,vmag\n1,10,20,3\n2," + strings.Repeat("1", 3<<20) + ",5,4\n"
			return hostileFile(t, dir, "long.csv", []byte(body))
		}, []string{"long.csv:3:", "line too long", "1048576"}, 5 * time.Second},
		{"3 MiB of spaces, no newline", func(t *testing.T, dir string) string {
			return hostileFile(t, dir, "spaces.csv", append([]byte("id,ra,dec,vmag\n"), bytes.Repeat([]byte{' '}, 3<<20)...))
		}, []string{"spaces.csv:2:", "line too long"}, 5 * time.Second},
		// 32 KiB that inflate to 16 MiB (testdata/catalogs/README.md).
		{"gzip bomb", fixture("bomb.csv.gz"), []string{"bomb.csv.gz:", "decompressed data too large", "ratio"}, 0},
		{"declared 1e9 rows (Gaia)", fixture("gaia_rows_bomb.csv"), []string{"gaia_rows_bomb.csv:1:", "rows", "1000000000"}, 0},
		{"declared 1e9 rows (CSV)", func(t *testing.T, dir string) string {
			return hostileFile(t, dir, "rows.csv", []byte("# rows: 1000000000\nid,ra,dec,vmag\n1,10,20,3\n"))
		}, []string{"rows.csv:1:", "too many rows", "1000000000"}, 0},
		// NaN and infinities in numeric fields, per format. Byte columns
		// from the CDS ReadMe files the fixtures follow (README there).
		{"BSC5 Vmag NaN", edited("nan.dat", "bsc5_good.dat", 1, func(l string) string { return splice(l, 103, 107, "NaN") }),
			[]string{"nan.dat:1:", "Vmag"}, 0},
		{"BSC5 Parallax Inf", edited("inf.dat", "bsc5_good.dat", 1, func(l string) string { return splice(l, 162, 166, "+Inf") }),
			[]string{"inf.dat:1:", "Parallax"}, 0},
		{"hip_main Vmag NaN", edited("nan.dat", "hip_main_good.dat", 1, func(l string) string { return field(l, "|", 5, "  NaN") }),
			[]string{"nan.dat:1:", "Vmag"}, 0},
		{"hip_main Plx -Inf", edited("inf.dat", "hip_main_good.dat", 1, func(l string) string { return field(l, "|", 11, "   -Inf") }),
			[]string{"inf.dat:1:", "Plx"}, 0},
		{"hip2 Plx NaN", edited("nan.dat", "hip2_good.dat", 1, func(l string) string { return splice(l, 44, 50, "NaN") }),
			[]string{"nan.dat:1:", "Plx"}, 0},
		{"hip2 Hpmag Inf", edited("inf.dat", "hip2_good.dat", 1, func(l string) string { return splice(l, 130, 136, "Inf") }),
			[]string{"inf.dat:1:", "Hpmag"}, 0},
		{"Gaia bp_rp NaN (fixture)", fixture("gaia_bad.csv"), []string{"gaia_bad.csv:3:", "bp_rp", "NaN"}, 0},
		{"Gaia ra Inf", edited("inf.csv", "gaia_good.csv", 3, func(l string) string { return field(l, ",", 1, "inf") }),
			[]string{"inf.csv:3:", "ra"}, 0},
		{"Gaia parallax NaN", edited("nan.csv", "gaia_good.csv", 3, func(l string) string { return field(l, ",", 3, "NaN") }),
			[]string{"nan.csv:3:", "parallax"}, 0},
		{"CSV vmag NaN", func(t *testing.T, dir string) string {
			return hostileFile(t, dir, "nan.csv", []byte("id,ra,dec,vmag\n1,10,20,3\n2,11,21,NaN\n"))
		}, []string{"nan.csv:3:", "vmag"}, 0},
		{"TSV dec -Inf", edited("inf.tsv", "generic_good.tsv", 2, func(l string) string { return field(l, "\t", 1, "-Inf") }),
			[]string{"inf.tsv:2:", "dec"}, 0},
		{"TSV not a number (fixture)", fixture("generic_bad.tsv"), []string{"generic_bad.tsv:", "dec", "minus30"}, 0},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			if err := os.Mkdir(filepath.Join(dir, "out"), 0o755); err != nil {
				t.Fatal(err)
			}
			cat := c.make(t, dir)
			keep := []string{"out"}
			if rel, err := filepath.Rel(dir, cat); err == nil && !strings.HasPrefix(rel, "..") {
				keep = append(keep, rel)
			}
			start := time.Now()
			code, msg := hostileRun(t, stillIn(dir, "--catalog", cat)...)
			took := time.Since(start)
			hostileExpect(t, code, msg, append([]string{"catalog:"}, c.want...), dir, keep...)
			if c.fast > 0 && took > c.fast {
				t.Errorf("took %v to refuse (bound %v): the reader reads too far", took, c.fast)
			}
		})
	}

	// "catalog pack" must not leave a cache file behind either.
	t.Run("pack a gzip bomb", func(t *testing.T) {
		dir := t.TempDir()
		code, msg := hostileRun(t, "catalog", "pack", filepath.Join(hostileFixtures, "bomb.csv.gz"), "-o", filepath.Join(dir, "x.skyc"))
		hostileExpect(t, code, msg, []string{"bomb.csv.gz:", "decompressed data too large"}, dir)
	})
}

// TestHostileStillFlags: flags out of their domain or not finite.
func TestHostileStillFlags(t *testing.T) {
	cases := []struct {
		args []string
		want []string
	}{
		{[]string{"--speed", "NaN"}, []string{"--speed", "0 ≤ β < 1"}},
		{[]string{"--speed", "1"}, []string{"--speed 1", "0 ≤ β < 1"}},
		{[]string{"--speed", "-0.1"}, []string{"--speed"}},
		{[]string{"--gamma", "Inf"}, []string{"--gamma"}},
		{[]string{"--gamma", "0.5"}, []string{"--gamma", "γ ≥ 1"}},
		{[]string{"--rapidity", "NaN"}, []string{"--rapidity"}},
		{[]string{"--speed", "0.5", "--gamma", "2"}, []string{"only one of"}},
		{[]string{"--fov", "Inf"}, []string{"--fov", "finite"}},
		{[]string{"--fov", "-Inf"}, []string{"--fov", "finite"}},
		{[]string{"--fov", "200"}, []string{"--fov", "200", "pinhole"}},
		{[]string{"--exposure", "NaN"}, []string{"--exposure", "finite"}},
		{[]string{"--fwhm", "NaN"}, []string{"--fwhm"}},
		{[]string{"--fwhm", "0"}, []string{"--fwhm"}},
		{[]string{"--roll", "Inf"}, []string{"--roll"}},
		{[]string{"--tilt", "NaN"}, []string{"--tilt"}},
		{[]string{"--limit", "Inf"}, []string{"--limit"}},
		{[]string{"--toward", "NaN,0"}, []string{"--toward"}},
		{[]string{"--toward", "10,95"}, []string{"--toward", "declination"}},
		{[]string{"--position", "Inf,0,0"}, []string{"--position"}},
		{[]string{"--look", "NaN,3"}, []string{"--look"}},
		{[]string{"--up", "0,Inf"}, []string{"--up", "finite"}},
		{[]string{"--epoch", "NaN"}, []string{"--epoch"}},
		{[]string{"--size", "0x10"}, []string{"--size", "0x10"}},
		{[]string{"--size", "40000x10"}, []string{"--size", "40000x10"}},
		{[]string{"--size", "-5x10"}, []string{"--size"}},
		{[]string{"--size", "10"}, []string{"--size", "WIDTHxHEIGHT"}},
		{[]string{"--projection", "bogus"}, []string{"--projection", "bogus"}},
		{[]string{"--depth", "0"}, []string{"--depth"}},
		{[]string{"--tone", "bogus"}, []string{"--tone"}},
		{[]string{"--white", "bogus"}, []string{"--white"}},
		{[]string{"--beaming", "bogus"}, []string{"--beaming"}},
		{[]string{"--catalog-format", "bogus"}, []string{"--catalog-format"}},
		{[]string{"--no-such-flag"}, []string{"no-such-flag"}},
	}
	for _, c := range cases {
		t.Run(strings.Join(c.args, " "), func(t *testing.T) {
			dir := t.TempDir()
			if err := os.Mkdir(filepath.Join(dir, "out"), 0o755); err != nil {
				t.Fatal(err)
			}
			code, msg := hostileRun(t, stillIn(dir, c.args...)...)
			hostileExpect(t, code, msg, c.want, dir, "out")
		})
	}
	// The same frame with sane flags is written, so the cases above fail
	// for the reason they name and not for something common to all.
	t.Run("control", func(t *testing.T) {
		dir := t.TempDir()
		os.Mkdir(filepath.Join(dir, "out"), 0o755)
		if code, msg := hostileRun(t, stillIn(dir)...); code != exitOK {
			t.Fatalf("control render: status %d\n%s", code, msg)
		}
		if _, err := os.Stat(filepath.Join(dir, "out", "x.png")); err != nil {
			t.Fatal(err)
		}
	})
}

// TestHostileStillOutput: output paths that cannot be written are refused
// before anything is rendered.
func TestHostileStillOutput(t *testing.T) {
	t.Run("missing directory", func(t *testing.T) {
		code, msg := hostileRun(t, "still", "--size", "16x16", "-o", "/nonexistent/dir/x.png")
		hostileExpect(t, code, msg, []string{"--output", "/nonexistent/dir"}, t.TempDir())
		if _, err := os.Stat("/nonexistent"); !os.IsNotExist(err) {
			t.Errorf("/nonexistent was created (%v)", err)
		}
	})
	t.Run("parent is a file", func(t *testing.T) {
		// Unwritable even for root, unlike a read-only directory.
		dir := t.TempDir()
		hostileFile(t, dir, "plain", []byte("x"))
		code, msg := hostileRun(t, "still", "--size", "16x16", "-o", filepath.Join(dir, "plain", "x.png"))
		hostileExpect(t, code, msg, []string{"--output", "plain"}, dir, "plain")
	})
	t.Run("FITS in a missing directory", func(t *testing.T) {
		dir := t.TempDir()
		code, msg := hostileRun(t, "still", "--size", "16x16", "-o", filepath.Join(dir, "x.png"), "--fits", filepath.Join(dir, "no", "x.fits"))
		hostileExpect(t, code, msg, []string{"--fits"}, dir)
	})
	t.Run("sidecar is the PNG", func(t *testing.T) {
		dir := t.TempDir()
		p := filepath.Join(dir, "x.png")
		code, msg := hostileRun(t, "still", "--size", "16x16", "-o", p, "--sidecar", p)
		hostileExpect(t, code, msg, []string{"--sidecar", "same file"}, dir)
	})
}

// hostileBasePlan renders two 32×16 frames into output.dir = "out"; tests
// add to it. Its [output] table is last so keys can be appended to it (an
// appended key is on line 19).
const hostileBasePlan = `
[[leg]]
kind = "boost"
accel_g = 1.0
ship_years = 0.1
ra = 0
dec = 0

[show]
seconds = 0.2
fps = 10

[camera]
width = 32
height = 16

[output]
dir = "out"
`

// TestHostilePlans runs "flight" on hostile plans: nothing may be created.
func TestHostilePlans(t *testing.T) {
	cases := []struct {
		name string
		plan func(dir string) string // the plan's text
		want []string
	}{
		{"deeply nested arrays", func(string) string {
			return strings.Replace(hostileBasePlan, "[show]", "x = "+strings.Repeat("[", 100000)+strings.Repeat("]", 100000)+"\n[show]", 1)
		}, []string{"plan.toml:", "nesting depth", "limit"}},
		{"deeply nested table header", func(string) string {
			return "[" + strings.Repeat("a.", 4999) + "a]\n" + hostileBasePlan
		}, []string{"plan.toml:1:", "nesting depth"}},
		{"deeply nested inline tables", func(string) string {
			return hostileBasePlan + "\n[camera.z]\ny = " + strings.Repeat("{a = ", 2000) + "1" + strings.Repeat("}", 2000) + "\n"
		}, []string{"plan.toml:", "nesting depth"}},
		{"frames climb out", func(string) string {
			return hostileBasePlan + `frames = "../x/{frame}.png"` + "\n"
		}, []string{"plan.toml:19:", "output.frames", ".."}},
		{"frames climb out midway", func(string) string {
			return hostileBasePlan + `frames = "a/../../x/{frame}.png"` + "\n"
		}, []string{"output.frames", ".."}},
		{"frames absolute", func(dir string) string {
			return hostileBasePlan + `frames = "` + filepath.ToSlash(filepath.Join(dir, "abs")) + `/{frame}.png"` + "\n"
		}, []string{"plan.toml:19:", "output.frames", "absolute"}},
		{"leg speed NaN", func(string) string {
			return strings.Replace(hostileBasePlan, "ra = 0", "ra = nan", 1)
		}, []string{"plan.toml:6:", "leg[0].ra", "NaN"}},
		{"camera fov Inf", func(string) string {
			return strings.Replace(hostileBasePlan, "width = 32", "width = 32\nfov = inf", 1)
		}, []string{"plan.toml:", "camera.fov", "infinite"}},
		{"exposure -Inf", func(string) string {
			return strings.Replace(hostileBasePlan, "width = 32", "width = 32\nexposure = -inf", 1)
		}, []string{"camera.exposure", "infinite"}},
		{"accel_g NaN", func(string) string {
			return strings.Replace(hostileBasePlan, "accel_g = 1.0", "accel_g = nan", 1)
		}, []string{"plan.toml:4:", "accel_g", "NaN"}},
		{"absurd duration", func(string) string {
			return strings.Replace(hostileBasePlan, "seconds = 0.2", "seconds = 1e300", 1)
		}, []string{"plan.toml:", "show.seconds", "out of range"}},
		{"frame too large", func(string) string {
			return strings.Replace(hostileBasePlan, "width = 32", "width = 40000", 1)
		}, []string{"camera.width"}},
		{"catalogue with a 3 MiB line", func(dir string) string {
			os.WriteFile(filepath.Join(dir, "long.csv"), []byte("id,ra,dec,vmag\n1,"+strings.Repeat("2", 3<<20)+",3,4\n"), 0o644)
			return hostileBasePlan + "\n[catalogue]\npath = \"long.csv\"\n"
		}, []string{"long.csv:2:", "line too long"}},
		{"catalogue gzip bomb", func(dir string) string {
			b, _ := os.ReadFile(filepath.Join(hostileFixtures, "bomb.csv.gz"))
			os.WriteFile(filepath.Join(dir, "bomb.csv.gz"), b, 0o644)
			return hostileBasePlan + "\n[catalogue]\npath = \"bomb.csv.gz\"\n"
		}, []string{"bomb.csv.gz:", "decompressed data too large"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			hostileFile(t, dir, "plan.toml", []byte(c.plan(dir)))
			keep := []string{"plan.toml"}
			for _, k := range []string{"long.csv", "bomb.csv.gz"} {
				if _, err := os.Stat(filepath.Join(dir, k)); err == nil {
					keep = append(keep, k)
				}
			}
			code, msg := hostileRun(t, "flight", filepath.Join(dir, "plan.toml"))
			hostileExpect(t, code, msg, c.want, dir, keep...)
			if _, err := os.Stat(filepath.Join(filepath.Dir(dir), "x")); err == nil {
				t.Errorf("a directory was created beside the test directory")
			}
		})
	}

	t.Run("2 GiB sparse plan", func(t *testing.T) {
		dir := t.TempDir()
		p := hostileSparse(t, dir, "plan.toml", []byte("[show]\n"), 2<<30)
		start := time.Now()
		code, msg := hostileRun(t, "flight", p)
		hostileExpect(t, code, msg, []string{"plan.toml", "at most"}, dir, "plan.toml")
		if took := time.Since(start); took > 5*time.Second {
			t.Errorf("took %v to refuse a 2 GiB plan", took)
		}
	})

	t.Run("control", func(t *testing.T) {
		dir := t.TempDir()
		p := hostileFile(t, dir, "plan.toml", []byte(hostileBasePlan))
		if code, msg := hostileRun(t, "flight", p); code != exitOK {
			t.Fatalf("control plan: status %d\n%s", code, msg)
		}
		if _, err := os.Stat(filepath.Join(dir, "out")); err != nil {
			t.Fatal(err)
		}
	})
}

// TestHostileFlightFlags: bad flight flags are refused before any output.
func TestHostileFlightFlags(t *testing.T) {
	cases := []struct {
		args []string
		want []string
	}{
		{[]string{"--frames", "5-2"}, []string{"--frames", "5-2"}},
		{[]string{"--frames", "x"}, []string{"--frames"}},
		{[]string{"--shard", "3/2"}, []string{"--shard", "3/2"}},
		{[]string{"--shard", "0/0"}, []string{"--shard"}},
		{[]string{"--workers", "-1"}, []string{"--workers"}},
	}
	for _, c := range cases {
		t.Run(strings.Join(c.args, " "), func(t *testing.T) {
			dir := t.TempDir()
			p := hostileFile(t, dir, "plan.toml", []byte(hostileBasePlan))
			code, msg := hostileRun(t, append([]string{"flight", p}, c.args...)...)
			hostileExpect(t, code, msg, c.want, dir, "plan.toml")
		})
	}
	t.Run("no plan", func(t *testing.T) {
		code, msg := hostileRun(t, "flight")
		hostileExpect(t, code, msg, nil, t.TempDir())
	})
	t.Run("missing plan file", func(t *testing.T) {
		dir := t.TempDir()
		code, msg := hostileRun(t, "flight", filepath.Join(dir, "none.toml"))
		hostileExpect(t, code, msg, []string{"none.toml"}, dir)
	})
}
