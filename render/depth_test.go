package render

import (
	"fmt"
	"math"
	"reflect"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/spectrum"
)

// bruteDeltaV is an independent evaluation of V′ − V through the Blackbody
// API: normalise a star of V = 5 at T, boost it by D under beam, read V′.
func bruteDeltaV(t testing.TB, T, D float64, beam spectrum.Beaming) float64 {
	b, err := spectrum.FromV(T, 5)
	if err != nil {
		t.Fatal(err)
	}
	return b.Observed(D, beam).Vmag() - 5
}

// TestBrighteningV checks ΔV against the Blackbody API and the limits of
// the exact transform (physics.md; Rybicki & Lightman 1979 §4.9 [pub]):
// no change at D = 1; in the Rayleigh–Jeans limit (T → ∞) the V-band flux
// ratio tends to 1/D, ΔV → +2.5 log₁₀ D; under the D³ and D⁴ conventions
// (W′ = W·D^(k−4)) the same limit is D⁰ and D¹, ΔV → 0 and −2.5 log₁₀ D.
func TestBrighteningV(t *testing.T) {
	for _, beam := range []spectrum.Beaming{spectrum.BeamingExact, spectrum.BeamingD3, spectrum.BeamingD4} {
		for _, T := range []float64{2500, 3000, 5772, 10000, 30000} {
			for _, D := range []float64{0.1, 0.5, 1, 2, 4.36, 20} {
				have, want := BrighteningV(T, D, beam), bruteDeltaV(t, T, D, beam)
				if math.Abs(have-want) > 1e-6 {
					t.Errorf("%v, T = %v, D = %v: ΔV = %.8f, Blackbody API %.8f", beam, T, D, have, want)
				}
			}
		}
	}
	for _, D := range []float64{0.3, 2, 4.36} {
		T := 1e9
		for beam, k := range map[spectrum.Beaming]float64{spectrum.BeamingExact: 1, spectrum.BeamingD3: 0, spectrum.BeamingD4: -1} {
			want := 2.5 * k * math.Log10(D)
			if have := BrighteningV(T, D, beam); math.Abs(have-want) > 1e-3 {
				t.Errorf("%v, Rayleigh–Jeans, D = %v: ΔV = %.5f, want %.5f", beam, D, have, want)
			}
		}
	}
	if v := BrighteningV(5000, 1, spectrum.BeamingExact); v != 0 {
		t.Errorf("D = 1: ΔV = %v, want 0", v)
	}
	for _, bad := range [][2]float64{{0, 1}, {3000, 0}, {math.NaN(), 1}, {3000, math.Inf(1)}} {
		if v := BrighteningV(bad[0], bad[1], spectrum.BeamingExact); !math.IsNaN(v) {
			t.Errorf("T, D = %v: ΔV = %v, want NaN", bad, v)
		}
	}
}

// TestNeededDepthBruteForce checks the completeness bound against an
// independent brute force: every pixel of a small frame gives its apparent
// direction and D = 1/Inverse().Doppler(n′); for each, ΔV over a fine grid of
// temperatures through the Blackbody API; the bound must be at least as deep
// as the brute force's (it is a bound) and within 0.02 mag of it.
func TestNeededDepthBruteForce(t *testing.T) {
	ahead := r3.Vec{X: 1}
	cases := []struct {
		name       string
		kind       camera.Kind
		w, h       int
		fov        float64
		look       r3.Vec
		beta       float64
		beam       spectrum.Beaming
		tmin, tmax float64
	}{
		{"pinhole ahead 0.9c", camera.Pinhole, 48, 27, 60, ahead, 0.9, spectrum.BeamingExact, 2500, 30000},
		{"pinhole side 0.5c", camera.Pinhole, 40, 40, 30, r3.Vec{Y: 1}, 0.5, spectrum.BeamingExact, 3000, 12000},
		{"pinhole behind 0.9c", camera.Pinhole, 40, 30, 40, r3.Vec{X: -1}, 0.9, spectrum.BeamingExact, 2500, 30000},
		{"fisheye ahead 0.99c d4", camera.Fisheye, 41, 41, 180, ahead, 0.99, spectrum.BeamingD4, 4000, 40000},
		{"equirect 0.7c", camera.Equirect, 64, 32, 0, r3.Vec{Z: 1}, 0.7, spectrum.BeamingExact, 2500, 30000},
		{"hot stars only 0.9c", camera.Pinhole, 32, 32, 90, ahead, 0.9, spectrum.BeamingExact, 20000, 40000},
	}
	for _, c := range cases {
		p := looking(t, c.kind, c.w, c.h, c.fov, c.look)
		b, err := camera.NewBoost(ahead, c.beta)
		if err != nil {
			t.Fatal(err)
		}
		opt := Options{Projection: p, Observer: camera.Observer{Boost: b}, Beaming: c.beam, Exposure: 0, Limit: 9}
		dep, err := NeededDepth(opt, c.tmin, c.tmax)
		if err != nil {
			t.Fatal(err)
		}
		// Brute force: D at pixel corners and centres, ΔV on a T grid.
		inv := b.Inverse()
		dset := map[float64]bool{}
		for j := 0; j <= 2*c.h; j++ {
			for i := 0; i <= 2*c.w; i++ {
				v, ok := p.Inverse(float64(i)/2, float64(j)/2)
				if ok {
					dset[1/inv.Doppler(v)] = true
				}
			}
		}
		best := math.Inf(1)
		var bd, bt float64
		for D := range dset {
			for i := 0; i <= 400; i++ {
				T := c.tmin * math.Pow(c.tmax/c.tmin, float64(i)/400)
				if v := bruteDeltaV(t, T, D, c.beam); v < best {
					best, bd, bt = v, D, T
				}
			}
		}
		want := 9 - best
		t.Logf("%s: bound V = %.3f (ΔV %.3f at %.0f K, D %.3f; D in [%.3f, %.3f]); brute force %.3f (ΔV %.3f at %.0f K, D %.3f)",
			c.name, dep.Needed, dep.DeltaV, dep.T, dep.D, dep.DMin, dep.DMax, want, best, bt, bd)
		if dep.Needed < want-1e-9 || dep.Needed > want+0.02 {
			t.Errorf("%s: needed depth %.4f, brute force %.4f: want ≥ it and within 0.02 mag", c.name, dep.Needed, want)
		}
	}
}

// TestNeededDepthIssueFigures recomputes the figures the issue quotes from
// the project's own photometry [cp: this project's audit, recomputed]: a
// 3000 K star ahead at 0.9 c (D = γ(1+β) = 4.36) brightens by about 4.2 mag,
// so a frame looking ahead with limit V′ = 10 needs the catalogue to about
// V = 14, and with V′ = 6.5 to about 10.7.
func TestNeededDepthIssueFigures(t *testing.T) {
	if v := BrighteningV(3000, 4.3589, spectrum.BeamingExact); math.Abs(v+4.2) > 0.1 {
		t.Errorf("3000 K at D = 4.36: ΔV = %.3f, want ≈ −4.2", v)
	}
	b, _ := camera.NewBoost(r3.Vec{X: 1}, 0.9)
	p := looking(t, camera.Pinhole, 192, 108, 60, r3.Vec{X: 1})
	for _, c := range []struct{ lim, want float64 }{{10, 14.2}, {6.5, 10.7}} {
		dep, err := NeededDepth(Options{Projection: p, Observer: camera.Observer{Boost: b}, Limit: c.lim}, 3000, 40000)
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(dep.Needed-c.want) > 0.15 {
			t.Errorf("limit %v at 0.9 c ahead: needed V = %.2f, want ≈ %v", c.lim, dep.Needed, c.want)
		}
	}
	// At rest the bound is the limit itself.
	rest, _ := camera.NewBoost(r3.Vec{X: 1}, 0)
	dep, err := NeededDepth(Options{Projection: p, Observer: camera.Observer{Boost: rest}, Limit: 6.5}, 3000, 40000)
	if err != nil || dep.Needed != 6.5 {
		t.Errorf("at rest: needed %v, %v; want 6.5", dep.Needed, err)
	}
	if _, err := NeededDepth(Options{Projection: p, Limit: math.NaN()}, 3000, 40000); err == nil {
		t.Error("NaN limit: no error")
	}
	if _, err := NeededDepth(Options{Projection: p, Limit: 6}, 0, 40000); err == nil {
		t.Error("zero temperature: no error")
	}
}

func BenchmarkNeededDepth(b *testing.B) {
	bo, _ := camera.NewBoost(r3.Vec{X: 1}, 0.9)
	p := looking(b, camera.Pinhole, 1920, 1080, 60, r3.Vec{X: 1})
	opt := Options{Projection: p, Observer: camera.Observer{Boost: bo}, Limit: 10}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := NeededDepth(opt, 2500, 40000); err != nil {
			b.Fatal(err)
		}
	}
}

// TestDepthProfile: over the whole range in view the profile gives the
// frame's bound (to its 0.02 mag margin), over sub-ranges never less than a
// brute force over that range, and −Inf outside the view.
func TestDepthProfile(t *testing.T) {
	b, _ := camera.NewBoost(r3.Vec{X: 1}, 0.9)
	p := looking(t, camera.Pinhole, 192, 108, 60, r3.Vec{X: 1})
	opt := Options{Projection: p, Observer: camera.Observer{Boost: b}, Limit: 10}
	prof, err := NewDepthProfile(opt, 2500, 40000)
	if err != nil {
		t.Fatal(err)
	}
	if v := prof.NeededFor(0.01, 100); math.Abs(v-prof.Needed) > 0.021 {
		t.Errorf("whole range: %.3f, want the bound %.3f", v, prof.Needed)
	}
	if v := prof.NeededFor(0.01, 0.5); !math.IsInf(v, -1) {
		t.Errorf("D < 0.5 is not in view (D ≥ %.2f): %v, want −Inf", prof.DMin, v)
	}
	for _, r := range [][2]float64{{1.8, 2.2}, {2.5, 3}, {3.5, 4.4}} {
		best := math.Inf(1)
		for i := 0; i <= 50; i++ {
			D := r[0] + (math.Min(r[1], prof.DMax)-r[0])*float64(i)/50
			for j := 0; j <= 100; j++ {
				best = math.Min(best, bruteDeltaV(t, 2500*math.Pow(16, float64(j)/100), D, spectrum.BeamingExact))
			}
		}
		if v := prof.NeededFor(r[0], r[1]); v < 10-best-1e-9 || v > 10-best+0.05 {
			t.Errorf("D in %v: %.3f, brute force %.3f", r, v, 10-best)
		}
	}
}

// TestDepthProfilesReuse: DepthProfiles gives NewDepthProfile's profile
// field for field, sharing the table only between frames with the same
// Doppler range, temperatures and beaming (a fainter limit shares it; a
// faster ship, another beaming convention or temperature range do not).
func TestDepthProfilesReuse(t *testing.T) {
	p := looking(t, camera.Pinhole, 192, 108, 60, r3.Vec{X: 1})
	opt := func(beta, limit float64, beaming spectrum.Beaming) Options {
		b, _ := camera.NewBoost(r3.Vec{X: 1}, beta)
		return Options{Projection: p, Observer: camera.Observer{Boost: b}, Limit: limit, Beaming: beaming}
	}
	nudged := opt(0.9, 10, spectrum.BeamingExact) // the heading off in its last bits, as a flight's renormalised one
	nudged.Observer.Boost, _ = camera.NewBoost(r3.Vec{X: 1, Y: 3e-15}, 0.9)
	var c DepthProfiles
	first, err := c.New(opt(0.9, 10, spectrum.BeamingExact), 2500, 40000)
	if err != nil {
		t.Fatal(err)
	}
	for _, k := range []struct {
		name       string
		opt        Options
		tmin, tmax float64
		shared     bool
	}{
		{"same frame", opt(0.9, 10, spectrum.BeamingExact), 2500, 40000, true},
		{"fainter limit", opt(0.9, 12, spectrum.BeamingExact), 2500, 40000, true},
		{"heading's last bits", nudged, 2500, 40000, true},
		{"faster", opt(0.95, 10, spectrum.BeamingExact), 2500, 40000, false},
		{"beaming", opt(0.9, 10, spectrum.BeamingD3), 2500, 40000, false},
		{"temperatures", opt(0.9, 10, spectrum.BeamingExact), 3000, 40000, false},
	} {
		have, err := c.New(k.opt, k.tmin, k.tmax)
		if err != nil {
			t.Fatal(err)
		}
		want, err := NewDepthProfile(k.opt, k.tmin, k.tmax)
		if err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(have, want) {
			t.Errorf("%s: %+v, want %+v", k.name, *have, *want)
		}
		if k.opt.Observer.Boost == nudged.Observer.Boost && have.ld0 == first.ld0 && have.ld1 == first.ld1 {
			t.Errorf("%s: the Doppler range is unchanged, the case tests nothing", k.name)
		}
		if shared := &have.minDV[0] == &first.minDV[0]; shared != k.shared {
			t.Errorf("%s: table shared %v, want %v", k.name, shared, k.shared)
		}
	}
}

// A fisheye's Doppler range is exact: it holds the Doppler factor of every
// imaged direction (pixel corners and centres, and the rim of its circle
// sampled every 0.01°) and its ends are reached by those directions to
// 10⁻⁶, for fields of 90° to 220°, tilted and not, square and wide
// frames, looking ahead, aside and behind. (The grid search, used before
// for fisheyes, missed the smallest factor of the 80×48 frame by 0.25 %.)
func TestDopplerRangeFisheye(t *testing.T) {
	ahead := r3.Vec{X: 1}
	for _, c := range []struct {
		w, h      int
		fov, tilt float64
		look      r3.Vec
		beta      float64
	}{
		{64, 64, 180, 0, ahead, 0.9},
		{64, 64, 180, 0, r3.Vec{Y: 1}, 0.5},
		{64, 64, 220, 0, r3.Vec{X: -1}, 0.99},
		{80, 48, 90, 0, r3.Vec{X: 0.6, Y: 0.8}, 0.7},
		{64, 64, 180, 30, r3.Vec{Y: -1}, 0.95},
	} {
		p := looking(t, camera.Fisheye, c.w, c.h, c.fov, c.look)
		p.Tilt = c.tilt
		if err := p.Prepare(); err != nil {
			t.Fatal(err)
		}
		b, err := camera.NewBoost(ahead, c.beta)
		if err != nil {
			t.Fatal(err)
		}
		dmin, dmax, err := DopplerRange(Options{Projection: p, Observer: camera.Observer{Boost: b}})
		if err != nil {
			t.Fatal(err)
		}
		inv := b.Inverse()
		lo, hi := math.Inf(1), math.Inf(-1)
		see := func(x, y float64) {
			if v, ok := p.Inverse(x, y); ok {
				d := 1 / inv.Doppler(v)
				lo, hi = math.Min(lo, d), math.Max(hi, d)
			}
		}
		for j := 0; j <= 2*c.h; j++ {
			for i := 0; i <= 2*c.w; i++ {
				see(float64(i)/2, float64(j)/2)
			}
		}
		cx, cy, r, _ := p.ImageCircle()
		for k := range 36000 {
			s, co := math.Sincos(float64(k) * math.Pi / 18000)
			see(cx+r*co*(1-1e-12), cy+r*s*(1-1e-12))
		}
		name := fmt.Sprintf("%d×%d fov %g tilt %g look %v β %g", c.w, c.h, c.fov, c.tilt, c.look, c.beta)
		if lo < dmin || hi > dmax {
			t.Errorf("%s: directions give D in [%.9g, %.9g], outside the range [%.9g, %.9g]", name, lo, hi, dmin, dmax)
		}
		if lo > dmin*(1+1e-6) || hi < dmax*(1-1e-6) {
			t.Errorf("%s: range [%.9g, %.9g], but the directions reach only [%.9g, %.9g]", name, dmin, dmax, lo, hi)
		}
	}
}
