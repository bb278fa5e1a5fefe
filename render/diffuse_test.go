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
	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/spectrum"
)

// bandSky is a test sky with structure: two components whose dilutions
// vary smoothly with the catalogue direction (brighter toward +Z, a cool
// component concentrated toward a "plane" z = 0).
type bandSky struct{}

func (bandSky) Temperatures() []float64 { return []float64{3200, 9000} }
func (bandSky) Dilutions(n r3.Vec, w []float64) {
	w[0] = 4e-13 * (1 + 0.8*math.Exp(-n.Z*n.Z/0.05))
	w[1] = 1e-14 * (1.2 + n.Z)
}

// planckXYZ integrates Planck's law against the CIE 1931 functions
// directly (trapezoid on a 0.5 nm grid over 360–830 nm, which holds the
// table's 5 nm nodes, so the piecewise-linear CMFs are integrated without
// kink error): the luminance-like tristimulus values Km∫B_λ(T)x̄ dλ etc.,
// cd/m² per unit dilution. It uses neither the ln T tables nor their
// integrator [pub: CIE 015:2004 tristimulus integral; Planck's law].
func planckXYZ(T float64) (X, Y, Z float64) {
	const h = 0.5e-9
	for i := 0; i <= 940; i++ {
		l := 360e-9 + float64(i)*h
		wt := h
		if i == 0 || i == 940 {
			wt = h / 2
		}
		x, y, z := spectrum.CMF(l)
		b := spectrum.Planck(l, T) * wt
		X += b * x
		Y += b * y
		Z += b * z
	}
	return spectrum.Km * X, spectrum.Km * Y, spectrum.Km * Z
}

// inverseAberration is the textbook inverse transform, written out here
// independently of camera.Boost: light seen along n′ by a ship moving at
// β along b̂ comes from n with cos θ = (cos θ′ − β)/(1 − β cos θ′), in the
// plane of n′ and b̂, and has D = 1/(γ(1 − β cos θ′)) [pub: Einstein 1905
// aberration and Doppler formulas; physics.md].
func inverseAberration(np, bhat r3.Vec, beta float64) (n r3.Vec, D float64) {
	g := 1 / math.Sqrt(1-beta*beta)
	cp := r3.Dot(np, bhat)
	D = 1 / (g * (1 - beta*cp))
	c := (cp - beta) / (1 - beta*cp)
	perp := r3.Sub(np, r3.Scale(cp, bhat))
	if pn := r3.Norm(perp); pn > 0 {
		return r3.Add(r3.Scale(c, bhat), r3.Scale(math.Sqrt(max(0, 1-c*c))/pn, perp)), D
	}
	return r3.Scale(c, bhat), D
}

// At 0.9 c every pixel of a pinhole frame matches an independent
// evaluation: the direction from the textbook inverse aberration, the
// components at D·T_k integrated directly against the CIE functions (not
// the tables), times the pixel's solid angle cos³α/f² [pub: gnomonic
// projection Jacobian], on the stars' scale Scale·L·Ω. Centre sampling
// (MaxSamples 1) so that each pixel is one direction. Tolerances: 2·10⁻⁵
// in luminance and 2·10⁻⁵ in (x, y), above the tables' 10⁻⁶ and the
// 0.5 nm quadrature, far below any visible change.
func TestDiffuseAtSpeedIndependent(t *testing.T) {
	bhat := r3.Unit(r3.Vec{X: 0.3, Y: -0.5, Z: 0.4})
	const beta = 0.9
	obs := observer(t, bhat, beta)
	look := r3.Unit(r3.Add(bhat, r3.Vec{X: 0.8, Y: 0.2, Z: -0.1}))
	p := looking(t, camera.Pinhole, 40, 24, 100, look)
	f := blankFrame(t, p, obs)
	if err := AddDiffuse(f, bandSky{}, DiffuseOptions{MaxSamples: 1}); err != nil {
		t.Fatal(err)
	}
	fpx := 20 / math.Tan(50*math.Pi/180)
	sky := bandSky{}
	temps := sky.Temperatures()
	w := make([]float64, 2)
	minD, maxD := math.Inf(1), 0.0
	for j := 0; j < f.H; j++ {
		for i := 0; i < f.W; i++ {
			np, ok := p.Inverse(float64(i)+0.5, float64(j)+0.5)
			if !ok {
				t.Fatalf("pixel (%d,%d) has no direction", i, j)
			}
			n, D := inverseAberration(np, bhat, beta)
			minD, maxD = min(minD, D), max(maxD, D)
			sky.Dilutions(n, w)
			var X, Y, Z float64
			for k, T := range temps {
				x, y, z := planckXYZ(D * T)
				X += w[k] * x
				Y += w[k] * y
				Z += w[k] * z
			}
			c := r3.Dot(np, look)
			omega := c * c * c / (fpx * fpx)
			want := f.Scale * Y * omega
			hx, hy, hY := pixelXY(&f.Buffer, i, j)
			if !scalar.EqualWithinRel(hY, want, 2e-5) {
				t.Fatalf("pixel (%d,%d) D=%.3f: luminance have %.7g, want %.7g", i, j, D, hY, want)
			}
			wx, wy := X/(X+Y+Z), Y/(X+Y+Z)
			if math.Hypot(hx-wx, hy-wy) > 2e-5 {
				t.Fatalf("pixel (%d,%d) D=%.3f: (x, y) have (%.6f, %.6f), want (%.6f, %.6f)", i, j, D, hx, hy, wx, wy)
			}
		}
	}
	if minD > 0.9 || maxD < 2 {
		t.Errorf("the frame spans D %.2f..%.2f; the check wants a frame across D = 1", minD, maxD)
	}
}

// The D⁴ law: seen from any boost, the observed components of a diffuse
// source have a bolometric surface brightness Σ wσt⁴/π that is D⁴ times
// the rest value, with D = 1/(γ(1 − β cos θ′)) from the textbook formula;
// the dilutions are those of the catalogue direction of the inverse
// aberration [pub: I_ν/ν³ invariance, Rybicki & Lightman 1979 §4.9;
// physics.md "D⁴ intensity law"]. Up to γ = 10⁴.
func TestDiffuseD4Law(t *testing.T) {
	sky := bandSky{}
	temps := sky.Temperatures()
	rapid.Check(t, func(rt *rapid.T) {
		bhat := randDir(rt, "b")
		np := randDir(rt, "n")
		phi := rapid.Float64Range(0, math.Asinh(1e4)).Draw(rt, "phi")
		b, err := camera.NewBoostRapidity(bhat, phi)
		if err != nil {
			rt.Fatal(err)
		}
		tt, w := make([]float64, 2), make([]float64, 2)
		n, D := DiffuseSeen(b, sky, np, tt, w)
		// Independent D, in the cancellation-free form for β → 1:
		// 1/D = γ(1 − β cos θ′) = γ(1−β) + γβ(1 − cos θ′), with
		// γ(1−β) = cosh φ − sinh φ = e^−φ and 1 − cos θ′ = |n′ − b̂|²/2.
		wantD := 1 / (math.Exp(-phi) + math.Sinh(phi)*r3.Norm2(r3.Sub(np, bhat))/2)
		if !scalar.EqualWithinRel(D, wantD, 1e-9) {
			rt.Fatalf("φ=%g: D have %.12g, want %.12g", phi, D, wantD)
		}
		var rest, seen float64
		w0 := make([]float64, 2)
		sky.Dilutions(n, w0)
		for k, T := range temps {
			if w[k] != w0[k] {
				rt.Fatalf("dilution %d changed: %g → %g", k, w0[k], w[k])
			}
			rest += w0[k] * spectrum.SigmaSB * math.Pow(T, 4) / math.Pi
			seen += w[k] * spectrum.SigmaSB * math.Pow(tt[k], 4) / math.Pi
		}
		if !scalar.EqualWithinRel(seen/rest, math.Pow(wantD, 4), 1e-9) {
			rt.Fatalf("φ=%g: bolometric ratio %.12g, want D⁴ = %.12g", phi, seen/rest, math.Pow(wantD, 4))
		}
		if phi < 3 && r3.Norm(r3.Cross(np, bhat)) > 1e-3 { // where the textbook form is well conditioned
			wn, _ := inverseAberration(np, bhat, math.Tanh(phi))
			if r3.Norm(r3.Sub(n, wn)) > 1e-9 {
				rt.Fatalf("φ=%g: n have %v, want %v", phi, n, wn)
			}
		}
	})
	// And in the buffer: the luminance of the forward pixel at two speeds
	// has the ratio of blackbodies at the two forward temperatures.
	uni := UniformSky{T: []float64{5000}, W: []float64{1e-13}}
	var lum [2]float64
	var Ds = [2]float64{1.5, 6}
	for k, Dk := range Ds {
		b, err := camera.NewBoostRapidity(axisX, math.Log(Dk))
		if err != nil {
			t.Fatal(err)
		}
		f := blankFrame(t, looking(t, camera.Pinhole, 21, 21, 0.1, axisX), camera.Observer{Boost: b})
		if err := AddDiffuse(f, uni, DiffuseOptions{}); err != nil {
			t.Fatal(err)
		}
		lum[k] = f.Luminance(10, 10)
	}
	_, y1, _ := planckXYZ(5000 * Ds[0])
	_, y2, _ := planckXYZ(5000 * Ds[1])
	if have, want := lum[1]/lum[0], y2/y1; !scalar.EqualWithinRel(have, want, 2e-5) {
		t.Errorf("forward luminance ratio: have %.7g, want %.7g", have, want)
	}
}

// A uniform layer at rest over the whole sphere (equirect, exact row solid
// angles) has total luminance Scale·L·4π with L = Km Σ W_k ∫B_λ(T_k)ȳ dλ
// from direct integration [pub: E = ∫L dΩ for a uniform source].
func TestDiffuseUniformSphereTotal(t *testing.T) {
	uni := UniformSky{T: []float64{3000, 6000, 20000}, W: []float64{2e-13, 5e-14, 1e-15}}
	f := blankFrame(t, looking(t, camera.Equirect, 128, 64, 0, axisX), camera.Observer{})
	if err := AddDiffuse(f, uni, DiffuseOptions{}); err != nil {
		t.Fatal(err)
	}
	L := 0.0
	for k, T := range uni.T {
		_, y, _ := planckXYZ(T)
		L += uni.W[k] * y
	}
	r, g, b := f.Sum()
	if have, want := spectrum.Luminance(r, g, b), f.Scale*L*4*math.Pi; !scalar.EqualWithinRel(have, want, 2e-5) {
		t.Errorf("total luminance: have %.7g, want %.7g", have, want)
	}
}

// A uniform layer and the equivalent stars give the same light: N stars
// spread evenly over the sphere (a Fibonacci lattice), each of dilution
// 4W/N so that together they carry the flux ∫W B dΩ = 4πWB of the layer,
// rendered at rest through the star path, sum to the layer's total within
// 10⁻³ (light of stars within the PSF's reach of the poles, 2.5 px, is
// partly lost off the top and bottom rows: about 3·10⁻⁴ here) [pub: flux
// of a diluted blackbody πWB; E = ∫L dΩ].
func TestDiffuseMatchesEquivalentStars(t *testing.T) {
	const T, W, N = 6000.0, 1e-12, 4000
	p := looking(t, camera.Equirect, 256, 128, 0, axisX)
	f := blankFrame(t, p, camera.Observer{})
	if err := AddDiffuse(f, UniformSky{T: []float64{T}, W: []float64{W}}, DiffuseOptions{}); err != nil {
		t.Fatal(err)
	}
	bb, err := spectrum.NewBlackbody(T, 4*W/N)
	if err != nil {
		t.Fatal(err)
	}
	v := bb.Vmag()
	s := &catalog.Stars{Epoch: 2000, Source: "fibonacci", Format: "in-code"}
	golden := math.Pi * (3 - math.Sqrt(5))
	for i := 0; i < N; i++ {
		z := 1 - (2*float64(i)+1)/N
		rho := math.Sqrt(1 - z*z)
		s.Append(catalog.Star{ID: int64(i + 1), Dist: math.Inf(1), Vmag: v, Teff: T, BV: math.NaN(), RV: math.NaN(), Flags: catalog.FlagNoDistance})
		s.X[i], s.Y[i], s.Z[i] = float32(rho*math.Cos(golden*float64(i))), float32(rho*math.Sin(golden*float64(i))), float32(z)
	}
	sf, err := Render(s, Options{Projection: p, Limit: math.Inf(1)})
	if err != nil {
		t.Fatal(err)
	}
	if sf.Scale != f.Scale {
		t.Fatalf("scales differ: stars %g, layer %g", sf.Scale, f.Scale)
	}
	r, g, b := f.Sum()
	layer := spectrum.Luminance(r, g, b)
	r, g, b = sf.Sum()
	stars := spectrum.Luminance(r, g, b)
	if !scalar.EqualWithinRel(stars, layer, 1e-3) {
		t.Errorf("total luminance: stars %.6g, layer %.6g (ratio %.5f)", stars, layer, stars/layer)
	}
}

// The layer's pixel solid angles, with and without sub-sampling, sum to
// the field each projection images: 4π for equirect and the cube strip,
// 4·asin(sin a·sin b) for a pinhole of half fields a, b [pub: solid angle
// of a rectangular pyramid], 2π for a 180° fisheye (rim pixels sampled
// by sub-sample, so the rim costs less than with centres only).
func TestDiffuseFieldSolidAngles(t *testing.T) {
	ha := 30 * math.Pi / 180
	hb := math.Atan(math.Tan(ha) * 60 / 80)
	cases := []struct {
		kind camera.Kind
		w, h int
		want float64
		tol  [2]float64 // centre sampling, 4×4
	}{
		{camera.Equirect, 64, 32, 4 * math.Pi, [2]float64{1e-6, 1e-6}},
		{camera.Cube, 6 * 32, 32, 4 * math.Pi, [2]float64{1e-3, 1e-4}},
		{camera.Pinhole, 80, 60, 4 * math.Asin(math.Sin(ha)*math.Sin(hb)), [2]float64{1e-3, 1e-4}},
		{camera.Fisheye, 128, 128, 2 * math.Pi, [2]float64{2e-2, 3e-3}},
	}
	uni := UniformSky{T: []float64{6504}, W: []float64{1e-12}}
	_, y, _ := planckXYZ(6504)
	for _, c := range cases {
		for m, ms := range []int{1, 4} {
			p := looking(t, c.kind, c.w, c.h, 0, r3.Unit(r3.Vec{X: 1, Y: 0.3, Z: 0.2}))
			f := blankFrame(t, p, camera.Observer{})
			// Footprint tiny: every pixel takes ms×ms samples.
			if err := AddDiffuse(f, uni, DiffuseOptions{MaxSamples: ms, Footprint: 1e-9}); err != nil {
				t.Fatal(err)
			}
			r, g, b := f.Sum()
			omega := spectrum.Luminance(r, g, b) / (f.Scale * 1e-12 * y)
			if !scalar.EqualWithinRel(omega, c.want, c.tol[m]) {
				t.Errorf("%v, %d×%d samples: ΣΩ = %.6f sr, want %.6f", c.kind, ms, ms, omega, c.want)
			}
		}
	}
}

// A fisheye's rim pixel whose centre lies outside the circle, where one
// sample per pixel suffices (here 0.08° pixels, D ≤ 1.7), gets one
// evaluation at the centroid of its 8×8 sub-samples inside the circle,
// weighted by their solid angle: the same as sampling each of them (the
// mean of a smooth function over a region differs from its value at the
// region's centroid only at second order in the pixel's size) within
// 10⁻⁵, and the same share of the field.
func TestDiffuseFisheyeRimOneSample(t *testing.T) {
	p := looking(t, camera.Fisheye, 128, 128, 10, r3.Unit(r3.Vec{X: 1, Z: 0.12}))
	obs := observer(t, r3.Unit(r3.Vec{X: 0.6, Y: 0.5, Z: 0.3}), 0.5)
	one, all := blankFrame(t, p, obs), blankFrame(t, p, obs)
	if err := AddDiffuse(one, bandSky{}, DiffuseOptions{Exact: true}); err != nil {
		t.Fatal(err)
	}
	// Footprint tiny: every pixel, the rim too, samples all 8×8.
	if err := AddDiffuse(all, bandSky{}, DiffuseOptions{Exact: true, Footprint: 1e-9}); err != nil {
		t.Fatal(err)
	}
	rim, worst := 0, 0.0
	for j := range p.Height {
		for i := range p.Width {
			dx, dy := float64(i)+0.5-64, float64(j)+0.5-64
			if dx*dx+dy*dy <= 64*64 || !(math.Abs(dx) < 64.5 && math.Abs(dy) < 64.5) {
				continue
			}
			lo, la := one.Luminance(i, j), all.Luminance(i, j)
			if la == 0 {
				if lo != 0 {
					t.Errorf("pixel (%d,%d): %g, want 0 (no sub-sample inside)", i, j, lo)
				}
				continue
			}
			rim++
			worst = max(worst, math.Abs(lo/la-1))
		}
	}
	t.Logf("%d rim pixels with light, worst relative difference %.2e", rim, worst)
	if rim < 150 || worst > 1e-5 {
		t.Errorf("%d rim pixels, worst relative difference %.2e: want > 150 and ≤ 1e-5", rim, worst)
	}
	if worst == 0 {
		t.Error("the rim pixels are those of full sampling bit for bit: the one-sample rim was not used")
	}
}

// Where D varies fast within a pixel the default sampling follows it: a
// uniform sky seen at γ = 20 in a 384×192 equirect frame (0.94° pixels, so
// up to 7×7 samples near the beam's edge at θ′ ≈ 1/γ) whose poles are
// the direction of motion has the whole-sky luminance of the exact
// integral 2π∫L(D(θ′)) sin θ′ dθ′ (a fine quadrature over θ′ of the same
// table photometry) within 10⁻³, where centre sampling misses by more.
func TestDiffuseSupersampling(t *testing.T) {
	b, err := camera.NewBoostRapidity(axisZ, math.Acosh(20))
	if err != nil {
		t.Fatal(err)
	}
	uni := UniformSky{T: []float64{4000}, W: []float64{1e-13}}
	g, gb := b.Gamma(), b.GammaBeta()
	lum := func(th float64) float64 { // luminance at θ′ from the direction of motion
		D := 1 / (g - gb*math.Cos(th))
		return 1e-13 * math.Exp(spectrum.Lookup(math.Log(4000*D)).LnY) / math.Pi
	}
	want := 0.0
	const n = 200000
	for i := 0; i < n; i++ { // midpoint rule in θ′
		th := (float64(i) + 0.5) * math.Pi / n
		want += lum(th) * math.Sin(th) * math.Pi / n
	}
	want *= 2 * math.Pi
	var have [2]float64
	for m, ms := range []int{1, 0} {
		p := looking(t, camera.Equirect, 384, 192, 0, axisX)
		f := blankFrame(t, p, camera.Observer{Boost: b})
		if err := AddDiffuse(f, uni, DiffuseOptions{MaxSamples: ms}); err != nil {
			t.Fatal(err)
		}
		r, gg, bb := f.Sum()
		have[m] = spectrum.Luminance(r, gg, bb) / f.Scale
	}
	t.Logf("whole-sky luminance at γ = 20: exact %.6g, centre sampling %.6g (%+.2e), default %.6g (%+.2e)",
		want, have[0], have[0]/want-1, have[1], have[1]/want-1)
	if !scalar.EqualWithinRel(have[1], want, 1e-3) {
		t.Errorf("default sampling: have %.6g, want %.6g", have[1], want)
	}
	if math.Abs(have[0]/want-1) < 3*math.Abs(have[1]/want-1) {
		t.Errorf("centre sampling (%.3g) is not clearly worse than the default (%.3g): the test does not exercise sub-sampling",
			have[0]/want-1, have[1]/want-1)
	}
}

// The layer is the same for any worker count and can be kept apart.
func TestDiffuseDeterministicAndInto(t *testing.T) {
	b, err := camera.NewBoost(axisX, 0.99)
	if err != nil {
		t.Fatal(err)
	}
	var pix [][]float32
	for _, w := range []int{1, 3} {
		f := blankFrame(t, looking(t, camera.Fisheye, 96, 96, 120, r3.Unit(r3.Vec{X: 1, Y: 0.4})), camera.Observer{Boost: b})
		if err := AddDiffuse(f, bandSky{}, DiffuseOptions{Workers: w}); err != nil {
			t.Fatal(err)
		}
		pix = append(pix, f.Pix)
	}
	if !slices.Equal(pix[0], pix[1]) {
		t.Error("buffers differ between 1 and 3 workers")
	}
	f := blankFrame(t, looking(t, camera.Fisheye, 96, 96, 120, r3.Unit(r3.Vec{X: 1, Y: 0.4})), camera.Observer{Boost: b})
	layer, _ := NewBuffer(96, 96, false)
	if err := AddDiffuse(f, bandSky{}, DiffuseOptions{Into: layer}); err != nil {
		t.Fatal(err)
	}
	if r, g, bl := f.Sum(); r != 0 || g != 0 || bl != 0 {
		t.Error("Into: the frame's own buffer changed")
	}
	if !slices.Equal(layer.Pix, pix[0]) {
		t.Error("Into: the layer differs from the one drawn into the frame")
	}
	if err := f.Add(layer); err != nil || !slices.Equal(f.Pix, pix[0]) {
		t.Errorf("Add: %v", err)
	}
}

type badSky struct {
	t []float64
	w float64
}

func (s badSky) Temperatures() []float64 { return s.t }
func (s badSky) Dilutions(n r3.Vec, w []float64) {
	for k := range w {
		w[k] = 1e-13
	}
	if n.X > 0.5 {
		w[0] = s.w
	}
}

func TestDiffuseErrors(t *testing.T) {
	good := blankFrame(t, looking(t, camera.Pinhole, 16, 9, 0, axisX), camera.Observer{})
	small := blankFrame(t, looking(t, camera.Pinhole, 16, 9, 0, axisX), camera.Observer{})
	small.Options.Projection.Width = 17
	noScale := blankFrame(t, looking(t, camera.Pinhole, 16, 9, 0, axisX), camera.Observer{})
	noScale.Scale = 0
	wrongInto, _ := NewBuffer(8, 9, false)
	uni := UniformSky{T: []float64{5000}, W: []float64{1}}
	cases := []struct {
		name string
		f    *Frame
		sky  UnresolvedSky
		opt  DiffuseOptions
	}{
		{"nil frame", nil, uni, DiffuseOptions{}},
		{"nil sky", good, nil, DiffuseOptions{}},
		{"no components", good, UniformSky{}, DiffuseOptions{}},
		{"zero temperature", good, badSky{t: []float64{0}}, DiffuseOptions{}},
		{"NaN temperature", good, badSky{t: []float64{math.NaN()}}, DiffuseOptions{}},
		{"descending", good, badSky{t: []float64{5000, 4000}}, DiffuseOptions{}},
		{"negative dilution", good, badSky{t: []float64{5000}, w: -1}, DiffuseOptions{}},
		{"NaN dilution", good, badSky{t: []float64{5000}, w: math.NaN()}, DiffuseOptions{}},
		{"Inf dilution", good, badSky{t: []float64{5000}, w: math.Inf(1)}, DiffuseOptions{}},
		{"negative workers", good, uni, DiffuseOptions{Workers: -1}},
		{"negative footprint", good, uni, DiffuseOptions{Footprint: -1}},
		{"NaN MaxLnD", good, uni, DiffuseOptions{MaxLnD: math.NaN()}},
		{"too many samples", good, uni, DiffuseOptions{MaxSamples: 65}},
		{"size mismatch", small, uni, DiffuseOptions{}},
		{"Into size", good, uni, DiffuseOptions{Into: wrongInto}},
		{"zero scale", noScale, uni, DiffuseOptions{}},
	}
	for _, c := range cases {
		if err := AddDiffuse(c.f, c.sky, c.opt); !errors.Is(err, ErrDiffuse) {
			t.Errorf("%s: have %v, want an ErrDiffuse error", c.name, err)
		}
	}
}

// BenchmarkAddDiffuse measures the layer per pixel on one core: a 3-component
// structured sky at 0.9 c in a 60° pinhole frame (default sampling).
func BenchmarkAddDiffuse(b *testing.B) {
	boost, err := camera.NewBoost(axisX, 0.9)
	if err != nil {
		b.Fatal(err)
	}
	f := blankFrame(b, looking(b, camera.Pinhole, 480, 270, 60, r3.Unit(r3.Vec{X: 1, Y: 0.3})), camera.Observer{Boost: boost})
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		if err := AddDiffuse(f, bandSky{}, DiffuseOptions{Workers: 1}); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(f.W*f.H), "ns/pixel")
}

// BenchmarkAddDiffuseModel draws the built-in sky's unresolved light
// (catalog.UnresolvedSky, 7 components, depth V = 8) into the default
// still frame: 1920×1080 pinhole, 60°, at 0.9 c toward the galactic
// centre, looking ahead, on the adaptive grid (all cores).
func BenchmarkAddDiffuseModel(b *testing.B) { benchDiffuseModel(b, false) }

func benchDiffuseModel(b *testing.B, exact bool) {
	u := builtInUnresolved(b)
	gc := camera.FromGalacticLB(0, 0)
	boost, err := camera.NewBoost(gc, 0.9)
	if err != nil {
		b.Fatal(err)
	}
	f := blankFrame(b, looking(b, camera.Pinhole, 1920, 1080, 60, gc), camera.Observer{Boost: boost})
	b.ReportAllocs()
	c0 := cpuSeconds()
	b.ResetTimer()
	for b.Loop() {
		if err := AddDiffuse(f, u, DiffuseOptions{Exact: exact}); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(f.W*f.H), "ns/pixel")
	b.ReportMetric((cpuSeconds()-c0)/float64(b.N), "CPU-s/op")
}
