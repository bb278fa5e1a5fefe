package job

import (
	"fmt"
	"math"
	"os"
	"testing"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/flight"
	"github.com/skyframe/skyframe/render"
)

// panPlan is a steady pan: the camera turns from Dec −20° to +20° over
// 2 s at 10 fps, so at 1 s (frame 10) it moves at the smoothstep's peak
// rate 1.5 × 40°/2 s = 30°/s; the ship is at rest at the Sun.
func panPlan(t *testing.T) *flight.Plan {
	t.Helper()
	p, err := flight.ParsePlan([]byte(`
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

[[camera.look]]
at = 0
look = "0,-20"

[[camera.look]]
at = 2
look = "0,20"
`), "pan.toml")
	if err != nil {
		t.Fatal(err)
	}
	if err := p.Bind(nil); err != nil {
		t.Fatal(err)
	}
	return p
}

func pinhole200(fs flight.FrameState) (camera.Projection, error) {
	p := camera.Projection{Kind: camera.Pinhole, Width: 200, Height: 100, FOV: fs.Camera.FOV, Orient: fs.Camera.Orient}
	return p, p.Prepare()
}

// The exposure of a frame mid-pan at 30°/s and 10 fps with a 180° shutter
// spans 1.5° of turn: at the centre of a 60° pinhole 200 px wide that is
// 2·(100 px/tan 30°)·tan 0.75° = 4.53 px (gnomonic projection), and the
// probes nearer the edges move a little more. Three knots at −¼, 0, ¼
// frame intervals follow it (a steady pan curves little), and the diffuse
// layers take the 2-point Gauss–Legendre instants ±¼/√3. A closed shutter
// and a frame of the final hold (camera at rest) are their instant alone.
func TestPlanExposure(t *testing.T) {
	p := panPlan(t)
	e, err := PlanExposure(p, 10, 180, 1.5, pinhole200)
	if err != nil {
		t.Fatal(err)
	}
	centre := 2 * 100 / math.Tan(30*math.Pi/180) * math.Tan(0.75*math.Pi/180)
	if e.Path < centre || e.Path > 1.2*centre {
		t.Errorf("path %.4f px, want at least the centre's %.4f and within 20 %%", e.Path, centre)
	}
	if fmt.Sprint(e.Knots) != "[-0.25 0 0.25]" || e.KnotError > render.KnotTolerance {
		t.Errorf("knots %v (error %.3g px), want [-0.25 0 0.25]", e.Knots, e.KnotError)
	}
	g := 0.25 / math.Sqrt(3)
	if len(e.Layers) != 2 || math.Abs(math.Abs(e.Layers[0])-g) > 1e-15 || e.Layers[0] != -e.Layers[1] || e.LayerWeights[0] != 0.5 {
		t.Errorf("layer instants %v weights %v, want ±%v, ½ each", e.Layers, e.LayerWeights, g)
	}
	in, err := Instants(p, 10, e.Knots, pinhole200)
	if err != nil {
		t.Fatal(err)
	}
	fs, _ := p.FrameState(10)
	mid, _ := pinhole200(fs)
	if in[1].Projection.Orient != mid.Orient {
		t.Errorf("the middle knot's camera %+v is not the frame's %+v", in[1].Projection.Orient, mid.Orient)
	}
	for _, c := range []struct {
		frame   int
		shutter float64
	}{{10, 0}, {p.Frames() - 1, 180}} {
		e, err := PlanExposure(p, c.frame, c.shutter, 1.5, pinhole200)
		if err != nil {
			t.Fatal(err)
		}
		if e.Knots != nil || e.Layers != nil {
			t.Errorf("frame %d, shutter %v: knots %v layers %v, want the instant alone (path %.3g px)", c.frame, c.shutter, e.Knots, e.Layers, e.Path)
		}
	}
}

// The sample flight keeps a 180° shutter, and its fastest camera swing is
// blurred: three knots (a swing within the comfort limit curves little
// in one frame), a streak of a few pixels — under the ~8 px the speed
// target assumes — and the diffuse layers at two instants.
func TestSamplePlanBlur(t *testing.T) {
	data, err := os.ReadFile("../samples/plan.toml")
	if err != nil {
		t.Fatal(err)
	}
	p, err := flight.ParsePlan(data, "plan.toml")
	if err != nil {
		t.Fatal(err)
	}
	// The built-in sky with the Sun and the voyage's stand-off, as Load
	// binds the sample (which starts 1 au from the Sun and keys the
	// camera on it).
	stars := catalog.WithSun(catalog.BuiltIn(), [3]float64{1, 0, 0})
	p.StandOff = flight.StarsStandOff(stars, stars.Find)
	if err := p.Bind(flight.StarsResolver(stars, stars.Find)); err != nil {
		t.Fatal(err)
	}
	fr := p.Frame.Frame()
	if fr.Shutter != 180 {
		t.Fatalf("sample plan shutter %v°, want 180°", fr.Shutter)
	}
	fastest, px := 0, 0.0
	for i := 1; i < p.Frames(); i++ {
		m, err := p.MotionAt(i)
		if err != nil {
			t.Fatal(err)
		}
		if m.ScreenPx > px {
			fastest, px = i, m.ScreenPx
		}
	}
	proj := func(fs flight.FrameState) (camera.Projection, error) {
		q := camera.Projection{Kind: fr.Kind, Width: fr.Width, Height: fr.Height, FOV: fs.Camera.FOV, Tilt: fs.Camera.Tilt, Orient: fs.Camera.Orient}
		return q, q.Prepare()
	}
	e, err := PlanExposure(p, fastest, fr.Shutter, fr.FWHM, proj)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("fastest swing at frame %d: %.2f px per frame at the centre; exposure path %.2f px, %d knots, %d layer instants", fastest, px, e.Path, len(e.Knots), len(e.Layers))
	if len(e.Knots) != 3 || len(e.Layers) != 2 || e.Path > 8 || e.Path < 0.5*px/2 {
		t.Errorf("frame %d: path %.2f px (centre %.2f px per frame), knots %v, layer instants %v", fastest, e.Path, px, e.Knots, e.Layers)
	}
}
