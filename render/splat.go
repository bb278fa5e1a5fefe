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

// psfTail is the largest fraction of a star's flux that may lie beyond the
// PSF window on either side, along either axis (see PSF).
const psfTail = 1e-3

// psfTailSigma is Φ⁻¹(1 − psfTail) = 3.0902…, the point of the standard
// normal beyond which psfTail of the probability lies (normal tables
// [mem]; TestPSFTailSigma checks it with math.Erfc).
const psfTailSigma = 3.090232306167813

// maxTaps bounds the number of pixels a PSF covers along one axis:
// Taps() of the widest PSF, 2·⌈3.0902·MaxFWHM/2.3548⌉ + 1 = 87, rounded up.
const maxTaps = 112

// fwhmPerSigma is FWHM/σ of a Gaussian, 2√(2 ln 2).
const fwhmPerSigma = 2.3548200450309493

// ErrFWHM reports a point spread function width outside (0, MaxFWHM].
var ErrFWHM = errors.New("render: PSF FWHM out of range")

// PSF is a circular Gaussian point spread function integrated over each
// pixel, on a window of 2k+1 × 2k+1 pixels centred on the pixel the star
// is in: a star at c lights pixels ⌊c⌋−k … ⌊c⌋+k along each axis. Its
// weights separate into wx[i]·wy[j], each axis the difference of error
// functions at the pixel edges (within 8·10⁻⁷ of the exact integral per
// weight, see Weights), with the Gaussian's tails beyond the window added
// to the window's two edge pixels, so a star's deposits sum to its flux
// (to rounding) when the window lies inside the image.
//
// The window half-width k is the smallest whole number of pixels with at
// most psfTail = 10⁻³ of the flux beyond k pixels on one side,
// k = ⌈3.0902·σ⌉ (2 for the default 1.5 px FWHM: 5×5 pixels). The star is
// at least k pixels from either window edge, so the light folded into an
// edge pixel is at most 10⁻³ of the flux per side, and it moves the
// deposit's centroid by at most that many pixels: the folded tail lies
// between the window edge and the star's far side of the edge pixel.
// Against the 4σ support used before (6.1 pixels per axis, 37 per star
// for the default PSF, against 25 now) the peak pixel changes by less than
// 3·10⁻⁴ of the flux. The zero value is not usable; build one with NewPSF.
type PSF struct {
	fwhm, sigma float64
	k           int     // window half-width, px
	inv         float64 // 1/σ
	edges       *edgeTable
}

// edgeTable holds the Gaussian CDF G at the interior pixel edges of the
// window around a star as a function of the star's sub-pixel phase
// φ = c − ⌊c⌋, for Weights: at phase knot j (φ_j = j/phases, j = 0..phases)
// and edge offset m (the edge ⌊c⌋ + m, m = mMin … mMin+nm−1) it stores
// G((m − φ_j)/σ) and the slope to the next knot, so a weight costs one
// multiply-add per edge. Linear interpolation in φ errs by at most
// h²/8·max|G″|/σ² ≤ 0.03·h²/σ² (h = 1/phases; max|φ′(t)| = 0.242 [cp]);
// the phase count keeps that below 4·10⁻⁷ per edge, so a pixel's weight
// errs by at most 8·10⁻⁷ of the star's flux (TestWeightsVsErf). The
// weights still sum to 1: they are differences of the interpolated edge
// values, from −½ to ½.
type edgeTable struct {
	phases   int
	mMin, nm int
	val      []float64 // [j·nm + m − mMin]
	slope    []float64
}

// maxPhases bounds an edge table's phase knots (and its size, 1024 × the
// edge count × 16 bytes); narrower PSFs, which would need more, go without.
const maxPhases = 1024

// newEdgeTable returns the table for a PSF of the given σ and window
// half-width k, or nil when σ is too small for maxPhases knots to reach
// the accuracy.
func newEdgeTable(sigma float64, k int) *edgeTable {
	// 0.03·h²/σ² ≤ 4e-7: h ≤ 0.00365σ.
	phases := max(int(math.Ceil(1/(0.00365*sigma))), 16)
	if phases > maxPhases {
		return nil // σ < 0.27 px: Weights evaluates math.Erf per edge
	}
	t := &edgeTable{phases: phases}
	// The interior edges of the window lie at offsets −k+1 … k from ⌊c⌋.
	t.mMin = -k + 1
	t.nm = 2 * k
	t.val = make([]float64, (phases+1)*t.nm)
	t.slope = make([]float64, phases*t.nm)
	for j := 0; j <= phases; j++ {
		phi := float64(j) / float64(phases)
		for m := 0; m < t.nm; m++ {
			t.val[j*t.nm+m] = gaussCDFExact((float64(t.mMin+m) - phi) / sigma)
		}
	}
	for j := 0; j < phases; j++ {
		for m := 0; m < t.nm; m++ {
			t.slope[j*t.nm+m] = t.val[(j+1)*t.nm+m] - t.val[j*t.nm+m]
		}
	}
	return t
}

// gaussCDFExact is G(t) = ½·erf(t/√2), the centred normal CDF, from
// math.Erf.
func gaussCDFExact(t float64) float64 {
	return 0.5 * math.Erf(t/math.Sqrt2)
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
	k := max(int(math.Ceil(psfTailSigma*s)), 1)
	return PSF{fwhm: fwhm, sigma: s, k: k, inv: 1 / s, edges: newEdgeTable(s, k)}, nil
}

// FWHM returns the full width at half maximum in pixels.
func (p *PSF) FWHM() float64 { return p.fwhm }

// Sigma returns the Gaussian standard deviation in pixels.
func (p *PSF) Sigma() float64 { return p.sigma }

// Radius returns the window half-width k in pixels, a whole number: a
// star at c lights pixels ⌊c⌋−k … ⌊c⌋+k along each axis, so no pixel
// whose index differs from the star's by more than k receives light.
func (p *PSF) Radius() float64 { return float64(p.k) }

// Taps returns the number of pixels the kernel covers along one axis,
// 2k+1: the minimum length of the slice given to Weights.
func (p *PSF) Taps() int { return 2*p.k + 1 }

// Weights fills w with the fractions of a unit one-dimensional profile
// centred at pixel coordinate c that fall in pixels i0 … i0+n−1 (pixel i
// spans [i, i+1)), i0 = ⌊c⌋ − k and n = 2k+1, the first and last also
// holding the tails beyond them. The fractions are non-negative and sum
// to 1 to rounding. w must hold at least Taps() values; Weights does not
// allocate.
//
// The edge values come from the PSF's table over the sub-pixel phase (see
// edgeTable), within 8·10⁻⁷ of the exact integrals; for σ < 0.27 px,
// from math.Erf per edge.
func (p *PSF) Weights(c float64, w []float64) (i0, n int) {
	fl := math.Floor(c)
	i0 = int(fl) - p.k
	n = 2*p.k + 1
	w = w[:n]
	t := p.edges
	if t == nil {
		prev := -0.5
		for k := 0; k < n-1; k++ {
			e := gaussCDFExact((float64(i0+k+1) - c) * p.inv)
			w[k] = e - prev
			prev = e
		}
		w[n-1] = 0.5 - prev
		return i0, n
	}
	s := (c - fl) * float64(t.phases)
	j := min(int(s), t.phases-1)
	fr := s - float64(j)
	base := j * t.nm
	val, slope := t.val[base:base+n-1], t.slope[base:base+n-1]
	prev := -0.5
	for k := range val {
		e := val[k] + fr*slope[k]
		w[k] = e - prev
		prev = e
	}
	w[n-1] = 0.5 - prev
	return i0, n
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
