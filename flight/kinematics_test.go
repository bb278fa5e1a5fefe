package flight

import (
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/spatial/r3"
	"pgregory.net/rapid"
)

var xhat = r3.Vec{X: 1}

func mustTraj(t *testing.T, start State, legs ...LegSpec) *Trajectory {
	t.Helper()
	tr, err := NewTrajectory(start, legs, nil)
	if err != nil {
		t.Fatalf("NewTrajectory: %v", err)
	}
	return tr
}

// Check values from "The Relativistic Rocket", Usenet Physics FAQ (Baez et
// al.), quoted from memory [mem]; each is matched to its quoted rounding.
func TestRelativisticRocketFAQ(t *testing.T) {
	oneYear := mustTraj(t, RestAt(r3.Vec{}), BoostSpec{Accel: G0, Dir: xhat, ShipYears: 1}).End()
	ac := r3.Vec{X: 4.3 * LightYearPc}
	trip := mustTraj(t, RestAt(r3.Vec{}), VoyageSpec{Accel: G0, To: &ac}).End()
	for _, c := range []struct {
		name       string
		have, want float64
		tol        float64 // half a unit of the quoted last digit
	}{
		{"1 ship-yr at 1 g: β ≈ 0.77 [mem]", oneYear.Beta, 0.77, 0.005},
		{"1 ship-yr at 1 g: γ ≈ 1.58 [mem]", oneYear.Gamma, 1.58, 0.005},
		{"1 ship-yr at 1 g: t ≈ 1.19 yr [mem]", oneYear.T, 1.19, 0.005},
		{"1 ship-yr at 1 g: x ≈ 0.56 ly [mem]", oneYear.Pos.X / LightYearPc, 0.56, 0.005},
		{"4.3 ly at 1 g turnover: τ ≈ 3.6 yr [mem]", trip.Tau, 3.6, 0.05},
		{"4.3 ly at 1 g turnover: t ≈ 5.9 yr [mem]", trip.T, 5.9, 0.05},
	} {
		if !scalar.EqualWithinAbs(c.have, c.want, c.tol) {
			t.Errorf("%s: have %v, want %v ± %v", c.name, c.have, c.want, c.tol)
		}
	}
	// The turnover voyage against physics.md's closed form [pub formula].
	tau, tt, err := TurnoverTimes(G0, 4.3*LightYearPc)
	if err != nil {
		t.Fatal(err)
	}
	if !scalar.EqualWithinRel(trip.Tau, tau, 1e-12) || !scalar.EqualWithinRel(trip.T, tt, 1e-12) {
		t.Errorf("voyage τ, t = %v, %v; closed form %v, %v", trip.Tau, trip.T, tau, tt)
	}
}

// Constant velocity 0.6c over 4 ly [cp]: t = 4/0.6 = 6.67 yr, τ = t/γ = 5.33
// yr with γ = 1.25; D ahead 2, behind 0.5.
func TestCruiseAtPointSix(t *testing.T) {
	start, err := MovingAt(r3.Vec{}, xhat, 0.6)
	if err != nil {
		t.Fatal(err)
	}
	tr := mustTraj(t, start, CruiseSpec{Distance: 4 * LightYearPc})
	e := tr.End()
	for _, c := range []struct {
		name       string
		have, want float64
	}{
		{"t = 4/0.6 yr [cp]", e.T, 4 / 0.6},
		{"τ = t/1.25 yr [cp]", e.Tau, 4 / 0.6 / 1.25},
		{"γ = 1.25 [cp]", e.Gamma, 1.25},
		{"D ahead = 2 [cp]", e.DopplerAhead(), 2},
		{"D behind = 0.5 [cp]", e.DopplerBehind(), 0.5},
		{"x = 4 ly", e.Pos.X / LightYearPc, 4},
	} {
		if !scalar.EqualWithinRel(c.have, c.want, 1e-12) {
			t.Errorf("%s: have %v, want %v", c.name, c.have, c.want)
		}
	}
	if h := tr.Start().Doppler(r3.Vec{X: -1}); !scalar.EqualWithinRel(h, 0.5, 1e-12) {
		t.Errorf("Doppler toward home behind: have %v, want 0.5 [cp]", h)
	}
}

// 1 − β must stay accurate where β rounds to 1: 1 − β ≈ 1/(2γ²) and
// γ(1 − β) ≈ 1/(2γ) for large γ (series expansion) [cp].
func TestHighGamma(t *testing.T) {
	for _, g := range []float64{1e4, 1e6, 1e8} {
		s, err := MovingRapidity(r3.Vec{}, xhat, RapidityFromGamma(g))
		if err != nil {
			t.Fatal(err)
		}
		if !scalar.EqualWithinRel(s.Gamma, g, 1e-12) {
			t.Errorf("γ round trip: have %v, want %v", s.Gamma, g)
		}
		if want := 1 / (2 * g * g); !scalar.EqualWithinRel(s.OneMinusBeta(), want, 1e-6) {
			t.Errorf("γ=%g: 1−β have %v, want %v", g, s.OneMinusBeta(), want)
		}
		if want := 1 / (2 * g); !scalar.EqualWithinRel(s.DopplerBehind(), want, 1e-6) {
			t.Errorf("γ=%g: D behind have %v, want %v", g, s.DopplerBehind(), want)
		}
		// Catalogue time runs γ times faster at constant velocity.
		e := mustTraj(t, s, CruiseSpec{ShipYears: 1}).End()
		if !scalar.EqualWithinRel(e.T, g, 1e-12) {
			t.Errorf("γ=%g: t after 1 ship-yr have %v, want %v", g, e.T, g)
		}
	}
}

func TestArrival(t *testing.T) {
	dest := r3.Vec{X: 1, Y: 2, Z: -0.5}
	for _, sp := range []VoyageSpec{
		{Accel: G0, To: &dest},
		{Accel: G0, To: &dest, BetaCap: 0.5},
		{Accel: 3 * G0, To: &dest, GammaCap: 2},
	} {
		tr := mustTraj(t, RestAt(r3.Vec{}), sp)
		e := tr.End()
		if e.Beta != 0 || e.Remaining != 0 || e.Pos != dest {
			t.Errorf("%+v: end β=%v remaining=%v pos=%v, want 0, 0, %v", sp, e.Beta, e.Remaining, e.Pos, dest)
		}
		near := tr.AtTau(e.Tau * (1 - 1e-9))
		if near.Beta > 1e-6 || near.Remaining > 1e-9 {
			t.Errorf("just before arrival β=%v remaining=%v", near.Beta, near.Remaining)
		}
		if !scalar.EqualWithinRel(e.Travelled, r3.Norm(dest), 1e-12) {
			t.Errorf("travelled %v, want %v", e.Travelled, r3.Norm(dest))
		}
		if sp.BetaCap > 0 {
			mid := tr.AtTau(e.Tau / 2)
			if !scalar.EqualWithinAbs(mid.Beta, sp.BetaCap, 1e-12) {
				t.Errorf("coast β = %v, want the cap %v", mid.Beta, sp.BetaCap)
			}
		}
		if sp.GammaCap > 0 {
			mid := tr.AtTau(e.Tau / 2)
			if !scalar.EqualWithinRel(mid.Gamma, sp.GammaCap, 1e-12) {
				t.Errorf("coast γ = %v, want the cap %v", mid.Gamma, sp.GammaCap)
			}
		}
	}
}

func TestLegErrors(t *testing.T) {
	one := 1.0
	dest := r3.Vec{X: 1}
	elsewhere := r3.Vec{Y: 3}
	none := func(string) (r3.Vec, bool) { return r3.Vec{}, false }
	moving, _ := MovingAt(r3.Vec{}, xhat, 0.99)
	for _, c := range []struct {
		name  string
		start State
		legs  []LegSpec
		want  error
	}{
		{"accel 0", RestAt(r3.Vec{}), []LegSpec{BoostSpec{Dir: xhat, ShipYears: 1}}, ErrAccel},
		{"accel < 0", RestAt(r3.Vec{}), []LegSpec{VoyageSpec{Accel: -1, To: &dest}}, ErrAccel},
		{"unknown star", RestAt(r3.Vec{}), []LegSpec{VoyageSpec{Accel: G0, Star: "Nowhere"}}, ErrUnknownDestination},
		{"cap β = 1", RestAt(r3.Vec{}), []LegSpec{VoyageSpec{Accel: G0, To: &dest, BetaCap: 1}}, ErrSpeedCap},
		{"cap β > 1", RestAt(r3.Vec{}), []LegSpec{VoyageSpec{Accel: G0, To: &dest, BetaCap: 1.5}}, ErrSpeedCap},
		{"NaN duration", RestAt(r3.Vec{}), []LegSpec{CruiseSpec{ShipYears: math.NaN()}}, ErrNotFinite},
		{"NaN accel", RestAt(r3.Vec{}), []LegSpec{BoostSpec{Accel: math.NaN(), Dir: xhat, ShipYears: 1}}, ErrNotFinite},
		{"start mismatch", RestAt(r3.Vec{}), []LegSpec{CruiseSpec{ShipYears: 1}, CruiseSpec{ShipYears: 1, From: &elsewhere}}, ErrDisconnected},
		{"speed mismatch", RestAt(r3.Vec{}), []LegSpec{CruiseSpec{ShipYears: 1, Beta: &one}}, ErrDisconnected},
		{"sideways boost", moving, []LegSpec{BoostSpec{Accel: G0, Dir: r3.Vec{Y: 1}, ShipYears: 1}}, ErrNotCollinear},
		{"cannot stop", moving, []LegSpec{VoyageSpec{Accel: G0, To: &r3.Vec{X: 0.01}}}, ErrCannotStop},
		{"no duration", RestAt(r3.Vec{}), []LegSpec{CruiseSpec{}}, ErrDuration},
		{"no legs", RestAt(r3.Vec{}), nil, ErrNoLegs},
	} {
		_, err := NewTrajectory(c.start, c.legs, none)
		if !errors.Is(err, c.want) {
			t.Errorf("%s: have error %v, want %v", c.name, err, c.want)
		}
	}
}

// genTrajectory draws a random chain of collinear legs along a random axis,
// with boosts in both senses (so the velocity may reverse) and voyages far
// enough ahead to stop.
func genTrajectory(t *rapid.T) *Trajectory {
	axis := r3.Unit(r3.Vec{
		X: rapid.Float64Range(-1, 1).Draw(t, "ax"),
		Y: rapid.Float64Range(-1, 1).Draw(t, "ay"),
		Z: rapid.Float64Range(0.1, 1).Draw(t, "az"),
	})
	start0 := RestAt(r3.Vec{X: rapid.Float64Range(-5, 5).Draw(t, "x0")})
	cur := start0
	n := rapid.IntRange(1, 6).Draw(t, "n")
	var specs []LegSpec
	for i := 0; i < n; i++ {
		var sp LegSpec
		switch rapid.IntRange(0, 2).Draw(t, "kind") {
		case 0:
			sp = CruiseSpec{ShipYears: rapid.Float64Range(0.01, 3).Draw(t, "dur")}
		case 1:
			d := axis
			if rapid.Bool().Draw(t, "back") {
				d = r3.Scale(-1, axis)
			}
			sp = BoostSpec{Accel: rapid.Float64Range(0.1, 30).Draw(t, "a"), Dir: d, ShipYears: rapid.Float64Range(0.01, 3).Draw(t, "dur")}
		case 2:
			a := rapid.Float64Range(0.1, 30).Draw(t, "a")
			dir := cur.Dir
			if cur.Rapidity == 0 {
				dir = axis
			}
			stop := CPcPerYr / rapidityRate(a) * (math.Cosh(cur.Rapidity) - 1)
			dist := stop + rapid.Float64Range(0.01, 3).Draw(t, "extra")
			to := r3.Add(cur.Pos, r3.Scale(dist, dir))
			sp = VoyageSpec{Accel: a, To: &to, BetaCap: rapid.SampledFrom([]float64{0, 0.5, 0.99}).Draw(t, "cap")}
		}
		l, err := sp.Build(cur, nil)
		if err != nil {
			// A voyage slower than a cap it already exceeds: skip it.
			if errors.Is(err, ErrSpeedCap) {
				continue
			}
			t.Fatalf("leg %d %+v: %v", i, sp, err)
		}
		specs = append(specs, sp)
		cur = l.End()
	}
	if len(specs) == 0 {
		specs = []LegSpec{CruiseSpec{ShipYears: 1}}
	}
	tr, err := NewTrajectory(start0, specs, nil)
	if err != nil {
		t.Fatalf("NewTrajectory: %v", err)
	}
	return tr
}

// Legs connect: each starts where the previous ended in position, velocity,
// τ and t (the chaining rule itself); and states just either side of a joint
// agree to first order.
func TestContinuityProperty(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		tr := genTrajectory(t)
		legs := tr.Legs()
		for i := 1; i < len(legs); i++ {
			a, b := legs[i-1].End(), legs[i].Start()
			va, vb := r3.Scale(a.GammaBeta, a.Dir), r3.Scale(b.GammaBeta, b.Dir)
			scale := 1 + r3.Norm(a.Pos)
			if r3.Norm(r3.Sub(a.Pos, b.Pos)) > 1e-12*scale || r3.Norm(r3.Sub(va, vb)) > 1e-9*(1+a.GammaBeta) ||
				a.Tau != b.Tau || a.T != b.T {
				t.Fatalf("joint %d: end %+v, next start %+v", i, a, b)
			}
			const eps = 1e-7
			l, r := tr.AtTau(a.Tau-eps), tr.AtTau(a.Tau+eps)
			// |Δx| ≤ c Δt, Δt ≤ γ_max Δτ.
			g := math.Max(l.Gamma, r.Gamma)
			if d := r3.Norm(r3.Sub(l.Pos, r.Pos)); d > CPcPerYr*2*eps*g*(1+1e-6) {
				t.Fatalf("joint %d: position jumps by %v pc across ±%v yr", i, d, eps)
			}
		}
	})
}

// Inverting t → τ (closed form, asinh) recovers τ; catalogue time increases
// with ship time; travelled + remaining is the path length.
func TestInversionRoundTripProperty(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		tr := genTrajectory(t)
		end := tr.End()
		u := rapid.Float64Range(0, 1).Draw(t, "u")
		tau := u * end.Tau
		s := tr.AtTau(tau)
		back := tr.AtT(s.T)
		if !scalar.EqualWithinAbs(back.Tau, tau, 1e-9*(1+end.Tau)) {
			t.Fatalf("τ=%v → t=%v → τ=%v", tau, s.T, back.Tau)
		}
		if s2 := tr.AtTau(tau + 1e-3*end.Tau); s2.T < s.T {
			t.Fatalf("t decreases: t(%v)=%v, later %v", tau, s.T, s2.T)
		}
		if !scalar.EqualWithinAbs(s.Travelled+s.Remaining, tr.Length(), 1e-9*(1+tr.Length())) {
			t.Fatalf("travelled %v + remaining %v ≠ length %v", s.Travelled, s.Remaining, tr.Length())
		}
	})
}
