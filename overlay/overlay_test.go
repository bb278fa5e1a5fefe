package overlay

import (
	"bytes"
	"errors"
	"image"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/render"
)

type layerCase struct {
	name   string
	kind   camera.Kind
	w, h   int
	fov    float64
	beta   float64
	layers Options
}

func layerCases() []layerCase {
	dest := camera.FromRADec(10, 8)
	hud := HUDValues{Beta: 0.6, Gamma: 1.25, TauYears: 2.5, TYears: 3.1, TravelledLy: 1.9, RemainingLy: math.NaN(),
		RateHome: 0.5, RateDest: 2, Title: "test flight"}
	return []layerCase{
		{"grid_radec", camera.Pinhole, 160, 90, 90, 0.6, Options{Graticule: GraticuleOptions{Frame: GraticuleEquatorial, Step: 10}}},
		{"grid_galactic_equirect", camera.Equirect, 180, 90, 0, 0.6, Options{Graticule: GraticuleOptions{Frame: GraticuleGalactic, Step: 30}}},
		{"unity_fisheye", camera.Fisheye, 90, 90, 200, 0.9, Options{UnityCircle: true, Markers: MarkerOptions{Motion: true}}},
		{"markers", camera.Pinhole, 160, 90, 60, 0.5, Options{Markers: MarkerOptions{Motion: true, Destination: &dest}}},
		{"lattice", camera.Pinhole, 160, 90, 100, 0.8, Options{Lattice: LatticeOptions{PerSide: 5, Spacing: 1}}},
		{"labels", camera.Pinhole, 160, 90, 60, 0.3, Options{Labels: LabelOptions{Brightest: 4, Stars: []string{"Zeta"}}}},
		{"hud", camera.Pinhole, 320, 180, 60, 0.6, Options{HUD: &hud, HUDCorner: BottomRight}},
		{"dome", camera.Fisheye, 400, 400, 180, 0.6, Options{Graticule: GraticuleOptions{Frame: GraticuleEquatorial, Step: 20},
			Markers: MarkerOptions{Motion: true}, Labels: LabelOptions{Brightest: 8}, HUD: &hud, HUDCorner: BottomLeft}},
		{"dome_large_text", camera.Fisheye, 600, 600, 180, 0.6, Options{Labels: LabelOptions{Brightest: 8}, HUD: &hud,
			HUDCorner: TopRight, TextSize: 16}},
	}
}

func (c layerCase) frame(t *testing.T) *render.Frame {
	t.Helper()
	fwd := r3.Unit(r3.Vec{X: 1, Y: 0.1, Z: 0.05})
	p := looking(t, c.kind, c.w, c.h, c.fov, axisX)
	f, err := render.Render(handmade(), render.Options{Projection: p, Observer: observer(t, fwd, c.beta), FWHM: 1.8, Exposure: 1})
	if err != nil {
		t.Fatal(err)
	}
	return f
}

// Golden images of each overlay layer [cp: regression against reviewed
// renders, regenerated with -regen].
func TestLayersGolden(t *testing.T) {
	for _, c := range layerCases() {
		t.Run(c.name, func(t *testing.T) {
			f := c.frame(t)
			img := f.ToNRGBA(render.ToneShoulder)
			before := append([]uint8(nil), img.Pix...)
			if err := Draw(img, f, handmade(), c.layers); err != nil {
				t.Fatal(err)
			}
			if bytes.Equal(before, img.Pix) {
				t.Fatal("the layer drew nothing")
			}
			checkGolden(t, c.name, img)
		})
	}
}

// The zero Options changes nothing, even without a frame.
func TestLayersZero(t *testing.T) {
	img := image.NewNRGBA(image.Rect(0, 0, 4, 4))
	if err := Draw(img, nil, nil, Options{}); err != nil {
		t.Fatal(err)
	}
	for _, v := range img.Pix {
		if v != 0 {
			t.Fatal("zero Options drew something")
		}
	}
}

func TestDrawErrors(t *testing.T) {
	c := layerCases()[0]
	f := c.frame(t)
	cases := []struct {
		name string
		img  *image.NRGBA
		l    Options
		want error
		text string
	}{
		{"size", image.NewNRGBA(image.Rect(0, 0, 10, 10)), Options{UnityCircle: true}, ErrOverlay, "10×10"},
		{"label", f.ToNRGBA(render.ToneLinear), Options{Labels: LabelOptions{Stars: []string{"Omicron"}}}, ErrLabel, `"Omicron"`},
		{"lattice", f.ToNRGBA(render.ToneLinear), Options{Lattice: LatticeOptions{PerSide: 101}}, ErrLattice, "1030301"},
		{"step", f.ToNRGBA(render.ToneLinear), Options{Graticule: GraticuleOptions{Frame: GraticuleGalactic, Step: -5}}, ErrGraticule, "-5"},
		{"brightest", f.ToNRGBA(render.ToneLinear), Options{Labels: LabelOptions{Brightest: -1}}, ErrLabel, "-1"},
		{"corner", f.ToNRGBA(render.ToneLinear), Options{HUD: &HUDValues{}, HUDCorner: 9}, ErrOverlay, "9"},
	}
	for _, k := range cases {
		before := append([]uint8(nil), k.img.Pix...)
		err := Draw(k.img, f, handmade(), k.l)
		if !errors.Is(err, k.want) || !strings.Contains(err.Error(), k.text) {
			t.Errorf("%s: have %v, want %v naming %s", k.name, err, k.want, k.text)
		}
		if !bytes.Equal(before, k.img.Pix) {
			t.Errorf("%s: image changed despite the error", k.name)
		}
	}
}

// Beacons lie where the textbook transform puts them: direction from the
// observer, then aberration (physics.md), then the gnomonic projection.
// A beacon straight ahead stays ahead; nearby beacons at the side are
// pulled forward [pub: aberration formula].
func TestLatticeBeacons(t *testing.T) {
	heading := r3.Unit(r3.Vec{X: 1, Y: 0.2})
	obs := observer(t, heading, 0.8)
	obs.Position = r3.Vec{X: 0.3, Y: -0.2, Z: 0.1}
	p := looking(t, camera.Pinhole, 160, 90, 120, axisX)
	bs, err := LatticeBeacons(p, obs, LatticeOptions{PerSide: 4, Spacing: 2})
	if err != nil {
		t.Fatal(err)
	}
	if len(bs) == 0 {
		t.Fatal("no beacon visible")
	}
	for _, b := range bs {
		d := r3.Sub(b.Pos, obs.Position)
		want := refAberrate(r3.Unit(d), heading, 0.8)
		x, y, ok := refProject(&p, want)
		if !ok || math.Hypot(x-b.X, y-b.Y) > 1e-6 {
			t.Fatalf("beacon %d,%d,%d at (%g, %g), want (%g, %g)", b.I, b.J, b.K, b.X, b.Y, x, y)
		}
		if math.Abs(b.Dist-r3.Norm(d)) > 1e-12 {
			t.Fatalf("beacon distance %g, want %g", b.Dist, r3.Norm(d))
		}
	}
	if n, err := (LatticeOptions{PerSide: 101, Confirm: true}).Count(); err != nil || n != 1030301 {
		t.Errorf("confirmed 101³: have %d, %v; want 1030301, nil", n, err)
	}
	for _, o := range []LatticeOptions{{PerSide: -1}, {PerSide: 2, Spacing: -1}, {PerSide: 2, Spacing: math.Inf(1)},
		{PerSide: 2, Origin: r3.Vec{X: math.NaN()}}, {PerSide: 200000, Confirm: true}} {
		if _, err := o.Count(); !errors.Is(err, ErrLattice) {
			t.Errorf("%+v: have %v, want ErrLattice", o, err)
		}
	}
}

// Greedy labels stay inside the image, never overlap each other, the
// blocked boxes or the labelled stars, come out the same each time, and
// are skipped when there is no room.
func TestPlaceLabels(t *testing.T) {
	measure := func(s string) (float64, float64) { return 6 * float64(len(s)), 10 }
	var targets []labelTarget
	for i := 0; i < 30; i++ {
		targets = append(targets, labelTarget{strings.Repeat("x", 1+i%5), 20 + float64(i%6)*22, 15 + float64(i/6)*15})
	}
	blocked := []box{{100, 0, 160, 30}}
	room := labelRoom(looking(t, camera.Pinhole, 160, 90, 60, axisX), 0)
	a := placeLabels(targets, measure, room, blocked, 3)
	b := placeLabels(targets, measure, room, blocked, 3)
	if len(a) == 0 || len(a) == len(targets) {
		t.Fatalf("placed %d of %d labels, want some but not all", len(a), len(targets))
	}
	if len(a) != len(b) {
		t.Fatal("placement not deterministic")
	}
	for i, l := range a {
		if l != b[i] {
			t.Fatal("placement not deterministic")
		}
		lb := box{l.X0, l.Y0, l.X1, l.Y1}
		if l.X0 < 0 || l.Y0 < 0 || l.X1 > 160 || l.Y1 > 90 {
			t.Errorf("label %q outside the image: %+v", l.Text, lb)
		}
		if lb.overlaps(blocked[0]) {
			t.Errorf("label %q overlaps the blocked box", l.Text)
		}
		for _, tg := range targets {
			if lb.overlaps(box{tg.x - 1.5, tg.y - 1.5, tg.x + 1.5, tg.y + 1.5}) {
				t.Errorf("label %q covers a labelled star at (%g, %g)", l.Text, tg.x, tg.y)
			}
		}
		for j := i + 1; j < len(a); j++ {
			if lb.overlaps(box{a[j].X0, a[j].Y0, a[j].X1, a[j].Y1}) {
				t.Errorf("labels %q and %q overlap", l.Text, a[j].Text)
			}
		}
	}
}

func TestResolveLabels(t *testing.T) {
	rows, err := ResolveLabels(handmade(), []string{"kappa", "Alpha"})
	if err != nil || len(rows) != 2 || rows[0] != 9 || rows[1] != 0 {
		t.Errorf("have %v, %v; want [9 0]", rows, err)
	}
	if _, err := ResolveLabels(handmade(), []string{"Alpha", "Nope"}); !errors.Is(err, ErrLabel) || !strings.Contains(err.Error(), `"Nope"`) {
		t.Errorf("unknown star: %v", err)
	}
}

func TestHUD(t *testing.T) {
	v := NoHUDValues()
	if len(v.Lines()) != 0 {
		t.Errorf("all NaN: %v, want no lines", v.Lines())
	}
	v.Beta, v.Gamma, v.RateDest = 0.6, 1.25, 2
	lines := v.Lines()
	if len(lines) != 3 || lines[0][1] != "0.600000 c" || lines[1][1] != "1.25" || lines[2][1] != "×2" {
		t.Errorf("have %q", lines)
	}
	// 1 − β = 1/(γ²(1+β)): γ = 1e4 gives 5.0e-9 [cp: γ ≈ 1/√(2(1−β))].
	v = NoHUDValues()
	v.Beta, v.Gamma = 1, 1e4
	if s := v.Lines()[0][1]; s != "1 − 5.000e-09 c" {
		t.Errorf("β near 1: have %q", s)
	}
	measure := func(s string) (float64, float64) { return 6 * float64(len([]rune(s))), 10 }
	full := NoHUDValues()
	full.Beta, full.Gamma, full.Title = 0.5, 1.1547, "x"
	for c := TopLeft; c <= BottomRight; c++ {
		_, b, _ := hudLayout(full, c, 200, 100, measure, 1)
		if b.x0 < 0 || b.y0 < 0 || b.x1 > 200 || b.y1 > 100 {
			t.Errorf("%v: box %+v outside the image", c, b)
		}
		right, bottom := b.x1 > 190, b.y1 > 90 // within the 8 px margin of that edge
		if right != (c == TopRight || c == BottomRight) || bottom != (c == BottomLeft || c == BottomRight) {
			t.Errorf("%v: box %+v in the wrong corner", c, b)
		}
		if p, err := ParseCorner(c.String()); err != nil || p != c {
			t.Errorf("ParseCorner(%q) = %v, %v", c.String(), p, err)
		}
	}
	if c, err := ParseCorner("BR"); err != nil || c != BottomRight {
		t.Errorf("ParseCorner(BR) = %v, %v", c, err)
	}
	if _, err := ParseCorner("middle"); err == nil {
		t.Error("ParseCorner(middle): no error")
	}
}
