package render

import (
	"errors"
	"math"
	"slices"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/spatial/r3"
	"pgregory.net/rapid"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/spectrum"
)

// blankFrame returns a black frame of projection p seen by obs at the zero
// (default) exposure, ready for AddCMB.
func blankFrame(t testing.TB, p camera.Projection, obs camera.Observer) *Frame {
	t.Helper()
	buf, err := NewBuffer(p.Width, p.Height, false)
	if err != nil {
		t.Fatal(err)
	}
	return &Frame{Buffer: *buf, Options: Options{Projection: p, Observer: obs}, Scale: ExposureScale(0)}
}

// looking returns a projection looking along dir.
func looking(t testing.TB, kind camera.Kind, w, h int, fov float64, dir r3.Vec) camera.Projection {
	t.Helper()
	o, err := camera.LookAt(dir, axisZ, 0)
	if err != nil {
		t.Fatal(err)
	}
	p := camera.Projection{Kind: kind, Width: w, Height: h, FOV: fov, Orient: o}
	if err := p.Prepare(); err != nil {
		t.Fatal(err)
	}
	return p
}

// kimLocus is the Planckian locus approximation of Kim et al. (2002,
// J. Korean Phys. Soc. 41, 865) for 1667–4000 K [pub; coefficients quoted
// from memory].
func kimLocus(T float64) (x, y float64) {
	t1, t2, t3 := 1e3/T, 1e6/(T*T), 1e9/(T*T*T)
	x = -0.2661239*t3 - 0.2343589*t2 + 0.8776956*t1 + 0.179910
	if T <= 2222 {
		return x, -1.1063814*x*x*x - 1.34811020*x*x + 2.18555832*x - 0.20219683
	}
	return x, -0.9549476*x*x*x - 1.37418593*x*x + 2.09137015*x - 0.16748867
}

// pixelXY returns the chromaticity and luminance of buffer pixel (i, j).
func pixelXY(b *Buffer, i, j int) (x, y, Y float64) {
	r, g, bl := b.At(i, j)
	X, Y, Z := spectrum.LinearSRGBToXYZ(float64(r), float64(g), float64(bl))
	return X / (X + Y + Z), Y / (X + Y + Z), Y
}

// The solar dipole: at rest the CMB is hottest toward the Sun's motion by
// T₀β_s = 3362.1 μK (Planck 2018 results I quote 3362.08 μK [pub, from
// memory]), coldest opposite.
func TestCMBSolarDipole(t *testing.T) {
	apex := camera.FromGalacticLB(SunCMBL, SunCMBB)
	hot := CMBTemperatureAt(camera.Boost{}, apex, CMBOptions{})
	cold := CMBTemperatureAt(camera.Boost{}, r3.Scale(-1, apex), CMBOptions{})
	if d := (hot - cold) / 2; math.Abs(d-3362.08e-6) > 1e-6 {
		t.Errorf("dipole amplitude: have %.3f μK, want 3362.08 μK [pub]", d*1e6)
	}
	if have := CMBTemperatureAt(camera.Boost{}, apex, CMBOptions{NoSunMotion: true}); have != CMBTemperature {
		t.Errorf("no solar motion: have %g K, want T0 = %g K (Fixsen 2009) [pub]", have, CMBTemperature)
	}
}

// At rest the CMB (2.7 K) emits nothing visible: after tone mapping and sRGB
// encoding at the default exposure every pixel stays below half an 8-bit
// code value [cp: invisible means it rounds to 0].
func TestCMBInvisibleAtRest(t *testing.T) {
	for _, kind := range []camera.Kind{camera.Pinhole, camera.Equirect} {
		w, h := 160, 90
		if kind == camera.Equirect {
			w, h = 180, 90
		}
		f := blankFrame(t, looking(t, kind, w, h, 0, axisX), camera.Observer{})
		if err := AddCMB(f, CMBOptions{}); err != nil {
			t.Fatal(err)
		}
		worst := 0.0
		for j := 0; j < f.H; j++ {
			for i := 0; i < f.W; i++ {
				r, g, b := f.At(i, j)
				r1, g1, b1 := Tone(ToneShoulder, float64(r), float64(g), float64(b))
				worst = max(worst, spectrum.EncodeSRGB(r1), spectrum.EncodeSRGB(g1), spectrum.EncodeSRGB(b1))
			}
		}
		if worst >= 0.5/255 {
			t.Errorf("%v: max encoded pixel %g, want < 0.5/255", kind, worst)
		}
	}
}

// gammaForForwardT returns the boost along the solar CMB apex at which the
// CMB straight ahead reaches T kelvin. On axis both Doppler factors are
// e^φ, so rapidities add: T = T₀·e^(φ_s + φ) [pub: relativistic Doppler
// factor on axis, √((1+β)/(1−β)) = e^φ].
func boostForForwardT(t testing.TB, T float64) camera.Boost {
	t.Helper()
	phiSun := math.Atanh(SunCMBSpeed / speedOfLightKMS)
	b, err := camera.NewBoostRapidity(camera.FromGalacticLB(SunCMBL, SunCMBB), math.Log(T/CMBTemperature)-phiSun)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// A ship moving along the CMB dipole at the speed where the forward CMB is
// 3000 K sees the forward pixel with the chromaticity of a 3000 K
// Planckian radiator: within 0.003 of spectrum.Chromaticity(3000) and of
// the Kim et al. (2002) locus [pub].
func TestCMBForward3000K(t *testing.T) {
	b := boostForForwardT(t, 3000)
	if g := b.Gamma(); g < 200 || g > 600 {
		t.Errorf("γ = %g for a 3000 K forward CMB, physics.md says visible colours need γ ≈ 200–550 [cp]", g)
	}
	apex := b.Dir()
	if have := CMBTemperatureAt(b, apex, CMBOptions{}); !scalar.EqualWithinRel(have, 3000, 1e-9) {
		t.Errorf("forward T′: have %.9g K, want 3000 K", have)
	}
	// Odd size: the centre pixel's centre is the image centre, straight
	// ahead; the FOV is small against the beam width 1/γ ≈ 0.1°.
	p := looking(t, camera.Pinhole, 161, 91, 0.02, apex)
	f := blankFrame(t, p, camera.Observer{Boost: b})
	if err := AddCMB(f, CMBOptions{}); err != nil {
		t.Fatal(err)
	}
	x, y, Y := pixelXY(&f.Buffer, 80, 45)
	if !(Y > 0) {
		t.Fatalf("forward pixel luminance %g, want > 0", Y)
	}
	wx, wy := spectrum.Chromaticity(3000)
	kx, ky := kimLocus(3000)
	if math.Hypot(x-wx, y-wy) > 0.003 {
		t.Errorf("forward pixel (x, y) = (%.4f, %.4f), Chromaticity(3000) = (%.4f, %.4f)", x, y, wx, wy)
	}
	if math.Hypot(x-kx, y-ky) > 0.003 {
		t.Errorf("forward pixel (x, y) = (%.4f, %.4f), Kim et al. 2002 at 3000 K = (%.4f, %.4f) [pub]", x, y, kx, ky)
	}
	// Surface brightness: Scale · L · Ω_px with L = e^LnY/π (lux per unit
	// W is πB) and Ω_px = (pixel angle)² at the centre of a gnomonic frame.
	fpx := 80.5 / math.Tan(0.01*math.Pi/180)
	want := f.Scale * math.Exp(spectrum.Lookup(math.Log(3000)).LnY) / math.Pi / (fpx * fpx)
	if !scalar.EqualWithinRel(Y, want, 1e-4) {
		t.Errorf("forward pixel luminance: have %g, want Scale·L·Ω = %g", Y, want)
	}
}

// Surface brightness follows the temperature: the same forward pixel at two
// speeds along the dipole has the luminance ratio of blackbodies at the two
// forward temperatures T₀e^(φ_s+φ), so the bolometric ratio is D⁴ [pub:
// I_ν/ν³ invariance; physics.md "D⁴ intensity law"].
func TestCMBSurfaceBrightnessScaling(t *testing.T) {
	var lum [2]float64
	temps := [2]float64{2000, 4500}
	for k, T := range temps {
		b := boostForForwardT(t, T)
		f := blankFrame(t, looking(t, camera.Pinhole, 161, 91, 0.01, b.Dir()), camera.Observer{Boost: b})
		if err := AddCMB(f, CMBOptions{}); err != nil {
			t.Fatal(err)
		}
		_, _, lum[k] = pixelXY(&f.Buffer, 80, 45)
	}
	b1, _ := spectrum.NewBlackbody(temps[0], 1)
	b2, _ := spectrum.NewBlackbody(temps[1], 1)
	_, y1, _ := b1.XYZ()
	_, y2, _ := b2.XYZ()
	if have, want := lum[1]/lum[0], y2/y1; !scalar.EqualWithinRel(have, want, 1e-5) {
		t.Errorf("luminance ratio: have %g, want %g", have, want)
	}
	if have, want := b2.Bolometric()/b1.Bolometric(), math.Pow(temps[1]/temps[0], 4); !scalar.EqualWithinRel(have, want, 1e-12) {
		t.Errorf("bolometric ratio: have %g, want D⁴ = %g", have, want)
	}
}

// CMBTemperatureAt agrees with an independent four-vector computation: the
// CMB rest frame's four-velocity, boosted into the Sun's frame and then
// into the ship's, gives T′ = T₀/(u′ᵗ + n′·u′) [pub: relativistic Doppler
// shift of an isotropic blackbody, T′ = T₀/(γ_c(1 − β_c n′·b̂_c))].
func TestCMBTemperatureFourVector(t *testing.T) {
	rapid.Check(t, func(rt *rapid.T) {
		dir := randDir(rt, "dir")
		np := randDir(rt, "n")
		beta := rapid.Float64Range(0, 0.999).Draw(rt, "beta")
		b, err := camera.NewBoost(dir, beta)
		if err != nil {
			rt.Fatal(err)
		}
		bs := SunCMBSpeed / speedOfLightKMS
		gs := 1 / math.Sqrt(1-bs*bs)
		apex := camera.FromGalacticLB(SunCMBL, SunCMBB)
		// CMB frame moves at −β_s·b̂_s relative to the Sun.
		ut, u := gs, r3.Scale(-gs*bs, apex)
		// Boost into the ship frame (velocity β·b̂, axes parallel).
		g := 1 / math.Sqrt(1-beta*beta)
		bh := r3.Unit(dir)
		bx := r3.Dot(bh, u)
		ut2 := g * (ut - beta*bx)
		u2 := r3.Add(u, r3.Scale((g-1)*bx-g*beta*ut, bh))
		want := CMBTemperature / (ut2 + r3.Dot(np, u2))
		if have := CMBTemperatureAt(b, np, CMBOptions{}); !scalar.EqualWithinRel(have, want, 1e-9) {
			rt.Fatalf("β=%g dir=%v n′=%v: have %.12g K, want %.12g K", beta, dir, np, have, want)
		}
	})
}

func randDir(rt *rapid.T, label string) r3.Vec {
	for {
		v := r3.Vec{X: rapid.Float64Range(-1, 1).Draw(rt, label+"x"), Y: rapid.Float64Range(-1, 1).Draw(rt, label+"y"),
			Z: rapid.Float64Range(-1, 1).Draw(rt, label+"z")}
		if n := r3.Norm(v); n > 0.1 && n <= 1 {
			return r3.Scale(1/n, v)
		}
	}
}

// Pixel solid angles tile the imaged sky: they sum to 4π for an equirect
// frame and a cube strip, to 4·asin(sin a·sin b) for a pinhole of half
// fields a, b [pub: solid angle of a rectangular pyramid], and to 2π for a
// 180° fisheye (pixels counted by their centre, so the rim costs ~1/R).
func TestPixelSolidAngleSums(t *testing.T) {
	ha := 30 * math.Pi / 180
	hb := math.Atan(math.Tan(ha) * 60 / 80)
	cases := []struct {
		kind camera.Kind
		w, h int
		want float64
		tol  float64
	}{
		{camera.Equirect, 64, 32, 4 * math.Pi, 1e-12},
		{camera.Cube, 6 * 32, 32, 4 * math.Pi, 1e-3},
		{camera.Pinhole, 80, 60, 4 * math.Asin(math.Sin(ha)*math.Sin(hb)), 1e-3},
		{camera.Fisheye, 128, 128, 2 * math.Pi, 2e-2},
	}
	for _, c := range cases {
		p := looking(t, c.kind, c.w, c.h, 0, r3.Unit(r3.Vec{X: 1, Y: 0.3, Z: 0.2}))
		sa, err := newPixelSolidAngle(&p)
		if err != nil {
			t.Fatal(err)
		}
		sum := 0.0
		for j := 0; j < c.h; j++ {
			for i := 0; i < c.w; i++ {
				if n, ok := p.Inverse(float64(i)+0.5, float64(j)+0.5); ok {
					sum += sa.at(i, j, n)
				}
			}
		}
		if !scalar.EqualWithinRel(sum, c.want, c.tol) {
			t.Errorf("%v: ΣΩ = %.6f sr, want %.6f", c.kind, sum, c.want)
		}
	}
}

// A uniform blackbody sky (β = 0, no dipole) at temperature T has total
// buffer luminance Scale·L·4π with L = Y(W=1)/π, i.e. 4·Scale·Y: the
// illuminance a sphere of luminance L puts on a (4π-facing) detector
// [pub: E = L·Ω for a uniform source].
func TestCMBUniformSkyTotal(t *testing.T) {
	const T = 5772
	f := blankFrame(t, looking(t, camera.Equirect, 128, 64, 0, axisX), camera.Observer{})
	if err := AddCMB(f, CMBOptions{T0: T, NoSunMotion: true}); err != nil {
		t.Fatal(err)
	}
	r, g, b := f.Sum()
	bb, _ := spectrum.NewBlackbody(T, 1)
	_, y, _ := bb.XYZ()
	if have, want := spectrum.Luminance(r, g, b), 4*f.Scale*y; !scalar.EqualWithinRel(have, want, 1e-5) {
		t.Errorf("total luminance: have %g, want %g", have, want)
	}
}

// AddCMB gives the same buffer for any worker count.
func TestCMBDeterministic(t *testing.T) {
	b := boostForForwardT(t, 2500)
	var pix [][]float32
	for _, w := range []int{1, 3} {
		f := blankFrame(t, looking(t, camera.Fisheye, 96, 96, 40, b.Dir()), camera.Observer{Boost: b})
		if err := AddCMB(f, CMBOptions{Workers: w}); err != nil {
			t.Fatal(err)
		}
		pix = append(pix, f.Pix)
	}
	if !slices.Equal(pix[0], pix[1]) {
		t.Error("buffers differ between 1 and 3 workers")
	}
}

func TestCMBErrors(t *testing.T) {
	good := blankFrame(t, looking(t, camera.Pinhole, 16, 9, 0, axisX), camera.Observer{})
	small := blankFrame(t, looking(t, camera.Pinhole, 16, 9, 0, axisX), camera.Observer{})
	small.Options.Projection.Width = 17
	noScale := blankFrame(t, looking(t, camera.Pinhole, 16, 9, 0, axisX), camera.Observer{})
	noScale.Scale = 0
	cases := []struct {
		name string
		f    *Frame
		opt  CMBOptions
	}{
		{"nil frame", nil, CMBOptions{}},
		{"negative T0", good, CMBOptions{T0: -1}},
		{"NaN T0", good, CMBOptions{T0: math.NaN()}},
		{"negative workers", good, CMBOptions{Workers: -2}},
		{"size mismatch", small, CMBOptions{}},
		{"zero scale", noScale, CMBOptions{}},
	}
	for _, c := range cases {
		if err := AddCMB(c.f, c.opt); !errors.Is(err, ErrCMB) {
			t.Errorf("%s: have %v, want an ErrCMB error", c.name, err)
		}
	}
}

func BenchmarkAddCMB(b *testing.B) {
	boost := boostForForwardT(b, 3000)
	f := blankFrame(b, looking(b, camera.Pinhole, 480, 270, 1, boost.Dir()), camera.Observer{Boost: boost})
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		if err := AddCMB(f, CMBOptions{Workers: 1}); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(f.W*f.H), "ns/pixel")
}

// The fisheye's pixel solid angle, found from the distance to the image
// centre, equals the Jacobian |∂n/∂x × ∂n/∂y| of the projection's own
// Inverse by central differences (to 1e-6), across the image of a 180°
// and a 360° fisheye, tilted and not.
func TestFisheyePixelSolidAngle(t *testing.T) {
	for _, c := range []struct{ fov, tilt float64 }{{180, 0}, {360, 0}, {180, 35}, {200, -20}} {
		p := looking(t, camera.Fisheye, 200, 200, c.fov, r3.Unit(r3.Vec{X: 0.2, Y: 1, Z: 0.4}))
		p.Tilt = c.tilt
		if err := p.Prepare(); err != nil {
			t.Fatal(err)
		}
		s, err := newPixelSolidAngle(&p)
		if err != nil {
			t.Fatal(err)
		}
		checked := 0
		for j := 3; j < 200; j += 7 {
			for i := 5; i < 200; i += 11 {
				x, y := float64(i)+0.5, float64(j)+0.5
				n, ok := p.Inverse(x, y)
				if !ok || math.Hypot(x-100, y-100) > 97 {
					continue
				}
				const h = 1e-3
				xp, _ := p.Inverse(x+h, y)
				xm, _ := p.Inverse(x-h, y)
				yp, _ := p.Inverse(x, y+h)
				ym, _ := p.Inverse(x, y-h)
				want := r3.Norm(r3.Cross(r3.Scale(1/(2*h), r3.Sub(xp, xm)), r3.Scale(1/(2*h), r3.Sub(yp, ym))))
				if got := s.at(i, j, n); !scalar.EqualWithinRel(got, want, 1e-6) {
					t.Fatalf("fov %g° tilt %g°, pixel (%d, %d): Ω %.9g sr, want %.9g", c.fov, c.tilt, i, j, got, want)
				}
				checked++
			}
		}
		if checked < 300 {
			t.Fatalf("fov %g°: %d pixels checked", c.fov, checked)
		}
	}
}
