package main

import (
	"context"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"testing"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/flight"
	flightjob "github.com/skyframe/skyframe/job"
	"github.com/skyframe/skyframe/render"
)

// panPlan is a steady pan across one star: the camera turns from Dec −20°
// to +20° over 2 s, so at 1 s (frame 10 of 10 fps) it moves at the
// smoothstep's peak rate 1.5 × 40°/2 s = 30°/s through the star at RA 0,
// Dec 0, centred. The ship is at rest at the Sun.
func panPlan(t *testing.T, shutter float64) *flightjob.Job {
	t.Helper()
	dir := t.TempDir()
	if err := os.WriteFile(filepath.Join(dir, "one.csv"), []byte("id,ra,dec,vmag,bv\n1,0,0,2,0.6\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	plan := writePlan(t, dir, fmt.Sprintf(`
[catalogue]
path = "one.csv"

[[leg]]
kind = "cruise"
ship_years = 1
ra = 0
dec = 0

[show]
fps = 10
seconds = 2.1

[camera]
size = "200x100"
fov = 60
exposure = 2
shutter = %g

[[camera.look]]
at = 0
look = "0,-20"

[[camera.look]]
at = 2
look = "0,20"
`, shutter))
	e := &env{ctx: context.Background(), stdout: io.Discard, stderr: io.Discard, getenv: func(string) string { return "" }}
	j, err := loadFlightJob(e, plan, &flightFlags{preview: 1, every: 1})
	if err != nil {
		t.Fatal(err)
	}
	return j
}

// renderPan returns frame 10's linear buffer and its exposure's knot count
// (0: the frame's instant alone).
func renderPan(t *testing.T, shutter float64) (*render.Frame, int) {
	t.Helper()
	j := panPlan(t, shutter)
	fs, err := j.Plan.FrameState(10)
	if err != nil {
		t.Fatal(err)
	}
	proj, err := j.Projection(fs)
	if err != nil {
		t.Fatal(err)
	}
	obs, _ := flightObserver(t, fs)
	// The frame's catalogue: the star and the Sun, culled at the origin.
	fr, err := j.Sky.Frame([]render.Options{{Projection: proj, Observer: obs}}, math.NaN())
	if err != nil {
		t.Fatal(err)
	}
	_, prep, err := fr.Stars(obs.Position)
	if err != nil {
		t.Fatal(err)
	}
	f, _, _, ex, err := j.RenderLinear(prep, fs, obs, proj)
	if err != nil {
		t.Fatal(err)
	}
	return f, len(ex.Knots)
}

// moments returns the summed luminance-like total (R+G+B) and the
// intensity-weighted variance of the image's x and y.
func moments(f *render.Frame) (sum, varX, varY float64) {
	var sx, sy, sxx, syy float64
	for y := 0; y < f.H; y++ {
		for x := 0; x < f.W; x++ {
			k := 3 * (y*f.W + x)
			v := float64(f.Pix[k]) + float64(f.Pix[k+1]) + float64(f.Pix[k+2])
			sum += v
			fx, fy := float64(x)+0.5, float64(y)+0.5
			sx += v * fx
			sy += v * fy
			sxx += v * fx * fx
			syy += v * fy * fy
		}
	}
	mx, my := sx/sum, sy/sum
	return sum, sxx/sum - mx*mx, syy/sum - my*my
}

// Motion blur keeps a star's light (summed flux within 1e-4 of the
// unblurred frame) and spreads it along the analytic on-screen path of a
// steady pan: at 30°/s and 10 fps a 180° shutter covers 1.5°, which a
// 60° pinhole 200 px wide maps to 1.5° × (100 px / tan 30°) × π/180 =
// 4.534 px at the centre (gnomonic projection, y = f·tan δ). The star is
// a streak of n = ⌈L/(0.75·FWHM)⌉ = 5 sub-positions at the midpoints of
// equal time steps (render.StreakSpacing), whose variance along the path,
// L²(n²−1)/(12n²), adds to the unblurred image's.
func TestMotionBlurPan(t *testing.T) {
	sharp, k0 := renderPan(t, 0)
	blur, k := renderPan(t, 180)
	if k0 != 0 || k != 3 {
		t.Fatalf("knots: %d with the shutter closed, %d open; want 0 and 3", k0, k)
	}
	s0, vx0, vy0 := moments(sharp)
	s1, vx1, vy1 := moments(blur)
	if rel := math.Abs(s1-s0) / s0; rel > 1e-4 {
		t.Errorf("summed flux %v blurred, %v sharp: relative change %.2g, want ≤ 1e-4", s1, s0, rel)
	}
	f := 100 / math.Tan(30*math.Pi/180)
	L := 1.5 * math.Pi / 180 * f
	n := math.Ceil(L / (render.StreakSpacing * render.DefaultFWHM))
	want := L * L * (n*n - 1) / (12 * n * n)
	if got := vy1 - vy0; math.Abs(got-want) > 0.02*want {
		t.Errorf("streak variance along the pan %.4f px², want %.4f (L = %.3f px, %v sub-positions)", got, want, L, n)
	}
	if math.Abs(vx1-vx0) > 0.01*vx0 {
		t.Errorf("the streak widened across the pan: variance %.4f → %.4f", vx0, vx1)
	}
	t.Logf("streak %.3f px of %v sub-positions, %d knots; variance %.4f → %.4f px²", L, n, k, vy0, vy1)
}

func flightObserver(t *testing.T, fs flight.FrameState) (camera.Observer, error) {
	t.Helper()
	o, err := flight.Observer(fs.State)
	if err != nil {
		t.Fatal(err)
	}
	return o, nil
}
