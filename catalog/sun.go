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
	// SunRadius is the nominal solar radius, 695 700 km (IAU 2015
	// Resolution B3) [pub], in parsecs: an observer closer than this to
	// the origin is inside the Sun.
	SunRadius = 695_700e3 / 149_597_870_700 * AUParsec
	// SunOffset is how far from the origin the Sun's row puts its centre:
	// 1 km in parsecs (1 pc = 3.0857·10¹³ km), 1.4·10⁻⁶ of its radius. See
	// Sun.
	SunOffset = 1 / 3.0856775814913673e13
	// sunVmagLo is the brightest V Stars.Validate accepts for the Sun's
	// row.
	sunVmagLo = -100
)

// Sun returns the Sun as a star of the catalogue frame, at the origin. A
// catalogue row is a direction and a distance from the origin, with the V
// seen from there, and an observer sees it with the dilution (d/r)²
// (camera.Observer); a star exactly at the origin would have no direction
// and an infinite V there, so the Sun's centre is put SunOffset (1 km) from
// the origin toward the north ecliptic pole, with its V at that distance,
// M_V + 5 log₁₀(SunOffset / 10 pc) ≈ −67.6. Seen from any observer outside
// the Sun that is the Sun at the origin to within 1 km: V = −26.74 from 1 au
// and −0.17 from 1 pc (M_V + 5 log₁₀(r / 10 pc)), in the direction of the
// origin to 1 km / r radians. The V column of the Sun's row therefore holds
// its magnitude seen from 1 km, beyond the range the readers accept for
// other rows (Stars.Validate makes an exception for SunID).
func Sun() Star {
	ra, dec := 270.0, 66.56070833 // north ecliptic pole, J2000 (obliquity 23.4392794°) [cp]
	r, d := ra*math.Pi/180, dec*math.Pi/180
	dist := float64(float32(SunOffset)) // the distance the float32 column holds
	// V rounded to the float32 the column holds, toward the bright side
	// (3.8·10⁻⁶ mag at most), so that the stored row never dims the Sun.
	v := SunAbsV + 5*math.Log10(dist/10)
	v32 := float32(v)
	if float64(v32) > v {
		v32 = math.Nextafter32(v32, float32(math.Inf(-1)))
	}
	return Star{
		ID: SunID, Name: SunName, RA: ra, Dec: dec, Dist: dist,
		Vmag: float64(v32), Teff: SunTeff, BV: 0.65,
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

// SunShown reports whether an observer at pos (pc, the Sun at the origin)
// sees the Sun as a star of the sky: everywhere except at the origin
// itself. At the origin the catalogue's own sky is shown — the sky of the
// solar system's night side, whose directions the catalogue lists as seen
// from there — without the Sun, which is where the observer stands. An
// observer elsewhere inside the Sun (closer than SunRadius) is an input
// error: the renderer refuses it naming the Sun (render.InsideStarError).
func SunShown(pos [3]float64) bool {
	return pos != [3]float64{}
}

// WithSun returns s with the Sun appended as its last row, unless s already
// has it (HasSun) or the observer at pos (pc) is at the origin (SunShown).
// s itself is never modified: the result is a copy when the Sun is added.
func WithSun(s *Stars, pos [3]float64) *Stars {
	if !SunShown(pos) || HasSun(s) {
		return s
	}
	out := s.Slice(0, s.Len()) // full-capacity slices: Append copies, s is untouched
	out.Append(Sun())
	return out
}
