package flight

import (
	"math"
	"os"
	"testing"

	"github.com/skyframe/skyframe/catalog"
)

func loadPlan(t *testing.T, path string) *Plan {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	p, err := ParsePlan(data, path)
	if err != nil {
		t.Fatal(err)
	}
	if p.NeedsResolver() {
		// The built-in sky with the Sun and the stand-off of a voyage,
		// as job.Load binds a plan that does not start at the Sun (the
		// sample starts 1 au from it).
		stars := catalog.WithSun(catalog.BuiltIn(), [3]float64{1, 0, 0})
		p.StandOff = StarsStandOff(stars, stars.Find)
		if err := p.Bind(StarsResolver(stars, stars.Find)); err != nil {
			t.Fatal(err)
		}
	}
	return p
}

// Camera moves ease in and out of every key (issue check for the sample
// plans): the per-frame rotation of the view changes smoothly — no
// frame-to-frame change larger than a quarter of the largest step — and
// decays to zero at the final key instead of stopping dead; the sample
// stays within the comfort limit.
func TestCameraMovesSmooth(t *testing.T) {
	for _, path := range []string{"../samples/plan.toml", "../testdata/plans/voyage.toml"} {
		p := loadPlan(t, path)
		n := p.Frames()
		steps := make([]float64, n)
		maxStep := 0.0
		for i := 1; i < n; i++ {
			m, err := p.MotionAt(i)
			if err != nil {
				t.Fatal(err)
			}
			steps[i] = m.StepDeg
			maxStep = max(maxStep, m.StepDeg)
		}
		if maxStep == 0 {
			t.Fatalf("%s: the camera never moves", path)
		}
		worst, at := 0.0, 0
		for i := 2; i < n; i++ {
			if d := math.Abs(steps[i] - steps[i-1]); d > worst {
				worst, at = d, i
			}
		}
		if worst > maxStep/4 {
			t.Errorf("%s: angular step jumps by %.3g° at frame %d (largest step %.3g°)", path, worst, at, maxStep)
		}
		last := p.looks[len(p.looks)-1]
		k := int(math.Ceil(last.at * p.Show.FPS))
		if k < n && steps[k] > 0.01*maxStep {
			t.Errorf("%s: step %.3g° at the final key (frame %d), want it eased to 0 (largest %.3g°)", path, steps[k], k, maxStep)
		}
		t.Logf("%s: largest step %.3g°/frame, largest change %.3g° at frame %d", path, maxStep, worst, at)
	}
	st, err := ComfortStretches(loadPlan(t, "../samples/plan.toml"), Range{First: 0, Last: -1})
	if err != nil || len(st) != 0 {
		t.Errorf("the sample plan exceeds the comfort limit: %+v %v", st, err)
	}
}

// Ease is the smoothstep: 0 and 1 at the ends with zero slope, ½ halfway.
func TestEase(t *testing.T) {
	const h = 1e-6
	for _, c := range []struct{ w, v, slope float64 }{{0, 0, 0}, {1, 1, 0}, {0.5, 0.5, 1.5}} {
		if Ease(c.w) != c.v {
			t.Errorf("Ease(%v) = %v, want %v", c.w, Ease(c.w), c.v)
		}
		if s := (Ease(c.w+h) - Ease(c.w-h)) / (2 * h); math.Abs(s-c.slope) > 1e-5 {
			t.Errorf("Ease'(%v) = %v, want %v", c.w, s, c.slope)
		}
	}
}
