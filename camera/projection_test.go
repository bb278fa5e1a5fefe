package camera

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/spatial/r3"
	"pgregory.net/rapid"
)

func TestKindNames(t *testing.T) {
	for _, c := range []struct {
		k    Kind
		name string // [cp] names fixed by the project contract
	}{{Pinhole, "pinhole"}, {Equirect, "equirect"}, {Fisheye, "fisheye"}, {Cube, "cube"}} {
		if s := c.k.String(); s != c.name {
			t.Errorf("%d.String() = %q, want %q", int(c.k), s, c.name)
		}
		for _, in := range []string{c.name, " " + c.name + " ", "  " + string([]rune(c.name)[0]-32) + c.name[1:]} {
			k, err := ParseKind(in)
			if err != nil || k != c.k {
				t.Errorf("ParseKind(%q) = %v, %v; want %v", in, k, err, c.k)
			}
		}
		var k Kind
		b, _ := c.k.MarshalText()
		if err := k.UnmarshalText(b); err != nil || k != c.k {
			t.Errorf("text round trip of %v: %v, %v", c.k, k, err)
		}
	}
	if _, err := ParseKind("mercator"); !errors.Is(err, ErrProjection) || !contains(err.Error(), "mercator") {
		t.Errorf("ParseKind(mercator): %v", err)
	}
	if s := Kind(9).String(); s != "Kind(9)" {
		t.Errorf("Kind(9).String() = %q", s)
	}
	if _, err := Kind(-1).MarshalText(); err == nil {
		t.Error("MarshalText of Kind(-1) gave no error")
	}
}

func TestValidate(t *testing.T) {
	o, _ := LookAt(r3.Vec{X: 1, Y: 1}, r3.Vec{Z: 1}, 10)
	good := []Projection{
		{Kind: Pinhole, Width: 640, Height: 480},
		{Kind: Pinhole, Width: 1, Height: 1, FOV: 179},
		{Kind: Pinhole, Width: MaxSize, Height: MaxSize, FOV: MinFOV, Orient: o},
		{Kind: Equirect, Width: 2048, Height: 1024},
		{Kind: Equirect, Width: 7, Height: 1000, FOV: math.NaN()}, // FOV ignored
		{Kind: Fisheye, Width: 512, Height: 512, FOV: 360, Tilt: -180},
		{Kind: Fisheye, Width: 512, Height: 300, Tilt: 90},
		{Kind: Cube, Width: 600, Height: 100},
	}
	for _, p := range good {
		if err := p.Validate(); err != nil {
			t.Errorf("%+v: %v", p, err)
		}
	}
	bad := []struct {
		p     Projection
		field string // the error must name it
	}{
		{Projection{Kind: Kind(4), Width: 10, Height: 10}, "Kind"},
		{Projection{Kind: Pinhole, Width: 0, Height: 10}, "Width = 0"},
		{Projection{Kind: Pinhole, Width: MaxSize + 1, Height: 10}, "Width = 32769"},
		{Projection{Kind: Pinhole, Width: 10, Height: -1}, "Height = -1"},
		{Projection{Kind: Pinhole, Width: 10, Height: 10, FOV: 180}, "FOV = 180"},
		{Projection{Kind: Pinhole, Width: 10, Height: 10, FOV: -5}, "FOV = -5"},
		{Projection{Kind: Pinhole, Width: 10, Height: 10, FOV: 1e-9}, "FOV = 1e-09"},
		{Projection{Kind: Pinhole, Width: 10, Height: 10, FOV: math.NaN()}, "FOV = NaN"},
		{Projection{Kind: Fisheye, Width: 10, Height: 10, FOV: 361}, "FOV = 361"},
		{Projection{Kind: Fisheye, Width: 10, Height: 10, Tilt: math.Inf(1)}, "Tilt = +Inf"},
		{Projection{Kind: Cube, Width: 60, Height: 11}, "Width = 60"},
		{Projection{Kind: Pinhole, Width: 10, Height: 10, Orient: Orientation{Forward: r3.Vec{X: 1}}}, "Orient.Right"},
		{Projection{Kind: Pinhole, Width: 10, Height: 10, Orient: Orientation{Forward: r3.Vec{X: 1}, Right: r3.Vec{Y: 1}, Up: r3.Vec{Z: 1}}}, "Orient.Right"},
		{Projection{Kind: Pinhole, Width: 10, Height: 10, Orient: Orientation{Forward: r3.Vec{X: 1}, Right: r3.Vec{Y: -1}, Up: r3.Vec{X: 1}}}, "Orient.Up"},
	}
	for _, c := range bad {
		err := c.p.Validate()
		if !errors.Is(err, ErrProjection) || !contains(err.Error(), c.field) {
			t.Errorf("%+v: have %v, want an error naming %q", c.p, err, c.field)
		}
	}
}

func TestLookAt(t *testing.T) {
	o, err := LookAt(r3.Vec{X: 2}, r3.Vec{Z: 5}, 0)
	if err != nil || o != DefaultOrientation() {
		t.Errorf("LookAt(+X, +Z) = %+v, %v; want DefaultOrientation", o, err)
	}
	// Fallbacks: zero or parallel up → north; forward at a pole → +X.
	for _, c := range []struct {
		f, up, wantUp r3.Vec
	}{
		{r3.Vec{Y: 1}, r3.Vec{}, r3.Vec{Z: 1}},
		{r3.Vec{Y: 1}, r3.Vec{Y: -3}, r3.Vec{Z: 1}},
		{r3.Vec{Z: 1}, r3.Vec{Z: 1}, r3.Vec{X: 1}},
		{r3.Vec{Z: -1}, r3.Vec{}, r3.Vec{X: 1}},
	} {
		o, err := LookAt(c.f, c.up, 0)
		if err != nil || angle(o.Up, c.wantUp) > 1e-15 || o.Validate() != nil {
			t.Errorf("LookAt(%v, %v): Up = %v, %v; want %v", c.f, c.up, o.Up, err, c.wantUp)
		}
	}
	// Roll +90°: up turns to the old right (documented convention).
	o, _ = LookAt(r3.Vec{X: 1}, r3.Vec{Z: 1}, 90)
	if angle(o.Up, r3.Vec{Y: -1}) > 1e-15 || angle(o.Right, r3.Vec{Z: -1}) > 1e-15 || o.Validate() != nil {
		t.Errorf("roll 90: %+v", o)
	}
	for _, c := range []struct {
		f, up r3.Vec
		roll  float64
		want  error
	}{
		{r3.Vec{}, r3.Vec{Z: 1}, 0, ErrDirection},
		{r3.Vec{X: math.NaN()}, r3.Vec{Z: 1}, 0, ErrDirection},
		{r3.Vec{X: 1}, r3.Vec{Z: math.Inf(1)}, 0, ErrDirection},
		{r3.Vec{X: 1}, r3.Vec{Z: 1}, math.NaN(), ErrProjection},
	} {
		if _, err := LookAt(c.f, c.up, c.roll); !errors.Is(err, c.want) {
			t.Errorf("LookAt(%v, %v, %v): %v, want %v", c.f, c.up, c.roll, err, c.want)
		}
	}
}

// TestKnownMappings checks the projection conventions of the contract
// [cp: gnomonic, plate carrée and equidistant azimuthal definitions].
func TestKnownMappings(t *testing.T) {
	o, _ := LookAt(r3.Vec{X: 1, Y: 2, Z: 0.5}, r3.Vec{Z: 1}, 17)
	dirAt := func(lonDeg, latDeg float64) r3.Vec { // about o: lon toward Right, lat toward Up
		sl, cl := math.Sincos(lonDeg * deg)
		sb, cb := math.Sincos(latDeg * deg)
		return r3.Add(r3.Add(r3.Scale(cb*cl, o.Forward), r3.Scale(cb*sl, o.Right)), r3.Scale(sb, o.Up))
	}
	W, H := 800.0, 400.0
	cases := []struct {
		name string
		p    Projection
		dir  r3.Vec
		x, y float64
	}{
		{"pinhole centre", Projection{Kind: Pinhole, Width: 800, Height: 400, Orient: o}, o.Forward, W / 2, H / 2},
		{"pinhole right edge", Projection{Kind: Pinhole, Width: 800, Height: 400, FOV: 90, Orient: o}, dirAt(45, 0), W, H / 2},
		{"pinhole left edge", Projection{Kind: Pinhole, Width: 800, Height: 400, FOV: 60, Orient: o}, dirAt(-30, 0), 0, H / 2},
		// 60° wide, 800 px: f = 400/tan 30°; 10° up → y = 200 − f tan 10°.
		{"pinhole up", Projection{Kind: Pinhole, Width: 800, Height: 400, Orient: o}, dirAt(0, 10), W / 2, H/2 - 400/math.Tan(30*deg)*math.Tan(10*deg)},
		{"equirect centre", Projection{Kind: Equirect, Width: 800, Height: 400, Orient: o}, o.Forward, W / 2, H / 2},
		{"equirect right", Projection{Kind: Equirect, Width: 800, Height: 400, Orient: o}, o.Right, 3 * W / 4, H / 2},
		{"equirect left", Projection{Kind: Equirect, Width: 800, Height: 400, Orient: o}, r3.Scale(-1, o.Right), W / 4, H / 2},
		{"equirect near up", Projection{Kind: Equirect, Width: 800, Height: 400, Orient: o}, dirAt(0, 89.9), W / 2, H * 0.1 / 180},
		{"equirect (30°, −45°)", Projection{Kind: Equirect, Width: 800, Height: 400, Orient: o}, dirAt(30, -45), W/2 + W/12, H/2 + H/4},
		{"fisheye centre", Projection{Kind: Fisheye, Width: 800, Height: 400, Orient: o}, o.Forward, W / 2, H / 2},
		{"fisheye 90° right at circle edge", Projection{Kind: Fisheye, Width: 800, Height: 400, Orient: o}, o.Right, W/2 + H/2, H / 2},
		{"fisheye 90° up at circle edge", Projection{Kind: Fisheye, Width: 800, Height: 400, Orient: o}, o.Up, W / 2, 0},
		{"fisheye 360 behind-ish", Projection{Kind: Fisheye, Width: 400, Height: 400, FOV: 360, Orient: o}, dirAt(-135, 0), 200 - 150, 200},
		// Tilt 30°: axis 30° above Forward; Forward 30° below centre.
		{"fisheye tilt axis", Projection{Kind: Fisheye, Width: 400, Height: 400, Tilt: 30, Orient: o}, dirAt(0, 30), 200, 200},
		{"fisheye tilt forward", Projection{Kind: Fisheye, Width: 400, Height: 400, Tilt: 30, Orient: o}, o.Forward, 200, 200 + 200*30.0/90},
		{"cube +F centre", Projection{Kind: Cube, Width: 600, Height: 100, Orient: o}, o.Forward, 450, 50},
		{"cube +R centre", Projection{Kind: Cube, Width: 600, Height: 100, Orient: o}, o.Right, 50, 50},
		{"cube −R centre", Projection{Kind: Cube, Width: 600, Height: 100, Orient: o}, r3.Scale(-1, o.Right), 150, 50},
		{"cube +U centre", Projection{Kind: Cube, Width: 600, Height: 100, Orient: o}, o.Up, 250, 50},
		{"cube −U centre", Projection{Kind: Cube, Width: 600, Height: 100, Orient: o}, r3.Scale(-1, o.Up), 350, 50},
		{"cube −F centre", Projection{Kind: Cube, Width: 600, Height: 100, Orient: o}, r3.Scale(-1, o.Forward), 550, 50},
		// +F face right edge at 45°; +U face: forward is at its bottom edge.
		{"cube +F right edge", Projection{Kind: Cube, Width: 600, Height: 100, Orient: o}, dirAt(44.999999, 0), 500, 50},
		{"cube +U toward forward", Projection{Kind: Cube, Width: 600, Height: 100, Orient: o}, dirAt(0, 60), 250, 50 + 50*math.Tan(30*deg)},
	}
	for _, c := range cases {
		x, y, ok := c.p.Forward(c.dir)
		if !ok || !scalar.EqualWithinAbs(x, c.x, 1e-4) || !scalar.EqualWithinAbs(y, c.y, 1e-9) {
			t.Errorf("%s: Forward = (%.9g, %.9g, %v), want (%.9g, %.9g)", c.name, x, y, ok, c.x, c.y)
		}
	}
	// Undefined points.
	p := Projection{Kind: Pinhole, Width: 100, Height: 100, Orient: o}
	if _, _, ok := p.Forward(r3.Scale(-1, o.Forward)); ok {
		t.Error("pinhole: behind the camera gave ok")
	}
	if _, _, ok := p.Forward(o.Right); ok {
		t.Error("pinhole: 90° off axis gave ok")
	}
	for _, k := range []Kind{Pinhole, Equirect, Fisheye, Cube} {
		q := Projection{Kind: k, Width: 600, Height: 100}
		if x, y, ok := q.Forward(r3.Vec{}); ok || !math.IsNaN(x) || !math.IsNaN(y) {
			t.Errorf("%v: zero dir gave (%v, %v, %v)", k, x, y, ok)
		}
		if _, ok := q.Inverse(math.NaN(), 3); ok {
			t.Errorf("%v: Inverse(NaN) gave ok", k)
		}
	}
	f := Projection{Kind: Fisheye, Width: 100, Height: 100}
	if _, ok := f.Inverse(0, 0); ok {
		t.Error("fisheye: corner outside the circle gave ok")
	}
	if _, _, ok := f.Forward(r3.Vec{X: -1}); ok {
		t.Error("fisheye: antipode of the axis gave ok")
	}
	if x, _, ok := f.Forward(r3.Vec{X: 1}); !ok || x != 50 {
		t.Errorf("fisheye default orientation centre x = %v", x)
	}
}

// TestCentreAndScale checks the WCS helpers.
func TestCentreAndScale(t *testing.T) {
	o, _ := LookAt(FromRADec(83.8, -5.4), r3.Vec{Z: 1}, 0)
	cases := []struct {
		p      Projection
		centre r3.Vec
		scale  float64 // deg/px [cp: derivative at centre]
	}{
		{Projection{Kind: Pinhole, Width: 1000, Height: 500, FOV: 90, Orient: o}, o.Forward, rad / 500},
		{Projection{Kind: Equirect, Width: 3600, Height: 1800, Orient: o}, o.Forward, 0.1},
		{Projection{Kind: Fisheye, Width: 900, Height: 1800, Orient: o}, o.Forward, 0.2},
		{Projection{Kind: Fisheye, Width: 900, Height: 900, FOV: 90, Tilt: 90, Orient: o}, o.Up, 0.1},
		{Projection{Kind: Cube, Width: 1200, Height: 200, Orient: o}, o.Forward, rad / 100},
	}
	for _, c := range cases {
		if a := angle(c.p.Centre(), c.centre); a > 1e-15 {
			t.Errorf("%v: Centre off by %g rad", c.p.Kind, a)
		}
		if s := c.p.PixelScale(); !scalar.EqualWithinRel(s, c.scale, 1e-14) {
			t.Errorf("%v: PixelScale = %v, want %v", c.p.Kind, s, c.scale)
		}
		if err := c.p.CentreOrientation().Validate(); err != nil {
			t.Errorf("%v: CentreOrientation: %v", c.p.Kind, err)
		}
		// A pixel next to the centre is PixelScale away.
		p := c.p
		cx, cy := float64(p.Width)/2, float64(p.Height)/2
		if p.Kind == Cube {
			cx = 4.5 * float64(p.Height)
		}
		d0, _ := p.Inverse(cx, cy)
		d1, _ := p.Inverse(cx+1e-3, cy)
		if s := angle(d0, d1) * rad / 1e-3; !scalar.EqualWithinRel(s, c.scale, 1e-6) {
			t.Errorf("%v: measured scale %v, want %v", c.p.Kind, s, c.scale)
		}
	}
}

// TestProjectionRoundTrip: pixel → direction → pixel within 1e-6 px for
// random pixels, sizes, orientations, rolls and fisheye tilts, in every
// kind; and the centre pixel (+Forward face centre for Cube) is the
// Centre direction.
func TestProjectionRoundTrip(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		kind := Kind(rapid.IntRange(0, 3).Draw(t, "kind"))
		fwd := drawUnit(t, "forward")
		up := drawUnit(t, "up")
		roll := rapid.Float64Range(-180, 180).Draw(t, "roll")
		o, err := LookAt(fwd, up, roll)
		if err != nil {
			t.Fatal(err)
		}
		h := rapid.IntRange(1, 4096).Draw(t, "H")
		p := Projection{Kind: kind, Height: h, Orient: o}
		switch kind {
		case Pinhole:
			p.Width = rapid.IntRange(1, 4096).Draw(t, "W")
			p.FOV = rapid.SampledFrom([]float64{0, MinFOV, 179}).Draw(t, "FOV edge")
			if rapid.Bool().Draw(t, "FOV random") {
				p.FOV = rapid.Float64Range(MinFOV, 179).Draw(t, "FOV")
			}
		case Equirect:
			p.Width = rapid.IntRange(1, 8192).Draw(t, "W")
		case Fisheye:
			p.Width = rapid.IntRange(1, 4096).Draw(t, "W")
			p.FOV = rapid.SampledFrom([]float64{0, MinFOV, 360}).Draw(t, "FOV edge")
			if rapid.Bool().Draw(t, "FOV random") {
				p.FOV = rapid.Float64Range(MinFOV, 360).Draw(t, "FOV")
			}
			p.Tilt = rapid.Float64Range(-180, 180).Draw(t, "tilt")
		case Cube:
			p.Width = 6 * h
			if p.Width > MaxSize {
				p.Height = MaxSize / 6
				p.Width = 6 * p.Height
			}
		}
		if rapid.Bool().Draw(t, "prepare") {
			if err := p.Prepare(); err != nil {
				t.Fatal(err)
			}
		} else if err := p.Validate(); err != nil {
			t.Fatal(err)
		}
		W, H := float64(p.Width), float64(p.Height)
		// Centre.
		cx, cy := W/2, H/2
		if kind == Cube {
			cx = 4.5 * H
		}
		// A float64 direction is known to ~1.1e-16 rad, which is more than
		// 1e-6 px only for extreme scales (FOV of nanodegrees).
		tol := math.Max(1e-6, 16*0x1p-53*rad/p.PixelScale())
		if x, y, ok := p.Forward(p.Centre()); !ok || !scalar.EqualWithinAbs(x, cx, tol) || !scalar.EqualWithinAbs(y, cy, tol) {
			t.Fatalf("centre maps to (%v, %v, %v), want (%v, %v)", x, y, ok, cx, cy)
		}
		if kind != Fisheye || p.Tilt == 0 {
			if a := angle(p.Centre(), o.Forward); a > 1e-15 {
				t.Fatalf("Centre is %g rad from Forward", a)
			}
		}
		// Random pixel.
		x := rapid.Float64Range(0, W).Draw(t, "x")
		y := rapid.Float64Range(0, H).Draw(t, "y")
		dir, ok := p.Inverse(x, y)
		if kind == Fisheye {
			fov := p.FieldOfView() * deg
			th := math.Hypot(x-W/2, y-H/2) / (float64(min(p.Width, p.Height)) / 2) * fov / 2
			if ok != (th <= fov/2) {
				t.Fatalf("fisheye θ=%v FOV/2=%v: ok = %v", th, fov/2, ok)
			}
			if !ok || th > math.Pi-1e-3 {
				return // the antipode is ill-conditioned: a circle in the image
			}
		}
		if !ok {
			t.Fatalf("Inverse(%v, %v) not ok", x, y)
		}
		if m := r3.Norm(dir); !scalar.EqualWithinAbs(m, 1, 1e-14) {
			t.Fatalf("|dir| = %v", m)
		}
		hx, hy, ok := p.Forward(dir)
		if !ok {
			t.Fatalf("Forward(Inverse(%v, %v)) not ok", x, y)
		}
		dx := math.Abs(hx - x)
		if kind == Equirect {
			dx = math.Min(dx, math.Abs(dx-W)) // the seam behind
			if lat := (H/2 - y) / H * math.Pi; math.Cos(lat)*W < 1e-3 {
				dx = 0 // at a pole every longitude is the same point
			}
		}
		if kind == Cube && (math.Abs(x/H-math.Round(x/H)) < 1e-9 || y < 1e-9*H || y > H-1e-9*H) {
			return // on a face edge, shared with another face elsewhere in the strip
		}
		if dx > tol || math.Abs(hy-y) > tol {
			t.Fatalf("(%v, %v) → %v → (%v, %v)", x, y, dir, hx, hy)
		}
	})
}

func TestProjectionAllocs(t *testing.T) {
	for _, k := range []Kind{Pinhole, Equirect, Fisheye, Cube} {
		p := Projection{Kind: k, Width: 600, Height: 100, Tilt: 10}
		d := r3.Unit(r3.Vec{X: 1, Y: 0.1, Z: 0.2})
		if a := testing.AllocsPerRun(100, func() {
			x, y, _ := p.Forward(d)
			p.Inverse(x, y)
		}); a != 0 {
			t.Errorf("%v: %v allocations", k, a)
		}
	}
}

// TestPrepareCacheInvalidation: changing a field after Prepare must not use
// stale constants.
func TestPrepareCacheInvalidation(t *testing.T) {
	p := Projection{Kind: Pinhole, Width: 100, Height: 100, FOV: 90}
	if err := p.Prepare(); err != nil {
		t.Fatal(err)
	}
	d := r3.Unit(r3.Vec{X: 1, Y: -1}) // 45° right of default Forward
	if x, _, _ := p.Forward(d); !scalar.EqualWithinAbs(x, 100, 1e-9) {
		t.Errorf("FOV 90: x = %v, want 100", x)
	}
	p.FOV = 60
	want := 50 + 50/math.Tan(30*deg) // [cp] gnomonic x = cx + f tan 45°
	if x, _, _ := p.Forward(d); !scalar.EqualWithinAbs(x, want, 1e-9) {
		t.Errorf("after FOV change: x = %v, want %v", x, want)
	}
	if err := (&Projection{Kind: Cube, Width: 5, Height: 5}).Prepare(); err == nil {
		t.Error("Prepare accepted an invalid cube")
	}
}

func benchForward(b *testing.B, k Kind, prepare bool) {
	p := Projection{Kind: k, Width: 1200, Height: 200, Tilt: 20}
	if prepare {
		if err := p.Prepare(); err != nil {
			b.Fatal(err)
		}
	}
	dirs := make([]r3.Vec, 1024)
	for i := range dirs {
		z := float64(i)/512 - 1 + 1.0/1024
		ph := float64(i) * 2.399963
		s := math.Sqrt(1 - z*z)
		dirs[i] = r3.Vec{X: math.Abs(s*math.Cos(ph)) + 0.01, Y: s * math.Sin(ph), Z: z}
	}
	var sink float64
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		x, y, _ := p.Forward(dirs[i&1023])
		sink += x + y
		i++
	}
	_ = sink
}

func BenchmarkForwardPinhole(b *testing.B)           { benchForward(b, Pinhole, true) }
func BenchmarkForwardPinholeUnprepared(b *testing.B) { benchForward(b, Pinhole, false) }
func BenchmarkForwardEquirect(b *testing.B)          { benchForward(b, Equirect, true) }
func BenchmarkForwardFisheye(b *testing.B)           { benchForward(b, Fisheye, true) }
func BenchmarkForwardCube(b *testing.B)              { benchForward(b, Cube, true) }

func benchInverse(b *testing.B, k Kind) {
	p := Projection{Kind: k, Width: 1200, Height: 200, Tilt: 20}
	if err := p.Prepare(); err != nil {
		b.Fatal(err)
	}
	var sink float64
	b.ReportAllocs()
	i := 0
	for b.Loop() {
		d, _ := p.Inverse(float64(i%1200)+0.5, float64(i/1200%200)+0.5)
		sink += d.X
		i++
	}
	_ = sink
}

func BenchmarkInversePinhole(b *testing.B)  { benchInverse(b, Pinhole) }
func BenchmarkInverseEquirect(b *testing.B) { benchInverse(b, Equirect) }
func BenchmarkInverseFisheye(b *testing.B)  { benchInverse(b, Fisheye) }
func BenchmarkInverseCube(b *testing.B)     { benchInverse(b, Cube) }

// TestForwardBatch: the batch form gives Forward's bits for every kind,
// with the frame prepared or not, including directions Forward refuses
// (zero, NaN, behind a pinhole, opposite a fisheye axis), which come back
// as NaN.
func TestForwardBatch(t *testing.T) {
	rng := rand.New(rand.NewPCG(13, 14))
	n := 5000
	x, y, z := make([]float64, n), make([]float64, n), make([]float64, n)
	for k := range x {
		x[k], y[k], z[k] = rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64()
	}
	x[0], y[0], z[0] = 0, 0, 0
	x[1] = math.NaN()
	o, err := LookAt(r3.Unit(r3.Vec{X: 1, Y: 2, Z: 0.5}), r3.Vec{Z: 1}, 10)
	if err != nil {
		t.Fatal(err)
	}
	f := o.Forward
	x[2], y[2], z[2] = -f.X, -f.Y, -f.Z
	px, py := make([]float64, n), make([]float64, n)
	same := func(a, b float64) bool {
		return math.Float64bits(a) == math.Float64bits(b) || (math.IsNaN(a) && math.IsNaN(b))
	}
	for _, kind := range []Kind{Pinhole, Equirect, Fisheye, Cube} {
		for _, prepared := range []bool{false, true} {
			p := Projection{Kind: kind, Width: 640, Height: 480, Orient: o}
			if kind == Cube {
				p.Width, p.Height = 600, 100
			}
			if prepared {
				if err := p.Prepare(); err != nil {
					t.Fatal(err)
				}
			}
			p.ForwardBatch(x, y, z, px, py)
			for k := range x {
				u, v, ok := p.Forward(r3.Vec{X: x[k], Y: y[k], Z: z[k]})
				if !ok {
					u, v = math.NaN(), math.NaN()
				}
				if !same(u, px[k]) || !same(v, py[k]) {
					t.Fatalf("%v prepared=%v k=%d: batch (%v, %v), Forward (%v, %v)", kind, prepared, k, px[k], py[k], u, v)
				}
			}
		}
	}
}

// InverseBeyond is Inverse inside a fisheye's circle, bit for bit, and
// beyond it continues the equidistant mapping θ = r/k: the direction at
// 100 px outside a 180° 800×400 fisheye's circle (k = 200/(π/2) px/rad) is
// 90° + 100/k from the centre along the same image direction
// [pub: equidistant fisheye r = kθ], out to θ = π; other kinds are Inverse.
func TestInverseBeyond(t *testing.T) {
	o, _ := LookAt(r3.Vec{X: 1, Y: 2, Z: 0.5}, r3.Vec{Z: 1}, 17)
	p := Projection{Kind: Fisheye, Width: 800, Height: 400, Orient: o}
	if err := p.Prepare(); err != nil {
		t.Fatal(err)
	}
	r := rand.New(rand.NewPCG(3, 4))
	for range 1000 {
		x, y := r.Float64()*800, r.Float64()*400
		a, okA := p.Inverse(x, y)
		b, okB := p.InverseBeyond(x, y)
		if okA && (!okB || a != b) {
			t.Fatalf("(%g, %g) inside: InverseBeyond %v %v, Inverse %v", x, y, b, okB, a)
		}
	}
	k := 200 / (math.Pi / 2)
	for _, c := range []struct{ dx, dy float64 }{{300, 0}, {0, -300}, {-212.1, 212.1}} {
		rr := math.Hypot(c.dx, c.dy)
		d, ok := p.InverseBeyond(400+c.dx, 200+c.dy)
		if !ok {
			t.Fatalf("%v: not ok", c)
		}
		if th := math.Acos(r3.Dot(d, o.Forward)); !scalar.EqualWithinAbs(th, rr/k, 1e-12) {
			t.Errorf("%v: θ = %.12f, want r/k = %.12f", c, th, rr/k)
		}
		// The same image direction: toward Right for +x, Up for −y.
		side := r3.Add(r3.Scale(c.dx/rr, o.Right), r3.Scale(-c.dy/rr, o.Up))
		if r3.Dot(r3.Sub(d, r3.Scale(r3.Dot(d, o.Forward), o.Forward)), side) <= 0 {
			t.Errorf("%v: direction %v not on the side of the image direction", c, d)
		}
	}
	if _, ok := p.InverseBeyond(400+k*math.Pi+1, 200); ok {
		t.Error("beyond θ = π: ok")
	}
	q := Projection{Kind: Pinhole, Width: 800, Height: 400, Orient: o}
	if err := q.Prepare(); err != nil {
		t.Fatal(err)
	}
	a, _ := q.Inverse(10, 20)
	if b, ok := q.InverseBeyond(10, 20); !ok || a != b {
		t.Errorf("pinhole: InverseBeyond %v, Inverse %v", b, a)
	}
}
