package render

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
)

// panKnots returns k knots of a camera turning uniformly about the z axis
// (up) from azimuth −δ/2 to +δ/2 (degrees), looking along the equator,
// seen by obs.
func panKnots(t testing.TB, kind camera.Kind, w, h int, fov, delta float64, k int, obs camera.Observer) []Instant {
	t.Helper()
	out := make([]Instant, k)
	for i := range out {
		az := (-delta/2 + delta*float64(i)/float64(k-1)) * math.Pi / 180
		o, err := camera.LookAt(r3.Vec{X: math.Cos(az), Y: math.Sin(az)}, axisZ, 0)
		if err != nil {
			t.Fatal(err)
		}
		out[i] = Instant{Observer: obs, Projection: camera.Projection{Kind: kind, Width: w, Height: h, FOV: fov, Orient: o}}
	}
	return out
}

// streakMoments returns the summed R+G+B of f and the intensity-weighted
// mean and variance of x and y (pixel centres).
func streakMoments(f *Frame) (sum, mx, my, vx, vy float64) {
	var sx, sy, sxx, syy float64
	for y := 0; y < f.H; y++ {
		for x := 0; x < f.W; x++ {
			k := 3 * (y*f.W + x)
			v := float64(f.Pix[k]) + float64(f.Pix[k+1]) + float64(f.Pix[k+2])
			fx, fy := float64(x)+0.5, float64(y)+0.5
			sum += v
			sx += v * fx
			sy += v * fy
			sxx += v * fx * fx
			syy += v * fy * fy
		}
	}
	mx, my = sx/sum, sy/sum
	return sum, mx, my, sxx/sum - mx*mx, syy/sum - my*my
}

// A steady pan across one star: the streak keeps the star's summed flux
// (within 1e-4 of the unblurred frame), its centroid stays where the star
// is at the frame's instant, and its length is the analytic on-screen
// path. The camera turns 1.5° during the exposure; a 60° pinhole 200 px
// wide has f = 100 px / tan 30° (gnomonic projection, x = f·tan α), so a
// star on the axis at the middle knot moves from −f·tan 0.75° to
// +f·tan 0.75°: L = 4.5345 px. n sub-positions at the midpoints of equal
// time steps of a path of length L have variance L²(n²−1)/(12n²) along
// it, which adds to the unblurred image's; n = ⌈L/(0.75·FWHM)⌉ = 5.
func TestStreakPan(t *testing.T) {
	stars := one(axisX, 2, 5800)
	p, err := Prepare(stars)
	if err != nil {
		t.Fatal(err)
	}
	obs := observer(t, axisX, 0)
	knots := panKnots(t, camera.Pinhole, 200, 100, 60, 1.5, 3, obs)
	opt := Options{Exposure: 2}
	sharp, err := p.RenderMotion(opt, knots[1:2])
	if err != nil {
		t.Fatal(err)
	}
	blur, err := p.RenderMotion(opt, knots)
	if err != nil {
		t.Fatal(err)
	}
	s0, mx0, my0, vx0, vy0 := streakMoments(sharp)
	s1, mx1, my1, vx1, vy1 := streakMoments(blur)
	if rel := math.Abs(s1-s0) / s0; rel > 1e-4 {
		t.Errorf("summed flux %v streaked, %v sharp: relative change %.2g, want ≤ 1e-4", s1, s0, rel)
	}
	if math.Hypot(mx1-mx0, my1-my0) > 1e-3 {
		t.Errorf("centroid moved from (%.4f, %.4f) to (%.4f, %.4f)", mx0, my0, mx1, my1)
	}
	f := 100 / math.Tan(30*math.Pi/180)
	L := 2 * f * math.Tan(0.75*math.Pi/180)
	n := math.Ceil(L / (StreakSpacing * DefaultFWHM))
	if n != 5 {
		t.Fatalf("expected 5 sub-positions for L = %.4f px, the rule gives %v", L, n)
	}
	want := L * L * (n*n - 1) / (12 * n * n)
	if got := vx1 - vx0; math.Abs(got-want) > 0.01*want {
		t.Errorf("streak variance along the pan %.5f px², want %.5f (L = %.4f px, n = %v)", got, want, L, n)
	}
	if got := math.Sqrt(12 * (vx1 - vx0) * n * n / (n*n - 1)); math.Abs(got-L) > 0.005*L {
		t.Errorf("streak length %.4f px, analytic %.4f px", got, L)
	}
	if math.Abs(vy1-vy0) > 0.01*vy0 {
		t.Errorf("the streak widened across the pan: variance %.5f → %.5f", vy0, vy1)
	}
	// The same exposure as 65 instants, each rendered whole and averaged:
	// the streak is their continuous limit, so the two agree closely.
	fine := panKnots(t, camera.Pinhole, 200, 100, 60, 1.5, 65, obs)
	var mean []float64
	for _, k := range fine {
		g, err := p.RenderMotion(opt, []Instant{k})
		if err != nil {
			t.Fatal(err)
		}
		if mean == nil {
			mean = make([]float64, len(g.Pix))
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
	// 5 sub-positions against 65 instants: the streak ripples by under
	// 0.5 % along its length and its ends differ by the sampling.
	if diff > 0.05*peak {
		t.Errorf("streak differs from the mean of 65 instants by %.3g (peak %.3g)", diff, peak)
	}
	t.Logf("L = %.4f px, n = %v; variance %.5f → %.5f px²; max difference from 65 instants %.2g of peak", L, n, vx0, vx1, diff/peak)
}

// With every knot the same, nothing moves and RenderMotion is Render, bit
// for bit (every star is a single deposit at the middle knot).
func TestStreakStillIsRender(t *testing.T) {
	p, err := Prepare(randomStars(20000, -1, 9, 5))
	if err != nil {
		t.Fatal(err)
	}
	obs := observer(t, r3.Unit(r3.Vec{X: 1, Y: 1}), 0.9)
	for _, kind := range []camera.Kind{camera.Pinhole, camera.Fisheye, camera.Equirect, camera.Cube} {
		w, h := 320, 200
		if kind == camera.Cube {
			w, h = 600, 100
		}
		in := Instant{Observer: obs, Projection: proj(t, kind, w, h)}
		opt := Options{Projection: in.Projection, Observer: obs, Exposure: 3, Doppler: true}
		want, err := p.Render(opt)
		if err != nil {
			t.Fatal(err)
		}
		got, err := p.RenderMotion(opt, []Instant{in, in, in, in, in})
		if err != nil {
			t.Fatal(err)
		}
		if !slices.Equal(got.Pix, want.Pix) || !slices.Equal(got.Doppler, want.Doppler) {
			t.Errorf("%v: RenderMotion with five equal knots differs from Render", kind)
		}
		if got.Stats.Drawn != want.Stats.Drawn || got.Stats.OffFrame != want.Stats.OffFrame || got.Stats.Culled != want.Stats.Culled {
			t.Errorf("%v: stats %+v, Render's %+v", kind, got.Stats, want.Stats)
		}
	}
}

// Streaks are bit-identical for any worker count, for every projection,
// with several segments, an accelerating observer and the Doppler channel.
func TestStreakWorkersIdentical(t *testing.T) {
	p, err := Prepare(randomStars(30000, -1, 9, 7))
	if err != nil {
		t.Fatal(err)
	}
	for _, kind := range []camera.Kind{camera.Pinhole, camera.Fisheye, camera.Equirect, camera.Cube} {
		w, h, fov := 320, 200, 90.0
		if kind == camera.Cube {
			w, h = 600, 100
		}
		knots := panKnots(t, kind, w, h, fov, 4, 5, observer(t, axisX, 0.5))
		for i := range knots {
			knots[i].Observer = observer(t, r3.Unit(r3.Vec{X: 1, Y: 1}), 0.5+0.01*float64(i))
		}
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
				t.Errorf("%v: %d workers differ from 1", kind, workers)
			}
		}
	}
}

// A star crossing an equirectangular frame's ±180° seam keeps its flux and
// its streak is continuous across the seam (lit on both edges).
func TestStreakEquirectSeam(t *testing.T) {
	p, err := Prepare(one(r3.Vec{X: -1}, 2, 5800))
	if err != nil {
		t.Fatal(err)
	}
	knots := panKnots(t, camera.Equirect, 360, 180, 0, 4, 3, observer(t, axisX, 0))
	opt := Options{Exposure: 2}
	sharp, err := p.RenderMotion(opt, knots[1:2])
	if err != nil {
		t.Fatal(err)
	}
	blur, err := p.RenderMotion(opt, knots)
	if err != nil {
		t.Fatal(err)
	}
	s0, _, _, _, _ := streakMoments(sharp)
	s1, _, _, _, _ := streakMoments(blur)
	if rel := math.Abs(s1-s0) / s0; rel > 1e-4 {
		t.Errorf("summed flux %v streaked, %v sharp: relative change %.2g", s1, s0, rel)
	}
	row := 90
	lit := func(x int) float32 { r, _, _ := blur.At(x, row); return r }
	// 4° of pan is 4 px here: the streak reaches 2 px either side of the
	// seam, beyond the PSF's own 2.5 px reach.
	if lit(2) == 0 || lit(357) == 0 || lit(3) == 0 || lit(356) == 0 {
		t.Errorf("streak not on both sides of the seam: x=2,3: %g %g; x=356,357: %g %g", lit(2), lit(3), lit(356), lit(357))
	}
	if r, _, _ := sharp.At(3, row); r >= lit(3) {
		t.Errorf("the sharp star reaches x=3 as far as the streak does (%g ≥ %g)", r, lit(3))
	}
}

func TestRenderMotionErrors(t *testing.T) {
	p, err := Prepare(one(axisX, 2, 5800))
	if err != nil {
		t.Fatal(err)
	}
	knots := panKnots(t, camera.Pinhole, 200, 100, 60, 1, 3, observer(t, axisX, 0))
	if _, err := p.RenderMotion(Options{}, knots[:2]); !errors.Is(err, ErrMotion) {
		t.Errorf("two knots: %v, want ErrMotion", err)
	}
	bad := slices.Clone(knots)
	bad[2].Projection.Width = 300
	if _, err := p.RenderMotion(Options{}, bad); !errors.Is(err, ErrMotion) {
		t.Errorf("knots of different sizes: %v, want ErrMotion", err)
	}
	long := make([]Instant, MaxKnots+2)
	for i := range long {
		long[i] = knots[0]
	}
	if _, err := p.RenderMotion(Options{}, long); !errors.Is(err, ErrMotion) {
		t.Errorf("%d knots: %v, want ErrMotion", len(long), err)
	}
}

// quadError returns the largest distance between the exact path
// path(u), u ∈ [−1, 1] (evenly spaced knots at u = −1 + 2k/(K−1)), and
// the renderer's piecewise quadratic through K knots, over 1024 times.
func quadError(path func(u float64) (float64, float64), K int) float64 {
	segs := (K - 1) / 2
	worst := 0.0
	const steps = 1024
	for i := 0; i <= steps; i++ {
		u := -1 + 2*float64(i)/steps
		// Segment s spans u from −1 + 2s/segs to −1 + 2(s+1)/segs.
		s := min(int((u+1)/2*float64(segs)), segs-1)
		ua, ub := -1+2*float64(s)/float64(segs), -1+2*float64(s+1)/float64(segs)
		um := (ua + ub) / 2
		x0, y0 := path(ua)
		x1, y1 := path(um)
		x2, y2 := path(ub)
		v := (u - um) / (ub - um)
		qx := x1 + v*((x2-x0)/2+v*(x2-2*x1+x0)/2)
		qy := y1 + v*((y2-y0)/2+v*(y2-2*y1+y0)/2)
		ex, ey := path(u)
		worst = math.Max(worst, math.Hypot(qx-ex, qy-ey))
	}
	return worst
}

// pathLen is the length of path over u ∈ [−1, 1].
func pathLen(path func(u float64) (float64, float64)) float64 {
	L := 0.0
	px, py := path(-1)
	for i := 1; i <= 1024; i++ {
		x, y := path(-1 + 2*float64(i)/1024)
		L += math.Hypot(x-px, y-py)
		px, py = x, y
	}
	return L
}

// The knot count. Three knots (one quadratic) follow the exact apparent
// path of a star within KnotTolerance for paths of 64 px under a uniform
// pan over a 90° pinhole (corner stars, where the gnomonic stretch is
// largest), a roll seen at a 4096² fisheye's rim (circular arcs) and a
// ship accelerating at 0.9 c seen sideways (aberration sweeping the sky).
// A pan starting from rest within the exposure (angle ∝ time², an
// extreme eased key: 1.8° in one exposure) curves its path in time far
// more: there, and for a 500 px roll, ChooseKnots adds knots. The path
// through the knots chosen is checked densely (1024 times) against the
// exact one; a motion that three knots follow within half the tolerance
// must get three.
func TestStreakKnots(t *testing.T) {
	type motion struct {
		name string
		// at returns the pixel of direction n at time u for a motion of
		// size s (degrees or rapidity).
		at    func(s, u float64, n r3.Vec) (float64, float64)
		n     []r3.Vec // directions to follow
		L     float64  // longest path, px
		three bool     // three knots expected
	}
	lookAt := func(f, up r3.Vec, roll float64) camera.Orientation {
		o, err := camera.LookAt(f, up, roll)
		if err != nil {
			t.Fatal(err)
		}
		return o
	}
	pin := camera.Projection{Kind: camera.Pinhole, Width: 1920, Height: 1080, FOV: 90}
	fish := camera.Projection{Kind: camera.Fisheye, Width: 4096, Height: 4096}
	panAt := func(az float64) *camera.Projection {
		q := pin
		a := az * math.Pi / 180
		q.Orient = lookAt(r3.Vec{X: math.Cos(a), Y: math.Sin(a)}, axisZ, 0)
		return &q
	}
	// Directions seen at the corners, edges and centre of the pinhole at
	// the middle of the pan, and at the fisheye's rim.
	var pinDirs, rimDirs []r3.Vec
	for _, c := range [][2]float64{{0, 0}, {1920, 1080}, {0, 1080}, {960, 540}, {1920, 540}, {960, 0}} {
		d, ok := panAt(0).Inverse(c[0], c[1])
		if !ok {
			t.Fatal("inverse")
		}
		pinDirs = append(pinDirs, d)
	}
	for _, a := range []float64{0, 45, 90, 200} {
		q := fish
		q.Orient = lookAt(axisX, axisZ, 0)
		s, c := math.Sincos(a * math.Pi / 180)
		d, ok := q.Inverse(2048+2040*c, 2048+2040*s)
		if !ok {
			t.Fatal("inverse")
		}
		rimDirs = append(rimDirs, d)
	}
	ship := func(phi float64) camera.Observer {
		b, err := camera.NewBoostRapidity(r3.Vec{Y: 1}, phi)
		if err != nil {
			t.Fatal(err)
		}
		return camera.Observer{Boost: b}
	}
	phi0 := math.Atanh(0.9)
	inv := ship(phi0).Boost.Inverse()
	var shipDirs []r3.Vec
	for _, d := range pinDirs {
		m, _ := inv.Apply(d)
		shipDirs = append(shipDirs, m)
	}
	roll := func(s, u float64, n r3.Vec) (float64, float64) {
		q := fish
		q.Orient = lookAt(axisX, axisZ, u*s/2)
		x, y, _ := q.Forward(n)
		return x, y
	}
	motions := []motion{
		{"uniform pan, 90° pinhole", func(s, u float64, n r3.Vec) (float64, float64) {
			x, y, _ := panAt(u * s / 2).Forward(n)
			return x, y
		}, pinDirs, 64, true},
		{"roll, 4096² fisheye rim", roll, rimDirs, 64, true},
		{"ship accelerating at 0.9 c, seen sideways", func(s, u float64, n r3.Vec) (float64, float64) {
			m, _ := ship(phi0 + u*s/2).Boost.Apply(n)
			x, y, _ := panAt(0).Forward(m)
			return x, y
		}, shipDirs, 64, true},
		{"pan from rest within the exposure, 90° pinhole", func(s, u float64, n r3.Vec) (float64, float64) {
			x, y, _ := panAt(s * (u + 1) * (u + 1) / 4).Forward(n)
			return x, y
		}, pinDirs, 64, false},
		{"roll, 4096² fisheye rim", roll, rimDirs, 500, false},
	}
	for _, m := range motions {
		// Size the motion so that its longest path is m.L.
		longest := func(s float64) float64 {
			L := 0.0
			for _, n := range m.n {
				L = math.Max(L, pathLen(func(u float64) (float64, float64) { return m.at(s, u, n) }))
			}
			return L
		}
		s := 1e-3
		for range 60 {
			s *= m.L / longest(s)
		}
		k, est, err := ChooseKnots(len(m.n), 0, func(u float64, xs, ys []float64) error {
			for j, n := range m.n {
				xs[j], ys[j] = m.at(s, u, n)
			}
			return nil
		})
		if err != nil {
			t.Fatal(err)
		}
		e3, ek := 0.0, 0.0
		for _, n := range m.n {
			path := func(u float64) (float64, float64) { return m.at(s, u, n) }
			e3, ek = math.Max(e3, quadError(path, 3)), math.Max(ek, quadError(path, k))
		}
		t.Logf("%s, %.0f px: 3 knots %.2g px off; ChooseKnots: %d knots, estimated %.2g px, measured %.2g px", m.name, m.L, e3, k, est, ek)
		if ek > KnotTolerance {
			t.Errorf("%s, %.0f px: %d knots are %.3g px off the exact path, want ≤ %v", m.name, m.L, k, ek, KnotTolerance)
		}
		if m.three != (k == 3) || m.three != (e3 <= KnotTolerance/2) {
			t.Errorf("%s, %.0f px: 3 knots are %.3g px off and ChooseKnots took %d; expected three: %v", m.name, m.L, e3, k, m.three)
		}
	}
}

// BenchmarkRenderMotion renders 10⁶ random stars (V −1 to 12) at 0.9 c
// without motion and streaked during a pan: 1920×1080 60° pinhole (pan of
// 0.25°: a 7.3 px streak at the centre) and 4096² fisheye (0.4°: 9.1 px).
func BenchmarkRenderMotion(b *testing.B) {
	n := 1_000_000
	if testing.Short() {
		n /= 10
	}
	p, err := Prepare(randomStars(n, -1, 12, 13))
	if err != nil {
		b.Fatal(err)
	}
	obs := observer(b, r3.Unit(r3.Vec{X: 1, Y: 1}), 0.9)
	for _, c := range []struct {
		name      string
		kind      camera.Kind
		w, h      int
		fov, pan  float64
		exposureV float64
	}{
		{"pinhole1920x1080", camera.Pinhole, 1920, 1080, 60, 0.25, 4},
		{"fisheye4096", camera.Fisheye, 4096, 4096, 180, 0.4, 4},
	} {
		knots := panKnots(b, c.kind, c.w, c.h, c.fov, c.pan, 3, obs)
		for _, blur := range []bool{false, true} {
			k := knots[1:2]
			if blur {
				k = knots
			}
			b.Run(fmt.Sprintf("%s/streaks=%v", c.name, blur), func(b *testing.B) {
				b.ReportAllocs()
				for b.Loop() {
					if _, err := p.RenderMotion(Options{Exposure: c.exposureV}, k); err != nil {
						b.Fatal(err)
					}
				}
			})
		}
	}
}

// TestRenderMotionIntoMatchesRenderMotion: one Frame drawn into again and
// again by RenderMotionInto — blurred pans of several projections, with
// and without the Doppler channel, a size change and back, and a frame
// with one knot (drawn as Render) — holds each time the bits
// RenderMotion gives, with the buffer reused whenever it fits [cp:
// determinism of IEEE 754 arithmetic in fixed order].
func TestRenderMotionIntoMatchesRenderMotion(t *testing.T) {
	stars := randomStars(20_000, -1, 9, 29)
	p, err := Prepare(stars)
	if err != nil {
		t.Fatal(err)
	}
	obs := observer(t, r3.Unit(r3.Vec{X: 1, Y: 0.3, Z: 0.2}), 0.6)
	var dst Frame
	var pix0 *float32
	for i, c := range []struct {
		kind    camera.Kind
		w, h    int
		doppler bool
		knots   int
	}{
		{camera.Pinhole, 320, 180, false, 3}, {camera.Pinhole, 320, 180, true, 5}, {camera.Fisheye, 300, 300, false, 3},
		{camera.Pinhole, 320, 180, false, 1}, {camera.Equirect, 400, 200, false, 3}, {camera.Equirect, 400, 200, false, 3},
	} {
		knots := panKnots(t, c.kind, c.w, c.h, 60, 2, max(3, c.knots), obs)
		if c.knots == 1 {
			knots = knots[1:2]
		}
		opt := Options{Exposure: 3, Doppler: c.doppler, Workers: 1 + i%2}
		want, err := p.RenderMotion(opt, knots)
		if err != nil {
			t.Fatal(err)
		}
		reuse := len(dst.Pix) == 3*c.w*c.h && (dst.Doppler != nil) == c.doppler
		if err := p.RenderMotionInto(&dst, opt, knots); err != nil {
			t.Fatal(err)
		}
		sameFrame(t, &dst, want)
		if reuse != (pix0 == &dst.Pix[0]) {
			t.Errorf("case %d: buffer reused %v, want %v", i, pix0 == &dst.Pix[0], reuse)
		}
		pix0 = &dst.Pix[0]
	}
	if err := p.RenderMotionInto(nil, Options{}, nil); err == nil {
		t.Error("RenderMotionInto(nil): no error")
	}
}
