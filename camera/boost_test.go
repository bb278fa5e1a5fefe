package camera

import (
	"errors"
	"math"
	"math/big"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/spatial/r3"
	"pgregory.net/rapid"
)

const arcsecPerRad = 180 * 3600 / math.Pi

// angle returns the angle between unit vectors a and b without the
// cancellation of acos near 0 and π.
func angle(a, b r3.Vec) float64 {
	return 2 * math.Atan2(r3.Norm(r3.Sub(a, b)), r3.Norm(r3.Add(a, b)))
}

func mustBoost(t testing.TB, dir r3.Vec, beta float64) Boost {
	t.Helper()
	b, err := NewBoost(dir, beta)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

func mustGamma(t testing.TB, dir r3.Vec, gamma float64) Boost {
	t.Helper()
	b, err := NewBoostGamma(dir, gamma)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// TestBoostPointSix checks the β = 0.6 values of physics.md [cp]:
// γ = 1.25, D ahead = 2, D behind = 0.5, rapidity = atanh 0.6 = ln 2 [cp].
func TestBoostPointSix(t *testing.T) {
	dir := r3.Vec{X: 0, Y: 0, Z: 3} // normalised by the constructor
	b := mustBoost(t, dir, 0.6)
	checks := []struct {
		name       string
		have, want float64
	}{
		{"γ", b.Gamma(), 1.25},                                     // [cp] physics.md
		{"γβ", b.GammaBeta(), 0.75},                                // [cp] 1.25·0.6
		{"1−β", b.OneMinusBeta(), 0.4},                             // [cp]
		{"φ", b.Rapidity(), math.Ln2},                              // [cp] atanh 0.6 = ½ ln 4
		{"D ahead", b.Doppler(r3.Vec{Z: 1}), 2},                    // [cp] physics.md
		{"D behind", b.Doppler(r3.Vec{Z: -1}), 0.5},                // [cp] physics.md
		{"D side", b.Doppler(r3.Vec{X: 1}), 1.25},                  // [cp] transverse Doppler D = γ
		{"inverse D ahead", b.Inverse().Doppler(r3.Vec{Z: 1}), .5}, // [cp] β → −β
	}
	for _, c := range checks {
		if !scalar.EqualWithinAbsOrRel(c.have, c.want, 1e-15, 1e-15) {
			t.Errorf("%s: have %.17g, want %.17g", c.name, c.have, c.want)
		}
	}
	if d := b.Dir(); d != (r3.Vec{Z: 1}) {
		t.Errorf("Dir: have %v, want (0,0,1)", d)
	}
}

// TestAberrationTable checks cos θ′ = (cos θ + β)/(1 + β cos θ) [pub]
// (Einstein 1905, §7; physics.md) over a table of angles and speeds, and
// cos θ′ = β at θ = 90°.
func TestAberrationTable(t *testing.T) {
	bdir := r3.Unit(r3.Vec{X: 1, Y: 2, Z: -2})
	perp := r3.Unit(r3.Cross(bdir, r3.Vec{X: 0, Y: 0, Z: 1}))
	for _, beta := range []float64{0, 1e-4, 0.1, 0.6, 0.9, 0.99, 0.999999} {
		b := mustBoost(t, bdir, beta)
		for _, deg := range []float64{0, 10, 30, 45, 60, 90, 120, 135, 150, 170, 179, 180} {
			th := deg * math.Pi / 180
			n := r3.Add(r3.Scale(math.Cos(th), bdir), r3.Scale(math.Sin(th), perp))
			np, d := b.Apply(n)
			c := math.Cos(th)
			want := (c + beta) / (1 + beta*c)
			if deg == 90 {
				want = beta // [pub] cos θ′ = β at θ = 90°
			}
			have := r3.Dot(np, bdir)
			// The float64 textbook reference itself cancels near 180° at
			// high β (1 + β cos θ ≈ 1e-4), hence 1e-12; TestApplyHighGamma
			// checks precision against a 400-bit reference.
			if !scalar.EqualWithinAbs(have, want, 1e-12) {
				t.Errorf("β=%v θ=%v°: cos θ′ have %.17g, want %.17g", beta, deg, have, want)
			}
			// n′ stays in the plane of n and b̂ on the same side.
			if s := r3.Dot(np, perp); s < -1e-15 {
				t.Errorf("β=%v θ=%v°: n′ crossed to the other side of b̂ (%g)", beta, deg, s)
			}
			g := 1 / math.Sqrt((1-beta)*(1+beta))
			if wd := g * (1 + beta*c); !scalar.EqualWithinRel(d, wd, 1e-12) {
				t.Errorf("β=%v θ=%v°: D have %.17g, want %.17g", beta, deg, d, wd)
			}
		}
	}
}

// TestAberrationConstant checks the small-β limit: a star 90° from the
// velocity is displaced toward it by asin β ≈ v/c.
func TestAberrationConstant(t *testing.T) {
	const c = 299792458.0 // m/s, SI definition [pub]
	cases := []struct {
		name   string
		v      float64 // m/s
		want   float64 // arcsec
		tolArc float64
	}{
		// IAU (1976) constant of aberration κ = 20.49552″ [pub]; the speed
		// v = κ·c must give back κ (the relativistic term β³/6 is 3e-8″).
		{"IAU 1976 κ", 20.49552 / arcsecPerRad * c, 20.49552, 1e-6},
		// Earth's mean orbital speed 29.78 km/s [cp] gives ≈ 20.4955″
		// (physics.md); 29.78 is quoted to ±0.01 km/s in its last digit,
		// which is ±0.0069″, and κ itself corresponds to 29.789 km/s.
		{"29.78 km/s", 29780, 20.4955, 20.4955 * 0.01 / 29.78},
	}
	n := r3.Vec{X: 1}
	for _, cs := range cases {
		b := mustBoost(t, r3.Vec{Y: 1}, cs.v/c)
		np, _ := b.Apply(n)
		have := angle(n, np) * arcsecPerRad
		if !scalar.EqualWithinAbs(have, cs.want, cs.tolArc) {
			t.Errorf("%s: deflection have %.6f″, want %.6f″ ± %g", cs.name, have, cs.want, cs.tolArc)
		}
		if np.Y <= 0 {
			t.Errorf("%s: star moved away from the apex (n′ = %v)", cs.name, np)
		}
	}
}

// refApply evaluates physics.md's textbook formulas
// D = γ(1 + β cos θ), n′ = (n + ((γ−1) cos θ + γβ) b̂)/D in 400-bit
// arithmetic from the exact float64 inputs, with β = √(γ²−1)/γ.
func refApply(bdir, n r3.Vec, gamma float64) (r3.Vec, float64) {
	const prec = 400
	f := func(x float64) *big.Float { return new(big.Float).SetPrec(prec).SetFloat64(x) }
	nf := func() *big.Float { return new(big.Float).SetPrec(prec) }
	g := f(gamma)
	gb := nf().Sqrt(nf().Sub(nf().Mul(g, g), f(1)))
	beta := nf().Quo(gb, g)
	bx, by, bz := f(bdir.X), f(bdir.Y), f(bdir.Z)
	nx, ny, nz := f(n.X), f(n.Y), f(n.Z)
	// Normalise both exactly as the code's contract assumes unit vectors.
	norm := func(x, y, z *big.Float) (*big.Float, *big.Float, *big.Float) {
		m := nf().Add(nf().Add(nf().Mul(x, x), nf().Mul(y, y)), nf().Mul(z, z))
		s := nf().Sqrt(m)
		return nf().Quo(x, s), nf().Quo(y, s), nf().Quo(z, s)
	}
	bx, by, bz = norm(bx, by, bz)
	nx, ny, nz = norm(nx, ny, nz)
	c := nf().Add(nf().Add(nf().Mul(nx, bx), nf().Mul(ny, by)), nf().Mul(nz, bz))
	d := nf().Mul(g, nf().Add(f(1), nf().Mul(beta, c)))
	k := nf().Add(nf().Mul(nf().Sub(g, f(1)), c), gb)
	ox := nf().Quo(nf().Add(nx, nf().Mul(k, bx)), d)
	oy := nf().Quo(nf().Add(ny, nf().Mul(k, by)), d)
	oz := nf().Quo(nf().Add(nz, nf().Mul(k, bz)), d)
	x, _ := ox.Float64()
	y, _ := oy.Float64()
	z, _ := oz.Float64()
	df, _ := d.Float64()
	return r3.Vec{X: x, Y: y, Z: z}, df
}

// TestApplyHighGamma compares Apply with the 400-bit evaluation of the
// physics.md formulas ahead, sideways and (the hard case) behind, at γ up to
// 1e9, including directions within 1e-12 rad of ±b̂ and the float64 nearest
// to −b̂ itself. (Beyond γ ≈ 1e9 exactly behind, the ulp by which the input
// vectors miss unit length starts to matter against 1 − β.)
func TestApplyHighGamma(t *testing.T) {
	bdir := r3.Unit(r3.Vec{X: 0.3, Y: -0.5, Z: 0.8})
	p1 := r3.Unit(r3.Cross(bdir, r3.Vec{X: 1}))
	for _, gamma := range []float64{1.0000001, 1.25, 10, 1e4, 1e8, 1e9} {
		b := mustGamma(t, bdir, gamma)
		for _, off := range []float64{0, 1e-12, 1e-9, 1e-6, 1e-3, 0.5, 1.5, math.Pi / 2, math.Pi - 1, math.Pi - 1e-3, math.Pi - 1e-6, math.Pi - 1e-9, math.Pi - 1e-12, math.Pi} {
			n := r3.Add(r3.Scale(math.Cos(off), bdir), r3.Scale(math.Sin(off), p1))
			np, d := b.Apply(n)
			wn, wd := refApply(b.Dir(), n, gamma)
			if !scalar.EqualWithinRel(d, wd, 1e-14) {
				t.Errorf("γ=%g θ=%g: D have %.17g, want %.17g", gamma, off, d, wd)
			}
			if a := angle(np, wn); a > 1e-14 {
				t.Errorf("γ=%g θ=%g: n′ off by %g rad (have %v, want %v)", gamma, off, a, np, wn)
			}
			if m := r3.Norm(np); !scalar.EqualWithinAbs(m, 1, 1e-14) {
				t.Errorf("γ=%g θ=%g: |n′| = %.17g", gamma, off, m)
			}
		}
	}
}

func TestBoostConstructorsAgree(t *testing.T) {
	dir := r3.Vec{X: 1, Y: 1}
	for _, beta := range []float64{1e-3, 0.5, 0.6, 0.9, 0.99999} {
		a := mustBoost(t, dir, beta)
		g, err := NewBoostGamma(dir, a.Gamma())
		if err != nil {
			t.Fatal(err)
		}
		r, err := NewBoostRapidity(dir, a.Rapidity())
		if err != nil {
			t.Fatal(err)
		}
		for _, o := range []Boost{g, r} {
			// γ − 1 carries fewer digits of β when β is small.
			tol := 1e-12 / (a.Gamma() - 1)
			if !scalar.EqualWithinRel(o.OneMinusBeta(), a.OneMinusBeta(), math.Max(tol, 1e-13)) ||
				!scalar.EqualWithinRel(o.GammaBeta(), a.GammaBeta(), math.Max(tol, 1e-13)) ||
				!scalar.EqualWithinRel(o.Gamma(), a.Gamma(), 1e-14) {
				t.Errorf("β=%v: constructors disagree: %+v vs %+v", beta, o, a)
			}
		}
	}
	// γ = 1e8: β rounds to 1, 1 − β does not [cp: 1−β = 1/(γ²(1+β))].
	b := mustGamma(t, dir, 1e8)
	if b.Beta() != 1 {
		t.Logf("β = %.17g", b.Beta())
	}
	if want := 5e-17; !scalar.EqualWithinRel(b.OneMinusBeta(), want, 1e-15) {
		t.Errorf("1−β at γ=1e8: have %g, want %g", b.OneMinusBeta(), want)
	}
	r, _ := NewBoostRapidity(dir, math.Acosh(1e8))
	if !scalar.EqualWithinRel(r.OneMinusBeta(), 5e-17, 1e-12) || !scalar.EqualWithinRel(r.Gamma(), 1e8, 1e-12) {
		t.Errorf("rapidity boost at γ=1e8: %+v", r)
	}
}

func TestBoostErrors(t *testing.T) {
	dir := r3.Vec{X: 1}
	nan := math.NaN()
	cases := []struct {
		name string
		err  error
		want error
	}{
		{"β=1", second(NewBoost(dir, 1)), ErrSpeed},
		{"β=1.5", second(NewBoost(dir, 1.5)), ErrSpeed},
		{"β<0", second(NewBoost(dir, -0.1)), ErrSpeed},
		{"β NaN", second(NewBoost(dir, nan)), ErrSpeed},
		{"β Inf", second(NewBoost(dir, math.Inf(1))), ErrSpeed},
		{"γ<1", second(NewBoostGamma(dir, 0.5)), ErrSpeed},
		{"γ NaN", second(NewBoostGamma(dir, nan)), ErrSpeed},
		{"γ Inf", second(NewBoostGamma(dir, math.Inf(1))), ErrSpeed},
		{"γ > MaxGamma", second(NewBoostGamma(dir, 1e151)), ErrSpeed},
		{"φ<0", second(NewBoostRapidity(dir, -1)), ErrSpeed},
		{"φ huge", second(NewBoostRapidity(dir, 800)), ErrSpeed},
		{"φ > acosh MaxGamma", second(NewBoostRapidity(dir, 347)), ErrSpeed},
		{"φ NaN", second(NewBoostRapidity(dir, nan)), ErrSpeed},
		{"zero dir", second(NewBoost(r3.Vec{}, 0.5)), ErrDirection},
		{"NaN dir", second(NewBoost(r3.Vec{X: nan}, 0.5)), ErrDirection},
		{"Inf dir γ", second(NewBoostGamma(r3.Vec{Y: math.Inf(-1)}, 2)), ErrDirection},
		{"zero dir φ", second(NewBoostRapidity(r3.Vec{}, 1)), ErrDirection},
	}
	for _, c := range cases {
		if !errors.Is(c.err, c.want) {
			t.Errorf("%s: have %v, want %v", c.name, c.err, c.want)
		}
	}
	// The message names the value.
	if err := second(NewBoost(dir, 1.5)); err == nil || !contains(err.Error(), "1.5") {
		t.Errorf("error %q does not name β = 1.5", err)
	}
	// β = 0 (and γ = 1, φ = 0) accept a zero or NaN direction.
	for _, f := range []func() (Boost, error){
		func() (Boost, error) { return NewBoost(r3.Vec{}, 0) },
		func() (Boost, error) { return NewBoost(r3.Vec{X: nan}, 0) },
		func() (Boost, error) { return NewBoostGamma(r3.Vec{}, 1) },
		func() (Boost, error) { return NewBoostRapidity(r3.Vec{}, 0) },
	} {
		b, err := f()
		if err != nil {
			t.Errorf("identity boost: %v", err)
			continue
		}
		n := r3.Unit(r3.Vec{X: 1, Y: -2, Z: 3})
		np, d := b.Apply(n)
		if angle(np, n) > 1e-16 || d != 1 {
			t.Errorf("identity boost moved n: %v → %v, D=%v", n, np, d)
		}
	}
}

// TestMaxGamma: at the largest accepted γ nothing overflows, ahead or
// behind: D ahead = γ(1+β) → 2γ, behind 1/(γ(1+β)) → 1/(2γ) [cp].
func TestMaxGamma(t *testing.T) {
	b := mustGamma(t, r3.Vec{X: 1}, MaxGamma)
	for _, c := range []struct {
		n     r3.Vec
		cos   float64
		wantD float64
	}{{r3.Vec{X: 1}, 1, 2 * MaxGamma}, {r3.Vec{X: -1}, -1, 0.5 / MaxGamma}, {r3.Vec{Y: 1}, 1, MaxGamma}} {
		np, d := b.Apply(c.n)
		if !scalar.EqualWithinRel(d, c.wantD, 1e-15) || !scalar.EqualWithinAbs(np.X, c.cos, 1e-15) {
			t.Errorf("n=%v: n′=%v D=%v, want cos θ′=%v D=%v", c.n, np, d, c.cos, c.wantD)
		}
	}
	if _, err := NewBoostRapidity(r3.Vec{X: 1}, math.Acosh(MaxGamma)*0.999); err != nil {
		t.Error(err)
	}
}

func second(_ Boost, err error) error { return err }

func contains(s, sub string) bool {
	for i := 0; i+len(sub) <= len(s); i++ {
		if s[i:i+len(sub)] == sub {
			return true
		}
	}
	return false
}

func TestZeroBoostIsIdentity(t *testing.T) {
	var b Boost
	n := r3.Unit(r3.Vec{X: 0.2, Y: 0.3, Z: -0.9})
	np, d := b.Apply(n)
	if angle(np, n) != 0 || d != 1 || b.Gamma() != 1 || b.OneMinusBeta() != 1 {
		t.Errorf("zero Boost: n′=%v D=%v γ=%v", np, d, b.Gamma())
	}
	np, d = b.Inverse().Apply(n)
	if angle(np, n) != 0 || d != 1 {
		t.Errorf("zero Boost inverse: n′=%v D=%v", np, d)
	}
}

func TestApplyNormalisesInput(t *testing.T) {
	b := mustBoost(t, r3.Vec{Z: 1}, 0.6)
	n := r3.Unit(r3.Vec{X: 1, Y: 1, Z: 1})
	want, wd := b.Apply(n)
	// A float32 round trip leaves |n| off by ~1e-8.
	n32 := r3.Vec{X: float64(float32(n.X)), Y: float64(float32(n.Y)), Z: float64(float32(n.Z))}
	have, hd := b.Apply(n32)
	if m := r3.Norm(have); !scalar.EqualWithinAbs(m, 1, 1e-15) {
		t.Errorf("|n′| = %.17g for float32 input", m)
	}
	if a := angle(have, want); a > 1e-7 || !scalar.EqualWithinRel(hd, wd, 1e-7) {
		t.Errorf("float32 input: n′ off by %g, D %v vs %v", a, hd, wd)
	}
}

// drawUnit draws a direction uniformly on the sphere.
func drawUnit(t *rapid.T, label string) r3.Vec {
	z := rapid.Float64Range(-1, 1).Draw(t, label+".z")
	ph := rapid.Float64Range(0, 2*math.Pi).Draw(t, label+".φ")
	s := math.Sqrt((1 - z) * (1 + z))
	return r3.Vec{X: s * math.Cos(ph), Y: s * math.Sin(ph), Z: z}
}

// drawNear draws a direction within a log-uniform angle (1e-14 … 0.1 rad) of
// v or of −v.
func drawNear(t *rapid.T, v r3.Vec) r3.Vec {
	lg := rapid.Float64Range(-14, -1).Draw(t, "lg ε")
	eps := math.Pow(10, lg)
	p := r3.Cross(v, drawUnit(t, "aux"))
	if r3.Norm(p) < 1e-3 {
		p = perpendicular(v)
	}
	p = r3.Unit(p)
	base := v
	if rapid.Bool().Draw(t, "behind") {
		base = r3.Scale(-1, v)
	}
	return r3.Unit(r3.Add(r3.Scale(math.Cos(eps), base), r3.Scale(math.Sin(eps), p)))
}

// perpendicular returns a unit vector perpendicular to v.
func perpendicular(v r3.Vec) r3.Vec {
	a := r3.Vec{X: 1}
	if math.Abs(v.X) > 0.5 {
		a = r3.Vec{Y: 1}
	}
	return r3.Unit(r3.Cross(v, a))
}

// TestBoostProperties checks, over random directions and γ from 1 to 1e8
// (uniform and log-uniform), including directions very close to ±b̂:
// no NaN; |n′| = 1 within 1e-12; Inverse(Apply(n)) = n; D(n)·D′(n′) = 1.
//
// Tolerances: n′ is stored in float64, so it carries a rounding of up to
// ε ≈ 1.1e-16 rad that no algorithm avoids. Going back, the inverse boost
// magnifies angles near the apex by D (dθ = D dθ′), and ln D′ changes by
// γβ sin θ per radian of n′ [cp: differentiate D′ = γ(1 − β cos θ′) with
// sin θ′ = sin θ / D]. So the bounds are 1e-12, or 8ε·D rad for the round
// trip and 8ε·γ sin θ (relative) for D·D′ where those are larger — which
// happens only for D or γ sin θ above ~1e3.
func TestBoostProperties(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		bdir := drawUnit(t, "b̂")
		var gamma float64
		switch rapid.IntRange(0, 2).Draw(t, "γ law") {
		case 0:
			gamma = rapid.Float64Range(1, 1e8).Draw(t, "γ")
		case 1:
			gamma = math.Pow(10, rapid.Float64Range(0, 8).Draw(t, "lg γ"))
		default:
			gamma = 1 + math.Pow(10, rapid.Float64Range(-6, 1).Draw(t, "lg γ−1"))
		}
		b, err := NewBoostGamma(bdir, gamma)
		if err != nil {
			t.Fatal(err)
		}
		var n r3.Vec
		if rapid.Bool().Draw(t, "near axis") {
			n = drawNear(t, bdir)
		} else {
			n = drawUnit(t, "n")
		}
		np, d := b.Apply(n)
		if math.IsNaN(np.X+np.Y+np.Z+d) || math.IsInf(d, 0) || d <= 0 {
			t.Fatalf("γ=%g n=%v: n′=%v D=%v", gamma, n, np, d)
		}
		if m := r3.Norm(np); !scalar.EqualWithinAbs(m, 1, 1e-12) {
			t.Fatalf("γ=%g n=%v: |n′| = %.17g", gamma, n, m)
		}
		if dd := b.Doppler(n); dd != d {
			t.Fatalf("Doppler %v ≠ Apply's D %v", dd, d)
		}
		back, dp := b.Inverse().Apply(np)
		const eps = 0x1p-53
		tol := math.Max(1e-12, 8*eps*d)
		if a := angle(back, n); a > tol {
			t.Fatalf("γ=%g D=%g: Inverse(Apply(n)) off by %g rad (tol %g)", gamma, d, a, tol)
		}
		sin := r3.Norm(r3.Cross(n, b.Dir()))
		tolD := math.Max(1e-12, 8*eps*b.GammaBeta()*sin)
		if p := d * dp; !scalar.EqualWithinRel(p, 1, tolD) {
			t.Fatalf("γ=%g D=%g: D·D′ = %.17g (tol %g)", gamma, d, p, tolD)
		}
	})
}

func TestApplyBatchMatchesApply(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	b := mustGamma(t, r3.Vec{X: 1, Y: -1, Z: 0.5}, 37)
	const n = 1000
	x, y, z := make([]float64, n), make([]float64, n), make([]float64, n)
	for i := range x {
		v := r3.Unit(r3.Vec{X: rng.NormFloat64(), Y: rng.NormFloat64(), Z: rng.NormFloat64()})
		x[i], y[i], z[i] = v.X, v.Y, v.Z
	}
	ox, oy, oz, d := make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n)
	b.ApplyBatch(x, y, z, ox, oy, oz, d)
	for i := range x {
		np, dd := b.Apply(r3.Vec{X: x[i], Y: y[i], Z: z[i]})
		if np != (r3.Vec{X: ox[i], Y: oy[i], Z: oz[i]}) || dd != d[i] {
			t.Fatalf("star %d: batch %v %v, Apply %v %v", i, ox[i], d[i], np, dd)
		}
	}
	// In place, and without D.
	b.ApplyBatch(x, y, z, x, y, z, nil)
	for i := range x {
		if x[i] != ox[i] || y[i] != oy[i] || z[i] != oz[i] {
			t.Fatalf("in-place star %d differs", i)
		}
	}
	// Short slices: the shortest length wins, nothing panics.
	b.ApplyBatch(x, y[:10], z, ox, oy, oz, d[:5])
	if allocs := testing.AllocsPerRun(10, func() { b.ApplyBatch(x, y, z, ox, oy, oz, d) }); allocs != 0 {
		t.Errorf("ApplyBatch allocates %v times", allocs)
	}
}

func BenchmarkBoostApply(b *testing.B) {
	bo := mustGamma(b, r3.Vec{X: 1, Y: 2, Z: 3}, 10)
	n := r3.Unit(r3.Vec{X: -1, Y: 0.5, Z: 0.25})
	var sink float64
	b.ReportAllocs()
	for b.Loop() {
		np, d := bo.Apply(n)
		sink += np.X + d
	}
	_ = sink
}

func BenchmarkApplyBatch1e6(b *testing.B) {
	bo := mustGamma(b, r3.Vec{X: 1, Y: 2, Z: 3}, 10)
	const n = 1_000_000
	rng := rand.New(rand.NewPCG(3, 4))
	x, y, z := make([]float64, n), make([]float64, n), make([]float64, n)
	for i := range x {
		v := r3.Unit(r3.Vec{X: rng.NormFloat64(), Y: rng.NormFloat64(), Z: rng.NormFloat64()})
		x[i], y[i], z[i] = v.X, v.Y, v.Z
	}
	ox, oy, oz, d := make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n)
	b.ReportAllocs()
	bo.ApplyBatch(x, y, z, ox, oy, oz, d) // touch the output pages
	// One op is one star (so -benchtime=Nx means N stars), processed in
	// batches over the 1e6-star arrays.
	b.ResetTimer()
	for done := 0; done < b.N; {
		m := min(n, b.N-done)
		bo.ApplyBatch(x[:m], y[:m], z[:m], ox[:m], oy[:m], oz[:m], d[:m])
		done += m
	}
	b.ReportMetric(float64(b.N)/b.Elapsed().Seconds()/1e6, "Mstars/s")
}
