package catalog

import (
	"fmt"
	"strings"
)

// Format names a catalogue file format.
type Format int

const (
	// FormatAuto (the zero value) asks the reader to detect the format from
	// the content, with the file extension only as a tie-breaking hint.
	FormatAuto Format = iota
	// FormatBSC5: Yale Bright Star Catalogue, 5th Revised Ed. (Hoffleit &
	// Warren 1991), CDS V/50 file "catalog", fixed-width, J2000 positions.
	FormatBSC5
	// FormatHipparcos: The Hipparcos Catalogue (ESA 1997), CDS I/239 file
	// hip_main.dat, '|'-separated fields H0…H77, positions at J1991.25.
	FormatHipparcos
	// FormatHipparcos2007: Hipparcos, the New Reduction (van Leeuwen 2007),
	// CDS I/311 file hip2.dat, fixed-width, positions at J1991.25.
	FormatHipparcos2007
	// FormatGaiaCSV: a CSV export of the Gaia archive with at least the
	// columns source_id, ra, dec, parallax, phot_g_mean_mag, bp_rp.
	FormatGaiaCSV
	// FormatCSV: any comma- (or semicolon-) separated table with a header,
	// read through a ColumnMap.
	FormatCSV
	// FormatTSV: any tab-separated table with a header, read through a
	// ColumnMap.
	FormatTSV
	// FormatCache: skyframe's binary catalogue cache (see WriteCache).
	FormatCache
)

var formatNames = [...]string{
	FormatAuto:          "auto",
	FormatBSC5:          "bsc5",
	FormatHipparcos:     "hipparcos",
	FormatHipparcos2007: "hipparcos2007",
	FormatGaiaCSV:       "gaia",
	FormatCSV:           "csv",
	FormatTSV:           "tsv",
	FormatCache:         "cache",
}

// String returns the format's short name, as accepted by ParseFormat.
func (f Format) String() string {
	if f >= 0 && int(f) < len(formatNames) {
		return formatNames[f]
	}
	return fmt.Sprintf("Format(%d)", int(f))
}

// ParseFormat converts a short name ("bsc5", "hipparcos", "hipparcos2007",
// "gaia", "csv", "tsv", "cache", "auto" or "") into a Format. A few aliases
// are accepted: "v50", "i239", "hip", "i311", "hip2", "gaia-csv".
func ParseFormat(s string) (Format, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "", "auto":
		return FormatAuto, nil
	case "bsc5", "bsc", "v50", "v/50":
		return FormatBSC5, nil
	case "hipparcos", "hip", "i239", "i/239", "hip_main":
		return FormatHipparcos, nil
	case "hipparcos2007", "hip2", "i311", "i/311":
		return FormatHipparcos2007, nil
	case "gaia", "gaia-csv", "gaiacsv":
		return FormatGaiaCSV, nil
	case "csv":
		return FormatCSV, nil
	case "tsv":
		return FormatTSV, nil
	case "cache", "skyfcat":
		return FormatCache, nil
	}
	return FormatAuto, fmt.Errorf("catalog: unknown format name %q (want bsc5, hipparcos, hipparcos2007, gaia, csv, tsv or cache)", s)
}
