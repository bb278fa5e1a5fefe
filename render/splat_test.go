package render

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"github.com/skyframe/skyframe/camera"
)

// A Gaussian's FWHM is 2√(2 ln 2)·σ ≈ 2.35482σ [pub: any statistics text].
func TestPSFSigma(t *testing.T) {
	p, err := NewPSF(2.35482)
	if err != nil {
		t.Fatal(err)
	}
	if have, want := p.Sigma(), 1.0; !scalar.EqualWithinAbs(have, want, 1e-5) {
		t.Errorf("σ: have %v, want %v", have, want)
	}
	if have, want := p.Radius(), 4.0; !scalar.EqualWithinAbs(have, want, 1e-4) {
		t.Errorf("radius: have %v, want %v", have, want)
	}
}

func TestPSFErrors(t *testing.T) {
	for _, f := range []float64{-1, math.NaN(), math.Inf(1), MaxFWHM * 1.01} {
		if _, err := NewPSF(f); !errors.Is(err, ErrFWHM) {
			t.Errorf("NewPSF(%v): have %v, want ErrFWHM", f, err)
		}
	}
	p, err := NewPSF(0)
	if err != nil || p.FWHM() != DefaultFWHM {
		t.Errorf("NewPSF(0): have %v, %v; want FWHM %v", p.FWHM(), err, DefaultFWHM)
	}
}

// The centre pixel of a pixel-centred Gaussian of σ = 1 holds
// (2Φ(0.5) − 1)² of the flux, with Φ(0.5) = 0.691462 from the standard
// normal table [mem], so 2Φ(0.5) − 1 = 0.382925 (the tails folded into the
// window's edge pixels do not reach the centre).
func TestPeakFraction(t *testing.T) {
	p, _ := NewPSF(fwhmPerSigma)
	want := 0.382925 * 0.382925
	if have := p.PeakFraction(); !scalar.EqualWithinRel(have, want, 1e-5) {
		t.Errorf("peak fraction: have %v, want %v", have, want)
	}
}

// psfTailSigma is the standard normal's upper 10⁻³ point: ½·erfc(t/√2) is
// the normal's upper tail [cp], from math.Erfc. Each PSF's window
// half-width k is the smallest whole number of pixels with at most 10⁻³ of
// the flux beyond it on one side (the rule in PSF's doc).
func TestPSFTailSigma(t *testing.T) {
	tail := func(x float64) float64 { return 0.5 * math.Erfc(x/math.Sqrt2) }
	if have := tail(psfTailSigma); !scalar.EqualWithinRel(have, psfTail, 1e-12) {
		t.Errorf("tail beyond %v σ: have %v, want %v", psfTailSigma, have, psfTail)
	}
	for _, fwhm := range []float64{0.3, 0.5, 1, 1.5, 2, 2.5, 4, 9.7, MaxFWHM} {
		p, _ := NewPSF(fwhm)
		k := p.Radius()
		if tail(k/p.Sigma()) > psfTail || (k > 1 && tail((k-1)/p.Sigma()) <= psfTail) {
			t.Errorf("FWHM %v: k = %v px leaves %.3g beyond it, %.3g beyond k−1", fwhm, k, tail(k/p.Sigma()), tail((k-1)/p.Sigma()))
		}
		if p.Taps() > maxTaps {
			t.Errorf("FWHM %v: %d taps > maxTaps", fwhm, p.Taps())
		}
	}
	if p, _ := NewPSF(DefaultFWHM); p.Taps() != 5 {
		t.Errorf("default PSF: %d taps per axis, want 5", p.Taps())
	}
}

// Energy conservation [cp: the PSF is normalised over its support]: a star
// deposited away from the edges puts exactly its flux into the image, for
// random sub-pixel positions and several widths.
func TestSplatConservesFlux(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for _, fwhm := range []float64{0.5, 1, 1.5, 2.5, 4, 9.7} {
		p, err := NewPSF(fwhm)
		if err != nil {
			t.Fatal(err)
		}
		for k := 0; k < 50; k++ {
			b, _ := NewBuffer(80, 80, true)
			x, y := 30+20*rng.Float64(), 30+20*rng.Float64()
			f := [3]float64{1, 0.5, 2}
			b.splat(x, y, f, 1.7, &p)
			r, g, bl := b.Sum()
			for c, have := range []float64{r, g, bl} {
				if !scalar.EqualWithinRel(have, f[c], 1e-4) {
					t.Errorf("FWHM %v at (%.3f,%.3f) channel %d: have %v, want %v", fwhm, x, y, c, have, f[c])
				}
			}
		}
	}
}

// Sub-pixel accuracy [cp]: the flux centroid of the deposit, with pixel
// (i, j) at its centre (i+0.5, j+0.5), equals the star position within
// 1e-3 px for FWHM ≥ 1.5 px (narrower kernels alias at the pixel scale).
func TestSplatCentroid(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for _, fwhm := range []float64{1.5, 2, 3, 6} {
		p, _ := NewPSF(fwhm)
		for k := 0; k < 50; k++ {
			b, _ := NewBuffer(64, 64, false)
			x, y := 24+16*rng.Float64(), 24+16*rng.Float64()
			b.splat(x, y, [3]float64{1, 1, 1}, 1, &p)
			var sx, sy, s float64
			for j := 0; j < b.H; j++ {
				for i := 0; i < b.W; i++ {
					v, _, _ := b.At(i, j)
					s += float64(v)
					sx += float64(v) * (float64(i) + 0.5)
					sy += float64(v) * (float64(j) + 0.5)
				}
			}
			if hx, hy := sx/s, sy/s; math.Abs(hx-x) > 1e-3 || math.Abs(hy-y) > 1e-3 {
				t.Errorf("FWHM %v: centroid have (%.5f,%.5f), want (%.5f,%.5f)", fwhm, hx, hy, x, y)
			}
		}
	}
}

// A star on a buffer edge loses the part of its kernel outside [cp]: a star
// exactly on the left edge keeps half of its light.
func TestSplatEdge(t *testing.T) {
	p, _ := NewPSF(2)
	b, _ := NewBuffer(40, 40, false)
	b.splat(0, 20, [3]float64{1, 1, 1}, 1, &p)
	r, _, _ := b.Sum()
	if !scalar.EqualWithinAbs(r, 0.5, 1e-6) {
		t.Errorf("edge star: have %v, want 0.5", r)
	}
	b.splat(math.NaN(), 3, [3]float64{1, 1, 1}, 1, &p)
	b.splat(-1e9, 3, [3]float64{1, 1, 1}, 1, &p)
	if r2, _, _ := b.Sum(); r2 != r {
		t.Errorf("NaN/far star changed the buffer: %v → %v", r, r2)
	}
}

// The Doppler channel holds the luminance-weighted mean D [cp: definition
// in Buffer's doc]: two equal stars on the same spot with D = 1 and D = 3
// give 2; a star three times brighter with D = 3 gives 2.5.
func TestSplatDopplerMean(t *testing.T) {
	p, _ := NewPSF(1.5)
	for _, c := range []struct{ f1, d1, f2, d2, want float64 }{
		{1, 1, 1, 3, 2},
		{1, 1, 3, 3, 2.5},
	} {
		b, _ := NewBuffer(16, 16, true)
		b.splat(8.5, 8.5, [3]float64{c.f1, c.f1, c.f1}, c.d1, &p)
		b.splat(8.5, 8.5, [3]float64{c.f2, c.f2, c.f2}, c.d2, &p)
		if have := float64(b.Doppler[8*16+8]); !scalar.EqualWithinRel(have, c.want, 1e-6) {
			t.Errorf("%+v: have %v, want %v", c, have, c.want)
		}
		if b.Doppler[0] != 0 {
			t.Errorf("unlit pixel D: have %v, want 0", b.Doppler[0])
		}
	}
}

func TestSplatAllocs(t *testing.T) {
	p, _ := NewPSF(3)
	b, _ := NewBuffer(64, 64, true)
	if n := testing.AllocsPerRun(100, func() { b.splat(20.3, 30.7, [3]float64{1, 1, 1}, 1, &p) }); n != 0 {
		t.Errorf("Splat allocates %v times per call, want 0", n)
	}
}

func BenchmarkSplat(b *testing.B) {
	p, _ := NewPSF(DefaultFWHM)
	buf, _ := NewBuffer(512, 512, false)
	rng := rand.New(rand.NewPCG(5, 6))
	xs := make([]float64, 1024)
	for i := range xs {
		xs[i] = 8 + 496*rng.Float64()
	}
	b.ReportAllocs()
	for i := 0; b.Loop(); i++ {
		buf.splat(xs[i&1023], xs[(i+7)&1023], [3]float64{1, 1, 1}, 1, &p)
	}
}

// TestWeightsVsErf checks the tabulated weights against the exact pixel
// integrals of the Gaussian from math.Erf, the window's first and last
// pixels holding the tails beyond them (the reference: ½·erf(t/√2) is the
// centred normal CDF [cp]), to the 8·10⁻⁷ the table promises, for PSFs
// from the narrowest to the widest and sub-pixel phases that fall between
// the table's knots.
func TestWeightsVsErf(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 10))
	var w [maxTaps]float64
	for _, fwhm := range []float64{0.3, 0.5, 1, 1.5, 2.5, 4, 9.7, MaxFWHM} {
		p, err := NewPSF(fwhm)
		if err != nil {
			t.Fatal(err)
		}
		worst := 0.0
		for k := 0; k < 2000; k++ {
			c := 100*rng.Float64() - 50
			i0, n := p.Weights(c, w[:])
			sum := 0.0
			for i := 0; i < n; i++ {
				if i0 != int(math.Floor(c))-int(p.Radius()) || n != p.Taps() {
					t.Fatalf("FWHM %v, c=%v: window %d+%d, want ⌊c⌋−k and 2k+1", fwhm, c, i0, n)
				}
				a := (float64(i0+i) - c) / p.Sigma()
				b := (float64(i0+i+1) - c) / p.Sigma()
				if i == 0 {
					a = math.Inf(-1)
				}
				if i == n-1 {
					b = math.Inf(1)
				}
				want := 0.5 * (math.Erf(b/math.Sqrt2) - math.Erf(a/math.Sqrt2))
				worst = math.Max(worst, math.Abs(w[i]-want))
				sum += w[i]
			}
			if math.Abs(sum-1) > 1e-14 {
				t.Fatalf("FWHM %v, c=%v: weights sum to 1%+.2g", fwhm, c, sum-1)
			}
		}
		if worst > 8e-7 {
			t.Errorf("FWHM %v: worst weight error %.2g, want ≤ 8e-7", fwhm, worst)
		}
		t.Logf("FWHM %v: worst weight error %.2g", fwhm, worst)
	}
}

// TestSplat5MatchesSplat: the unrolled 5×5 splat of the default PSF adds
// the same bits as the general splat for records anywhere in a tile, and
// declines a window that crosses the tile's edge [cp: the same IEEE 754
// operations in the same order give the same result].
func TestSplat5MatchesSplat(t *testing.T) {
	psf, err := NewPSF(0)
	if err != nil {
		t.Fatal(err)
	}
	if psf.k != 2 || psf.edges == nil {
		t.Fatalf("default PSF: k %d, table %v; splat5 would not run", psf.k, psf.edges != nil)
	}
	g := newGrid(512, 512, psf.Radius(), camera.Fisheye)
	win := tileWindow{x0: 256, y0: 128, x1: 384, y1: 256} // one tile of the frame
	a, _ := NewBuffer(512, 512, false)
	b, _ := NewBuffer(512, 512, false)
	var wx, wy [maxTaps]float64
	rng := rand.New(rand.NewPCG(3, 4))
	inside, outside := 0, 0
	for i := 0; i < 20000; i++ {
		r := splatRec{x: 250 + 140*rng.Float64(), y: 122 + 140*rng.Float64(),
			rgb: [3]float32{rng.Float32(), rng.Float32(), 3 * rng.Float32()}, d: 1}
		if i%7 == 0 { // exact pixel edges and centres
			r.x, r.y = math.Floor(r.x), math.Floor(r.y)+0.5
		}
		if splat5(a, win, &r, psf.edges) {
			inside++
		} else {
			outside++
			g.splat(a, win, &r, &psf, &wx, &wy)
		}
		g.splat(b, win, &r, &psf, &wx, &wy)
	}
	if inside < 1000 || outside < 1000 {
		t.Fatalf("inside %d, outside %d: both paths must be exercised", inside, outside)
	}
	for i := range a.Pix {
		if math.Float32bits(a.Pix[i]) != math.Float32bits(b.Pix[i]) {
			t.Fatalf("Pix[%d]: splat5 %v, splat %v", i, a.Pix[i], b.Pix[i])
		}
	}
}
