package catalog

import "math"

// The Sun as a catalogue star. Its effective temperature is the IAU 2015
// Resolution B3 nominal value, 5772 K [pub]; its absolute magnitude
// M_V = 4.83 is the common value (Willmer 2018, ApJS 236, 47, Table 3:
// M_V = 4.81 in the Vega system; 4.83 in most textbooks) [cp/mem], which
// gives V = −26.74 at 1 au [cp].
const (
	SunTeff = 5772.0
	SunAbsV = 4.83
	// SunID is the Sun's identifier (DisplayID writes "Sun"); it lies
	// above every built-in range, so it clashes with no real catalogue.
	SunID int64 = 9_200_000_000_000_000_000
	// SunName is the Sun's name in Stars.Names.
	SunName = "Sun"
	// AUParsec is one astronomical unit in parsecs: 648000/π au = 1 pc
	// (IAU 2012 B2, IAU 2015 B2) [pub].
	AUParsec = math.Pi / 648000
	// SunMinDistance is how far from the Sun's centre (pc, 1000 au) an
	// observer must be for WithSun to add it; see WithSun.
	SunMinDistance = 1000 * AUParsec
)

// Sun returns the Sun as a star of the catalogue frame. A catalogue star
// is a direction and a distance from the Sun, so the Sun is given at 1 au
// from the origin (the distance camera.Observer expects of it) with its V
// there, M_V + 5 log₁₀(1 au / 10 pc) = −26.74; seen from an observer at
// distance r ≫ 1 au from the origin it has V = 4.83 + 5 log₁₀(r / 10 pc)
// (−0.17 from 1 pc) in the direction of the origin to within 1 au / r
// radians. Its direction from the origin is the north ecliptic pole's
// (any fixed direction would do).
func Sun() Star {
	ra, dec := 270.0, 66.56070833 // north ecliptic pole, J2000 (obliquity 23.4392794°) [cp]
	r, d := ra*math.Pi/180, dec*math.Pi/180
	return Star{
		ID: SunID, Name: SunName, RA: ra, Dec: dec, Dist: AUParsec,
		Vmag: SunAbsV + 5*math.Log10(AUParsec/10), Teff: SunTeff, BV: 0.65,
		Flags: FlagTeffFromCatalogue, RV: math.NaN(),
		Dir: [3]float64{math.Cos(d) * math.Cos(r), math.Cos(d) * math.Sin(r), math.Sin(d)},
	}
}

// HasSun reports whether s already lists the Sun: a star named "Sun" or
// "Sol", or with SunID.
func HasSun(s *Stars) bool {
	for _, nm := range s.Names {
		if nm == SunName || nm == "Sol" {
			return true
		}
	}
	for _, id := range s.ID {
		if id == SunID {
			return true
		}
	}
	return false
}

// WithSun returns s with the Sun appended as its last row, unless s already
// has it (HasSun) or the observer at pos (pc) is within SunMinDistance of
// the origin (inside the solar system the Sun is no point of the sky: an
// observer there sees the night sky without it). s itself is never
// modified: the result is a copy when the Sun is added.
func WithSun(s *Stars, pos [3]float64) *Stars {
	if math.Sqrt(pos[0]*pos[0]+pos[1]*pos[1]+pos[2]*pos[2]) < SunMinDistance || HasSun(s) {
		return s
	}
	out := s.Slice(0, s.Len()) // full-capacity slices: Append copies, s is untouched
	out.Append(Sun())
	return out
}
