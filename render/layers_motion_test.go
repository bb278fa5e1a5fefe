package render

import (
	"math"
	"slices"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
)

// gaussBandSky is a 6000 K unresolved layer concentrated in a Gaussian band
// of width sigma (radians) along the equator, on a faint uniform floor:
// sharper than any layer skyframe draws, to test the blur of diffuse
// layers against.
type gaussBandSky struct{ sigma float64 }

func (gaussBandSky) Temperatures() []float64 { return []float64{6000} }
func (s gaussBandSky) Dilutions(n r3.Vec, w []float64) {
	b := math.Asin(math.Max(-1, math.Min(1, n.Z)))
	w[0] = 1e-13 * (0.05 + math.Exp(-b*b/(2*s.sigma*s.sigma)))
}

// tiltKnots returns instants of a camera tilting uniformly in elevation
// from −δ/2 to +δ/2 degrees at times u.
func tiltInstants(t *testing.T, w, h int, fov, delta float64, u []float64) []Instant {
	t.Helper()
	out := make([]Instant, len(u))
	for i, ui := range u {
		e := ui * delta / 2 * math.Pi / 180
		o, err := camera.LookAt(r3.Vec{X: math.Cos(e), Z: math.Sin(e)}, axisZ, 0)
		if err != nil {
			t.Fatal(err)
		}
		out[i] = Instant{Observer: observer(t, axisX, 0.3), Projection: camera.Projection{Kind: camera.Pinhole, Width: w, Height: h, FOV: fov, Orient: o}}
	}
	return out
}

// The diffuse layers' blur: the layer averaged at LayerTimes' Gauss–
// Legendre instants matches the mean of 256 evenly spaced instants (the
// time integral, to far better than 8-bit precision) within 3·10⁻³ (under one 8-bit step at full scale, 1/255) of the
// layer's peak, for a band of σ = 8 px swept across the frame by 8, 24
// and 64 px — while the frame's instant alone misses it by much more
// once the sweep is comparable with the band (TestStreakPan does the same
// for a star). The weights sum to 1, so a uniform layer is unchanged.
func TestAddLinearMotion(t *testing.T) {
	const w, h, fov = 160, 120, 10.0 // 16 px per degree
	sky := gaussBandSky{sigma: 0.5 * math.Pi / 180}
	lay := Layers{Unresolved: sky}
	newFrame := func(in Instant) *Frame {
		buf, err := NewBuffer(w, h, false)
		if err != nil {
			t.Fatal(err)
		}
		return &Frame{Buffer: *buf, Options: Options{Projection: in.Projection, Observer: in.Observer}, Scale: ExposureScale(0)}
	}
	for _, path := range []float64{8, 24, 64} {
		delta := path / 16
		u, wts := LayerTimes(path)
		sum := 0.0
		for _, v := range wts {
			sum += v
		}
		if math.Abs(sum-1) > 1e-12 {
			t.Fatalf("weights sum to %v", sum)
		}
		mid := tiltInstants(t, w, h, fov, delta, []float64{0})[0]
		got := newFrame(mid)
		if err := lay.AddLinearMotion(got, tiltInstants(t, w, h, fov, delta, u), wts); err != nil {
			t.Fatal(err)
		}
		n := 256
		if testing.Short() {
			n = 96
		}
		uu, ww := make([]float64, n), make([]float64, n)
		for i := range uu {
			uu[i], ww[i] = -1+(2*float64(i)+1)/float64(n), 1/float64(n)
		}
		ref := newFrame(mid)
		if err := lay.AddLinearMotion(ref, tiltInstants(t, w, h, fov, delta, uu), ww); err != nil {
			t.Fatal(err)
		}
		inst := newFrame(mid)
		if err := lay.AddLinear(inst); err != nil {
			t.Fatal(err)
		}
		peak, dGot, dInst := 0.0, 0.0, 0.0
		for i, v := range ref.Pix {
			peak = math.Max(peak, float64(v))
			dGot = math.Max(dGot, math.Abs(float64(got.Pix[i]-v)))
			dInst = math.Max(dInst, math.Abs(float64(inst.Pix[i]-v)))
		}
		t.Logf("sweep %v px: %d nodes, off the time mean by %.2g of peak; the instant alone %.2g", path, len(u), dGot/peak, dInst/peak)
		if dGot > 3e-3*peak {
			t.Errorf("sweep %v px: %d-node blur off the time mean by %.3g of peak, want ≤ 3e-3", path, len(u), dGot/peak)
		}
		if path >= 24 && dInst < 10*dGot {
			t.Errorf("sweep %v px: the instant alone is as close to the time mean (%.3g) as the blur (%.3g)", path, dInst/peak, dGot/peak)
		}
	}
	f := newFrame(tiltInstants(t, w, h, fov, 1, []float64{0})[0])
	if err := lay.AddLinearMotion(f, tiltInstants(t, w, h, fov, 1, []float64{0}), []float64{-1}); err == nil {
		t.Error("a negative weight was accepted")
	}
}

func TestLayerTimes(t *testing.T) {
	for _, c := range []struct {
		path float64
		m    int
	}{{0, 2}, {4, 2}, {8, 2}, {9, 3}, {24, 6}, {64, 16}, {1e6, MaxLayerNodes}, {math.NaN(), 2}} {
		u, w := LayerTimes(c.path)
		if len(u) != c.m || len(w) != c.m {
			t.Errorf("LayerTimes(%v): %d nodes, want %d", c.path, len(u), c.m)
		}
	}
	// The 2-point rule's nodes are ±1/√3 (Abramowitz & Stegun 25.4.29).
	u, w := LayerTimes(0)
	if math.Abs(math.Abs(u[0])-1/math.Sqrt(3)) > 1e-15 || u[0] != -u[1] || w[0] != 0.5 || w[1] != 0.5 {
		t.Errorf("2-point rule: nodes %v weights %v", u, w)
	}
}

// AddLinearMotionKept leaves the frame AddLinearMotion leaves, bit for
// bit, and returns the stars and each layer apart (they sum to the frame
// within float32 rounding).
func TestAddLinearMotionKept(t *testing.T) {
	const w, h = 96, 64
	lay := Layers{CMB: true, Unresolved: gaussBandSky{sigma: 0.02}}
	u, wts := LayerTimes(20)
	at := tiltInstants(t, w, h, 30, 1.5, u)
	mid := tiltInstants(t, w, h, 30, 1.5, []float64{0})[0]
	frames := make([]*Frame, 2)
	for i := range frames {
		buf, err := NewBuffer(w, h, false)
		if err != nil {
			t.Fatal(err)
		}
		for k := range buf.Pix {
			buf.Pix[k] = float32(k%7) * 0.01 // stand-in stars
		}
		frames[i] = &Frame{Buffer: *buf, Options: Options{Projection: mid.Projection, Observer: mid.Observer}, Scale: ExposureScale(-20)}
	}
	if err := lay.AddLinearMotion(frames[0], at, wts); err != nil {
		t.Fatal(err)
	}
	kept, err := lay.AddLinearMotionKept(frames[1], at, wts)
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(frames[0].Pix, frames[1].Pix) {
		t.Error("AddLinearMotionKept left another frame than AddLinearMotion")
	}
	if len(kept) != 3 || kept[0].Name != LayerStars || kept[1].Name != LayerCMB || kept[2].Name != LayerUnresolved {
		t.Fatalf("contributions %v", kept)
	}
	for k, v := range frames[1].Pix {
		s := kept[0].Pix[k] + kept[1].Pix[k] + kept[2].Pix[k]
		if math.Abs(float64(s-v)) > 1e-6*math.Abs(float64(v)) {
			t.Fatalf("pixel value %d: contributions sum to %v, frame %v", k, s, v)
		}
	}
}
