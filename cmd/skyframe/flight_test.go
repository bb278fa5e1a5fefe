package main

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io/fs"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"runtime"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"gonum.org/v1/gonum/floats/scalar"

	"github.com/skyframe/skyframe/flight"
	flightjob "github.com/skyframe/skyframe/job"
)

// envExecMain makes the test binary act as the skyframe command, so tests
// can run real processes of it (shards, kills, signals) without a separate
// go build.
const envExecMain = "SKYFRAME_TEST_EXEC_MAIN"

func TestMain(m *testing.M) {
	if os.Getenv(envExecMain) == "1" {
		main()
		return
	}
	os.Exit(m.Run())
}

// skyframeProc returns a real process of the skyframe command.
func skyframeProc(t *testing.T, extraEnv []string, args ...string) *exec.Cmd {
	t.Helper()
	exe, err := os.Executable()
	if err != nil {
		t.Fatal(err)
	}
	cmd := exec.Command(exe, args...)
	cmd.Env = append(os.Environ(), envExecMain+"=1")
	// A shard from the test's own environment must not leak in.
	for _, k := range []string{flight.EnvShard, flight.EnvShards, "JOB_COMPLETION_INDEX", "SLURM_ARRAY_TASK_ID"} {
		cmd.Env = append(cmd.Env, k+"=")
	}
	cmd.Env = append(cmd.Env, extraEnv...)
	return cmd
}

// runIn runs the command in-process and returns its exit status and output.
func runIn(t *testing.T, args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	code := run(context.Background(), args, &out, &errb)
	return code, out.String(), errb.String()
}

// runFree runs the command in-process like runIn, with the free space on
// every file system reported by free.
func runFree(t *testing.T, free func(dir string) (uint64, error), args ...string) (int, string, string) {
	t.Helper()
	var out, errb bytes.Buffer
	e := &env{ctx: context.Background(), stdout: &out, stderr: &errb, getenv: os.Getenv, freeSpace: free}
	code := e.dispatch(args)
	return code, out.String(), errb.String()
}

// tinyCamera keeps frames at 64×36 so a test renders in milliseconds, with
// the shutter closed (the swings of these plans are fast: blurring them
// takes many sub-frames); blurTinyCamera opens it to 45°.
const tinyCamera = `
[camera]
width = 64
height = 36
fov = 70
shutter = 0
`

var blurTinyCamera = strings.Replace(tinyCamera, "shutter = 0", "shutter = 45", 1)

// blurred is a plan with the shutter opened.
func blurred(plan string) string { return strings.Replace(plan, tinyCamera, blurTinyCamera, 1) }

// writePlan writes a plan file into dir and returns its path.
func writePlan(t *testing.T, dir, body string) string {
	t.Helper()
	p := filepath.Join(dir, "plan.toml")
	if err := os.WriteFile(p, []byte(body), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

// voyagePlan flies to the invented star Sollow of the built-in sky, turning
// the camera from the destination to behind: n frames at 10 fps.
func voyagePlan(frames int) string {
	return fmt.Sprintf(`title = "test voyage"
[[leg]]
kind = "voyage"
accel_g = 1.0
to_star = "Sollow"
speed_cap = 0.9

[show]
fps = 10
seconds = %g

[[camera.look]]
at = 0
look = "Sollow"

[[camera.look]]
at = %g
look = "behind"
roll = 30
`, float64(frames)/10, float64(frames)/20) + tinyCamera
}

// tree reads every regular file under dir, by slash-separated relative path.
func tree(t *testing.T, dir string) map[string][]byte {
	t.Helper()
	files := map[string][]byte{}
	err := filepath.WalkDir(dir, func(p string, d fs.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return err
		}
		b, err := os.ReadFile(p)
		if err != nil {
			return err
		}
		rel, _ := filepath.Rel(dir, p)
		files[filepath.ToSlash(rel)] = b
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	return files
}

// sameTree fails unless both directories hold the same files, byte for byte.
func sameTree(t *testing.T, have, want string) {
	t.Helper()
	h, w := tree(t, have), tree(t, want)
	for name, wb := range w {
		hb, ok := h[name]
		if !ok {
			t.Errorf("%s: missing (want %d bytes)", name, len(wb))
			continue
		}
		if !bytes.Equal(hb, wb) {
			t.Errorf("%s: %d bytes differ from the reference's %d", name, len(hb), len(wb))
		}
	}
	for name := range h {
		if _, ok := w[name]; !ok {
			t.Errorf("%s: not in the reference run", name)
		}
	}
}

// noTemps fails if dir holds a temporary file of render.WriteFileAtomic.
func noTemps(t *testing.T, dir string) {
	t.Helper()
	for name := range tree(t, dir) {
		if strings.Contains(filepath.Base(name), ".tmp-") {
			t.Errorf("temporary file left behind: %s", name)
		}
	}
}

// reference renders the plan in one process into a fresh directory.
func reference(t *testing.T, plan string) string {
	t.Helper()
	out := filepath.Join(t.TempDir(), "ref")
	if b, err := skyframeProc(t, nil, "flight", plan, "--out", out).CombinedOutput(); err != nil {
		t.Fatalf("reference run: %v\n%s", err, b)
	}
	return out
}

// Shards must partition the frames exactly and each frame must depend only
// on the plan and its index, so three processes writing into one directory
// produce the one-process result byte for byte.
func TestFlightShardsByteIdentical(t *testing.T) {
	dir := t.TempDir()
	plan := writePlan(t, dir, blurred(voyagePlan(14))) // motion-blurred frames too
	ref := reference(t, plan)
	if n := len(tree(t, ref)); n != 28 {
		t.Fatalf("reference run wrote %d files, want 28 (14 frames × PNG + sidecar)", n)
	}
	out := filepath.Join(dir, "sharded")
	cmds := []*exec.Cmd{
		skyframeProc(t, nil, "flight", plan, "--out", out, "--shard", "0/3"),
		// Shard 1 from a Kubernetes Indexed Job's environment.
		skyframeProc(t, []string{"JOB_COMPLETION_INDEX=1", flight.EnvShards + "=3"}, "flight", plan, "--out", out),
		// Shard 2 from a Slurm job array's environment (--array=0-2),
		// opted into with SKYFRAME_SHARD=auto.
		skyframeProc(t, []string{"SLURM_ARRAY_TASK_ID=2", "SLURM_ARRAY_TASK_COUNT=3", flight.EnvShard + "=auto"}, "flight", plan, "--out", out),
	}
	outputs := make([]*bytes.Buffer, len(cmds))
	for i, c := range cmds {
		outputs[i] = &bytes.Buffer{}
		c.Stdout, c.Stderr = outputs[i], outputs[i]
		if err := c.Start(); err != nil {
			t.Fatal(err)
		}
	}
	for i, c := range cmds {
		if err := c.Wait(); err != nil {
			t.Fatalf("shard %d: %v\n%s", i, err, outputs[i])
		}
		if want := fmt.Sprintf("shard %d/3", i); !strings.Contains(outputs[i].String(), want) {
			t.Errorf("shard %d: output does not name %q:\n%s", i, want, outputs[i])
		}
	}
	sameTree(t, out, ref)
}

// waitForFrames polls until at least n sidecars exist under dir.
func waitForFrames(t *testing.T, dir string, n int, deadline time.Duration) {
	t.Helper()
	end := time.Now().Add(deadline)
	for time.Now().Before(end) {
		m, _ := filepath.Glob(filepath.Join(dir, "frames", "*.json"))
		if len(m) >= n {
			return
		}
		time.Sleep(5 * time.Millisecond)
	}
	t.Fatalf("fewer than %d frames appeared in %v", n, deadline)
}

// A process killed with SIGKILL mid-run leaves whole frames only; --resume
// completes the directory to exactly what an uninterrupted run writes and
// removes stale temporary files.
func TestFlightResumeAfterKill(t *testing.T) {
	dir := t.TempDir()
	plan := writePlan(t, dir, blurred(voyagePlan(40)))
	ref := reference(t, plan)
	out := filepath.Join(dir, "killed")
	c := skyframeProc(t, []string{envTestPace + "=40ms"}, "flight", plan, "--out", out)
	if err := c.Start(); err != nil {
		t.Fatal(err)
	}
	waitForFrames(t, out, 4, 20*time.Second)
	if err := c.Process.Kill(); err != nil {
		t.Fatal(err)
	}
	_ = c.Wait()
	done, _ := filepath.Glob(filepath.Join(out, "frames", "*.json"))
	if len(done) >= 40 {
		t.Fatalf("the run finished before the kill (%d sidecars); the test proves nothing", len(done))
	}
	// What a kill during a write leaves: a temporary file of a frame.
	stale := filepath.Join(out, "frames", ".00039.png.tmp-12345")
	if err := os.WriteFile(stale, []byte("partial"), 0o644); err != nil {
		t.Fatal(err)
	}
	if b, err := skyframeProc(t, nil, "flight", plan, "--out", out, "--resume").CombinedOutput(); err != nil {
		t.Fatalf("resume: %v\n%s", err, b)
	} else if want := fmt.Sprintf("resume: %d of 40 frames already done", len(done)); !strings.Contains(string(b), want) &&
		!strings.Contains(string(b), fmt.Sprintf("resume: %d of 40", len(done)+1)) {
		// The killed process may have completed one more frame after the glob.
		t.Errorf("resume output lacks %q:\n%s", want, b)
	}
	noTemps(t, out)
	sameTree(t, out, ref)
}

var interruptedRe = regexp.MustCompile(`interrupted after frame (\d+)`)

// SIGINT and SIGTERM stop the render after a whole frame: exit status 1,
// the message names the last frame written, no partial or temporary file.
func TestFlightSignals(t *testing.T) {
	for _, sig := range []syscall.Signal{syscall.SIGINT, syscall.SIGTERM} {
		t.Run(sig.String(), func(t *testing.T) {
			dir := t.TempDir()
			plan := writePlan(t, dir, voyagePlan(40))
			out := filepath.Join(dir, "out")
			c := skyframeProc(t, []string{envTestPace + "=40ms"}, "flight", plan, "--out", out)
			var stderr bytes.Buffer
			c.Stderr = &stderr
			if err := c.Start(); err != nil {
				t.Fatal(err)
			}
			waitForFrames(t, out, 3, 20*time.Second)
			if err := c.Process.Signal(sig); err != nil {
				t.Fatal(err)
			}
			err := c.Wait()
			ee, ok := err.(*exec.ExitError)
			if !ok || ee.ExitCode() != exitFailure {
				t.Fatalf("exit: %v, want status %d\n%s", err, exitFailure, stderr.String())
			}
			m := interruptedRe.FindStringSubmatch(stderr.String())
			if m == nil {
				t.Fatalf("stderr lacks %q:\n%s", "interrupted after frame N", stderr.String())
			}
			last, _ := strconv.Atoi(m[1])
			if last >= 39 {
				t.Fatalf("interrupted after frame %d: the run had finished", last)
			}
			noTemps(t, out)
			// Frames 0..last are whole and nothing beyond was written.
			if code, so, se := runIn(t, "flight", plan, "--out", out, "--verify", "--frames", fmt.Sprintf("0-%d", last)); code != exitOK {
				t.Errorf("verify 0-%d: status %d\n%s%s", last, code, so, se)
			}
			if n := len(tree(t, out)); n != 2*(last+1) {
				t.Errorf("%d files for %d frames, want %d", n, last+1, 2*(last+1))
			}
		})
	}
}

// The dry run prints the documented columns and, for a 0.6 c cruise, the
// textbook values.
func TestFlightDryRun(t *testing.T) {
	dir := t.TempDir()
	plan := writePlan(t, dir, `
[start]
speed = 0.6
ra = 0
dec = 0

[[leg]]
kind = "cruise"
ship_years = 1

[show]
fps = 4
seconds = 1
`+tinyCamera)
	code, out, errs := runIn(t, "flight", plan, "--dry-run")
	if code != exitOK {
		t.Fatalf("status %d: %s", code, errs)
	}
	recs, err := csv.NewReader(strings.NewReader(out)).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	// The column list of the flight command's specification (tracker issue 5)
	// and the camera motion columns (issue 15).
	wantHeader := "frame,tau_yr,t_yr,beta,gamma,x_pc,y_pc,z_pc,doppler_ahead,doppler_behind,rate_home,rate_dest,camera_deg_s,centre_px_frame"
	if h := strings.Join(recs[0], ","); h != wantHeader {
		t.Fatalf("header %q, want %q", h, wantHeader)
	}
	if len(recs) != 1+4 {
		t.Fatalf("%d rows, want 4 frames", len(recs)-1)
	}
	if _, err := os.Stat(filepath.Join(dir, "out")); !os.IsNotExist(err) {
		t.Errorf("a dry run created the output directory (%v)", err)
	}
	for _, r := range recs[1:] {
		v := make([]float64, len(r))
		for i, s := range r {
			if v[i], err = strconv.ParseFloat(s, 64); err != nil {
				t.Fatalf("row %v: %v", r, err)
			}
		}
		tau := v[1]
		for _, c := range []struct {
			col  int
			want float64
			src  string
		}{
			{3, 0.6, "cruise speed"},
			{4, 1.25, "γ at β = 0.6 [cp]"},
			{2, 1.25 * tau, "t = γτ at 0.6 c [cp]"},
			{5, 0.6 * 1.25 * tau * flight.LightYearPc, "x = βγτ light-years [cp], ly in pc (IAU) [pub]"},
			{6, 0, "y on the RA 0 Dec 0 axis"},
			{8, 2, "D ahead at 0.6 c [cp]"},
			{9, 0.5, "D behind at 0.6 c [cp]"},
			{10, 0.5, "home straight behind: rate 0.5 [cp]"},
			{11, 2, "destination straight ahead: rate 2 [cp]"},
			{12, 0, "camera fixed ahead: no rotation"},
			{13, 0, "camera fixed ahead: the centre does not move"},
		} {
			if !scalar.EqualWithinAbsOrRel(v[c.col], c.want, 1e-10, 1e-10) {
				t.Errorf("frame %v %s: have %v, want %v (%s)", r[0], recs[0][c.col], v[c.col], c.want, c.src)
			}
		}
	}
	if last := recs[len(recs)-1][1]; last != "1" {
		t.Errorf("last frame τ = %s, want 1 (the cruise's ship years)", last)
	}
}

// Bad plans and impossible outputs are refused with status 2 before any
// frame is rendered.
func TestFlightBadInput(t *testing.T) {
	show := "\n[show]\nfps = 2\nseconds = 1\n" + tinyCamera
	cases := []struct {
		name, plan string
		want       []string
	}{
		{"legs do not connect", `
[start]
speed = 0.5
ra = 0
dec = 0
[[leg]]
kind = "cruise"
ship_years = 1
from = [1, 0, 0]
` + show, []string{"plan.toml:", "leg[0]", "does not start where the previous one ended"}},
		{"non-collinear voyage", `
[[leg]]
kind = "boost"
accel_g = 1
ship_years = 1
ra = 0
dec = 0
[[leg]]
kind = "voyage"
accel_g = 1
to_position = [0, 1, 0]
` + show, []string{"leg[1]", "not along"}},
		{"zero acceleration", `
[[leg]]
kind = "voyage"
accel_g = 0
to_position = [1, 0, 0]
` + show, []string{"plan.toml:4:", "accel_g", "positive"}},
		{"negative acceleration", `
[[leg]]
kind = "boost"
accel = -9.8
ship_years = 1
ra = 0
dec = 0
` + show, []string{"plan.toml:4:", "accel"}},
		{"unknown destination", `
[[leg]]
kind = "voyage"
accel_g = 1
to_star = "Nowhere"
` + show, []string{"unknown destination", `"Nowhere"`}},
		{"speed cap at c", `
[[leg]]
kind = "voyage"
accel_g = 1
to_position = [1, 0, 0]
speed_cap = 1.0
` + show, []string{"plan.toml:6:", "speed_cap", "below 1"}},
		{"unknown key", `
[[leg]]
kind = "cruise"
ship_years = 1

[show]
seconds = 1

[camera]
width = 64
height = 36
lok = "ahead"
`, []string{"plan.toml:12:", "camera.lok", `did you mean "camera.look"`}},
		{"unresolved light", `
[[leg]]
kind = "cruise"
ship_years = 1
[overlays]
unresolved = "maybe"
` + show, []string{"plan.toml:6:", "overlays.unresolved", "auto"}},
		{"unresolved depth out of range", `
[[leg]]
kind = "cruise"
ship_years = 1
[overlays]
unresolved_depth = 99
` + show, []string{"plan.toml:6:", "overlays.unresolved_depth"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			plan := writePlan(t, dir, c.plan)
			code, _, errs := runIn(t, "flight", plan)
			if code != exitUsage {
				t.Fatalf("status %d, want %d\n%s", code, exitUsage, errs)
			}
			for _, w := range c.want {
				if !strings.Contains(errs, w) {
					t.Errorf("message %q lacks %q", errs, w)
				}
			}
			if _, err := os.Stat(filepath.Join(dir, "out")); !os.IsNotExist(err) {
				t.Errorf("output directory created before the error (%v)", err)
			}
		})
	}

	t.Run("output larger than free space", func(t *testing.T) {
		var asked string
		free := func(dir string) (uint64, error) { asked = dir; return 100 << 10, nil }
		dir := t.TempDir()
		plan := writePlan(t, dir, voyagePlan(20))
		code, _, errs := runFree(t, free, "flight", plan)
		if code != exitUsage {
			t.Fatalf("status %d, want %d\n%s", code, exitUsage, errs)
		}
		// 20 frames × (64·36·3 raw + 6 + 2048 + 8192 bytes) = 343 KB > 100 KiB.
		if !strings.Contains(errs, "20 frames need about") || !strings.Contains(errs, "100 KiB free") {
			t.Errorf("message %q does not give the need and the free space", errs)
		}
		if asked != filepath.Join(dir, "out") {
			t.Errorf("free space asked for %q, want the output directory", asked)
		}
		if _, err := os.Stat(filepath.Join(dir, "out")); !os.IsNotExist(err) {
			t.Errorf("output directory created before the error (%v)", err)
		}
		// The same plan fits in 1 MiB.
		free = func(string) (uint64, error) { return 1 << 20, nil }
		if code, _, errs := runFree(t, free, "flight", plan, "--frames", "0-1"); code != exitOK {
			t.Errorf("with 1 MiB free: status %d\n%s", code, errs)
		}
	})
}

// --verify lists a missing and a corrupted frame and exits 1; --resume
// repairs exactly those, after which --verify passes.
func TestFlightVerify(t *testing.T) {
	dir := t.TempDir()
	plan := writePlan(t, dir, voyagePlan(6))
	if code, _, errs := runIn(t, "flight", plan); code != exitOK {
		t.Fatalf("render: status %d\n%s", code, errs)
	}
	out := filepath.Join(dir, "out")
	before := tree(t, out)
	if code, so, se := runIn(t, "flight", plan, "--verify"); code != exitOK {
		t.Fatalf("verify of a fresh render: status %d\n%s%s", code, so, se)
	}
	if err := os.Remove(filepath.Join(out, "frames", "00002.png")); err != nil {
		t.Fatal(err)
	}
	png4 := filepath.Join(out, "frames", "00004.png")
	b, err := os.ReadFile(png4)
	if err != nil {
		t.Fatal(err)
	}
	b[len(b)/2] ^= 0x40
	if err := os.WriteFile(png4, b, 0o644); err != nil {
		t.Fatal(err)
	}
	code, so, _ := runIn(t, "flight", plan, "--verify")
	if code != exitFailure {
		t.Errorf("verify: status %d, want %d", code, exitFailure)
	}
	for _, w := range []string{"missing frame 2:", "corrupt frame 4:", "4 intact, 1 missing, 1 corrupt"} {
		if !strings.Contains(so, w) {
			t.Errorf("verify output lacks %q:\n%s", w, so)
		}
	}
	// A sidecar from another plan (sealed as a real one is) is corrupt too.
	side0 := filepath.Join(out, "frames", "00000.json")
	var s flightjob.Sidecar
	sb, _ := os.ReadFile(side0)
	if err := json.Unmarshal(sb, &s); err != nil {
		t.Fatal(err)
	}
	s.Flight.PlanHash = strings.Repeat("0", 64)
	sb2, _ := json.MarshalIndent(s, "", "  ")
	if err := os.WriteFile(side0, append(flightjob.Seal(sb2), '\n'), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, so, _ := runIn(t, "flight", plan, "--verify"); !strings.Contains(so, "corrupt frame 0:") || !strings.Contains(so, "different inputs") {
		t.Errorf("verify did not flag a sidecar of another plan:\n%s", so)
	}
	code, _, se := runIn(t, "flight", plan, "--resume")
	if code != exitOK || !strings.Contains(se, "resume: 3 of 6 frames already done") {
		t.Errorf("resume: status %d\n%s", code, se)
	}
	if code, so, se := runIn(t, "flight", plan, "--verify"); code != exitOK {
		t.Errorf("verify after resume: status %d\n%s%s", code, so, se)
	}
	after := tree(t, out)
	for name, want := range before {
		if !bytes.Equal(after[name], want) {
			t.Errorf("%s differs after repair", name)
		}
	}
}

// A camera swinging between the bright forward sky and the dark sky behind
// every frame fails the general flash threshold of WCAG 2.1 SC 2.3.1 [pub]
// (more than 3 flashes in a second); a steady view passes.
func TestFlightFlashWarning(t *testing.T) {
	const warn = "WCAG 2.3.1 / ITU-R BT.1702 general flash threshold"
	base := `
[start]
speed = 0.99
ra = 266.4
dec = -28.9

[[leg]]
kind = "cruise"
ship_years = 1

[show]
fps = 10
seconds = 1
` + tinyCamera
	var keys strings.Builder
	for i := 0; i < 10; i++ {
		look := "ahead"
		if i%2 == 1 {
			look = "behind"
		}
		fmt.Fprintf(&keys, "\n[[camera.look]]\nat = %g\nlook = %q\n", float64(i)/10, look)
	}
	for _, c := range []struct {
		name, plan string
		warn       bool
	}{
		{"steady", base, false},
		{"alternating", base + keys.String(), true},
	} {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			plan := writePlan(t, dir, c.plan)
			code, _, errs := runIn(t, "flight", plan)
			if code != exitOK {
				t.Fatalf("status %d\n%s", code, errs)
			}
			if got := strings.Contains(errs, warn); got != c.warn {
				t.Errorf("warning printed: %v, want %v\n%s", got, c.warn, errs)
			}
			var s flightjob.Sidecar
			b, _ := os.ReadFile(filepath.Join(dir, "out", "frames", "00000.json"))
			if err := json.Unmarshal(b, &s); err != nil {
				t.Fatal(err)
			}
			// Straight ahead at 0.99 c the sky is bright: the recorded
			// mean luminance must be well above black.
			if !(s.Flight.MeanLuminance > 0.01 && s.Flight.MeanLuminance <= 1) {
				t.Errorf("frame 0 mean luminance %v, want in (0.01, 1]", s.Flight.MeanLuminance)
			}
		})
	}
}

// The progress lines for a log (not a terminal) follow the documented form.
func TestFrameProgressLine(t *testing.T) {
	var b bytes.Buffer
	p := newFrameProgress(&b, "flight", 600)
	p.done = 120
	line := p.line(p.start.Add(40 * time.Second))
	// 120 frames in 40 s: 3 frames/s, 480 left: 160 s.
	if want := "flight: frame 120/600 (20%), 3.0 frames/s, ETA 2m40s"; line != want {
		t.Errorf("have %q, want %q", line, want)
	}
}

// --workers N bounds the CPUs of the whole run: while the frames render,
// GOMAXPROCS is N (the sky's preparation, the unresolved maps and the
// writers size themselves by it), and it is restored when the run ends.
func TestFlightWorkersCapCPUs(t *testing.T) {
	if runtime.GOMAXPROCS(0) < 2 {
		t.Skip("one CPU: nothing to cap")
	}
	before := runtime.GOMAXPROCS(0)
	dir := t.TempDir()
	plan := writePlan(t, dir, voyagePlan(2))
	for _, c := range []struct {
		workers string
		want    int
	}{{"1", 1}, {"0", before}} {
		seen := -1
		getenv := func(k string) string {
			if k == envTestPace {
				seen = runtime.GOMAXPROCS(0)
			}
			return os.Getenv(k)
		}
		var out, errb bytes.Buffer
		e := &env{ctx: context.Background(), stdout: &out, stderr: &errb, getenv: getenv}
		if code := e.dispatch([]string{"flight", plan, "--workers", c.workers, "--out", filepath.Join(dir, "w"+c.workers)}); code != 0 {
			t.Fatalf("--workers %s: exit %d: %s", c.workers, code, errb.String())
		}
		if seen != c.want {
			t.Errorf("--workers %s: GOMAXPROCS %d while rendering, want %d", c.workers, seen, c.want)
		}
		if got := runtime.GOMAXPROCS(0); got != before {
			t.Errorf("--workers %s: GOMAXPROCS %d after the run, want it restored to %d", c.workers, got, before)
		}
	}
}

// procsWriter records GOMAXPROCS at every write: what the command printed
// while its work ran.
type procsWriter struct {
	bytes.Buffer
	procs []int
}

func (w *procsWriter) Write(p []byte) (int, error) {
	w.procs = append(w.procs, runtime.GOMAXPROCS(0))
	return w.Buffer.Write(p)
}

// still --workers N runs the still on N CPUs (GOMAXPROCS while it prints
// its report, restored after) and writes the same bytes as with all CPUs;
// a negative count is a usage error naming the flag.
func TestStillWorkers(t *testing.T) {
	if runtime.GOMAXPROCS(0) < 2 {
		t.Skip("one CPU: nothing to cap")
	}
	before := runtime.GOMAXPROCS(0)
	dir := t.TempDir()
	files := map[string][]byte{}
	for _, c := range []struct {
		workers string
		want    int
	}{{"1", 1}, {"0", before}} {
		out := filepath.Join(dir, "w"+c.workers+".png")
		var stdout procsWriter
		var stderr bytes.Buffer
		e := &env{ctx: context.Background(), stdout: &stdout, stderr: &stderr, getenv: os.Getenv}
		if code := e.dispatch([]string{"still", "--size", "320x180", "--workers", c.workers, "-o", out, "--fits", out + ".fits"}); code != 0 {
			t.Fatalf("--workers %s: exit %d: %s", c.workers, code, stderr.String())
		}
		if len(stdout.procs) == 0 {
			t.Fatalf("--workers %s: nothing printed", c.workers)
		}
		for _, p := range stdout.procs {
			if p != c.want {
				t.Errorf("--workers %s: GOMAXPROCS %d while the still ran, want %d", c.workers, p, c.want)
			}
		}
		if got := runtime.GOMAXPROCS(0); got != before {
			t.Errorf("--workers %s: GOMAXPROCS %d after the run, want it restored to %d", c.workers, got, before)
		}
		for _, ext := range []string{"", ".fits"} {
			b, err := os.ReadFile(out + ext)
			if err != nil {
				t.Fatal(err)
			}
			if prev, ok := files[ext]; ok && !bytes.Equal(prev, b) {
				t.Errorf("%q: --workers 1 and 0 write different bytes", ext)
			}
			files[ext] = b
		}
	}
	// Out of range (10⁵ goroutines would exceed the Go runtime's thread
	// limit and crash): exit 2 naming the flag, nothing written, for
	// still and flight alike.
	plan := writePlan(t, dir, voyagePlan(2))
	for _, args := range [][]string{
		{"still", "--workers", "-2", "-o", filepath.Join(dir, "bad.png")},
		{"still", "--workers", "100000", "-o", filepath.Join(dir, "bad.png")},
		{"flight", plan, "--workers", "100000", "--out", filepath.Join(dir, "badflight")},
	} {
		code, msg := hostileRun(t, args...)
		hostileExpect(t, code, msg, []string{"--workers " + args[len(args)-3]}, dir, "w0.png", "w0.png.fits", "w0.json", "w1.png", "w1.png.fits", "w1.json", filepath.Base(plan))
	}
}
