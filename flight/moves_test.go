package flight

import (
	"bytes"
	"encoding/csv"
	"math"
	"strconv"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/frameopt"
)

// parseBound parses a plan and binds its star names to the built-in sky.
func parseBound(t *testing.T, src string) *Plan {
	t.Helper()
	p, err := ParsePlan([]byte(src), "moves.toml")
	if err != nil {
		t.Fatal(err)
	}
	stars := catalog.BuiltIn()
	if err := p.Bind(StarsResolver(stars, stars.Find)); err != nil {
		t.Fatal(err)
	}
	return p
}

// smoothstep is 3w² − 2w³ on [0, 1] (the ease the plan format documents),
// written out here rather than taken from Ease.
func smoothstep(w float64) float64 {
	w = math.Max(0, math.Min(1, w))
	return w * w * (3 - 2*w)
}

// A swing from Dec −20° to +20° along RA 0 in 2 s at 10 fps, the ship at
// rest at the Sun: the camera turns about its right axis, so its step
// into frame i is 40°·(s(i/20) − s((i−1)/20)) with s the smoothstep, and
// the sky at the centre of a 60° pinhole 200 px wide moves by f·tan(step),
// f = 100 px / tan 30° (gnomonic projection). The dry run's camera_deg_s
// and centre_px_frame columns and MotionAt give those values; the comfort
// check flags exactly the frames above 5°/s (peak 1.5 × 20°/s = 30°/s) or
// above the frame's width in 7 s (200 px / 70 frames = 2.86 px/frame), and
// a slow swing (Dec −1° to +1° in 10 s: 0.3°/s at most, 0.06 px/frame)
// none.
func TestCameraMotionColumns(t *testing.T) {
	plan := func(seconds float64, dec float64) string {
		return `
[[leg]]
kind = "cruise"
ship_years = 1
ra = 0
dec = 0

[show]
fps = 10
seconds = ` + strconv.FormatFloat(seconds+0.1, 'g', -1, 64) + `

[camera]
size = "200x100"
fov = 60

[[camera.look]]
at = 0
look = "0,-` + strconv.FormatFloat(dec, 'g', -1, 64) + `"

[[camera.look]]
at = ` + strconv.FormatFloat(seconds, 'g', -1, 64) + `
look = "0,` + strconv.FormatFloat(dec, 'g', -1, 64) + `"
`
	}
	p := parseBound(t, plan(2, 20))
	f := 100 / math.Tan(30*math.Pi/180)
	limitPx := 200.0 / (7 * 10)
	step := func(i int) float64 { return 40 * (smoothstep(float64(i)/20) - smoothstep(float64(i-1)/20)) }
	var buf bytes.Buffer
	if err := WriteDryRunCSV(&buf, p, Range{First: 0, Last: -1}); err != nil {
		t.Fatal(err)
	}
	rows, err := csv.NewReader(&buf).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	col := map[string]int{}
	for k, n := range rows[0] {
		col[n] = k
	}
	var over []int
	for i := 1; i < p.Frames(); i++ {
		want := step(i)
		wantPx := f * math.Tan(want*math.Pi/180)
		m, err := p.MotionAt(i)
		if err != nil {
			t.Fatal(err)
		}
		rate, _ := strconv.ParseFloat(rows[i+1][col["camera_deg_s"]], 64)
		px, _ := strconv.ParseFloat(rows[i+1][col["centre_px_frame"]], 64)
		if math.Abs(m.StepDeg-want) > 1e-9 || math.Abs(rate-10*want) > 1e-8 || math.Abs(m.RateDegS-10*want) > 1e-8 {
			t.Errorf("frame %d: step %.12g° (CSV %.12g°/s), analytic %.12g° (%.12g°/s)", i, m.StepDeg, rate, want, 10*want)
		}
		if math.Abs(px-wantPx) > 1e-7 || math.Abs(m.ScreenPx-wantPx) > 1e-7 {
			t.Errorf("frame %d: centre moves %.10g px (CSV %.10g), analytic %.10g", i, m.ScreenPx, px, wantPx)
		}
		if 10*want > 5 || wantPx > limitPx {
			over = append(over, i)
		}
	}
	if math.Abs(10*step(10)-30) > 0.5 {
		t.Fatalf("mid-swing rate %.3g°/s, want about 30 (the test's own arithmetic)", 10*step(10))
	}
	st, err := ComfortStretches(p, Range{First: 0, Last: -1})
	if err != nil {
		t.Fatal(err)
	}
	if len(st) != 1 || len(over) == 0 || st[0].First != over[0] || st[0].Last != over[len(over)-1] || !st[0].RateOver || !st[0].PxOver {
		t.Fatalf("comfort stretches %+v, want one over frames %v (rate and px)", st, over)
	}
	peak := 0.0
	for _, i := range over {
		peak = math.Max(peak, 10*step(i))
	}
	if math.Abs(st[0].MaxRateDegS-peak) > 1e-8 {
		t.Errorf("stretch peak %.10g°/s, analytic %.10g°/s", st[0].MaxRateDegS, peak)
	}
	t.Logf("frames %d-%d over the comfort limit, peak %.4g°/s and %.4g px/frame (limits 5°/s, %.3g px/frame)",
		st[0].First, st[0].Last, st[0].MaxRateDegS, st[0].MaxScreenPx, limitPx)

	slow := parseBound(t, plan(10, 1))
	if st, err := ComfortStretches(slow, Range{First: 0, Last: -1}); err != nil || len(st) != 0 {
		t.Errorf("a 0.3°/s swing flagged: %+v %v", st, err)
	}
}

// A key on a star keeps the star where the key puts it — at the centre —
// while the ship accelerates and aberration sweeps the star across the
// sky: between two keys on Ambrel (a nearby star of the built-in sky,
// 2.74 pc), the camera's forward direction is Ambrel's apparent direction
// at every frame, computed here from the ship's position and boost and
// the star's catalogue position (parallax, then the aberration of
// camera.Boost), to 1e-6 rad (the catalogue's float32 positions).
func TestTrackedStarStaysPut(t *testing.T) {
	p := parseBound(t, `
[[leg]]
kind = "voyage"
accel_g = 1.4
to_star = "Marrowby"
speed_cap = 0.97

[show]
fps = 10
seconds = 20

[camera]
size = "200x100"

[[camera.look]]
at = 2
look = "Ambrel"

[[camera.look]]
at = 18
look = "Ambrel"
`)
	stars := catalog.BuiltIn()
	row, ok := stars.Find("Ambrel")
	if !ok {
		t.Fatal("no Ambrel in the built-in sky")
	}
	pos := r3.Scale(float64(stars.Dist[row]), r3.Vec{X: float64(stars.X[row]), Y: float64(stars.Y[row]), Z: float64(stars.Z[row])})
	var first, last r3.Vec
	n := 0
	for i := 0; i < p.Frames(); i++ {
		fs, err := p.FrameState(i)
		if err != nil {
			t.Fatal(err)
		}
		if fs.Seconds < 2 || fs.Seconds > 18 {
			continue
		}
		obs, err := Observer(fs.State)
		if err != nil {
			t.Fatal(err)
		}
		app, _ := obs.Boost.Apply(r3.Unit(r3.Sub(pos, obs.Position)))
		if a := math.Acos(math.Min(1, r3.Dot(app, fs.Camera.Orient.Forward))); a > 1e-6 {
			t.Errorf("frame %d (%.2f s, β = %.3f): forward %.3g rad from Ambrel's apparent direction", i, fs.Seconds, fs.State.Beta, a)
		}
		if n == 0 {
			first = app
		}
		last = app
		n++
	}
	sweep := math.Acos(r3.Dot(first, last)) * 180 / math.Pi
	t.Logf("%d frames tracked; Ambrel's apparent direction moved %.1f°", n, sweep)
	if n < 100 || sweep < 5 {
		t.Errorf("%d frames, sweep %.2f°: the test wants a long track across a large aberration sweep", n, sweep)
	}
}

// The sample plan shows the camera moves (issue 15, item 6): a key on a
// star (tracked), an exposure ramp between keys, a swing of more than 90°
// between keys with easing (TestCameraMovesSmooth checks it eases), and a
// 180° shutter (job's TestSamplePlanBlur checks it blurs).
func TestSamplePlanMoves(t *testing.T) {
	p := loadPlan(t, "../samples/plan.toml")
	tracked, ramp := false, false
	var prevExpo float64
	for i, k := range p.looks {
		if k.look.Kind == frameopt.Star {
			tracked = true
		}
		if i > 0 && k.expo != prevExpo {
			ramp = true
		}
		prevExpo = k.expo
	}
	swing := 0.0
	for i := 1; i < len(p.looks); i++ {
		a, err := p.FrameState(int(math.Round(p.looks[i-1].at * p.Show.FPS)))
		if err != nil {
			t.Fatal(err)
		}
		b, err := p.FrameState(min(int(math.Round(p.looks[i].at*p.Show.FPS)), p.Frames()-1))
		if err != nil {
			t.Fatal(err)
		}
		swing = max(swing, AngleBetween(a.Camera.Orient, b.Camera.Orient))
	}
	fr := p.Frame.Frame()
	t.Logf("tracked star %v, exposure ramp %v, largest swing between keys %.1f°, shutter %v°", tracked, ramp, swing, fr.Shutter)
	if !tracked || !ramp || swing < 90 || fr.Shutter != 180 {
		t.Errorf("the sample lacks a move: tracked star %v, exposure ramp %v, swing %.1f° (want > 90°), shutter %v° (want 180°)", tracked, ramp, swing, fr.Shutter)
	}
}
