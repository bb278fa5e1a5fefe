package render

import (
	"bytes"
	"errors"
	"math"
	"math/rand/v2"
	"runtime"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/spectrum"
)

var (
	axisX = r3.Vec{X: 1}
	axisY = r3.Vec{Y: 1}
	axisZ = r3.Vec{Z: 1}
)

// proj returns a projection looking along +X with +Z up.
func proj(t testing.TB, kind camera.Kind, w, h int) camera.Projection {
	t.Helper()
	o, err := camera.LookAt(axisX, axisZ, 0)
	if err != nil {
		t.Fatal(err)
	}
	return camera.Projection{Kind: kind, Width: w, Height: h, Orient: o}
}

func observer(t testing.TB, dir r3.Vec, beta float64) camera.Observer {
	t.Helper()
	b, err := camera.NewBoost(dir, beta)
	if err != nil {
		t.Fatal(err)
	}
	return camera.Observer{Boost: b}
}

// one returns a catalogue holding a single star in direction dir.
func one(dir r3.Vec, v, teff float64) *catalog.Stars {
	s := &catalog.Stars{Epoch: 2000, Source: "test", Format: "in-code"}
	s.Append(catalog.Star{ID: 1, Name: "one", Dist: math.Inf(1), Vmag: v, Teff: teff, BV: math.NaN(), RV: math.NaN(),
		Flags: catalog.FlagNoDistance})
	d := r3.Unit(dir)
	s.X[0], s.Y[0], s.Z[0] = float32(d.X), float32(d.Y), float32(d.Z)
	return s
}

// randomStars draws n stars uniformly on the sphere with V in [vmin, vmax]
// and temperatures 2500..40000 K, from a seeded PCG.
func randomStars(n int, vmin, vmax float64, seed uint64) *catalog.Stars {
	rng := rand.New(rand.NewPCG(seed, seed^0x9e3779b97f4a7c15))
	s := &catalog.Stars{Epoch: 2000, Source: "random", Format: "in-code"}
	for i := 0; i < n; i++ {
		z := 2*rng.Float64() - 1
		phi := 2 * math.Pi * rng.Float64()
		rho := math.Sqrt(1 - z*z)
		dist := math.Inf(1)
		if i%3 != 0 {
			dist = 1 + 500*rng.Float64()
		}
		s.ID = append(s.ID, int64(i+1))
		s.X = append(s.X, float32(rho*math.Cos(phi)))
		s.Y = append(s.Y, float32(rho*math.Sin(phi)))
		s.Z = append(s.Z, float32(z))
		s.Dist = append(s.Dist, float32(dist))
		s.Vmag = append(s.Vmag, float32(vmin+(vmax-vmin)*rng.Float64()))
		s.Teff = append(s.Teff, float32(2500*math.Exp(math.Log(16)*rng.Float64())))
		s.BV = append(s.BV, float32(math.NaN()))
		s.Flags = append(s.Flags, 0)
	}
	return s
}

// centroid returns the luminance centroid of the buffer and its total.
func centroid(b *Buffer) (x, y, sum float64) {
	for j := 0; j < b.H; j++ {
		for i := 0; i < b.W; i++ {
			l := b.Luminance(i, j)
			sum += l
			x += l * (float64(i) + 0.5)
			y += l * (float64(j) + 0.5)
		}
	}
	return x / sum, y / sum, sum
}

// Determinism [cp: requirement of the renderer]: the same frame with one and
// with four workers is bit-identical, stats included.
func TestDeterministicAcrossWorkers(t *testing.T) {
	stars := randomStars(30000, -1, 9, 7)
	for _, c := range []struct {
		kind camera.Kind
		w, h int
	}{{camera.Fisheye, 200, 200}, {camera.Equirect, 256, 128}, {camera.Pinhole, 160, 90}, {camera.Cube, 192, 32}} {
		var frames []*Frame
		for _, workers := range []int{1, 4, 3} {
			f, err := Render(stars, Options{Projection: proj(t, c.kind, c.w, c.h),
				Observer: observer(t, axisY, 0.7), Workers: workers, Doppler: true, Exposure: 2})
			if err != nil {
				t.Fatal(err)
			}
			frames = append(frames, f)
		}
		a := frames[0]
		if a.Stats.Drawn == 0 {
			t.Fatalf("%v: nothing drawn", c.kind)
		}
		for _, b := range frames[1:] {
			for i := range a.Pix {
				if math.Float32bits(a.Pix[i]) != math.Float32bits(b.Pix[i]) {
					t.Fatalf("%v: Pix[%d] differs: %v vs %v", c.kind, i, a.Pix[i], b.Pix[i])
				}
			}
			for i := range a.Doppler {
				if math.Float32bits(a.Doppler[i]) != math.Float32bits(b.Doppler[i]) {
					t.Fatalf("%v: Doppler[%d] differs", c.kind, i)
				}
			}
			if a.Stats.Drawn != b.Stats.Drawn || a.Stats.Culled != b.Stats.Culled || a.Stats.OffFrame != b.Stats.OffFrame {
				t.Errorf("%v: stats differ: %+v vs %+v", c.kind, a.Stats, b.Stats)
			}
			for i := range a.Stats.Brightest {
				if a.Stats.Brightest[i] != b.Stats.Brightest[i] {
					t.Errorf("%v: brightest[%d] differs", c.kind, i)
				}
			}
			// The tone map runs on the frame's Workers too.
			if !bytes.Equal(a.ToNRGBA(ToneShoulder).Pix, b.ToNRGBA(ToneShoulder).Pix) || !bytes.Equal(a.ToNRGBA64(ToneShoulder).Pix, b.ToNRGBA64(ToneShoulder).Pix) {
				t.Errorf("%v: tone-mapped images differ across Workers", c.kind)
			}
		}
		if s := a.Stats; s.Drawn+s.Culled+s.OffFrame+s.Invalid != s.Total {
			t.Errorf("%v: counts %+v do not add up", c.kind, s)
		}
	}
}

// A star straight ahead, seen by a ship moving straight ahead, stays ahead
// (cos θ′ = (cos θ + β)/(1 + β cos θ) = 1 [pub: physics.md]) and lands on
// the image centre (contract: the centre is the Forward direction; for the
// cube strip, the centre of the +Forward face, the fifth of six).
func TestAheadLandsOnCentre(t *testing.T) {
	for _, c := range []struct {
		kind         camera.Kind
		w, h         int
		wantX, wantY float64
	}{
		{camera.Pinhole, 64, 48, 32, 24},
		{camera.Pinhole, 65, 47, 32.5, 23.5},
		{camera.Equirect, 128, 64, 64, 32},
		{camera.Fisheye, 64, 64, 32, 32},
		{camera.Cube, 192, 32, 4.5 * 32, 16},
	} {
		f, err := Render(one(axisX, 1, 6000), Options{Projection: proj(t, c.kind, c.w, c.h), Observer: observer(t, axisX, 0.9)})
		if err != nil {
			t.Fatal(err)
		}
		x, y, _ := centroid(&f.Buffer)
		if math.Abs(x-c.wantX) > 1e-3 || math.Abs(y-c.wantY) > 1e-3 {
			t.Errorf("%v %d×%d: have (%.5f, %.5f), want (%v, %v)", c.kind, c.w, c.h, x, y, c.wantX, c.wantY)
		}
	}
}

// At rest at the Sun the observed V′ is the catalogue V [pub: physics.md,
// "at β = 0 V′ = V exactly"], for any temperature, to the bit.
func TestRestMagnitude(t *testing.T) {
	s := &catalog.Stars{}
	for i, c := range []struct{ v, t float64 }{{-1.46, 9940}, {0.03, 9600}, {3.2, 3500}, {5.5, 30000}, {2, 5772}} {
		s.Append(catalog.Star{ID: int64(i), RA: 10 * float64(i), Dec: 5, Dist: 10, Vmag: c.v, Teff: c.t, BV: math.NaN(), RV: math.NaN()})
	}
	f, err := Render(s, Options{Projection: proj(t, camera.Equirect, 64, 32)})
	if err != nil {
		t.Fatal(err)
	}
	if len(f.Stats.Brightest) != s.Len() {
		t.Fatalf("brightest: have %d stars, want %d", len(f.Stats.Brightest), s.Len())
	}
	for _, b := range f.Stats.Brightest {
		if want := float64(s.Vmag[b.Row]); b.V != want {
			t.Errorf("row %d: V′ have %v, want %v", b.Row, b.V, want)
		}
		if b.D != 1 {
			t.Errorf("row %d: D have %v, want 1", b.Row, b.D)
		}
	}
	for i := 1; i < len(f.Stats.Brightest); i++ {
		if f.Stats.Brightest[i].V < f.Stats.Brightest[i-1].V {
			t.Errorf("brightest not sorted: %v", f.Stats.Brightest)
		}
	}
}

// The renderer's photometry agrees with the W-based Blackbody path for the
// Doppler-shifted diluted blackbody, spectrum.FromV(T, V).Observed(D).Vmag()
// [pub: physics.md, T′ = D T, W′ = W/D²], within 1e-9 mag, ahead and behind
// a ship at β = 0.8 (D = 3 and 1/3 [cp: D = √((1+β)/(1−β))]).
func TestMovingMagnitudeMatchesSpectrum(t *testing.T) {
	for _, c := range []struct {
		dir   r3.Vec
		wantD float64
		teff  float64
		beam  spectrum.Beaming
	}{
		{axisX, 3, 5772, spectrum.BeamingExact},
		{r3.Scale(-1, axisX), 1.0 / 3, 5772, spectrum.BeamingExact},
		{axisX, 3, 25000, spectrum.BeamingExact},
		{r3.Scale(-1, axisX), 1.0 / 3, 3000, spectrum.BeamingD4},
	} {
		f, err := Render(one(c.dir, 2, c.teff), Options{Projection: proj(t, camera.Equirect, 64, 32),
			Observer: observer(t, axisX, 0.8), Beaming: c.beam, Limit: math.Inf(1)})
		if err != nil {
			t.Fatal(err)
		}
		if len(f.Stats.Brightest) != 1 {
			t.Fatalf("have %d stars drawn, want 1", len(f.Stats.Brightest))
		}
		got := f.Stats.Brightest[0]
		if !scalar.EqualWithinRel(got.D, c.wantD, 1e-9) {
			t.Errorf("D: have %v, want %v", got.D, c.wantD)
		}
		bb, err := spectrum.FromV(c.teff, 2)
		if err != nil {
			t.Fatal(err)
		}
		want := bb.Observed(c.wantD, c.beam).Vmag()
		if math.Abs(got.V-want) > 1e-9 {
			t.Errorf("T %v D %v %v: V′ have %.12f, want %.12f", c.teff, c.wantD, c.beam, got.V, want)
		}
		if !scalar.EqualWithinRel(got.T, c.wantD*c.teff, 1e-6) {
			t.Errorf("T′: have %v, want %v", got.T, c.wantD*c.teff)
		}
	}
}

// Exposure definition [doc.go]: a WhiteTemperature star of V = Exposure at
// a pixel centre peaks at luminance 1; 2.5·log10 2 mag fainter it peaks at
// 0.5 (Pogson magnitude scale [pub]).
func TestExposureDefinition(t *testing.T) {
	for _, c := range []struct{ exposure, v, want float64 }{
		{0, 0, 1},
		{3, 3, 1},
		{3, 3 + 2.5*math.Log10(2), 0.5},
		{-2, 3, 0.01},
	} {
		f, err := Render(one(axisX, c.v, WhiteTemperature), Options{Projection: proj(t, camera.Pinhole, 65, 49), Exposure: c.exposure})
		if err != nil {
			t.Fatal(err)
		}
		if have := f.Luminance(32, 24); !scalar.EqualWithinRel(have, c.want, 1e-4) {
			t.Errorf("exposure %v, V %v: peak have %v, want %v", c.exposure, c.v, have, c.want)
		}
		r, g, b := f.At(32, 24)
		for _, ch := range []float32{r, g, b} {
			if math.Abs(float64(ch)/c.want-1) > 0.1 {
				t.Errorf("exposure %v: a 6504 K star should be near white, have (%v,%v,%v)", c.exposure, r, g, b)
			}
		}
	}
}

// Total deposited luminance is Scale × illuminance, the illuminance from the
// spectrum package's integration (Y = K_m ∫ F_λ ȳ dλ [pub: CIE / SI]).
func TestRenderConservesLight(t *testing.T) {
	for _, fwhm := range []float64{1, 1.5, 4} {
		f, err := Render(one(axisX, 1.5, 4500), Options{Projection: proj(t, camera.Pinhole, 64, 48), FWHM: fwhm})
		if err != nil {
			t.Fatal(err)
		}
		bb, _ := spectrum.FromV(4500, 1.5)
		_, y, _ := bb.XYZ()
		_, _, sum := centroid(&f.Buffer)
		if want := f.Scale * y; !scalar.EqualWithinRel(sum, want, 2e-3) {
			t.Errorf("FWHM %v: total luminance have %v, want %v", fwhm, sum, want)
		}
	}
}

// Culling [doc]: stars fainter than Limit are counted and not drawn; the
// default limit is Exposure + 10; +Inf keeps everything.
func TestCulling(t *testing.T) {
	s := &catalog.Stars{}
	for i, v := range []float64{11.9, 12.1, 4, 30} {
		s.Append(catalog.Star{ID: int64(i), RA: float64(i), Dist: math.Inf(1), Vmag: v, Teff: WhiteTemperature, BV: math.NaN(), RV: math.NaN()})
	}
	for _, c := range []struct {
		exposure, limit float64
		drawn, culled   int
	}{
		{2, 0, 2, 2},
		{2, 12, 2, 2},
		{2, 5, 1, 3},
		{2, math.Inf(1), 4, 0},
	} {
		f, err := Render(s, Options{Projection: proj(t, camera.Equirect, 64, 32), Exposure: c.exposure, Limit: c.limit})
		if err != nil {
			t.Fatal(err)
		}
		if f.Stats.Drawn != c.drawn || f.Stats.Culled != c.culled || f.Stats.Total != 4 {
			t.Errorf("limit %v: have %+v, want drawn %d culled %d", c.limit, f.Stats, c.drawn, c.culled)
		}
	}
}

// A star behind a pinhole camera or outside its field is off frame.
func TestOffFrame(t *testing.T) {
	for _, dir := range []r3.Vec{r3.Scale(-1, axisX), axisZ, axisY} {
		f, err := Render(one(dir, 0, 5000), Options{Projection: proj(t, camera.Pinhole, 64, 48)})
		if err != nil {
			t.Fatal(err)
		}
		if f.Stats.OffFrame != 1 || f.Stats.Drawn != 0 {
			t.Errorf("dir %v: have %+v, want 1 off frame", dir, f.Stats)
		}
		if r, g, b := f.Sum(); r+g+b != 0 {
			t.Errorf("dir %v: buffer not black", dir)
		}
	}
}

func TestRenderErrors(t *testing.T) {
	good := proj(t, camera.Pinhole, 16, 16)
	if _, err := Render(nil, Options{Projection: good}); !errors.Is(err, ErrStars) {
		t.Errorf("nil stars: have %v", err)
	}
	s := one(axisX, 0, 5000)
	if _, err := Render(s, Options{Projection: good, Workers: -1}); !errors.Is(err, ErrWorkers) {
		t.Errorf("Workers -1: have %v", err)
	}
	if _, err := Render(s, Options{Projection: good, FWHM: -2}); !errors.Is(err, ErrFWHM) {
		t.Errorf("FWHM -2: have %v", err)
	}
	if _, err := Render(s, Options{Projection: good, Exposure: math.NaN()}); !errors.Is(err, ErrExposure) {
		t.Errorf("Exposure NaN: have %v", err)
	}
	if _, err := Render(s, Options{Projection: good, Limit: math.NaN()}); !errors.Is(err, ErrLimit) {
		t.Errorf("Limit NaN: have %v", err)
	}
	if _, err := Render(s, Options{Projection: good, Beaming: 7}); !errors.Is(err, ErrBeaming) {
		t.Errorf("Beaming 7: have %v", err)
	}
	if _, err := Render(s, Options{}); err == nil {
		t.Errorf("zero projection: no error")
	}
	bad := &catalog.Stars{ID: []int64{1}}
	if _, err := Render(bad, Options{Projection: good}); err == nil {
		t.Errorf("ragged catalogue: no error")
	}
}

// The equirect frame wraps a star on the ±180° seam: its light is split
// between both edges and none is lost.
func TestEquirectWrap(t *testing.T) {
	f, err := Render(one(r3.Scale(-1, axisX), 1, 6000), Options{Projection: proj(t, camera.Equirect, 128, 64)})
	if err != nil {
		t.Fatal(err)
	}
	bb, _ := spectrum.FromV(6000, 1)
	_, y, _ := bb.XYZ()
	_, _, sum := centroid(&f.Buffer)
	if !scalar.EqualWithinRel(sum, f.Scale*y, 2e-3) {
		t.Errorf("seam star: total have %v, want %v", sum, f.Scale*y)
	}
	if f.Luminance(0, 32) == 0 || f.Luminance(127, 32) == 0 {
		t.Errorf("seam star not on both edges: %v %v", f.Luminance(0, 32), f.Luminance(127, 32))
	}
}

// Determinism across GOMAXPROCS [cp]: with Workers = 0 the worker count
// follows GOMAXPROCS; the encoded image must not change with it.
func TestDeterministicAcrossGOMAXPROCS(t *testing.T) {
	stars := randomStars(20000, -1, 8, 21)
	var imgs [][]byte
	for _, procs := range []int{1, 2, 5} {
		old := runtime.GOMAXPROCS(procs)
		f, err := Render(stars, Options{Projection: proj(t, camera.Fisheye, 160, 160), Observer: observer(t, axisZ, 0.5), Exposure: 1})
		if err == nil {
			imgs = append(imgs, f.ToNRGBA64(ToneShoulder).Pix)
		}
		runtime.GOMAXPROCS(old)
		if err != nil {
			t.Fatal(err)
		}
	}
	for k := 1; k < len(imgs); k++ {
		if !bytes.Equal(imgs[0], imgs[k]) {
			t.Errorf("GOMAXPROCS run %d gives a different image", k)
		}
	}
}

// A fisheye draws only inside its circle [doc.go]: a star 100° from the
// axis of a 180° fisheye falls in the image corner (ok = true there) and
// is off frame.
func TestFisheyeCircle(t *testing.T) {
	p := proj(t, camera.Fisheye, 100, 60)
	dir := r3.Add(r3.Scale(math.Cos(100*math.Pi/180), axisX), r3.Scale(math.Sin(100*math.Pi/180), r3.Unit(r3.Vec{Y: -1, Z: 0.02})))
	x, y, ok := p.Forward(dir)
	if !ok || x < 0 || x > 100 || y < 0 || y > 60 {
		t.Fatalf("test direction not in the image corner region: (%v, %v, %v)", x, y, ok)
	}
	f, err := Render(one(dir, 0, 5000), Options{Projection: p})
	if err != nil {
		t.Fatal(err)
	}
	if f.Stats.OffFrame != 1 {
		t.Errorf("have %+v, want the star off frame", f.Stats)
	}
}

// A cube-strip star near a face edge lights only its own face [doc.go]:
// nothing crosses into the neighbouring square of the strip.
func TestCubeFaceClip(t *testing.T) {
	const h = 32
	p := proj(t, camera.Cube, 6*h, h)
	// 44.5° to the right of Forward: inside the +Forward face (x in
	// [4h, 5h)), about 0.4 px from its right edge.
	a := 44.6 * math.Pi / 180
	right := p.Orient.Right
	dir := r3.Add(r3.Scale(math.Cos(a), axisX), r3.Scale(math.Sin(a), right))
	x, _, ok := p.Forward(dir)
	if !ok || x < 4*h || x >= 5*h {
		t.Fatalf("test star at x = %v, want in [%d, %d)", x, 4*h, 5*h)
	}
	f, err := Render(one(dir, 0, 5000), Options{Projection: p, FWHM: 3})
	if err != nil {
		t.Fatal(err)
	}
	for j := 0; j < h; j++ {
		for i := 5 * h; i < 6*h; i++ {
			if l := f.Luminance(i, j); l != 0 {
				t.Fatalf("light at (%d,%d) in the next face: %v", i, j, l)
			}
		}
	}
	if l := f.Luminance(5*h-1, h/2); l == 0 {
		t.Errorf("no light at the face edge next to the star")
	}
}

// The batched geometry (SoA, Boost.ApplyBatch) gives exactly what
// camera.Observer.See gives star by star, including unknown distances and
// a star at the observer's position.
func TestGeometryMatchesSee(t *testing.T) {
	stars := randomStars(3*blockSize+17, 0, 5, 31)
	p, err := Prepare(stars)
	if err != nil {
		t.Fatal(err)
	}
	pos := r3.Scale(float64(stars.Dist[5]), r3.Vec{X: p.ux[5], Y: p.uy[5], Z: p.uz[5]}) // the observer sits exactly at star 5
	for _, o := range []camera.Observer{
		observer(t, axisY, 0.8),
		{Position: pos, Boost: observer(t, r3.Unit(r3.Vec{X: 1, Y: -2, Z: 0.5}), 0.999).Boost},
		{Position: r3.Vec{X: 3, Y: -40, Z: 7}},
	} {
		opt := Options{Observer: o, Limit: math.Inf(1)}
		tr := newTransformer(p, &opt, nil, 1)
		n := stars.Len()
		for lo := 0; lo < n; lo += blockSize {
			m := min(blockSize, n-lo)
			tr.geometry(lo, m, &tr.geom)
			for j := 0; j < m; j++ {
				i := lo + j
				wn, wd, wdil, wr := o.See(r3.Vec{X: p.ux[i], Y: p.uy[i], Z: p.uz[i]}, float64(stars.Dist[i]))
				g := &tr.geom
				if (wr == 0) != g.bad[j] {
					t.Fatalf("star %d: r == 0 is %v, bad flag %v", i, wr == 0, g.bad[j])
				}
				if wr == 0 {
					continue
				}
				// The block keeps ln dilution (0 for 1, unset from the Sun).
				lnDil, wantLnDil := 0.0, 0.0
				if !g.sun {
					lnDil = g.lnDil[j]
				}
				if wdil != 1 {
					wantLnDil = lnFast(wdil)
				}
				if g.x[j] != wn.X || g.y[j] != wn.Y || g.z[j] != wn.Z || g.d[j] != wd || lnDil != wantLnDil {
					t.Fatalf("star %d: have (%v,%v,%v) D %v ln dil %v, want %v D %v ln dil %v (dil %v)",
						i, g.x[j], g.y[j], g.z[j], g.d[j], lnDil, wn, wd, wantLnDil, wdil)
				}
			}
		}
	}
}

// The renderer's photometry is the shared one (spectrum.Observe, itself
// checked against direct integration of the Bessell V passband and the CIE
// ȳ table to 1e-6 mag in the spectrum tests): for stars ahead, sideways and
// behind a ship at β = 0.8 away from the Sun (so with dilution (d⊙/r)²),
// under each convention, the drawn star's V′ (Stats) equals Observe's to
// 1e-9 mag (the two differ only in the rounding of their logarithms), and
// the light it deposits — the frame's summed linear R, G, B — equals
// Scale × the linear sRGB of Observe's XYZ to 1e-6 (a float32 buffer;
// 7e-8 seen).
// A 0.004 mag error in either (0.37 % in flux) fails.
func TestRenderPhotometryMatchesShared(t *testing.T) {
	pos := r3.Vec{X: 0.5, Y: 0.3}
	obs := observer(t, axisX, 0.8)
	obs.Position = pos
	worstV, worstF := 0.0, 0.0
	for _, beam := range []spectrum.Beaming{spectrum.BeamingExact, spectrum.BeamingD3, spectrum.BeamingD4} {
		for ra := 0.0; ra < 360; ra += 30 {
			s := &catalog.Stars{Epoch: 2000, Source: "test", Format: "in-code"}
			teff := 2600 + 90*ra
			s.Append(catalog.Star{ID: 1, Name: "one", RA: ra, Dec: 0, Dist: 4 + ra/60, Vmag: 3.3, Teff: teff, BV: math.NaN(), RV: math.NaN()})
			opt := Options{Projection: proj(t, camera.Equirect, 256, 128), Observer: obs, Beaming: beam,
				Limit: math.Inf(1), Exposure: 2}
			f, err := Render(s, opt)
			if err != nil {
				t.Fatal(err)
			}
			if f.Stats.Drawn != 1 || len(f.Stats.Brightest) != 1 {
				t.Fatalf("RA %v: drawn %d, want 1", ra, f.Stats.Drawn)
			}
			u := unit32(s.X[0], s.Y[0], s.Z[0])
			_, d, dil, _ := obs.See(u, float64(s.Dist[0]))
			want := spectrum.Observe(float64(s.Vmag[0]), float64(s.Teff[0]), d, dil, beam)
			got := f.Stats.Brightest[0]
			if got.D != d {
				t.Errorf("RA %v: D %v, Observer.See %v", ra, got.D, d)
			}
			if dv := math.Abs(got.V - want.V); dv > 1e-9 {
				t.Errorf("%v RA %v (D %.3f, T %v K): V′ %.12f, spectrum.Observe %.12f", beam, ra, d, teff, got.V, want.V)
			}
			worstV = max(worstV, math.Abs(got.V-want.V))
			// Expected deposit: Scale × XYZ → linear sRGB (gamut-mapped at
			// constant luminance), as spectrum defines them.
			e := want.Illuminance()
			X, Y, Z := e*want.X/want.Y, e, e*(1-want.X-want.Y)/want.Y
			r, g, b := spectrum.XYZToLinearSRGB(X, Y, Z, opt.Color)
			r, g, b = spectrum.GamutMap(r, g, b, Y)
			hr, hg, hb := f.Sum()
			for c, p := range [][2]float64{{hr, r}, {hg, g}, {hb, b}} {
				w := f.Scale * p[1]
				rel := math.Abs(p[0]/w - 1)
				worstF = max(worstF, rel)
				if rel > 1e-6 {
					t.Errorf("%v RA %v (D %.3f, T %v K) channel %d: deposited %.9g, Scale × Observe %.9g (rel %.2g)", beam, ra, d, teff, c, p[0], w, rel)
				}
			}
		}
	}
	t.Logf("worst |V′ − Observe| %.2g mag, deposited light %.2g relative", worstV, worstF)
}
