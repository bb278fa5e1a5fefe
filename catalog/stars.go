package catalog

import (
	"fmt"
	"math"
	"path/filepath"
	"strings"
	"unicode"
	"unicode/utf8"
)

// Flag records facts about a star that a renderer or a report should know:
// values the reader had to assume rather than read.
type Flag uint8

const (
	// FlagNoDistance: the catalogue gives no usable distance; the star is
	// treated as infinitely far (Dist is +Inf, no parallax, no 1/r² change).
	FlagNoDistance Flag = 1 << iota
	// FlagNoColour: the catalogue gives no colour and no temperature; Teff is
	// the documented default (DefaultTeff).
	FlagNoColour
	// FlagTeffFromCatalogue: Teff was read from the catalogue (for example
	// Gaia teff_gspphot) rather than derived from a colour index.
	FlagTeffFromCatalogue
	// FlagTeffExtrapolated: the colour index lies outside the validity range
	// of the colour–temperature relation used; Teff was clamped to its edge
	// (B−V) or extrapolated by a documented rule (BP−RP), see teff.go.
	FlagTeffExtrapolated
)

// DefaultTeff is the temperature, in kelvin, given to a star with no colour
// and no temperature in its catalogue: 5772 K, the IAU 2015 B3 nominal solar
// effective temperature, so such stars render as white-yellow.
const DefaultTeff = 5772

// Stars is a star catalogue held as struct-of-arrays, the form the per-star
// transform consumes. All columns that are not optional have length Len().
//
// Units and frames: directions are unit vectors on ICRS axes at Epoch;
// distances in parsecs from the Sun (+Inf when unknown); magnitudes are
// Johnson V; temperatures in kelvin; proper motions in milliarcseconds per
// Julian year, PMRA including the cos δ factor; radial velocity in km/s.
type Stars struct {
	ID      []int64   // catalogue identifier (HR, HIP, Gaia source_id, row number)
	X, Y, Z []float32 // ICRS unit direction from the Sun
	Dist    []float32 // parsecs from the Sun; +Inf when unknown
	Vmag    []float32 // Johnson V magnitude
	Teff    []float32 // effective temperature used for the blackbody, K
	BV      []float32 // B−V colour index; NaN where the catalogue has none
	Flags   []Flag

	// Optional columns: nil when the catalogue has none of them.
	PMRA, PMDec []float32 // mas/yr; PMRA is μα·cos δ
	RV          []float32 // km/s; NaN where unknown

	// Names holds the designation of stars that have one, by row index.
	Names map[int]string

	// Epoch is the Julian epoch of the positions (2000.0 for J2000).
	Epoch float64
	// Source names where the stars came from (a file name, "built-in sky").
	// Files written for others record SourceName instead.
	Source string
	// Format is the catalogue format the reader detected or was told.
	Format string
}

// Len returns the number of stars.
func (s *Stars) Len() int { return len(s.ID) }

// Star is one row of Stars, for code that is not on a hot path.
type Star struct {
	ID       int64
	Name     string
	RA, Dec  float64 // ICRS degrees
	Dist     float64 // pc, +Inf when unknown
	Vmag     float64
	Teff     float64
	BV       float64 // NaN when unknown
	Flags    Flag
	PMRA     float64 // mas/yr (μα cos δ); 0 when unknown
	PMDec    float64
	RV       float64 // km/s; NaN when unknown
	Dir      [3]float64
	RowIndex int
}

// At returns row i as a Star. It panics if i is out of range, like a slice.
func (s *Stars) At(i int) Star {
	x, y, z := float64(s.X[i]), float64(s.Y[i]), float64(s.Z[i])
	ra := math.Atan2(y, x) * 180 / math.Pi
	if ra < 0 {
		ra += 360
	}
	// atan2 rather than asin(z): the float32 vector need not be exactly unit,
	// and asin amplifies that error near the poles.
	dec := math.Atan2(z, math.Hypot(x, y)) * 180 / math.Pi
	st := Star{
		ID: s.ID[i], RA: ra, Dec: dec, Dist: float64(s.Dist[i]),
		Vmag: float64(s.Vmag[i]), Teff: float64(s.Teff[i]), BV: float64(s.BV[i]),
		Flags: s.Flags[i], RV: math.NaN(), Dir: [3]float64{x, y, z}, RowIndex: i,
	}
	if s.PMRA != nil {
		st.PMRA, st.PMDec = float64(s.PMRA[i]), float64(s.PMDec[i])
	}
	if s.RV != nil {
		st.RV = float64(s.RV[i])
	}
	if s.Names != nil {
		st.Name = s.Names[i]
	}
	return st
}

// Append adds one star. Directions are computed from RA/Dec (degrees).
// Optional columns are created on first use and back-filled.
func (s *Stars) Append(st Star) {
	n := s.Len()
	ra, dec := st.RA*math.Pi/180, st.Dec*math.Pi/180
	cd := math.Cos(dec)
	s.ID = append(s.ID, st.ID)
	s.X = append(s.X, float32(cd*math.Cos(ra)))
	s.Y = append(s.Y, float32(cd*math.Sin(ra)))
	s.Z = append(s.Z, float32(math.Sin(dec)))
	s.Dist = append(s.Dist, float32(st.Dist))
	s.Vmag = append(s.Vmag, float32(st.Vmag))
	s.Teff = append(s.Teff, float32(st.Teff))
	s.BV = append(s.BV, float32(st.BV))
	s.Flags = append(s.Flags, st.Flags)
	if (st.PMRA != 0 || st.PMDec != 0) && s.PMRA == nil {
		s.PMRA, s.PMDec = make([]float32, n, n+1), make([]float32, n, n+1)
	}
	if s.PMRA != nil {
		s.PMRA = append(s.PMRA, float32(st.PMRA))
		s.PMDec = append(s.PMDec, float32(st.PMDec))
	}
	if !math.IsNaN(st.RV) && s.RV == nil {
		s.RV = make([]float32, n, n+1)
		for i := range s.RV {
			s.RV[i] = float32(math.NaN())
		}
	}
	if s.RV != nil {
		s.RV = append(s.RV, float32(st.RV))
	}
	if st.Name != "" {
		if s.Names == nil {
			s.Names = map[int]string{}
		}
		s.Names[n] = CleanName(st.Name)
	}
}

// CleanName makes a star name safe to print: invalid UTF-8 and control
// characters (C0 and C1, DEL: Unicode category Cc), which could drive a
// terminal through escape sequences, become U+FFFD; surrounding blanks are
// trimmed. Every reader applies it to the names it loads.
func CleanName(s string) string {
	clean := true
	for _, r := range s {
		if r == utf8.RuneError || unicode.IsControl(r) {
			clean = false
			break
		}
	}
	if clean {
		return strings.TrimSpace(s)
	}
	s = strings.ToValidUTF8(s, "\uFFFD")
	return strings.TrimSpace(strings.Map(func(r rune) rune {
		if unicode.IsControl(r) {
			return '\uFFFD'
		}
		return r
	}, s))
}

// Validate checks that all columns have consistent lengths and that every
// value is in the range the text readers accept: unit directions (|n|²
// within 1e-4 of 1), V from −30 to 40, Teff from 100 K to 10⁶ K, distance
// > 0 or +Inf, B−V from −5 to 10 or NaN, proper motions within ±10⁵ mas/yr,
// radial velocity within ±10⁵ km/s or NaN. Every reader (text, cache,
// cache chunks, Parquet) calls it before returning, so a binary file cannot
// carry a value a text file could not. The one exception is the Sun's own
// row (SunID, see Sun), whose V seen 1 km from its centre is −67.6: V down
// to −100 is accepted there.
func (s *Stars) Validate() error {
	n := s.Len()
	cols := []struct {
		name string
		l    int
	}{{"X", len(s.X)}, {"Y", len(s.Y)}, {"Z", len(s.Z)}, {"Dist", len(s.Dist)},
		{"Vmag", len(s.Vmag)}, {"Teff", len(s.Teff)}, {"BV", len(s.BV)}, {"Flags", len(s.Flags)}}
	for _, c := range cols {
		if c.l != n {
			return fmt.Errorf("catalog: column %s has %d rows, want %d", c.name, c.l, n)
		}
	}
	if s.PMRA != nil && (len(s.PMRA) != n || len(s.PMDec) != n) {
		return fmt.Errorf("catalog: proper-motion columns have %d/%d rows, want %d", len(s.PMRA), len(s.PMDec), n)
	}
	if s.RV != nil && len(s.RV) != n {
		return fmt.Errorf("catalog: RV column has %d rows, want %d", len(s.RV), n)
	}
	for i := 0; i < n; i++ {
		x, y, z := s.X[i], s.Y[i], s.Z[i]
		if !finite32(x) || !finite32(y) || !finite32(z) {
			return fmt.Errorf("catalog: star %d (id %d) has a non-finite direction", i, s.ID[i])
		}
		if n2 := x*x + y*y + z*z; !(n2 > 1-unitTol && n2 < 1+unitTol) {
			return fmt.Errorf("catalog: star %d (id %d) has direction (%g, %g, %g), not a unit vector", i, s.ID[i], x, y, z)
		}
		if v := s.Vmag[i]; !(v >= vmagLo && v <= vmagHi) && !(s.ID[i] == SunID && v >= sunVmagLo && v <= vmagHi) {
			return fmt.Errorf("catalog: star %d (id %d) has V = %g, want %d to %d", i, s.ID[i], v, vmagLo, vmagHi)
		}
		if t := s.Teff[i]; !(t >= teffLo && t <= teffHi) {
			return fmt.Errorf("catalog: star %d (id %d) has Teff = %g K, want %g to %g", i, s.ID[i], t, float64(teffLo), float64(teffHi))
		}
		if !(s.Dist[i] > 0) {
			return fmt.Errorf("catalog: star %d (id %d) has distance %v; want > 0 or +Inf", i, s.ID[i], s.Dist[i])
		}
		if bv := s.BV[i]; bv == bv && !(bv >= bvLo && bv <= bvHi) {
			return fmt.Errorf("catalog: star %d (id %d) has B−V = %g, want %d to %d or none", i, s.ID[i], bv, bvLo, bvHi)
		}
		if s.PMRA != nil && !(math.Abs(float64(s.PMRA[i])) <= pmLim && math.Abs(float64(s.PMDec[i])) <= pmLim) {
			return fmt.Errorf("catalog: star %d (id %d) has proper motion (%g, %g) mas/yr beyond ±%g", i, s.ID[i], s.PMRA[i], s.PMDec[i], float64(pmLim))
		}
		if s.RV != nil {
			if rv := s.RV[i]; rv == rv && !(math.Abs(float64(rv)) <= rvLim) {
				return fmt.Errorf("catalog: star %d (id %d) has radial velocity %g km/s beyond ±%g", i, s.ID[i], rv, float64(rvLim))
			}
		}
	}
	return nil
}

// unitTol is how far |n|² of a stored direction may be from 1: float32
// rounding of a unit vector's components leaves |n|² within about 2e-7.
const unitTol = 1e-4

// finite32 reports whether v is neither NaN nor ±Inf (exponent bits not
// all set), without converting to float64.
func finite32(v float32) bool {
	return math.Float32bits(v)&0x7f800000 != 0x7f800000
}

// SourceName is Source without its directory: what output files record,
// so that no file carries a path of the machine it was made on.
func (s *Stars) SourceName() string {
	if s == nil || s.Source == "" {
		return ""
	}
	return filepath.Base(s.Source)
}
