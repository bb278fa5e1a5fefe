package sky

import (
	"math"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/render"
	"github.com/skyframe/skyframe/spectrum"
)

// galacticCentre is the direction of the galactic centre (RA 266.405°,
// Dec −28.936°, ICRS [cp]), the default heading of a still.
var galacticCentre = radec(266.405, -28.936)

func radec(ra, dec float64) r3.Vec {
	a, d := ra*math.Pi/180, dec*math.Pi/180
	return r3.Vec{X: math.Cos(d) * math.Cos(a), Y: math.Cos(d) * math.Sin(a), Z: math.Sin(d)}
}

// frameOpt returns a 1920×1080, 60° pinhole frame at speed beta toward
// the galactic centre, looking along look, with the naked-eye exposure
// (V = 6.5 just visible), from position pos.
func frameOpt(t testing.TB, beta float64, look, pos r3.Vec) render.Options {
	t.Helper()
	b, err := camera.NewBoost(galacticCentre, beta)
	if err != nil {
		t.Fatal(err)
	}
	o, err := camera.LookAt(look, r3.Vec{Z: 1}, 0)
	if err != nil {
		t.Fatal(err)
	}
	p := camera.Projection{Kind: camera.Pinhole, Width: 1920, Height: 1080, FOV: 60, Orient: o}
	if err := p.Prepare(); err != nil {
		t.Fatal(err)
	}
	return render.Options{Projection: p, Observer: camera.Observer{Position: pos, Boost: b}, Exposure: render.ExposureForLimit(6.5)}
}

// sameRows fails unless a and b hold the same rows.
func sameRows(t *testing.T, what string, a, b *catalog.Stars) {
	t.Helper()
	if a.Len() != b.Len() || !slices.Equal(a.ID, b.ID) || !slices.Equal(a.X, b.X) || !slices.Equal(a.Vmag, b.Vmag) ||
		!slices.Equal(a.Teff, b.Teff) || !slices.Equal(a.Dist, b.Dist) {
		t.Fatalf("%s: catalogues differ (%d and %d rows)", what, a.Len(), b.Len())
	}
}

// The built-in sky for a frame: at rest it is the default sky and the Sun;
// at 0.9 c ahead it is drawn to the depth of the stars the image can show
// (V ≈ 10.4: the coolest built-in stars, 3170 K, gain 3.9 mag near
// D = 4.4, and the naked-eye exposure shows V′ ≤ 6.54), in the cells ahead
// only; the default sky and the Sun are its first rows; a frame's
// catalogue does not depend on the frames asked for before it; at the
// origin the Sun's row is there but culled.
func TestBuiltInFrames(t *testing.T) {
	src := NewSource(catalog.BuiltIn(), true)
	base := src.Base()
	if base.Len() != catalog.BuiltIn().Len()+1 || base.ID[base.Len()-1] != catalog.SunID {
		t.Fatalf("Base: %d rows, last %d; want the built-in sky and the Sun", base.Len(), base.ID[base.Len()-1])
	}
	au := r3.Vec{X: catalog.AUParsec}
	rest, err := src.Frame([]render.Options{frameOpt(t, 0, galacticCentre, au)}, math.NaN())
	if err != nil {
		t.Fatal(err)
	}
	s0, _, err := rest.Stars(au)
	if err != nil {
		t.Fatal(err)
	}
	if rest.Depth != MinDepth || s0 != base || !rest.Report.Complete() {
		t.Errorf("at rest: depth %v, %d rows, complete %v; want %v, Base, complete", rest.Depth, s0.Len(), rest.Report.Complete(), MinDepth)
	}
	fast := []render.Options{frameOpt(t, 0.9, galacticCentre, au)}
	f, err := src.Frame(fast, math.NaN())
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(f.Depth-10.4) > 0.15 || !f.Report.Deep || !f.Report.Complete() {
		t.Errorf("0.9 c ahead: depth %v, report %+v; want ≈ 10.4, deep and complete", f.Depth, f.Report)
	}
	s1, p1, err := f.Stars(au)
	if err != nil {
		t.Fatal(err)
	}
	sameRows(t, "prefix", s1.Slice(0, base.Len()), base)
	// Whole sky to 10.4 would be ≈ 3·10⁵ stars; the cells behind stay at 8.
	n10, _ := catalog.ModelSky(f.Depth, catalog.SynthOptions{})
	if s1.Len() <= base.Len() || float64(s1.Len()) > 0.8*n10 {
		t.Errorf("0.9 c ahead: %d stars, want more than the %d of the default sky and fewer than 80 %% of the whole sky's %.0f", s1.Len(), base.Len(), n10)
	}
	// Asked again (a held view), the frame keeps its catalogue and
	// prepares it in full once: a new Prepared, kept after.
	sa, pa, _ := f.Stars(au)
	if sa != s1 || pa == p1 {
		t.Errorf("the same frame twice: catalogue kept %v, prepared again %v; want both", sa == s1, pa != p1)
	}
	if s, p, _ := f.Stars(au); s != s1 || p != pa {
		t.Error("the same frame three times: a third catalogue or Prepared")
	}
	// A frame of several instants (an open shutter) is prepared in full
	// at once.
	open, err := src.Frame(append(fast[:1:1], frameOpt(t, 0.9, galacticCentre, au)), math.NaN())
	if err != nil {
		t.Fatal(err)
	}
	src.last = [2]entry{}
	s3, p3, _ := open.Stars(au)
	if s, p, _ := open.Stars(au); s != s3 || p != p3 {
		t.Error("a frame of two instants asked twice: prepared again")
	}
	// A fresh source that saw other frames first gives the same rows.
	src2 := NewSource(catalog.BuiltIn(), true)
	for _, beta := range []float64{0.99, 0.5} {
		g, err := src2.Frame([]render.Options{frameOpt(t, beta, galacticCentre, au)}, math.NaN())
		if err != nil {
			t.Fatal(err)
		}
		if _, _, err := g.Stars(au); err != nil {
			t.Fatal(err)
		}
	}
	f2, err := src2.Frame(fast, math.NaN())
	if err != nil {
		t.Fatal(err)
	}
	s2, _, err := f2.Stars(au)
	if err != nil {
		t.Fatal(err)
	}
	sameRows(t, "after other frames", s2, s1)
	// Looking behind at 0.9 c the frame needs less than ahead.
	back, err := src.Frame([]render.Options{frameOpt(t, 0.9, r3.Scale(-1, galacticCentre), au)}, math.NaN())
	if err != nil {
		t.Fatal(err)
	}
	if back.Depth >= f.Depth {
		t.Errorf("0.9 c looking behind: depth %v, want less than ahead's %v", back.Depth, f.Depth)
	}
	// At the origin: the same rows, the Sun's culled.
	so, _, err := f.Stars(r3.Vec{})
	if err != nil {
		t.Fatal(err)
	}
	sun := base.Len() - 1
	if so.Len() != s1.Len() || so.Vmag[sun] != dimV || s1.Vmag[sun] == dimV {
		t.Errorf("at the origin: %d rows, Sun V %v; want %d rows and V %v", so.Len(), so.Vmag[sun], s1.Len(), float64(dimV))
	}
	// --sky-depth given: that depth.
	g, err := src.Frame(fast, 9)
	if err != nil {
		t.Fatal(err)
	}
	if g.Depth != 9 || g.Report.Complete() {
		t.Errorf("depth 9 at 0.9 c: %v, complete %v; want 9 and incomplete", g.Depth, g.Report.Complete())
	}
	if w := g.Report.Warning("flight", "frame 7"); !strings.Contains(w, "skyframe flight: warning: the built-in sky is complete to V ≈ 9.0, but frame 7 shows stars from catalogue V ≤ 10.") {
		t.Errorf("warning %q", w)
	}
}

// TestReleaseLendsStorage: a built catalogue lends its storage to the
// next only once it is out of the recent pair and released by every
// caller; one still in use keeps its rows while later frames are built.
func TestReleaseLendsStorage(t *testing.T) {
	src := NewSource(catalog.BuiltIn(), true)
	au := r3.Vec{X: catalog.AUParsec}
	frame := func(beta float64) *Frame {
		f, err := src.Frame([]render.Options{frameOpt(t, beta, galacticCentre, au)}, math.NaN())
		if err != nil {
			t.Fatal(err)
		}
		if !f.Report.Deep {
			t.Fatalf("β = %v: not drawn deeper", beta)
		}
		return f
	}
	stars := func(f *Frame) *catalog.Stars {
		s, _, err := f.Stars(au)
		if err != nil {
			t.Fatal(err)
		}
		return s
	}
	fa, fb, fc := frame(0.9), frame(0.93), frame(0.96)
	sa := stars(fa)
	want := fa.Catalogue(au) // the same rows in storage of its own
	sb := stars(fb)
	src.Release(sb)
	stars(fc) // sa leaves the recent pair while in use
	for _, beta := range []float64{0.91, 0.92} {
		s := stars(frame(beta)) // sb's storage, then new storage
		if &s.X[0] == &sa.X[0] {
			t.Fatalf("β = %v: built in the storage of a catalogue in use", beta)
		}
		src.Release(s)
	}
	sameRows(t, "a catalogue in use", sa, want)
	src.Release(sa)
	// Built again (out of the recent pair), fa's catalogue takes sa's
	// storage, now spare.
	if s := stars(fa); &s.X[0] != &sa.X[0] {
		t.Error("a released catalogue's storage not lent to the next")
	} else {
		sameRows(t, "rebuilt in lent storage", s, want)
	}
}

// A catalogue file: the Sun is appended once; the report compares the
// catalogue's estimated depth with the frame's bound (for its cull limit,
// here V′ = 6.5). A BSC5-like catalogue (the built-in sky cut at 6.5) is
// complete at rest and not at 0.9 c ahead, where it misses most of the
// stars the frame shows; its warning names both magnitudes and the
// unresolved option.
func TestCatalogueFrames(t *testing.T) {
	b := catalog.BuiltIn()
	var rows []int
	for i := range b.Len() {
		if b.Vmag[i] <= 6.5 {
			rows = append(rows, i)
		}
	}
	cut := &catalog.Stars{}
	for _, i := range rows {
		cut.Append(b.At(i))
	}
	src := NewSource(cut, false)
	if src.Base().Len() != cut.Len()+1 {
		t.Fatalf("Base: %d rows, want %d", src.Base().Len(), cut.Len()+1)
	}
	au := r3.Vec{X: catalog.AUParsec}
	at := func(beta float64) []render.Options {
		o := frameOpt(t, beta, galacticCentre, au)
		o.Limit = 6.5
		return []render.Options{o}
	}
	rest, err := src.Frame(at(0), math.NaN())
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(rest.Depth-6.5) > 0.01 || !rest.Report.Complete() || rest.Report.Warning("still", "") != "" {
		t.Errorf("at rest: depth %v, complete %v", rest.Depth, rest.Report.Complete())
	}
	f, err := src.Frame(at(0.9), math.NaN())
	if err != nil {
		t.Fatal(err)
	}
	ms, ml := f.Report.Missing()
	w := f.Report.Warning("stars", "")
	t.Log(w)
	if f.Report.Complete() || !(ms > 0.5 && ms < 1) || !(ml > 0 && ml < ms) ||
		!strings.Contains(w, "skyframe stars: warning: the catalogue is complete to V ≈ 6.5, but this frame shows stars from catalogue V ≤ ") ||
		!strings.Contains(w, "--unresolved-depth 6.5") {
		t.Errorf("0.9 c: complete %v, missing %.2f of the stars and %.2f of the light, warning %q", f.Report.Complete(), ms, ml, w)
	}
	s, _, err := f.Stars(au)
	if err != nil || s != src.Base() {
		t.Errorf("Stars: %v, want Base", err)
	}
	if worst, k := Worst([]Report{rest.Report, f.Report, rest.Report}); k != 1 || worst.Have != f.Report.Have {
		t.Errorf("Worst: %d, want 1", k)
	}
	if _, k := Worst([]Report{rest.Report}); k != -1 {
		t.Errorf("Worst of complete reports: %d, want −1", k)
	}
}

// The whole-sky bound against a brute-force search over the built-in
// sky's temperatures and the Doppler factors of the whole sky (an
// independent grid of 400 × 400 points in T and D, through
// render.BrighteningV): the bound is the grid's best to 0.01 mag, and at
// 0.9 c a list to V′ = 6.5 needs the built-in sky to V ≈ 10.4.
func TestWholeSkyBound(t *testing.T) {
	tmin, tmax := BuiltInTemps()
	for _, beta := range []float64{0.3, 0.9, 0.99} {
		b, err := camera.NewBoost(galacticCentre, beta)
		if err != nil {
			t.Fatal(err)
		}
		r := WholeSky(catalog.EstimateDepth(catalog.BuiltIn()), true, b, 6.5, spectrum.BeamingExact)
		g := 1 / math.Sqrt(1-beta*beta)
		dmin, dmax := g*(1-beta), g*(1+beta)
		best := math.Inf(1)
		for i := 0; i <= 400; i++ {
			T := tmin + (tmax-tmin)*float64(i)/400
			for j := 0; j <= 400; j++ {
				D := dmin + (dmax-dmin)*float64(j)/400
				best = math.Min(best, render.BrighteningV(T, D, spectrum.BeamingExact))
			}
		}
		if r.Needed.DeltaV > best+1e-9 || r.Needed.DeltaV < best-0.01 {
			t.Errorf("β = %g: bound ΔV = %.4f, brute force %.4f", beta, r.Needed.DeltaV, best)
		}
		if beta == 0.9 && (math.Abs(r.Needed.Needed-10.4) > 0.1 || r.Complete()) {
			t.Errorf("0.9 c: needs V %.2f (complete %v), want ≈ 10.4 and the V 8 sky incomplete", r.Needed.Needed, r.Complete())
		}
	}
}

// The whole-sky bound is deep enough: counting the built-in sky's stars
// that reach V′ ≤ 6.5 at speed (each star's own Doppler factor, V′ = V +
// render.BrighteningV) from the sky drawn to the bound and from the sky
// drawn a magnitude deeper gives the same count — the stars between add
// none (so a census whose count falls between 0.95 c and 0.99 c is not
// cut short by the depth). At rest the count is the catalogue's own.
func TestWholeSkyBoundByDeeperSky(t *testing.T) {
	beta, extra := 0.99, 1.0
	if testing.Short() {
		beta, extra = 0.9, 0.6
	}
	b, err := camera.NewBoost(galacticCentre, beta)
	if err != nil {
		t.Fatal(err)
	}
	r := WholeSky(catalog.EstimateDepth(catalog.BuiltIn()), true, b, 6.5, spectrum.BeamingExact)
	count := func(s *catalog.Stars) int {
		n := 0
		for i := range s.Len() {
			u := r3.Vec{X: float64(s.X[i]), Y: float64(s.Y[i]), Z: float64(s.Z[i])}
			_, d := b.Apply(r3.Unit(u))
			if float64(s.Vmag[i])+render.BrighteningV(float64(s.Teff[i]), d, spectrum.BeamingExact) <= 6.5 {
				n++
			}
		}
		return n
	}
	at := catalog.Synthetic(catalog.SynthOptions{MagLimit: math.Ceil(r.Needed.Needed*10) / 10})
	deeper := catalog.Synthetic(catalog.SynthOptions{MagLimit: r.Needed.Needed + extra})
	n1, n2 := count(at), count(deeper)
	t.Logf("β = %g: bound V %.2f; V′ ≤ 6.5: %d stars from %d, %d from %d", beta, r.Needed.Needed, n1, at.Len(), n2, deeper.Len())
	if n1 != n2 || n1 == 0 {
		t.Errorf("β = %g: %d stars reach V′ ≤ 6.5 from the sky drawn to the bound %.2f, %d from %g mag deeper", beta, n1, r.Needed.Needed, n2, extra)
	}
}

// UnresolvedMaps builds a depth's map once and refuses depths out of range.
func TestUnresolvedMaps(t *testing.T) {
	var u UnresolvedMaps
	a, err := u.At(9)
	if err != nil {
		t.Fatal(err)
	}
	b, err := u.At(9)
	if err != nil || a != b || len(a.Temperatures()) == 0 {
		t.Errorf("At(9) twice: %p, %p, %v", a, b, err)
	}
	for _, d := range []float64{math.NaN(), math.Inf(1), catalog.MinUnresolvedDepth - 1} {
		if _, err := u.At(d); err == nil {
			t.Errorf("At(%v): no error", d)
		}
	}
	if w := V0Dilution(5772); !(w > 0) || !math.IsNaN(V0Dilution(-1)) {
		t.Errorf("V0Dilution: %v, %v", w, V0Dilution(-1))
	}
}
