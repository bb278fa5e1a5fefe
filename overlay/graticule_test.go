package overlay

import (
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
)

// icrsToGalactic is the rotation from ICRS to galactic axes of The
// Hipparcos and Tycho Catalogues (ESA SP-1200, Vol. 1, §1.5.3, eq. 1.5.11)
// [pub, quoted from memory to 10 decimals]: rows are the galactic x (toward
// the centre), y (toward l = 90°) and z (north pole) axes on ICRS axes.
var icrsToGalactic = [3][3]float64{
	{-0.0548755604, -0.8734370902, -0.4838350155},
	{+0.4941094279, -0.4448296300, +0.7469822445},
	{-0.8676661490, -0.1980763734, +0.4559837762},
}

// refDir computes the catalogue direction of (lon, lat) without the camera
// package: spherical to Cartesian, then the transposed galactic rotation.
func refDir(frame GraticuleFrame, lon, lat float64) r3.Vec {
	l, b := lon*math.Pi/180, lat*math.Pi/180
	v := [3]float64{math.Cos(b) * math.Cos(l), math.Cos(b) * math.Sin(l), math.Sin(b)}
	if frame == GraticuleEquatorial {
		return r3.Vec{X: v[0], Y: v[1], Z: v[2]}
	}
	m := icrsToGalactic
	return r3.Vec{
		X: m[0][0]*v[0] + m[1][0]*v[1] + m[2][0]*v[2],
		Y: m[0][1]*v[0] + m[1][1]*v[1] + m[2][1]*v[2],
		Z: m[0][2]*v[0] + m[1][2]*v[1] + m[2][2]*v[2],
	}
}

// refAberrate is the textbook aberration formula (physics.md):
// n′ = (n + ((γ−1) cos θ + γβ) b̂)/D, D = γ(1 + β cos θ).
func refAberrate(n, bhat r3.Vec, beta float64) r3.Vec {
	g := 1 / math.Sqrt(1-beta*beta)
	c := r3.Dot(n, bhat)
	d := g * (1 + beta*c)
	return r3.Scale(1/d, r3.Add(n, r3.Scale((g-1)*c+g*beta, bhat)))
}

// refProject projects with the textbook formulas for Pinhole (gnomonic) and
// Equirect (plate carrée, camera package doc), and with camera otherwise.
func refProject(p *camera.Projection, n r3.Vec) (x, y float64, ok bool) {
	o := p.Orient
	w, h := float64(p.Width), float64(p.Height)
	switch p.Kind {
	case camera.Pinhole:
		z := r3.Dot(n, o.Forward)
		if z <= 0 {
			return 0, 0, false
		}
		f := (w / 2) / math.Tan(p.FieldOfView()*math.Pi/360)
		return w/2 + f*r3.Dot(n, o.Right)/z, h/2 - f*r3.Dot(n, o.Up)/z, true
	case camera.Equirect:
		lon := math.Atan2(r3.Dot(n, o.Right), r3.Dot(n, o.Forward))
		lat := math.Asin(math.Max(-1, math.Min(1, r3.Dot(n, o.Up))))
		return w/2 + lon*w/(2*math.Pi), h/2 - lat*h/math.Pi, true
	}
	return p.Forward(n)
}

// Every grid vertex lies on the aberrated, projected position of its own
// catalogue-frame coordinate within 0.5 px, recomputed independently
// [pub: ESA SP-1200 galactic rotation; aberration formula of physics.md;
// gnomonic and plate carrée projections], and consecutive vertices are at
// most MaxSegment apart.
func TestGridVerticesOnAberratedCoordinates(t *testing.T) {
	heading := r3.Unit(r3.Vec{X: 1, Y: 0.4, Z: 0.3})
	look := r3.Unit(r3.Vec{X: 1, Y: 0.1, Z: 0.05})
	kinds := []struct {
		kind camera.Kind
		w, h int
		fov  float64
	}{
		{camera.Pinhole, 160, 90, 90},
		{camera.Equirect, 180, 90, 0},
		{camera.Fisheye, 120, 120, 200},
		{camera.Cube, 6 * 40, 40, 0},
	}
	for _, k := range kinds {
		for _, frame := range []GraticuleFrame{GraticuleEquatorial, GraticuleGalactic} {
			for _, beta := range []float64{0, 0.9} {
				p := looking(t, k.kind, k.w, k.h, k.fov, look)
				b, err := camera.NewBoost(heading, beta)
				if err != nil {
					t.Fatal(err)
				}
				lines, err := GraticuleLines(p, b, GraticuleOptions{Frame: frame, Step: 20})
				if err != nil {
					t.Fatal(err)
				}
				n := 0
				for _, l := range lines {
					for i, v := range l.Points {
						n++
						want := refAberrate(refDir(frame, v.Lon, v.Lat), heading, beta)
						x, y, ok := refProject(&p, want)
						dx := x - v.X
						if k.kind == camera.Equirect && math.Abs(dx) > float64(k.w)/2 {
							dx = math.Abs(dx) - float64(k.w) // x = 0 and x = W are the same seam
						}
						if ok && k.kind == camera.Cube && math.Hypot(dx, y-v.Y) > 0.5 {
							// A point on a face edge belongs to two faces; compare
							// on the sphere, where a pixel is at most 90°/H.
							// Nudge into each neighbouring face.
							for _, e := range [][2]float64{{1e-7, 0}, {-1e-7, 0}, {0, 1e-7}, {0, -1e-7}} {
								if d, dok := p.Inverse(v.X+e[0], v.Y+e[1]); dok && angle(d, want) < 0.5*math.Pi/2/float64(k.h)/2 {
									dx, y = 0, v.Y
								}
							}
						}
						if !ok || math.Hypot(dx, y-v.Y) > 0.5 {
							t.Fatalf("%v %v β=%g: vertex (%g, %g) of (%g°, %g°): want (%g, %g) ok=%v",
								k.kind, frame, beta, v.X, v.Y, v.Lon, v.Lat, x, y, ok)
						}
						if i > 0 {
							u := l.Points[i-1]
							if d := math.Hypot(v.X-u.X, v.Y-u.Y); d > MaxSegment+1e-9 {
								t.Fatalf("%v %v β=%g: segment of %g px at (%g, %g)", k.kind, frame, beta, d, v.X, v.Y)
							}
						}
					}
				}
				if n < 100 {
					t.Errorf("%v %v β=%g: only %d vertices", k.kind, frame, beta, n)
				}
			}
		}
	}
}

// At rest, looking at RA 0° Dec 0° with north up, the celestial equator is
// the horizontal line through the image centre [cp: definition of the
// default orientation].
func TestGridEquatorThroughCentre(t *testing.T) {
	p := looking(t, camera.Pinhole, 160, 90, 60, axisX)
	lines, err := GraticuleLines(p, camera.Boost{}, GraticuleOptions{Frame: GraticuleEquatorial})
	if err != nil {
		t.Fatal(err)
	}
	found := false
	for _, l := range lines {
		if l.Kind != Parallel || l.Value != 0 {
			continue
		}
		for _, v := range l.Points {
			if !scalar.EqualWithinAbs(v.Y, 45, 1e-9) {
				t.Fatalf("equator vertex at y = %g, want 45", v.Y)
			}
			if math.Abs(v.X-80) < 1 {
				found = true
			}
		}
	}
	if !found {
		t.Error("no equator vertex near the image centre")
	}
}

// UnityAngle: β = 0.6, γ = 1.25 gives cos θ′ = (1 − 1/γ)/β = 1/3, θ′ =
// 70.5288° [cp: physics.md β = 0.6 check values]; small β tends to 90°
// − β/2 rad [derived: first order in β]; large γ to √(2/γ) rad
// [derived: tan θ′ = √(2(γ+1))/(γβ)].
func TestUnityAngle(t *testing.T) {
	cases := []struct {
		name  string
		boost func() (camera.Boost, error)
		want  float64
		tol   float64
	}{
		{"β=0.6", func() (camera.Boost, error) { return camera.NewBoost(axisX, 0.6) }, math.Acos(1.0/3) * 180 / math.Pi, 1e-12},
		{"β=1e-9", func() (camera.Boost, error) { return camera.NewBoost(axisX, 1e-9) }, 90 - 0.5e-9*180/math.Pi, 1e-12},
		{"γ=1e8", func() (camera.Boost, error) { return camera.NewBoostGamma(axisX, 1e8) }, math.Sqrt(2e-8) * 180 / math.Pi, 1e-8}, // next term: relative −1/(6γ)
	}
	for _, c := range cases {
		b, err := c.boost()
		if err != nil {
			t.Fatal(err)
		}
		if have := UnityAngle(b); !scalar.EqualWithinRel(have, c.want, c.tol) {
			t.Errorf("%s: have θ′ = %.12g°, want %.12g°", c.name, have, c.want)
		}
	}
}

// Every vertex of the D = 1 circle has Doppler factor 1 (to 1e-9) and sits
// on its direction's pixel.
func TestUnityCircleVertices(t *testing.T) {
	heading := r3.Unit(r3.Vec{X: 1, Y: -0.2, Z: 0.1})
	for _, beta := range []float64{0.3, 0.99} {
		b, err := camera.NewBoost(heading, beta)
		if err != nil {
			t.Fatal(err)
		}
		p := looking(t, camera.Equirect, 180, 90, 0, heading)
		lines, err := UnityCircle(p, b)
		if err != nil {
			t.Fatal(err)
		}
		n := 0
		for _, l := range lines {
			for _, v := range l.Points {
				n++
				// D(n′) = 1/D_inverse(n′).
				if d := 1 / b.Inverse().Doppler(v.Dir); !scalar.EqualWithinAbs(d, 1, 1e-9) {
					t.Fatalf("β=%g: D = %.12g at (%g, %g), want 1", beta, d, v.X, v.Y)
				}
				x, y, _ := refProject(&p, v.Dir)
				if math.Hypot(x-v.X, y-v.Y) > 0.5 {
					t.Fatalf("β=%g: vertex (%g, %g), direction projects to (%g, %g)", beta, v.X, v.Y, x, y)
				}
			}
		}
		if n < 50 {
			t.Errorf("β=%g: only %d vertices", beta, n)
		}
	}
	lines, err := UnityCircle(looking(t, camera.Pinhole, 16, 9, 0, axisX), camera.Boost{})
	if err != nil || len(lines) != 0 {
		t.Errorf("at rest: have %d lines, %v; want none", len(lines), err)
	}
}

func TestGridErrors(t *testing.T) {
	p := looking(t, camera.Pinhole, 16, 9, 0, axisX)
	for _, opt := range []GraticuleOptions{
		{Frame: GraticuleEquatorial, Step: -1},
		{Frame: GraticuleEquatorial, Step: 91},
		{Frame: GraticuleGalactic, Step: math.NaN()},
		{Frame: GraticuleFrame(7)},
	} {
		if _, err := GraticuleLines(p, camera.Boost{}, opt); !errors.Is(err, ErrGraticule) {
			t.Errorf("%+v: have %v, want ErrGraticule", opt, err)
		}
	}
	if l, err := GraticuleLines(p, camera.Boost{}, GraticuleOptions{}); err != nil || l != nil {
		t.Errorf("zero options: have %v, %v; want nothing", l, err)
	}
	if _, err := ParseGraticuleFrame("ecliptic"); !errors.Is(err, ErrGraticule) {
		t.Errorf("ParseGraticuleFrame(ecliptic): %v, want ErrGraticule", err)
	}
	for _, s := range []string{"none", "radec", "galactic"} {
		g, err := ParseGraticuleFrame(s)
		if err != nil || g.String() != s {
			t.Errorf("ParseGraticuleFrame(%q) = %v, %v", s, g, err)
		}
	}
}

func BenchmarkGraticuleLines(b *testing.B) {
	p := looking(b, camera.Pinhole, 1920, 1080, 90, axisX)
	boost, err := camera.NewBoost(r3.Unit(r3.Vec{X: 1, Y: 0.3}), 0.95)
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := GraticuleLines(p, boost, GraticuleOptions{Frame: GraticuleGalactic, Step: 10}); err != nil {
			b.Fatal(err)
		}
	}
}
