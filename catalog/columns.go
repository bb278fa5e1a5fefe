package catalog

import (
	"errors"
	"fmt"
	"strconv"
	"strings"
)

// ColumnFields are the fields a ColumnMap names, as the command line
// (--column FIELD=NAME) and a flight plan's [catalogue.columns] spell
// them. Set also takes the aliases de (dec), v (vmag), b-v (bv), plx
// (parallax), distance (dist) and pmde (pmdec), and the settings ra-hours
// (a boolean) and epoch (a Julian year).
var ColumnFields = []string{"id", "ra", "dec", "vmag", "bv", "teff", "parallax", "dist", "name", "pmra", "pmdec", "rv"}

// Errors of ColumnMap.Set: an unknown field, and a column of Gaia tables
// (g, bp_rp) that only the Gaia reader uses (it finds those columns by
// their archive names; a generic table has no use for them).
var (
	ErrColumnField = errors.New("unknown column field")
	ErrGaiaColumn  = errors.New("only the Gaia reader uses this column, and it finds it itself")
)

// gaiaColumns are the fields of ErrGaiaColumn.
var gaiaColumns = []string{"g", "bp_rp", "phot_g_mean_mag"}

// Set sets field (any case, surrounding space ignored) of m to the file's
// column name value. It refuses an empty value, a field given before, an
// unknown field (an error wrapping ErrColumnField that lists ColumnFields)
// and a Gaia column (ErrGaiaColumn). Messages do not name where the entry
// came from; callers prefix the flag or plan key.
func (m *ColumnMap) Set(field, value string) error {
	k, v := strings.ToLower(strings.TrimSpace(field)), strings.TrimSpace(value)
	var dst *string
	switch k {
	case "id":
		dst = &m.ID
	case "ra":
		dst = &m.RA
	case "dec", "de":
		dst = &m.Dec
	case "vmag", "v":
		dst = &m.Vmag
	case "bv", "b-v":
		dst = &m.BV
	case "teff":
		dst = &m.Teff
	case "parallax", "plx":
		dst = &m.Parallax
	case "dist", "distance":
		dst = &m.Dist
	case "name":
		dst = &m.Name
	case "pmra":
		dst = &m.PMRA
	case "pmdec", "pmde":
		dst = &m.PMDec
	case "rv":
		dst = &m.RV
	case "ra-hours", "rahours", "ra_hours":
		b, err := strconv.ParseBool(v)
		if err != nil {
			return fmt.Errorf("%q is not a boolean", v)
		}
		m.RAHours = b
		return nil
	case "epoch":
		e, err := strconv.ParseFloat(v, 64)
		if err != nil || e < -1e4 || e > 1e4 {
			return fmt.Errorf("%q is not a Julian year", v)
		}
		m.Epoch = e
		return nil
	default:
		for _, g := range gaiaColumns {
			if k == g {
				return ErrGaiaColumn
			}
		}
		return fmt.Errorf("%w %q (fields: %s)", ErrColumnField, k, strings.Join(ColumnFields, ", "))
	}
	if v == "" {
		return errors.New("empty column name")
	}
	if *dst != "" {
		return fmt.Errorf("field %q given twice", k)
	}
	*dst = v
	return nil
}

// ParseColumns reads column-map entries FIELD=NAME (see ColumnMap.Set);
// the bare word ra-hours means ra-hours=true. No entries give the zero
// ColumnMap (default column names). Errors name the entry.
func ParseColumns(entries []string) (ColumnMap, error) {
	var cm ColumnMap
	for _, e := range entries {
		if w := strings.ToLower(strings.TrimSpace(e)); w == "ra-hours" || w == "rahours" {
			cm.RAHours = true
			continue
		}
		k, v, ok := strings.Cut(e, "=")
		if !ok || strings.TrimSpace(k) == "" {
			return ColumnMap{}, fmt.Errorf("catalog: column map entry %q: want FIELD=NAME (fields: %s)", e, strings.Join(ColumnFields, ", "))
		}
		if err := cm.Set(k, v); err != nil {
			return ColumnMap{}, fmt.Errorf("catalog: column map entry %q: %w", e, err)
		}
	}
	return cm, nil
}

// ParseColumnMap reads a column map written as comma-separated entries,
// e.g. "ra=RAdeg,dec=DEdeg,vmag=V,bv=B-V,ra-hours=false,epoch=2000" (see
// ParseColumns). An empty string gives the zero ColumnMap.
func ParseColumnMap(spec string) (ColumnMap, error) {
	if strings.TrimSpace(spec) == "" {
		return ColumnMap{}, nil
	}
	return ParseColumns(strings.Split(spec, ","))
}
