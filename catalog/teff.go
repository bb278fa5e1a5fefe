package catalog

import "math"

// Colour–temperature and magnitude-system relations used by the readers.
//
// Precedence for a star's Teff (applied by every reader):
//  1. a temperature given by the catalogue (Gaia teff_gspphot, a generic
//     CSV "teff" column): FlagTeffFromCatalogue;
//  2. a colour index (B−V, or Gaia BP−RP) through the relations below,
//     with FlagTeffExtrapolated when the colour lies outside the relation's
//     validity range;
//  3. DefaultTeff, with FlagNoColour.

// B−V validity range adopted for TeffFromBV. Ballesteros' formula comes from
// fitting blackbodies to Johnson B and V; it diverges at B−V = −0.674
// (0.92(B−V) + 0.62 = 0). We use it over −0.4 ≤ B−V ≤ 2.0, the span of
// normal stars from early B to mid M [cp], and clamp outside.
const (
	BVMin = -0.4
	BVMax = 2.0
)

// TeffFromBV returns the effective temperature in kelvin for a Johnson B−V
// colour index, by Ballesteros (2012, EPL 97, 34008):
//
//	T = 4600 K · ( 1/(0.92(B−V) + 1.7) + 1/(0.92(B−V) + 0.62) ).
//
// B−V is clamped to [BVMin, BVMax] first; use BVInRange to know whether
// it was. NaN gives NaN.
func TeffFromBV(bv float64) float64 {
	if bv < BVMin {
		bv = BVMin
	} else if bv > BVMax {
		bv = BVMax
	}
	x := 0.92 * bv
	return 4600 * (1/(x+1.7) + 1/(x+0.62))
}

// BVInRange reports whether bv lies inside the validity range of TeffFromBV.
func BVInRange(bv float64) bool { return bv >= BVMin && bv <= BVMax }

// BP−RP validity range of the Mucciarelli & Bellazzini relation used by
// TeffFromBPRP, and the hard limits of our extension beyond it.
const (
	BPRPMin = 0.39
	BPRPMax = 1.50
	// bprpLo, bprpHi bound the linear-in-θ extension (θ stays positive).
	bprpLo = -0.7
	bprpHi = 5.0
)

// Dwarf coefficients of the Mucciarelli & Bellazzini (2020, RNAAS 4, 52)
// θ = 5040/Teff relation in Gaia (E)DR3 BP−RP at solar metallicity
// ([Fe/H] = 0, so the metallicity terms vanish) [mem].
const (
	mb20b0 = 0.4929
	mb20b1 = 0.5092
	mb20b2 = -0.0353
)

func mb20Theta(c float64) float64 { return mb20b0 + c*(mb20b1+c*mb20b2) }

// TeffFromBPRP returns the effective temperature in kelvin for a Gaia BP−RP
// colour, and whether the colour lies inside the relation's validity range.
//
// Inside 0.39 ≤ BP−RP ≤ 1.50 it uses the dwarf relation of Mucciarelli &
// Bellazzini (2020, RNAAS 4, 52) at solar metallicity,
//
//	θ = 0.4929 + 0.5092 C − 0.0353 C²,  Teff = 5040 K / θ,
//
// with the coefficients quoted from memory [mem]. Outside that range the
// function is our own documented extension, not a published relation: θ is
// continued linearly with the slope it has at the nearest edge (so Teff and
// its derivative are continuous), with C first clamped to [−0.7, 5.0]
// where θ stays positive (≈ 31 000 K to ≈ 1 950 K). The second result is
// then false and readers set FlagTeffExtrapolated. NaN gives (NaN, false).
func TeffFromBPRP(bprp float64) (float64, bool) {
	if math.IsNaN(bprp) {
		return math.NaN(), false
	}
	c := bprp
	if c >= BPRPMin && c <= BPRPMax {
		return 5040 / mb20Theta(c), true
	}
	c = math.Max(bprpLo, math.Min(bprpHi, c))
	edge := BPRPMin
	if c > BPRPMax {
		edge = BPRPMax
	}
	slope := mb20b1 + 2*mb20b2*edge
	theta := mb20Theta(edge) + slope*(c-edge)
	return 5040 / theta, false
}

// Range of the Riello et al. (2021) G−V polynomial in BP−RP.
const (
	gvBPRPMin = -0.5
	gvBPRPMax = 2.75
)

// SolarBPRP is the Gaia BP−RP colour of the Sun, 0.82 (Casagrande &
// VandenBerg 2018, MNRAS 479, L102) [mem]. Readers use it for G → V when a
// Gaia row has no BP−RP, consistent with giving that star DefaultTeff.
const SolarBPRP = 0.82

// VFromGaia converts a Gaia G magnitude and BP−RP colour C to Johnson V with
// the polynomial of Riello et al. (2021, A&A 649, A3, Table C.2) [mem]:
//
//	G − V = −0.02704 + 0.01424 C − 0.2156 C² + 0.01426 C³  (σ = 0.03 mag),
//
// fitted over −0.5 < C < 2.75; C is clamped to that range first so the
// cubic cannot run away for extreme colours.
func VFromGaia(g, bprp float64) float64 {
	c := math.Max(gvBPRPMin, math.Min(gvBPRPMax, bprp))
	gv := -0.02704 + c*(0.01424+c*(-0.2156+c*0.01426))
	return g - gv
}

// hpTable holds V − Hp against Johnson B−V, from Bessell (2000, PASP 112,
// 961, Table 2: B–G main-sequence stars and K–M giants) [pub]. That table is
// given against Tycho BT−VT with the columns Δ(B−V) and V − Hp; we read
// Δ(B−V) as (B−V) − (BT−VT), so each B−V below is BT−VT + Δ(B−V), for
// BT−VT = −0.25 … 1.20 in steps of 0.05.
var hpTable = [...][2]float64{
	{-0.219, 0.066}, {-0.179, 0.051}, {-0.139, 0.036}, {-0.095, 0.021},
	{-0.048, 0.006}, {-0.005, -0.011}, {0.040, -0.025}, {0.083, -0.038},
	{0.130, -0.048}, {0.179, -0.058}, {0.227, -0.069}, {0.275, -0.079},
	{0.325, -0.087}, {0.374, -0.094}, {0.420, -0.101}, {0.465, -0.108},
	{0.505, -0.114}, {0.549, -0.120}, {0.590, -0.127}, {0.632, -0.131},
	{0.674, -0.134}, {0.715, -0.137}, {0.756, -0.142}, {0.796, -0.147},
	{0.837, -0.151}, {0.878, -0.155}, {0.919, -0.158}, {0.958, -0.157},
	{0.996, -0.160}, {1.034, -0.162},
}

// SolarBV is the Johnson B−V of the Sun, 0.65 [mem]; VFromHp uses it when
// a star has no B−V, consistent with giving that star DefaultTeff.
const SolarBV = 0.65

// VFromHp converts a Hipparcos Hp magnitude to Johnson V using the star's
// B−V, by linear interpolation in the Bessell (2000) V − Hp table (see
// hpTable). Outside the table (B−V < −0.22 or > 1.03) the end value is
// held. The part of the table used stops at early K; for M stars, whose
// V − Hp departs from it by several tenths of a magnitude, the result is
// only a rough estimate. A NaN B−V uses SolarBV.
func VFromHp(hp, bv float64) float64 {
	if math.IsNaN(bv) {
		bv = SolarBV
	}
	t := hpTable[:]
	if bv <= t[0][0] {
		return hp + t[0][1]
	}
	if bv >= t[len(t)-1][0] {
		return hp + t[len(t)-1][1]
	}
	for i := 1; i < len(t); i++ {
		if bv <= t[i][0] {
			a, b := t[i-1], t[i]
			f := (bv - a[0]) / (b[0] - a[0])
			return hp + a[1] + f*(b[1]-a[1])
		}
	}
	return hp + t[len(t)-1][1]
}

// starColour applies the Teff precedence rule shared by the readers.
// teff is a catalogue temperature (NaN if none); bv a B−V (NaN if none);
// bprp a Gaia BP−RP (NaN if none).
func starColour(teff, bv, bprp float64) (float64, Flag) {
	switch {
	case !math.IsNaN(teff):
		return teff, FlagTeffFromCatalogue
	case !math.IsNaN(bv):
		if BVInRange(bv) {
			return TeffFromBV(bv), 0
		}
		return TeffFromBV(bv), FlagTeffExtrapolated
	case !math.IsNaN(bprp):
		t, ok := TeffFromBPRP(bprp)
		if ok {
			return t, 0
		}
		return t, FlagTeffExtrapolated
	}
	return DefaultTeff, FlagNoColour
}
