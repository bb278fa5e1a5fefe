package render

import (
	"fmt"
	"math"
	"slices"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
)

// equatorStar returns a catalogue of one star on the equator at azimuth
// az degrees (ICRS: toward +X at 0°, +Y at 90°).
func equatorStar(az float64) *Prepared {
	s, c := math.Sincos(az * math.Pi / 180)
	p, err := Prepare(one(r3.Vec{X: c, Y: s}, 2, 5800))
	if err != nil {
		panic(err)
	}
	return p
}

// panKnotsFor returns the knots ChooseKnots picks (tolerance
// KnotTolerance) for a camera panning uniformly by delta degrees about the
// z axis (panKnots), following star direction n.
func panKnotsFor(t *testing.T, kind camera.Kind, w, h int, fov, delta float64, n r3.Vec) []Instant {
	t.Helper()
	k, _, err := ChooseKnots(1, 0, func(u float64, xs, ys []float64) error {
		in := panKnots(t, kind, w, h, fov, delta*u, 2, camera.Observer{})[1]
		xs[0], ys[0], _ = in.Projection.Forward(n)
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	return panKnots(t, kind, w, h, fov, delta, k, camera.Observer{})
}

// frameSum returns the summed R+G+B of f over columns [c0, c1).
func frameSum(f *Frame, c0, c1 int) float64 {
	s := 0.0
	for y := 0; y < f.H; y++ {
		for x := c0; x < c1; x++ {
			k := 3 * (y*f.W + x)
			s += float64(f.Pix[k]) + float64(f.Pix[k+1]) + float64(f.Pix[k+2])
		}
	}
	return s
}

// A star that crosses a flat frame's edge during the exposure is streaked
// up to the edge: the light in the frame is the star's flux times the
// fraction of the exposure it spends inside. A 60° pinhole 200 px wide
// panning uniformly by 16° shows a star on the equator at relative azimuth
// α(u) = α₀ − 8°·u (u from −1 to 1 over the exposure) at
// x = 100 px + f·tan(−α), f = 100 px / tan 30° (gnomonic projection), so
// it is inside while |α| < 30°. With α₀ = −26° that is u < ½: three
// quarters of the exposure. The PSF's spill across the edge cancels in
// the time integral (the kernel's share inside at distance d and outside
// at −d sum to 1) because the path runs 15 px past the edge on the
// outside, beyond the kernel's reach.
func TestStreakFrameEdge(t *testing.T) {
	for _, c := range []struct {
		az, want float64 // star azimuth (degrees), in-frame fraction
	}{
		{-26, 0.75}, {-30, 0.5}, {26, 0.75}, {-33, 0.3125},
	} {
		p := equatorStar(c.az)
		s, co := math.Sincos(c.az * math.Pi / 180)
		knots := panKnotsFor(t, camera.Pinhole, 200, 100, 60, 16, r3.Vec{X: co, Y: s})
		blur, err := p.RenderMotion(Options{Exposure: 2}, knots)
		if err != nil {
			t.Fatal(err)
		}
		// The unblurred star, in the middle of the frame.
		ref, err := equatorStar(0).RenderMotion(Options{Exposure: 2}, knots[len(knots)/2:len(knots)/2+1])
		if err != nil {
			t.Fatal(err)
		}
		got := frameSum(blur, 0, blur.W) / frameSum(ref, 0, ref.W)
		t.Logf("azimuth %v°: %d knots, in-frame fraction %.5f, analytic %.5f", c.az, len(knots), got, c.want)
		if math.Abs(got-c.want) > 1e-3 {
			t.Errorf("azimuth %v°: in-frame fraction %.5f, analytic %.5f", c.az, got, c.want)
		}
	}
}

// A star that crosses from one cube face to the next during the exposure
// is streaked on both: their summed light is the unblurred star's (within
// 1e-4), and each face gets the fraction of the exposure the star spends on
// it. On the equator at relative azimuth α the star is on the forward face
// (4, columns 400–499 of a 600×100 strip) while |α| < 45° and on the
// −right face (1, columns 100–199) beyond +45°. A pan of 8° with
// α(u) = α₀ − 4°·u puts it on face 4 for u > (α₀ − 45°)/4°. The knots are
// three, as ChooseKnots gives a uniform pan whose probes stay on their
// faces (flight.Plan.ExposureProbes drops a probe that changes face), so
// the path is interpolated across the edge.
func TestStreakCubeFaceEdge(t *testing.T) {
	const h = 100
	for _, c := range []struct {
		az, onForward float64
	}{
		{46, 0.375}, {45, 0.5}, {43, 0.75}, {47.5, 0.1875},
	} {
		p := equatorStar(c.az)
		knots := panKnots(t, camera.Cube, 6*h, h, 0, 8, 3, camera.Observer{})
		blur, err := p.RenderMotion(Options{Exposure: 2}, knots)
		if err != nil {
			t.Fatal(err)
		}
		ref, err := equatorStar(0).RenderMotion(Options{Exposure: 2}, knots[len(knots)/2:len(knots)/2+1])
		if err != nil {
			t.Fatal(err)
		}
		total := frameSum(ref, 0, ref.W)
		if r := frameSum(ref, 4*h, 5*h) / total; math.Abs(r-1) > 1e-6 {
			t.Fatalf("the reference star at the face centre has %.7f of its light on its face", r)
		}
		all := frameSum(blur, 0, blur.W) / total
		fwd := frameSum(blur, 4*h, 5*h) / total
		side := frameSum(blur, h, 2*h) / total
		t.Logf("azimuth %v°: %d knots; total %.7f, forward face %.5f (analytic %.5f), side %.5f",
			c.az, len(knots), all, fwd, c.onForward, side)
		if math.Abs(all-1) > 1e-4 {
			t.Errorf("azimuth %v°: summed light %.7f of the unblurred star's, want 1 within 1e-4", c.az, all)
		}
		if math.Abs(fwd+side-all) > 1e-6 {
			t.Errorf("azimuth %v°: light on faces other than 1 and 4: %.3g", c.az, all-fwd-side)
		}
		// The quadratic through three unit vectors on the pan's circle
		// reaches the edge at a time off by at most 3·10⁻⁴ of the
		// exposure for this pan (the pan's direction error is O(δ³)).
		if math.Abs(fwd-c.onForward) > 1e-3 {
			t.Errorf("azimuth %v°: forward face has %.5f of the light, analytic %.5f", c.az, fwd, c.onForward)
		}
	}
}

// A star that passes behind a pinhole's image plane during the exposure
// (a 150° pinhole panning 60°) is streaked while it is in the frame: the
// light there is the star's flux times the fraction of the exposure it is
// inside, |α| < 75° (α = α₀ − 30°·u, α₀ = −80°: u < −1/6, 5/12 of the
// exposure). It used to be drawn at its middle position, unblurred.
func TestStreakBehindPinhole(t *testing.T) {
	p := equatorStar(-80)
	s, co := math.Sincos(-80 * math.Pi / 180)
	n := r3.Vec{X: co, Y: s}
	// Nine knots: the quadratic through three unit vectors 30° apart
	// lags a uniform pan by 0.2° at the edge; through 7.5° by 10″.
	knots := panKnots(t, camera.Pinhole, 400, 100, 150, 60, 9, camera.Observer{})
	if _, _, ok := knots[len(knots)-1].Projection.Forward(n); ok {
		t.Fatal("the star is in front of the last knot's camera; the test wants it behind")
	}
	blur, err := p.RenderMotion(Options{Exposure: 2}, knots)
	if err != nil {
		t.Fatal(err)
	}
	ref, err := equatorStar(0).RenderMotion(Options{Exposure: 2}, knots[len(knots)/2:len(knots)/2+1])
	if err != nil {
		t.Fatal(err)
	}
	got := frameSum(blur, 0, blur.W) / frameSum(ref, 0, ref.W)
	want := 5.0 / 12
	t.Logf("%d knots: in-frame fraction %.5f, analytic %.5f", len(knots), got, want)
	if math.Abs(got-want) > 1e-3 {
		t.Errorf("in-frame fraction %.5f, analytic %.5f", got, want)
	}
}

// Listed streaks keep RenderMotion bit-identical for any worker count: a
// cube strip and a wide pinhole panning fast under many stars.
func TestStreakEdgeWorkersIdentical(t *testing.T) {
	p, err := Prepare(randomStars(30000, -1, 9, 11))
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		kind      camera.Kind
		w, h      int
		fov, pan  float64
		knotCount int
	}{
		{camera.Cube, 600, 100, 0, 6, 5},
		{camera.Pinhole, 400, 100, 150, 40, 9},
	} {
		knots := panKnots(t, c.kind, c.w, c.h, c.fov, c.pan, c.knotCount, observer(t, axisX, 0.3))
		var ref *Frame
		for _, workers := range []int{1, 2, 5} {
			f, err := p.RenderMotion(Options{Exposure: 3, Doppler: true, Workers: workers}, knots)
			if err != nil {
				t.Fatal(err)
			}
			if ref == nil {
				ref = f
				continue
			}
			if !slices.Equal(f.Pix, ref.Pix) || !slices.Equal(f.Doppler, ref.Doppler) {
				t.Errorf("%v: %d workers differ from 1", c.kind, workers)
			}
		}
	}
}

// BenchmarkRenderMotionCube renders 10⁶ random stars (V −1 to 12) at
// 0.9 c into a 6×512² cube strip, unblurred and streaked during a 1° pan
// (a 4.5 px streak at a face centre, 9 px at its side edges), where the
// stars crossing the four side edges of the ring of faces are listed.
func BenchmarkRenderMotionCube(b *testing.B) {
	n := 1_000_000
	if testing.Short() {
		n /= 10
	}
	p, err := Prepare(randomStars(n, -1, 12, 13))
	if err != nil {
		b.Fatal(err)
	}
	obs := observer(b, r3.Unit(r3.Vec{X: 1, Y: 1}), 0.9)
	knots := panKnots(b, camera.Cube, 6*512, 512, 0, 1, 3, obs)
	for _, blur := range []bool{false, true} {
		k := knots[1:2]
		if blur {
			k = knots
		}
		b.Run(fmt.Sprintf("streaks=%v", blur), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := p.RenderMotion(Options{Exposure: 4}, k); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
