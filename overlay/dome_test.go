package overlay

import (
	"errors"
	"image"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/render"
)

// tilted returns a fisheye projection looking along +X, tilted by tilt
// degrees.
func tilted(t *testing.T, size int, fov, tilt float64) camera.Projection {
	t.Helper()
	p := looking(t, camera.Fisheye, size, size, fov, axisX)
	p.Tilt = tilt
	if err := p.Prepare(); err != nil {
		t.Fatal(err)
	}
	return p
}

// DomeAzAlt follows the domemaster geometry [pub: Dome Master Show File
// Format 1.0, sec. II, item 1, fulldome.org: equidistant fisheye, bottom of
// the frame = front of the dome, left and right as seen from the dome's
// centre facing the front]: recomputed from the direction the camera
// package puts at the pixel, the altitude is 90° less its angle from the
// frame's centre (the zenith) and the azimuth is measured from the frame's
// bottom (−Up at the centre) toward its right; the tilt moves the sky, not
// the dome.
func TestDomeAzAlt(t *testing.T) {
	for _, tilt := range []float64{0, 30} {
		for _, fov := range []float64{180, 220} {
			p := tilted(t, 512, fov, tilt)
			o := p.CentreOrientation()
			front := r3.Scale(-1, o.Up)
			for _, q := range [][2]float64{{256, 500}, {100, 400}, {400, 300}, {256, 300}, {30, 256}, {256, 20}, {480, 200}} {
				az, alt, ok := DomeAzAlt(p, q[0], q[1])
				n, ok2 := p.Inverse(q[0], q[1])
				if !ok || !ok2 {
					t.Fatalf("tilt %g fov %g (%g, %g): ok %v %v", tilt, fov, q[0], q[1], ok, ok2)
				}
				wantAlt := 90 - math.Acos(math.Max(-1, math.Min(1, r3.Dot(n, o.Forward))))*180/math.Pi
				wantAz := math.Atan2(r3.Dot(n, o.Right), r3.Dot(n, front)) * 180 / math.Pi
				if math.Abs(alt-wantAlt) > 1e-9 || math.Abs(az-wantAz) > 1e-9 {
					t.Errorf("tilt %g fov %g (%g, %g): have az %.6f alt %.6f, want %.6f %.6f", tilt, fov, q[0], q[1], az, alt, wantAz, wantAlt)
				}
			}
			// The bottom centre is the front, the right edge the viewer's right.
			if az, alt, _ := DomeAzAlt(p, 256, 511.999); fov == 180 && (math.Abs(az) > 1e-9 || math.Abs(alt) > 0.01) {
				t.Errorf("bottom centre: az %g alt %g, want the front spring line", az, alt)
			}
			if az, _, _ := DomeAzAlt(p, 511, 256); math.Abs(az-90) > 1e-9 {
				t.Errorf("right edge: az %g, want +90", az)
			}
		}
	}
	if _, _, ok := DomeAzAlt(looking(t, camera.Pinhole, 10, 10, 60, axisX), 5, 5); ok {
		t.Error("pinhole: ok")
	}
}

// domeFrame renders the handmade sky into a fisheye frame.
func domeFrame(t *testing.T, size int, tilt float64) *render.Frame {
	t.Helper()
	f, err := render.Render(handmade(), render.Options{Projection: tilted(t, size, 180, tilt),
		Observer: observer(t, r3.Unit(r3.Vec{X: 1, Y: 0.1, Z: 0.05}), 0.6), FWHM: 1.8, Exposure: 1})
	if err != nil {
		t.Fatal(err)
	}
	return f
}

// hudExtent returns the dome azimuth and altitude range of the lit pixels
// (alpha > 0) of a layer, at pixel centres, and how many there are.
func hudExtent(p camera.Projection, img *image.RGBA) (a DomeArea, n int) {
	a = DomeArea{math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)}
	b := img.Bounds()
	for j := b.Min.Y; j < b.Max.Y; j++ {
		for i := b.Min.X; i < b.Max.X; i++ {
			if img.RGBAAt(i, j).A == 0 {
				continue
			}
			az, alt, _ := DomeAzAlt(p, float64(i)+0.5, float64(j)+0.5)
			a = DomeArea{math.Min(a.AzMin, az), math.Max(a.AzMax, az), math.Min(a.AltMin, alt), math.Max(a.AltMax, alt)}
			n++
		}
	}
	return a, n
}

// litOutside counts the pixels whose centre is outside the image circle
// and that hold any light (RGB of the composite, or alpha of a layer).
func litOutside(p camera.Projection, img image.Image) (n int) {
	cx, cy, r, _ := p.ImageCircle()
	b := img.Bounds()
	for j := b.Min.Y; j < b.Max.Y; j++ {
		for i := b.Min.X; i < b.Max.X; i++ {
			if math.Hypot(float64(i)+0.5-cx, float64(j)+0.5-cy) <= r {
				continue
			}
			cr, cg, cb, ca := img.At(i, j).RGBA()
			if _, layer := img.(*image.RGBA); layer && ca > 0 || !layer && cr+cg+cb > 0 {
				n++
			}
		}
	}
	return n
}

// In a fisheye frame with the graticule, markers, 20 labels and the HUD
// with a title, no pixel outside the image circle is lit (the domemaster
// convention projects nothing there [pub: Dome Master Show File Format 1.0,
// sec. II]), and the HUD's lit pixels all lie in the front safe area,
// ±50° azimuth and 10–60° altitude [pub: ibid., item 9a], on the side and
// at the height its corner asks for, with and without a 30° tilt.
func TestDomeOverlaysInsideCircleAndSafeArea(t *testing.T) {
	hud := HUDValues{Beta: 0.6, Gamma: 1.25, TauYears: 2.5, TYears: 3.1, TravelledLy: 1.9, RemainingLy: 4.2,
		RateHome: 0.5, RateDest: 2, Title: "dome test flight"}
	for _, tilt := range []float64{0, 30} {
		f := domeFrame(t, 512, tilt)
		p := f.Options.Projection
		all := Options{Graticule: GraticuleOptions{Frame: GraticuleEquatorial, Step: 10}, UnityCircle: true,
			Markers: MarkerOptions{Motion: true}, Labels: LabelOptions{Brightest: 20}, HUD: &hud, HUDCorner: BottomLeft}
		img := f.ToNRGBA(render.ToneShoulder)
		if err := Draw(img, f, handmade(), all); err != nil {
			t.Fatal(err)
		}
		if n := litOutside(p, img); n != 0 {
			t.Errorf("tilt %g: %d lit pixels outside the image circle", tilt, n)
		}
		layer, err := Layer(f, handmade(), all)
		if err != nil {
			t.Fatal(err)
		}
		if n := litOutside(p, layer); n != 0 {
			t.Errorf("tilt %g: %d layer pixels outside the image circle", tilt, n)
		}
		for c := TopLeft; c <= BottomRight; c++ {
			layer, err := Layer(f, nil, Options{HUD: &hud, HUDCorner: c})
			if err != nil {
				t.Fatal(err)
			}
			a, n := hudExtent(p, layer)
			t.Logf("tilt %g, %v: %d HUD pixels, azimuth %.1f° to %.1f°, altitude %.1f° to %.1f°", tilt, c, n, a.AzMin, a.AzMax, a.AltMin, a.AltMax)
			if n < 1000 {
				t.Fatalf("tilt %g, %v: only %d HUD pixels", tilt, c, n)
			}
			s := FrontSafeArea
			if !s.Contains(a.AzMin, a.AltMin) || !s.Contains(a.AzMax, a.AltMax) {
				t.Errorf("tilt %g, %v: HUD spans azimuth %.2f° to %.2f°, altitude %.2f° to %.2f°, outside the safe area %+v",
					tilt, c, a.AzMin, a.AzMax, a.AltMin, a.AltMax, s)
			}
			left := c == TopLeft || c == BottomLeft
			if mid := (a.AzMin + a.AzMax) / 2; left != (mid < 0) {
				t.Errorf("tilt %g, %v: HUD centred at azimuth %.1f°, on the wrong side", tilt, c, mid)
			}
			low := c == BottomLeft || c == BottomRight
			if mid := (a.AltMin + a.AltMax) / 2; low != (mid < 35) {
				t.Errorf("tilt %g, %v: HUD centred at altitude %.1f°, want it %s", tilt, c, mid, map[bool]string{true: "low", false: "high"}[low])
			}
		}
	}
}

// The HUD's text reads upright along the dome's local vertical: a line
// runs along a circle of constant altitude (level for a viewer facing that
// part of the dome), so in a display turned toward a side its two ends are
// at the same altitude.
func TestDomeHUDUpright(t *testing.T) {
	f := domeFrame(t, 800, 0)
	p := f.Options.Projection
	for _, c := range []Corner{BottomLeft, TopRight} {
		v := NoHUDValues()
		v.Title = strings.Repeat("M", 24) // one line only
		layer, err := Layer(f, nil, Options{HUD: &v, HUDCorner: c})
		if err != nil {
			t.Fatal(err)
		}
		// The altitude of the line's ends: its text pixels in the first and
		// last quarter of its azimuth range.
		a, _ := hudExtent(p, layer)
		var loAlt, hiAlt []float64
		b := layer.Bounds()
		for j := b.Min.Y; j < b.Max.Y; j++ {
			for i := b.Min.X; i < b.Max.X; i++ {
				px := layer.RGBAAt(i, j)
				if px.A < 200 || px.R < 150 { // the text, not the panel or halo
					continue
				}
				az, alt, _ := DomeAzAlt(p, float64(i)+0.5, float64(j)+0.5)
				switch {
				case az < a.AzMin+(a.AzMax-a.AzMin)/4:
					loAlt = append(loAlt, alt)
				case az > a.AzMax-(a.AzMax-a.AzMin)/4:
					hiAlt = append(hiAlt, alt)
				}
			}
		}
		if len(loAlt) < 20 || len(hiAlt) < 20 {
			t.Fatalf("%v: too few text pixels (%d, %d)", c, len(loAlt), len(hiAlt))
		}
		m := func(v []float64) float64 {
			s := 0.0
			for _, x := range v {
				s += x
			}
			return s / float64(len(v))
		}
		if d := math.Abs(m(loAlt) - m(hiAlt)); d > 1.5 {
			t.Errorf("%v: the two ends of the text differ by %.2f° of altitude, want level along the dome", c, d)
		}
	}
}

// Bad input: a text size out of range, and a HUD that has no room in the
// front safe area (a small dome, large text, or a field too narrow to
// reach it) are errors naming the problem; CheckHUDFit says so before
// rendering.
func TestDomeHUDErrors(t *testing.T) {
	v := HUDValues{Beta: 0.6, Gamma: 1.25, TauYears: 2.5, TYears: 3.1, TravelledLy: 1.9, RemainingLy: 4.2,
		RateHome: 0.5, RateDest: 2, Title: "dome test flight"}
	for _, size := range []float64{-1, math.NaN(), math.Inf(1), 201} {
		if err := (Options{TextSize: size}).Validate(); !errors.Is(err, ErrOverlay) || !strings.Contains(err.Error(), "text size") {
			t.Errorf("text size %g: %v", size, err)
		}
	}
	cases := []struct {
		size      int
		fov, text float64
		fits      bool
	}{
		{512, 180, 0, true},
		{256, 180, 30, false},
		{160, 180, 0, false},
		{2048, 50, 0, false}, // a 50° field never reaches below 65° altitude
		{2048, 360, 0, true},
	}
	for _, k := range cases {
		p := tilted(t, k.size, k.fov, 0)
		err := CheckHUDFit(p, v, BottomRight, k.text)
		if k.fits != (err == nil) || err != nil && (!errors.Is(err, ErrHUDFit) || !strings.Contains(err.Error(), "safe area")) {
			t.Errorf("%d² fov %g text %g: %v, want fits = %v", k.size, k.fov, k.text, err, k.fits)
		}
		if k.fits || k.size > 512 {
			continue
		}
		f, err := render.Render(handmade(), render.Options{Projection: p, FWHM: 1.8, Exposure: 1})
		if err != nil {
			t.Fatal(err)
		}
		img := f.ToNRGBA(render.ToneLinear)
		before := append([]uint8(nil), img.Pix...)
		if err := Draw(img, f, nil, Options{HUD: &v, HUDCorner: BottomRight, TextSize: k.text}); !errors.Is(err, ErrHUDFit) {
			t.Errorf("%d² text %g: Draw: %v, want ErrHUDFit", k.size, k.text, err)
		}
		if string(before) != string(img.Pix) {
			t.Errorf("%d²: image changed despite the error", k.size)
		}
	}
	// Flat frames always make room (they shrink the display instead).
	if err := CheckHUDFit(looking(t, camera.Pinhole, 160, 90, 60, axisX), v, TopLeft, 30); err != nil {
		t.Errorf("pinhole: %v", err)
	}
}

// BenchmarkLayerDome draws every overlay of a 2048² fisheye frame,
// including the per-pixel clip to the image circle.
func BenchmarkLayerDome(b *testing.B) {
	t := &testing.T{}
	f := domeFrame(t, 2048, 0)
	hud := HUDValues{Beta: 0.6, Gamma: 1.25, TauYears: 2.5, TYears: 3.1, TravelledLy: 1.9, RemainingLy: 4.2,
		RateHome: 0.5, RateDest: 2, Title: "dome test flight"}
	opt := Options{Graticule: GraticuleOptions{Frame: GraticuleEquatorial}, Markers: MarkerOptions{Motion: true},
		Labels: LabelOptions{Brightest: 10}, HUD: &hud, HUDCorner: BottomLeft}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Layer(f, handmade(), opt); err != nil {
			b.Fatal(err)
		}
	}
}

// Straight undoes premultiplication as PNG wants it (W3C PNG, 2nd ed.,
// §12.4: stored alpha is not premultiplied): c = round(c′·255/α), clamped,
// transparent pixels zero; and Layer's output is premultiplied (no colour
// above its alpha).
func TestStraight(t *testing.T) {
	src := image.NewRGBA(image.Rect(0, 0, 4, 1))
	copy(src.Pix, []uint8{100, 50, 0, 200, 9, 9, 9, 0, 10, 20, 30, 255, 129, 0, 0, 128})
	d := Straight(src)
	want := []uint8{128, 64, 0, 200, 0, 0, 0, 0, 10, 20, 30, 255, 255, 0, 0, 128}
	for i := range want {
		if d.Pix[i] != want[i] {
			t.Fatalf("have %v, want %v", d.Pix, want)
		}
	}
	f := domeFrame(t, 256, 0)
	l, err := Layer(f, handmade(), Options{Graticule: GraticuleOptions{Frame: GraticuleGalactic}, Labels: LabelOptions{Brightest: 5}})
	if err != nil {
		t.Fatal(err)
	}
	for i := 0; i < len(l.Pix); i += 4 {
		if a := l.Pix[i+3]; l.Pix[i] > a || l.Pix[i+1] > a || l.Pix[i+2] > a {
			t.Fatalf("pixel %d: %v not premultiplied", i/4, l.Pix[i:i+4])
		}
	}
}
