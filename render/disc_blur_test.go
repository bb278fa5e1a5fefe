package render

import (
	"math"
	"slices"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
)

// prepared returns the prepared form of the Sun seen from 1 au along dir
// (sunAt).
func preparedSun(t *testing.T, dir r3.Vec) *Prepared {
	t.Helper()
	p, err := Prepare(sunAt(dir, 1))
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// A steady pan across the Sun seen from 1 au as a disc (26.8 px of
// radius in a 2° pinhole 201 px wide): the blurred disc keeps the sharp
// disc's summed light within 1e-4, its centroid stays put, and it is
// smeared along the pan by the analytic on-screen path. The camera turns
// 0.1° during the exposure; the gnomonic projection x = f·tan α with
// f = 100.5 px / tan 1° moves the centre from −f·tan 0.05° to
// +f·tan 0.05°, L = 10.05 px. n sub-positions at the midpoints of equal
// time steps over a path of length L add L²(n²−1)/(12n²) to the variance
// along it (TestStreakPan's rule) and nothing across it.
func TestDiscMotionPan(t *testing.T) {
	p := preparedSun(t, axisX)
	knots := panKnots(t, camera.Pinhole, 201, 201, 2, 0.1, 3, camera.Observer{})
	opt := Options{Exposure: -20, Limit: math.Inf(1)}
	sharp, err := p.RenderMotion(opt, knots[1:2])
	if err != nil {
		t.Fatal(err)
	}
	blur, err := p.RenderMotion(opt, knots)
	if err != nil {
		t.Fatal(err)
	}
	if sharp.Stats.Drawn != 1 || blur.Stats.Drawn != 1 {
		t.Fatalf("drawn %d sharp, %d blurred; want the Sun", sharp.Stats.Drawn, blur.Stats.Drawn)
	}
	s0, mx0, my0, vx0, vy0 := streakMoments(sharp)
	s1, mx1, my1, vx1, vy1 := streakMoments(blur)
	if rel := math.Abs(s1-s0) / s0; rel > 1e-4 {
		t.Errorf("summed light %v blurred, %v sharp: relative change %.2g, want ≤ 1e-4", s1, s0, rel)
	}
	if d := math.Hypot(mx1-mx0, my1-my0); d > 0.01 {
		t.Errorf("centroid moved by %.4f px, from (%.4f, %.4f) to (%.4f, %.4f)", d, mx0, my0, mx1, my1)
	}
	f := 100.5 / math.Tan(math.Pi/180)
	L := 2 * f * math.Tan(0.05*math.Pi/180)
	// The disc is sampled 4×4 per pixel (26.8 px radius): n = ⌈4·L⌉.
	n := math.Ceil(4 * L)
	want := L * L * (n*n - 1) / (12 * n * n)
	got := vx1 - vx0
	gotL := math.Sqrt(12 * got * n * n / (n*n - 1))
	t.Logf("L = %.4f px, n = %v: variance along the pan %.4f → %.4f px² (+%.4f, analytic +%.4f), smear length %.4f px; across %.4f → %.4f",
		L, n, vx0, vx1, got, want, gotL, vy0, vy1)
	if math.Abs(got-want) > 0.01*want {
		t.Errorf("variance along the pan grew by %.4f px², analytic %.4f", got, want)
	}
	if math.Abs(gotL-L) > 0.005*L {
		t.Errorf("smear length %.4f px, analytic %.4f px", gotL, L)
	}
	if math.Abs(vy1-vy0) > 0.002*vy0 {
		t.Errorf("the disc widened across the pan: variance %.4f → %.4f", vy0, vy1)
	}
	// The blurred disc is the mean of the sharp disc at 41 instants
	// (each rendered whole): far inside, where the disc covers every
	// instant's pixel, it is the mean to sampling; the smeared ends
	// differ by the sub-positions' sampling.
	fine := panKnots(t, camera.Pinhole, 201, 201, 2, 0.1, 41, camera.Observer{})
	mean := make([]float64, len(blur.Pix))
	for _, k := range fine {
		g, err := p.RenderMotion(opt, []Instant{k})
		if err != nil {
			t.Fatal(err)
		}
		for i, v := range g.Pix {
			mean[i] += float64(v) / float64(len(fine))
		}
	}
	peak, diff := 0.0, 0.0
	for i, v := range blur.Pix {
		peak = math.Max(peak, mean[i])
		diff = math.Max(diff, math.Abs(float64(v)-mean[i]))
	}
	t.Logf("largest difference from the mean of 41 instants: %.3g of the peak", diff/peak)
	if diff > 0.05*peak {
		t.Errorf("blurred disc differs from the mean of 41 instants by %.3g (peak %.3g)", diff, peak)
	}
}

// A disc that crosses a cube face edge during the exposure keeps its
// light (within 1e-4 of the sharp disc at the frame's instant, which
// straddles the edge), and both faces get some of it.
func TestDiscMotionCubeEdge(t *testing.T) {
	// The Sun from 1 au (0.27°) is 2.8 px in radius at a face edge of
	// 600 px; a pan of 0.5° moves it 5.2 px there.
	const h = 600
	p := preparedSun(t, r3.Vec{X: math.Cos(math.Pi / 4), Y: math.Sin(math.Pi / 4)})
	knots := panKnots(t, camera.Cube, 6*h, h, 0, 0.5, 3, camera.Observer{})
	opt := Options{Exposure: -20, Limit: math.Inf(1), Workers: 2}
	sharp, err := p.RenderMotion(opt, knots[1:2])
	if err != nil {
		t.Fatal(err)
	}
	blur, err := p.RenderMotion(opt, knots)
	if err != nil {
		t.Fatal(err)
	}
	s0, s1 := frameSum(sharp, 0, sharp.W), frameSum(blur, 0, blur.W)
	fwd, side := frameSum(blur, 4*h, 5*h)/s1, frameSum(blur, h, 2*h)/s1
	t.Logf("sharp %.6g, blurred %.6g (%.2g); forward face %.4f, side face %.4f", s0, s1, s1/s0-1, fwd, side)
	if rel := math.Abs(s1-s0) / s0; rel > 1e-4 {
		t.Errorf("summed light %v blurred, %v sharp: relative change %.2g", s1, s0, rel)
	}
	if !(fwd > 0.2 && side > 0.2) || math.Abs(fwd+side-1) > 1e-6 {
		t.Errorf("faces' shares %.4f (forward) and %.4f (side), want both, summing to 1", fwd, side)
	}
}

// Moving discs are bit-identical for any worker count, and a disc whose
// knots are all the same is drawn exactly as Render draws it.
func TestDiscMotionDeterministic(t *testing.T) {
	p := preparedSun(t, axisX)
	knots := panKnots(t, camera.Fisheye, 301, 301, 3, 0.2, 5, camera.Observer{})
	var ref *Frame
	for _, workers := range []int{1, 2, 5} {
		f, err := p.RenderMotion(Options{Exposure: -20, Limit: math.Inf(1), Workers: workers}, knots)
		if err != nil {
			t.Fatal(err)
		}
		if ref == nil {
			ref = f
		} else if !slices.Equal(f.Pix, ref.Pix) {
			t.Errorf("%d workers differ from 1", workers)
		}
	}
	in := knots[2]
	opt := Options{Projection: in.Projection, Observer: in.Observer, Exposure: -20, Limit: math.Inf(1)}
	want, err := p.Render(opt)
	if err != nil {
		t.Fatal(err)
	}
	got, err := p.RenderMotion(opt, []Instant{in, in, in})
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(got.Pix, want.Pix) {
		t.Error("a disc with three equal knots differs from Render's")
	}
}

// BenchmarkDiscMotion draws the Sun from 1 au as a 27 px disc, sharp and
// moved 10 px during the exposure, in a 2° pinhole 201 px wide.
func BenchmarkDiscMotion(b *testing.B) {
	p, err := Prepare(sunAt(axisX, 1))
	if err != nil {
		b.Fatal(err)
	}
	knots := panKnots(b, camera.Pinhole, 201, 201, 2, 0.1, 3, camera.Observer{})
	for _, c := range []struct {
		name  string
		knots []Instant
	}{{"sharp", knots[1:2]}, {"moving", knots}} {
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := p.RenderMotion(Options{Exposure: -20, Limit: math.Inf(1)}, c.knots); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
