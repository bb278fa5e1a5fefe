package spectrum

import (
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
)

func TestIlluminantA(t *testing.T) {
	// CIE 15:2004: illuminant A, 2856 K, c2 = 1.4388e-2 m K, (x, y) =
	// (0.44757, 0.40745) [pub], tolerance 0.0015 (physics.md).
	x, y := ChromaticityC2(2856, 1.4388e-2)
	if math.Abs(x-0.44757) > 0.0015 || math.Abs(y-0.40745) > 0.0015 {
		t.Errorf("illuminant A: have (%.5f, %.5f), want (0.44757, 0.40745)", x, y)
	}
}

// kim returns the Planckian locus approximation of Kim et al. (2002, US
// patent 7024034 / Kang et al., J. Korean Phys. Soc. 41, 865), 1667–25000 K
// [pub; coefficients quoted from memory].
func kim(T float64) (x, y float64) {
	t1, t2, t3 := 1e3/T, 1e6/(T*T), 1e9/(T*T*T)
	if T <= 4000 {
		x = -0.2661239*t3 - 0.2343589*t2 + 0.8776956*t1 + 0.179910
	} else {
		x = -3.0258469*t3 + 2.1070379*t2 + 0.2226347*t1 + 0.240390
	}
	switch {
	case T <= 2222:
		y = -1.1063814*x*x*x - 1.34811020*x*x + 2.18555832*x - 0.20219683
	case T <= 4000:
		y = -0.9549476*x*x*x - 1.37418593*x*x + 2.09137015*x - 0.16748867
	default:
		y = 3.0817580*x*x*x - 5.87338670*x*x + 3.75112997*x - 0.37001483
	}
	return x, y
}

func TestPlanckianLocusKim(t *testing.T) {
	for T := 1667.0; T <= 25000; T *= 1.05 {
		x, y := Chromaticity(T)
		kx, ky := kim(T)
		if math.Hypot(x-kx, y-ky) > 0.002 {
			t.Errorf("T=%.0f: have (%.4f, %.4f), Kim et al. 2002 (%.4f, %.4f) [pub]", T, x, y, kx, ky)
		}
	}
}

func TestRayleighJeansChromaticity(t *testing.T) {
	// T → ∞ tends to about (0.2399, 0.2342) [cp]; our 5 nm table gives
	// (0.23987, 0.23403), so the tolerance is 3e-4.
	for _, T := range []float64{1e12, 1e20, math.Inf(1)} {
		x, y := Chromaticity(T)
		if math.Abs(x-0.2399) > 3e-4 || math.Abs(y-0.2342) > 3e-4 {
			t.Errorf("T=%g: have (%.5f, %.5f), want ≈ (0.2399, 0.2342)", T, x, y)
		}
	}
}

func TestBeamingFluxRatios(t *testing.T) {
	for _, T := range []float64{3, 3000, 5772, 3e4, 1e9} {
		b := Blackbody{T: T, W: 1e-16}
		for _, D := range []float64{0.01, 0.5, 1, 2, 30} {
			for _, beam := range []Beaming{BeamingExact, BeamingD3, BeamingD4} {
				have := b.Observed(D, beam).Bolometric() / b.Bolometric()
				// F′/F = D², D³, D⁴ (physics.md) [pub: I_ν/ν³ invariance].
				want := math.Pow(D, float64(beam.FluxExponent()))
				if !scalar.EqualWithinRel(have, want, 1e-12) {
					t.Errorf("T=%g D=%g %v: bolometric ratio have %g, want %g", T, D, beam, have, want)
				}
			}
		}
	}
}

func TestVBandLimits(t *testing.T) {
	// Rayleigh–Jeans: f_λ ∝ T, so with W′ = W/D² the V flux ratio is 1/D
	// [pub, Planck's law]: hot stars ahead fade in V.
	b := Blackbody{T: 1e11, W: 1e-30}
	for _, D := range []float64{2, 10} {
		have := b.Observed(D, BeamingExact).VFlux() / b.VFlux()
		if !scalar.EqualWithinRel(have, 1/D, 1e-5) {
			t.Errorf("RJ D=%g: V ratio have %g, want %g", D, have, 1/D)
		}
	}
	// Wien: f_λ ∝ e^{−c₂/λT}, dominated by the long end of V (700 nm), so
	// ln(ratio) ≈ c₂/(700 nm·T)·(1 − 1/D) [pub, Wien's law]: cool stars
	// ahead brighten steeply.
	c := Blackbody{T: 300, W: 1}
	D := 2.0
	have := math.Log(c.Observed(D, BeamingExact).VFlux() / c.VFlux())
	want := C2 / (700e-9 * 300) * (1 - 1/D)
	if !scalar.EqualWithinRel(have, want, 0.02) {
		t.Errorf("Wien: ln V ratio have %g, want ≈ %g", have, want)
	}
}

func TestSun(t *testing.T) {
	// IAU 2015 B3: T = 5772 K, total solar irradiance 1361 W m⁻² [pub];
	// V⊙ = −26.74 [cp]; within 5 % (physics.md).
	s, err := FromV(5772, -26.74)
	if err != nil {
		t.Fatal(err)
	}
	if have := s.Bolometric(); !scalar.EqualWithinRel(have, 1361, 0.05) {
		t.Errorf("solar bolometric flux have %.1f W/m², want 1361 ± 5 %%", have)
	}
}

func TestV0Star(t *testing.T) {
	// B−V = 0 → T by Ballesteros (2012) [pub]; a V = 0 A0 star gives about
	// 2.5e-6 lux [cp], within 10 %.
	T := 4600 * (1/1.7 + 1/0.62)
	s, err := FromV(T, 0)
	if err != nil {
		t.Fatal(err)
	}
	if _, Y, _ := s.XYZ(); !scalar.EqualWithinRel(Y, 2.5e-6, 0.10) {
		t.Errorf("V=0, T=%.0f K: illuminance have %.3g lux, want 2.5e-6 ± 10 %%", T, Y)
	}
}

func TestRoundTripAndIdentity(t *testing.T) {
	for _, T := range []float64{40, 3000, 5772, 1e4, 4e4, 1e13} {
		for _, v := range []float64{-26.74, -1.46, 0, 6.5, 21} {
			b, err := FromV(T, v)
			if err != nil {
				t.Fatal(err)
			}
			// V′ = V at β = 0 by construction (physics.md).
			if have := b.Vmag(); !scalar.EqualWithinAbs(have, v, 1e-12) {
				t.Errorf("T=%g: Vmag(FromV(%g)) = %.15g", T, v, have)
			}
			if o := b.Observed(1, BeamingExact); o != b {
				t.Errorf("Observed(1) changed %+v to %+v", b, o)
			}
		}
	}
}

func TestXYZConsistency(t *testing.T) {
	b := Blackbody{T: 6500, W: 2e-17}
	X, Y, Z := b.XYZ()
	x, y := Chromaticity(6500)
	if s := X + Y + Z; !scalar.EqualWithinAbs(X/s, x, 1e-12) || !scalar.EqualWithinAbs(Y/s, y, 1e-12) {
		t.Errorf("XYZ (%g %g %g) inconsistent with chromaticity (%g, %g)", X, Y, Z, x, y)
	}
	// Y against direct integration of π W B_λ ȳ with Km [pub SI candela].
	p := getPhot()
	ln, _ := direct(math.Log(6500), C2, &p.lnConst)
	if want := 2e-17 * math.Exp(ln[1]); !scalar.EqualWithinRel(Y, want, 1e-6) {
		t.Errorf("Y have %g, want %g", Y, want)
	}
}

func TestBadInput(t *testing.T) {
	for _, c := range []struct {
		T, W float64
		err  error
	}{
		{0, 1, ErrTemperature}, {-5, 1, ErrTemperature}, {math.NaN(), 1, ErrTemperature},
		{math.Inf(1), 1, ErrTemperature}, {5000, -1, ErrDilution}, {5000, math.NaN(), ErrDilution},
		{5000, math.Inf(1), ErrDilution},
	} {
		if _, err := NewBlackbody(c.T, c.W); !errors.Is(err, c.err) {
			t.Errorf("NewBlackbody(%g, %g): err %v, want %v", c.T, c.W, err, c.err)
		}
	}
	if _, err := FromV(-1, 0); !errors.Is(err, ErrTemperature) {
		t.Errorf("FromV(-1, 0): err %v", err)
	}
	if _, err := FromV(5000, math.NaN()); !errors.Is(err, ErrMagnitude) {
		t.Errorf("FromV(5000, NaN): err %v", err)
	}
	if o := (Blackbody{T: 1, W: 1}).Observed(-1, BeamingExact); !math.IsNaN(o.T) {
		t.Errorf("Observed(-1) = %+v, want NaN", o)
	}
}

func TestBeamingParse(t *testing.T) {
	for _, b := range []Beaming{BeamingExact, BeamingD3, BeamingD4} {
		p, err := ParseBeaming(b.String())
		if err != nil || p != b {
			t.Errorf("ParseBeaming(%q) = %v, %v", b.String(), p, err)
		}
	}
	if _, err := ParseBeaming("d5"); err == nil {
		t.Error("ParseBeaming(d5): no error")
	}
	if s := Beaming(9).String(); s != "Beaming(9)" {
		t.Errorf("String = %q", s)
	}
	if v := Beaming(9).WScale(2); !math.IsNaN(v) {
		t.Errorf("invalid WScale = %g", v)
	}
}

func BenchmarkBlackbodyXYZ(b *testing.B) {
	getPhot()
	b.ReportAllocs()
	bb := Blackbody{T: 5000, W: 1e-17}
	var acc float64
	for i := 0; i < b.N; i++ {
		X, Y, Z := bb.XYZ()
		acc += X + Y + Z
		bb.T += 0.1
	}
	_ = acc
}
