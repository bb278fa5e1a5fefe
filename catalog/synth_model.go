package catalog

import (
	"math"
	"math/rand/v2"
)

// Model tables of the synthetic sky. Where a value is quoted from a
// publication the comment names it; [mem] marks values quoted from memory and
// rounded; [cal] marks values tuned so that the synthetic sky matches the
// Bright Star Catalogue statistics checked in synth_test.go.

// Galactic structure.
const (
	synthR0       = 8200.0                    // Sun's galactocentric radius, pc (Bland-Hawthorn & Gerhard 2016, ARA&A 54, 529: 8.2 ± 0.1 kpc) [mem]
	synthZSun     = 20.0                      // Sun's height above the plane, pc (ibid.: 25 ± 5 pc; Jurić et al. 2008: 25 pc) [mem, rounded]
	synthThinL    = synthLBase / synthThinLN  // thin-disk scale length, pc (Jurić et al. 2008, ApJ 673, 864: 2.6 kpc) [mem]
	synthThickL   = synthLBase / synthThickLN // thick-disk scale length, pc (ibid.: 3.6 kpc) [mem]
	synthThickH   = synthHBase / synthThickN  // thick-disk scale height, pc (ibid.: 900 pc) [mem]
	synthThickF   = 0.10                      // thick-disk share of old stars at the Sun (ibid.: 0.12 of the thin disk) [mem, rounded]
	synthHaloF    = 0.005                     // halo share of old stars at the Sun (ibid.: 0.005) [mem]
	synthHaloN    = 3.0                       // halo power-law index, ρ ∝ r^−n (ibid.: 2.77; 3 is the classical value) [mem, rounded]; lineOfSight hard-codes n = 3
	synthHaloQ    = 0.64                      // halo axis ratio c/a (ibid.: 0.64) [mem]
	synthHaloCore = 500.0                     // halo core radius, pc, keeps ρ finite at the centre [cal]

	// Dust: a thin exponential disk with extinction a0 per kpc in the plane
	// at the Sun. About 1 mag/kpc in V near the plane is the usual textbook
	// figure (e.g. Binney & Merrifield 1998, §3.7) [mem]; the scale height of
	// the dust is ~100–130 pc (Marshall et al. 2006, A&A 453, 635: 125 pc)
	// [mem]; its scale length about 0.28 R⊙ (Drimmel & Spergel 2001, ApJ
	// 556, 181) [mem], 2.3 kpc at R0. Without the radial fall-off (a layer
	// of the same density everywhere) the inner Galaxy is seen through too
	// little dust and the model's brightest Milky Way, stars fainter than
	// V = 6 near l = 0°, b = 3°, was 756 S10, against at most 400 published
	// (Cinzano 1998, TestUnresolvedPublished); with it, 350.
	synthDustA0 = 1.1                     // mag per kpc at the plane at the Sun [cal, close to the textbook 1 mag/kpc]
	synthDustH  = synthHBase / synthDustN // 112.5 pc [mem, rounded]; scale length synthLBase/synthDustLN
	// Ratio of total to selective extinction R_V = A_V/E(B−V) = 3.1
	// (Cardelli, Clayton & Mathis 1989, ApJ 345, 245) [pub].
	synthRV = 3.1

	// Main-sequence turn-off of the old populations (thick disk, halo):
	// main-sequence stars brighter than this are all young thin-disk stars.
	synthOldTurnoff = 3.5 // M_V [mem, ~F5–G0 dwarfs of ≳5 Gyr]
)

// synthLogPhi is the local luminosity function log10 φ(M_V), stars pc⁻³ per
// magnitude, for M_V = −8 … +16 in steps of 1, all stars of all luminosity
// classes. From −6 to +16 these are the V-column values of the classical
// luminosity-function table of Allen, Astrophysical Quantities, 3rd ed.
// (1973) [pub; section §117 from memory]; −7 and −8 are extrapolated with the
// slope of the −6…−4 values [cal].
var synthLogPhi = [...]float64{
	-9.3, -8.6, // −8, −7 (extrapolated)
	-7.9, -7.2, -6.54, -5.90, -5.28, -4.60, -3.95, // −6 … 0
	-3.46, -3.20, -2.94, -2.72, -2.47, -2.37, -2.45, -2.38, // 1 … 8
	-2.27, -2.11, -2.01, -1.97, -1.93, -1.89, -1.90, -1.92, // 9 … 16
}

const synthPhiMMin = -8.0 // M_V of synthLogPhi[0]

// synthLogPhiCal is added to synthLogPhi, at the same M_V nodes [cal]: the
// calibration against the Bright Star Catalogue counts by magnitude and
// colour (synth_test.go). It lowers late-B to A stars (M_V −0.5 … +2) by up
// to 0.3 dex and raises the luminous end (M_V −7 … −2) by up to 0.5 dex; the
// latter also stands in for the Gould Belt, the excess of young luminous
// stars within ~500 pc of the Sun that the smooth disk leaves out.
var synthLogPhiCal = [...]float64{
	0, 0.1, // −8, −7
	0.25, 0.45, 0.48, 0.45, 0.30, -0.03, -0.30, // −6 … 0
	-0.30, -0.22, -0.03, -0.03, 0, 0, 0, 0, // 1 … 8
	0, 0, 0, 0, 0, 0, 0, 0, // 9 … 16
}

// synthPhi returns φ(M), stars pc⁻³ mag⁻¹, interpolating log φ linearly.
func synthPhi(m float64) float64 {
	return math.Pow(10, interpUniform(synthLogPhi[:], synthPhiMMin, 1, m)+
		interpUniform(synthLogPhiCal[:], synthPhiMMin, 1, m))
}

// synthGiantFrac is the share of evolved stars (giants, bright giants and
// supergiants) in φ(M_V), tabulated at M_V = −8 … +5 in steps of 1. Giants
// dominate the luminosity function around the red clump (M_V ≈ +0.5…+1) and
// vanish by M_V ≈ +4; the values are [cal], guided by the giant/dwarf split
// of the Hipparcos H–R diagram (Perryman et al. 1995, A&A 304, 69) [mem].
var synthGiantFrac = [...]float64{
	0.75, 0.75, 0.70, 0.60, 0.50, 0.50, 0.55, 0.60, // −8 … −1
	0.40, 0.30, 0.20, 0.06, 0.01, 0, // 0 … 5
}

// Main-sequence colour and absolute magnitude, Schmidt-Kaler (1982) in
// Landolt-Börnstein VI/2b as reproduced in Allen's Astrophysical Quantities
// (4th ed., 2000, Table 15.7) [mem, rounded], O5 … M8.
var synthMSM = [...]float64{-5.7, -4.0, -2.5, -1.2, -0.25, 0.65, 1.3, 1.95, 2.7, 3.5, 4.4, 5.1, 5.9, 6.4, 7.35, 8.8, 9.9, 12.3, 15.5}
var synthMSBV = [...]float64{-0.32, -0.30, -0.24, -0.17, -0.11, -0.02, 0.05, 0.15, 0.30, 0.44, 0.58, 0.68, 0.81, 0.91, 1.15, 1.40, 1.49, 1.64, 1.90}

// Red giant branch of solar metallicity: (B−V)₀ against M_V from the base of
// the branch through the red clump (M_V ≈ +0.7, B−V ≈ 1.0; Alves 2000, ApJ
// 539, 732 gives M_K; the V value is [mem]) to M giants [mem, rounded].
var synthRGBM = [...]float64{-3.0, -2.0, -1.0, -0.5, 0.0, 0.7, 1.5, 3.0}
var synthRGBBV = [...]float64{1.62, 1.58, 1.50, 1.35, 1.15, 1.00, 0.95, 0.85}

// Thin-disk scale heights, pc, by kind of star (Mihalas & Binney 1981,
// Galactic Astronomy, Table 4-16, rounded: O 50, B 60, A 120, F 190, dwarfs
// and giants of types G–M ~300–350) [mem]; 300 pc for the old thin disk is
// Jurić et al. (2008) [mem]. Every vertical scale of the model, these, the
// thick disk's and the dust's, is synthHBase/n for an integer n, so that one
// exponential per point gives them all by integer powers; synthThinN holds
// the n of synthThinH (F stars 190 → 180 pc, dust 110 → 112.5 pc).
var synthThinH = [...]float64{50, 60, 90, 120, 180, 300}
var synthThinN = [...]int{36, 30, 20, 15, 10, 6}

// The radial scale lengths are likewise synthLBase/n: thin 46800/18 =
// 2600 pc, thick 46800/13 = 3600 pc, dust 46800/20 = 2340 pc.
const (
	synthLBase   = 46800.0
	synthThinLN  = 18
	synthThickLN = 13
	synthDustLN  = 20 // dust: 2340 pc [mem: 0.28 R⊙ at R0 = 8.2 kpc]
)

const (
	synthHBase  = 1800.0
	synthThickN = 2  // synthThickH = 1800/2
	synthDustN  = 16 // synthDustH = 1800/16
)

// synthMSHeight returns the index into synthThinH of a main-sequence star of
// absolute magnitude m.
func synthMSHeight(m float64) int {
	switch {
	case m < -3:
		return 0 // O–B0
	case m < -1:
		return 1 // B
	case m < 1:
		return 2 // late B, A0
	case m < 2.5:
		return 3 // A
	case m < 4:
		return 4 // F
	}
	return 5 // G, K, M dwarfs
}

// Geometries of the density model: the thin disk with each of synthThinH,
// then the thick disk, then the halo.
const (
	geomThin0 = 0
	geomThick = len(synthThinH)
	geomHalo  = geomThick + 1
	geomCount = geomHalo + 1
	geomOld   = geomThin0 + len(synthThinH) - 1 // old thin disk, 300 pc
	geomLum   = geomThin0 + 1                   // luminous evolved stars, 60 pc
)

// colourLaw selects how a synthetic star's (B−V)₀ follows from its M_V.
type colourLaw uint8

const (
	lawMS         colourLaw = iota // thin-disk main sequence
	lawGiant                       // thin-disk red giants and clump
	lawLuminous                    // bright giants and supergiants (M_V < −2.5)
	lawThickMS                     // thick-disk dwarfs, slightly metal-poor
	lawThickGiant                  // thick-disk giants
	lawHaloMS                      // halo dwarfs, metal-poor
	lawHaloGiant                   // halo giants and horizontal branch
)

// Colour scatter about the relations, mag [cal].
const (
	synthSigmaMS    = 0.06
	synthSigmaGiant = 0.10
	// Share of upper main-sequence stars (−1 < M_V < turn-off) drawn from an
	// exponential red tail of mean synthEvolvedTail above the relation.
	synthEvolvedShare = 0.5
	synthEvolvedTail  = 0.08
	// Share of thin-disk giants in the yellow part (B−V 0.4 … 0.9).
	synthYellowShare = 0.2
)

// synthColour draws an intrinsic colour (B−V)₀ for a star of law and M_V m.
func synthColour(law colourLaw, m float64, rng *rand.Rand) float64 {
	switch law {
	case lawMS:
		bv := interpTable(synthMSM[:], synthMSBV[:], m) + synthSigmaMS*rng.NormFloat64()
		if m > -1 && m < synthOldTurnoff && rng.Float64() < synthEvolvedShare {
			// Stars evolving off the upper main sequence are redder at
			// the same M_V than the zero-age relation.
			bv += synthEvolvedTail * rng.ExpFloat64()
		}
		return bv
	case lawThickMS:
		return interpTable(synthMSM[:], synthMSBV[:], m) - 0.04 + synthSigmaMS*rng.NormFloat64()
	case lawHaloMS:
		return interpTable(synthMSM[:], synthMSBV[:], m) - 0.10 + synthSigmaMS*rng.NormFloat64()
	case lawGiant:
		if rng.Float64() < synthYellowShare {
			// Yellow giants crossing the Hertzsprung gap and G giants.
			return 0.4 + 0.5*rng.Float64()
		}
		return interpTable(synthRGBM[:], synthRGBBV[:], m) + synthSigmaGiant*rng.NormFloat64()
	case lawThickGiant:
		return interpTable(synthRGBM[:], synthRGBBV[:], m) - 0.08 + synthSigmaGiant*rng.NormFloat64()
	case lawHaloGiant:
		// Metal-poor giants are bluer; a third sit on the horizontal branch.
		if rng.Float64() < 1.0/3 {
			return 0.1 + 0.5*rng.Float64()
		}
		return interpTable(synthRGBM[:], synthRGBBV[:], m) - 0.25 + synthSigmaGiant*rng.NormFloat64()
	}
	// Luminous stars: blue supergiants and bright giants (B–A), yellow ones
	// crossing the gap, and red supergiants (K–M). Shares [cal], guided by
	// the supergiant counts of the Bright Star Catalogue's spectral types
	// (most naked-eye supergiants are B–A) [mem].
	u := rng.Float64()
	switch {
	case u < 0.55:
		return -0.15 + 0.3*rng.Float64()
	case u < 0.75:
		return 0.2 + 0.8*rng.Float64()
	}
	return 1.55 + 0.12*rng.NormFloat64()
}

// interpUniform interpolates a table sampled at x0, x0+dx, … linearly and
// holds the end values outside it.
func interpUniform(t []float64, x0, dx, x float64) float64 {
	f := (x - x0) / dx
	if f <= 0 {
		return t[0]
	}
	i := int(f)
	if i >= len(t)-1 {
		return t[len(t)-1]
	}
	f -= float64(i)
	return t[i] + f*(t[i+1]-t[i])
}

// interpTable interpolates y(x) linearly for increasing xs and holds the end
// values outside it.
func interpTable(xs, ys []float64, x float64) float64 {
	if x <= xs[0] {
		return ys[0]
	}
	for i := 1; i < len(xs); i++ {
		if x <= xs[i] {
			f := (x - xs[i-1]) / (xs[i] - xs[i-1])
			return ys[i-1] + f*(ys[i]-ys[i-1])
		}
	}
	return ys[len(ys)-1]
}
