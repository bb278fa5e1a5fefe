package catalog

import "math"

// The invented solar neighbourhood of the built-in sky: seven stars within
// 5 pc with made-up names, so that flight plans have destinations in the
// synthetic sky. Their spectral types are typical of the real neighbourhood
// (mostly M dwarfs, one K and one G dwarf, one white dwarf); absolute
// magnitude, B−V and Teff of each type are the dwarf sequence of Pecaut &
// Mamajek (2013, ApJS 208, 9, online table) [mem, rounded], and the white
// dwarf's are typical of a cool DA [mem]. V is derived from M_V and the
// distance, V = M_V + 5 log10(d / 10 pc). The names and positions are
// invented; no real star is meant.

type nearbyDef struct {
	name    string
	spType  string
	ra, dec float64 // ICRS degrees
	dist    float64 // pc
	absV    float64 // M_V
	bv      float64 // B−V
	teff    float64 // K
}

var nearbyStars = [...]nearbyDef{
	{"Ambrel", "M1.5 V", 47.30, 22.85, 2.74, 9.9, 1.48, 3610},
	{"Ketterin", "M4.5 V", 128.62, -41.17, 1.93, 13.2, 1.76, 3120},
	{"Marrowby", "K1 V", 203.95, 12.40, 3.31, 6.1, 0.86, 5170},
	{"Sollow", "G2 V", 296.48, -18.63, 4.22, 4.8, 0.65, 5770},
	{"Thistlemere", "M3 V", 331.07, 58.21, 4.06, 11.1, 1.52, 3410},
	{"Oskelund", "M5.5 V", 82.16, -66.94, 3.68, 14.5, 1.90, 3030},
	{"Pennick Ember", "DA7", 164.53, 3.77, 4.71, 13.0, 0.20, 7500},
}

func (d *nearbyDef) star(k int) Star {
	ra, dec := d.ra*math.Pi/180, d.dec*math.Pi/180
	return Star{
		ID:       NearbyIDBase + int64(k) + 1,
		Name:     d.name,
		RA:       d.ra,
		Dec:      d.dec,
		Dist:     d.dist,
		Vmag:     d.absV + 5*math.Log10(d.dist/10),
		Teff:     d.teff,
		BV:       d.bv,
		Flags:    FlagTeffFromCatalogue,
		RV:       math.NaN(),
		Dir:      [3]float64{math.Cos(dec) * math.Cos(ra), math.Cos(dec) * math.Sin(ra), math.Sin(dec)},
		RowIndex: k,
	}
}

// NearbyStars returns the invented stars within 5 pc of the built-in sky, a
// fresh copy on each call. They are the first rows of BuiltIn() (RowIndex is
// their row there) and of every Synthetic sky without NoNearby; their
// identifiers are NearbyIDBase+1, NearbyIDBase+2, …, and Name holds their
// invented name, which flight plans can use as a destination. Teff is the
// tabulated temperature of the spectral type (FlagTeffFromCatalogue).
func NearbyStars() []Star {
	out := make([]Star, len(nearbyStars))
	for k := range nearbyStars {
		out[k] = nearbyStars[k].star(k)
	}
	return out
}

// NearbySpectralType returns the spectral type given to the invented nearby
// star called name, and false for any other name.
func NearbySpectralType(name string) (string, bool) {
	for k := range nearbyStars {
		if nearbyStars[k].name == name {
			return nearbyStars[k].spType, true
		}
	}
	return "", false
}
