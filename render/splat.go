package render

import (
	"errors"
	"fmt"
	"math"
)

// DefaultFWHM is the full width at half maximum, in pixels, of the point
// spread function when Options.FWHM is zero.
const DefaultFWHM = 1.5

// MaxFWHM is the widest point spread function accepted, in pixels.
const MaxFWHM = 32

// psfRadiusSigma is the truncation radius of the Gaussian in units of σ.
// At 4σ the discarded wings hold 6.3e-5 of the flux; the weights are
// renormalised over the truncated support so nothing is lost.
const psfRadiusSigma = 4

// maxTaps bounds the number of pixels a PSF covers along one axis:
// Taps() of the widest PSF, int(2·4·MaxFWHM/2.3548) + 2 = 110, rounded up.
const maxTaps = 112

// fwhmPerSigma is FWHM/σ of a Gaussian, 2√(2 ln 2).
const fwhmPerSigma = 2.3548200450309493

// ErrFWHM reports a point spread function width outside (0, MaxFWHM].
var ErrFWHM = errors.New("render: PSF FWHM out of range")

// PSF is a circular Gaussian point spread function truncated at 4σ and
// integrated over each pixel (within 8·10⁻⁷ of the exact integral per
// weight, see Weights). Its weights separate into
// wx[i]·wy[j], each axis the difference of error functions at the pixel
// edges, renormalised over the truncated support so that a star's
// deposits sum to its flux (to rounding) when the kernel lies inside the
// image. The zero value is not usable; build one with NewPSF.
type PSF struct {
	fwhm, sigma, radius float64
	inv                 float64 // 1/σ
	norm                float64 // 1/(Φ(4) − Φ(−4)): normalisation over the support
	edges               *edgeTable
}

// edgeTable holds the clamped CDF G at the pixel edges around a star as a
// function of the star's sub-pixel phase φ = c − ⌊c⌋, for Weights: at phase
// knot j (φ_j = j/phases, j = 0..phases) and edge offset m (the edge
// ⌊c⌋ + m, m = mMin … mMin+len−1) it stores G((m − φ_j)/σ) clamped to
// ±G(4) and the slope to the next knot, so a weight costs one
// multiply-add per edge. Linear interpolation in φ errs by at most
// h²/8·max|G″|/σ² ≤ 0.03·h²/σ² (h = 1/phases; max|φ′(t)| = 0.242 [cp]) plus
// h·φ(4)/(4σ) where an edge crosses the 4σ truncation (a kink); the phase
// count keeps both below 4·10⁻⁷ per edge, so a pixel's weight errs by at
// most 8·10⁻⁷ of the star's flux (against the 6.3·10⁻⁵ the truncation
// itself removes; TestWeightsVsErf). The weights still sum to 1 exactly: they
// are differences of the interpolated edge values, which run from −G(4)
// to G(4).
type edgeTable struct {
	phases   int
	mMin, nm int
	val      []float64 // [j·nm + m − mMin]
	slope    []float64
}

// maxPhases bounds an edge table's phase knots (and its size, 1024 × the
// edge count × 16 bytes); narrower PSFs, which would need more, go without.
const maxPhases = 1024

// newEdgeTable returns the table for a PSF of the given σ and radius, or
// nil when σ is too small for maxPhases knots to reach the accuracy.
func newEdgeTable(sigma, radius float64) *edgeTable {
	// h·φ(4)/(4σ) ≤ 4e-7 and 0.03·h²/σ² ≤ 4e-7: h ≤ min(0.012σ,
	// 0.00365σ) = 0.00365σ.
	phases := max(int(math.Ceil(1/(0.00365*sigma))), 16)
	if phases > maxPhases {
		return nil // σ < 0.27 px: Weights evaluates gaussCDF per edge
	}
	t := &edgeTable{phases: phases}
	// Edges lie within the support [c − r, c + r]; offsets m − φ from
	// −r − 1 to r + 1 cover every φ.
	t.mMin = int(math.Floor(-radius)) - 1
	t.nm = int(math.Ceil(radius)) + 2 - t.mMin
	t.val = make([]float64, (phases+1)*t.nm)
	t.slope = make([]float64, phases*t.nm)
	for j := 0; j <= phases; j++ {
		phi := float64(j) / float64(phases)
		for k := 0; k < t.nm; k++ {
			t.val[j*t.nm+k] = gaussCDFExact((float64(t.mMin+k) - phi) / sigma)
		}
	}
	for j := 0; j < phases; j++ {
		for k := 0; k < t.nm; k++ {
			t.slope[j*t.nm+k] = t.val[(j+1)*t.nm+k] - t.val[j*t.nm+k]
		}
	}
	return t
}

// gaussCDFExact is G(t) = ½·erf(t/√2) clamped to ±G(4), from math.Erf.
func gaussCDFExact(t float64) float64 {
	return 0.5 * math.Erf(math.Max(-psfRadiusSigma, math.Min(psfRadiusSigma, t))/math.Sqrt2)
}

// NewPSF returns the PSF of the given FWHM in pixels; 0 means DefaultFWHM.
func NewPSF(fwhm float64) (PSF, error) {
	if fwhm == 0 {
		fwhm = DefaultFWHM
	}
	if !(fwhm > 0 && fwhm <= MaxFWHM) {
		return PSF{}, fmt.Errorf("%w: %v px, want (0, %v]", ErrFWHM, fwhm, MaxFWHM)
	}
	s := fwhm / fwhmPerSigma
	return PSF{fwhm: fwhm, sigma: s, radius: psfRadiusSigma * s,
		inv: 1 / s, norm: 1 / (2 * cdfEdge), edges: newEdgeTable(s, psfRadiusSigma*s)}, nil
}

// FWHM returns the full width at half maximum in pixels.
func (p *PSF) FWHM() float64 { return p.fwhm }

// Sigma returns the Gaussian standard deviation in pixels.
func (p *PSF) Sigma() float64 { return p.sigma }

// Radius returns the truncation radius (4σ) in pixels: no pixel farther
// than this from the star along either axis receives light.
func (p *PSF) Radius() float64 { return p.radius }

// Taps returns an upper bound on the number of pixels the kernel covers
// along one axis: the minimum length of the slice given to Weights.
func (p *PSF) Taps() int { return int(2*p.radius) + 2 }

// Weights fills w with the fractions of a unit one-dimensional profile
// centred at pixel coordinate c that fall in pixels i0 … i0+n−1 (pixel i
// spans [i, i+1)). The fractions are non-negative and sum to 1 to
// rounding. w must hold at least Taps() values; Weights does not allocate.
//
// The edge values come from the PSF's table over the sub-pixel phase (see
// edgeTable), within 8·10⁻⁷ of the exact integrals; for σ < 0.27 px, from
// the tabulated CDF per edge (within 4·10⁻⁹).
func (p *PSF) Weights(c float64, w []float64) (i0, n int) {
	lo, hi := c-p.radius, c+p.radius
	i0 = int(math.Floor(lo))
	i1 := int(math.Floor(hi))
	n = i1 - i0 + 1
	w = w[:n]
	t := p.edges
	if t == nil {
		prev := -cdfEdge
		for k := 0; k < n-1; k++ {
			e := gaussCDF((float64(i0+k+1) - c) * p.inv)
			w[k] = (e - prev) * p.norm
			prev = e
		}
		w[n-1] = (cdfEdge - prev) * p.norm
		return i0, n
	}
	fl := math.Floor(c)
	s := (c - fl) * float64(t.phases)
	j := min(int(s), t.phases-1)
	fr := s - float64(j)
	// Edge k (between pixels i0+k and i0+k+1) is at offset m = i0+k+1 − ⌊c⌋.
	base := j*t.nm + i0 + 1 - int(fl) - t.mMin
	val, slope := t.val[base:base+n-1], t.slope[base:base+n-1]
	prev := -cdfEdge
	for k := range val {
		e := val[k] + fr*slope[k]
		w[k] = (e - prev) * p.norm
		prev = e
	}
	w[n-1] = (cdfEdge - prev) * p.norm
	return i0, n
}

// The centred Gaussian CDF G(t) = Φ(t) − ½ = ½·erf(t/√2) for t in σ units
// is tabulated on [−4, 4] at steps of 1/cdfPerSigma as cubic Hermite
// pieces built from math.Erf and the exact derivative φ(t). The
// interpolation error is below 4·10⁻⁹ (h⁴/384 · max|φ‴| with h = 1/32),
// far below float32 resolution, and costs a fraction of math.Erf.
const (
	cdfPerSigma = 32
	cdfN        = 2 * psfRadiusSigma * cdfPerSigma // intervals
)

var (
	cdfEdge = 0.5 * math.Erf(psfRadiusSigma/math.Sqrt2) // G(4)
	cdfTab  = buildCDF()
)

func buildCDF() *[cdfN][4]float64 {
	var t [cdfN][4]float64
	const h = 1.0 / cdfPerSigma
	g := func(x float64) (float64, float64) {
		return 0.5 * math.Erf(x/math.Sqrt2), h * math.Exp(-x*x/2) / math.Sqrt(2*math.Pi)
	}
	for k := range t {
		x0 := -psfRadiusSigma + float64(k)*h
		f0, m0 := g(x0)
		f1, m1 := g(x0 + h)
		t[k] = [4]float64{f0, m0, 3*(f1-f0) - 2*m0 - m1, 2*(f0-f1) + m0 + m1}
	}
	return &t
}

// gaussCDF returns G(t) from the table, clamped to ±G(4) outside [−4, 4].
func gaussCDF(t float64) float64 {
	u := (t + psfRadiusSigma) * cdfPerSigma
	if !(u > 0) {
		return -cdfEdge
	}
	j := int(u)
	if j >= cdfN {
		return cdfEdge
	}
	f := u - float64(j)
	c := &cdfTab[j]
	return c[0] + f*(c[1]+f*(c[2]+f*c[3]))
}

// PeakFraction returns the fraction of a star's flux that falls in the
// pixel under it when the star sits exactly at that pixel's centre.
func (p *PSF) PeakFraction() float64 {
	var w [maxTaps]float64
	i0, n := p.Weights(0.5, w[:])
	for k := 0; k < n; k++ {
		if i0+k == 0 {
			return w[k] * w[k]
		}
	}
	return 0
}

// Splat deposits a point source at continuous pixel coordinates (x, y)
// (pixel (i, j) spans [i, i+1)×[j, j+1)) with linear colour rgb, spread
// by psf. Light falling outside the buffer is lost. When the buffer has a
// Doppler channel, d is merged into each touched pixel's
// luminance-weighted mean. Splat does not allocate.
func (b *Buffer) Splat(x, y float64, rgb [3]float64, d float64, psf *PSF) {
	var wx, wy [maxTaps]float64
	if !(math.Abs(x) < 4*MaxSize && math.Abs(y) < 4*MaxSize) {
		return // also rejects NaN
	}
	x0, nx := psf.Weights(x, wx[:])
	y0, ny := psf.Weights(y, wy[:])
	lum := lumR*rgb[0] + lumG*rgb[1] + lumB*rgb[2]
	for j := 0; j < ny; j++ {
		py := y0 + j
		if py < 0 || py >= b.H {
			continue
		}
		for i := 0; i < nx; i++ {
			px := x0 + i
			if px < 0 || px >= b.W {
				continue
			}
			w := wx[i] * wy[j]
			p := py*b.W + px
			q := 3 * p
			if b.Doppler != nil {
				old := lumR*float64(b.Pix[q]) + lumG*float64(b.Pix[q+1]) + lumB*float64(b.Pix[q+2])
				add := w * lum
				if old+add > 0 {
					b.Doppler[p] = float32((old*float64(b.Doppler[p]) + add*d) / (old + add))
				}
			}
			b.Pix[q] += float32(w * rgb[0])
			b.Pix[q+1] += float32(w * rgb[1])
			b.Pix[q+2] += float32(w * rgb[2])
		}
	}
}
