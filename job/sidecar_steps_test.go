package job

import (
	"context"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/imgfile"
	"github.com/skyframe/skyframe/render"
)

// orientOf returns the camera axes a sidecar records.
func orientOf(l render.Look) [3]r3.Vec {
	v := func(d render.Direction) r3.Vec { return camera.FromRADec(d.RA, d.Dec) }
	return [3]r3.Vec{v(l.Forward), v(l.Right), v(l.Up)}
}

// turn returns the angle in degrees of the rotation between two sets of
// orthonormal axes: ‖A − B‖_F = 2√2·sin(θ/2) for a rotation by θ (well
// conditioned at small angles, unlike the trace formula).
func turn(a, b [3]r3.Vec) float64 {
	s := 0.0
	for k := range a {
		s += r3.Norm2(r3.Sub(a[k], b[k]))
	}
	return 2 * math.Asin(math.Min(1, math.Sqrt(s)/(2*math.Sqrt2))) * 180 / math.Pi
}

// The check on the sample plan, made on what the frames' sidecars
// record: the per-frame angular step of the view changes smoothly — no
// frame-to-frame change larger than a quarter of the largest step — and
// decays to 0 at the final key rather than stopping; each step is the one
// the plan's camera takes (flight.Plan.MotionAt) to 1e-6°. The sample is
// loaded as the command loads it (Load) and rendered at 2 % of its size
// from its base catalogue with the shutter closed and no unresolved layer
// (the camera the sidecars record does not depend on them): every frame
// without -short, else runs of frames around each key and around the
// fastest swing.
func TestSamplePlanStepsFromSidecars(t *testing.T) {
	out := t.TempDir()
	j, _, err := Load(context.Background(), "../samples/plan.toml", LoadOptions{Out: out, Preview: 0.02, Every: 1, Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	j.Sky, j.Layers.Unresolved, j.UnresolvedFollows = nil, nil, false
	j.Frame.Shutter = 0
	prep, err := render.Prepare(j.Stars)
	if err != nil {
		t.Fatal(err)
	}
	p := j.Plan
	n := p.Frames()
	fps := p.Show.FPS
	keys := p.Camera.Look
	if len(keys) < 2 {
		t.Fatalf("the sample has %d camera keys", len(keys))
	}
	last := int(math.Ceil(keys[len(keys)-1].At * fps))
	want := map[int]bool{}
	if testing.Short() {
		fastest, top := 0, 0.0
		for i := 1; i < n; i++ {
			m, err := p.MotionAt(i)
			if err != nil {
				t.Fatal(err)
			}
			if m.StepDeg > top {
				fastest, top = i, m.StepDeg
			}
		}
		centres := []int{fastest}
		for _, k := range keys {
			centres = append(centres, int(math.Round(k.At*fps)))
		}
		for _, c := range centres {
			for i := max(c-25, 0); i <= min(c+25, n-1); i++ {
				want[i] = true
			}
		}
	} else {
		for i := range n {
			want[i] = true
		}
	}
	enc := &imgfile.PNGEncoder{Workers: 1}
	axes := map[int][3]r3.Vec{}
	for i := range n {
		if !want[i] {
			continue
		}
		if _, err := j.RenderFrame(prep, enc, i); err != nil {
			t.Fatal(err)
		}
		data, err := os.ReadFile(filepath.Join(out, filepath.FromSlash(j.Files(i).Sidecar)))
		if err != nil {
			t.Fatal(err)
		}
		if err := CheckSeal(data); err != nil {
			t.Fatalf("frame %d: %v", i, err)
		}
		var sc Sidecar
		if err := json.Unmarshal(data, &sc); err != nil {
			t.Fatal(err)
		}
		if sc.Flight.Frame != i {
			t.Fatalf("sidecar of frame %d says frame %d", i, sc.Flight.Frame)
		}
		axes[i] = orientOf(sc.Look)
	}
	steps := map[int]float64{}
	maxStep := 0.0
	for i := 1; i < n; i++ {
		a, okA := axes[i-1]
		b, okB := axes[i]
		if !okA || !okB {
			continue
		}
		steps[i] = turn(a, b)
		maxStep = max(maxStep, steps[i])
		m, err := p.MotionAt(i)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(steps[i]-m.StepDeg) > 1e-6 {
			t.Errorf("frame %d: the sidecars turn by %.9g°, the plan's camera by %.9g°", i, steps[i], m.StepDeg)
		}
	}
	worst, at := 0.0, 0
	for i := 2; i < n; i++ {
		s0, ok0 := steps[i-1]
		s1, ok1 := steps[i]
		if ok0 && ok1 && math.Abs(s1-s0) > worst {
			worst, at = math.Abs(s1-s0), i
		}
	}
	t.Logf("%d sidecars: largest step %.4g°/frame, largest frame-to-frame change %.3g° (frame %d); final key at frame %d", len(axes), maxStep, worst, at, last)
	if maxStep < 0.05 {
		t.Fatalf("largest step %.3g°: the sample's swing is missing from the frames read", maxStep)
	}
	if worst > maxStep/4 {
		t.Errorf("the step jumps by %.3g° at frame %d, more than a quarter of the largest step %.3g°", worst, at, maxStep)
	}
	s, ok := steps[last]
	if !ok {
		t.Fatalf("no step read at the final key's frame %d", last)
	}
	if s > 0.01*maxStep {
		t.Errorf("step %.3g° at the final key (frame %d), want it eased to 0", s, last)
	}
	// The half-turn's end key too: the steps shrink into it.
	end := int(math.Round(keys[2].At * fps)) // the half-turn's end (66 s)
	if s0, ok := steps[end-20]; !ok || !(s0 > steps[end-10] && steps[end-10] > steps[end] && steps[end] < 0.01*maxStep) {
		t.Errorf("steps into the half-turn's end key (frame %d): %.3g°, %.3g°, %.3g°; want them easing to 0", end, steps[end-20], steps[end-10], steps[end])
	}
}
