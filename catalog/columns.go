package catalog

import (
	"fmt"
	"strconv"
	"strings"
)

// ParseColumnMap reads a column map written as comma-separated key=value
// pairs, e.g. "ra=RAdeg,dec=DEdeg,vmag=V,bv=B-V,ra-hours=false,epoch=2000".
// Keys (any case): id, ra, dec, vmag, bv, teff, parallax, dist, name, pmra,
// pmdec, rv, ra-hours (a boolean) and epoch (a Julian year). An empty
// string gives the zero ColumnMap (default column names).
func ParseColumnMap(spec string) (ColumnMap, error) {
	var cm ColumnMap
	if strings.TrimSpace(spec) == "" {
		return cm, nil
	}
	for _, kv := range strings.Split(spec, ",") {
		k, v, ok := strings.Cut(kv, "=")
		k, v = strings.ToLower(strings.TrimSpace(k)), strings.TrimSpace(v)
		if !ok || k == "" || v == "" {
			return ColumnMap{}, fmt.Errorf("catalog: column map entry %q: want key=value", kv)
		}
		var dst *string
		switch k {
		case "id":
			dst = &cm.ID
		case "ra":
			dst = &cm.RA
		case "dec", "de":
			dst = &cm.Dec
		case "vmag", "v":
			dst = &cm.Vmag
		case "bv", "b-v":
			dst = &cm.BV
		case "teff":
			dst = &cm.Teff
		case "parallax", "plx":
			dst = &cm.Parallax
		case "dist", "distance":
			dst = &cm.Dist
		case "name":
			dst = &cm.Name
		case "pmra":
			dst = &cm.PMRA
		case "pmdec", "pmde":
			dst = &cm.PMDec
		case "rv":
			dst = &cm.RV
		case "ra-hours", "rahours":
			b, err := strconv.ParseBool(v)
			if err != nil {
				return ColumnMap{}, fmt.Errorf("catalog: column map key %q: %q is not a boolean", k, v)
			}
			cm.RAHours = b
			continue
		case "epoch":
			e, err := strconv.ParseFloat(v, 64)
			if err != nil || e < -1e4 || e > 1e4 {
				return ColumnMap{}, fmt.Errorf("catalog: column map key epoch: %q is not a Julian year", v)
			}
			cm.Epoch = e
			continue
		default:
			return ColumnMap{}, fmt.Errorf("catalog: column map: unknown key %q", k)
		}
		if *dst != "" {
			return ColumnMap{}, fmt.Errorf("catalog: column map: key %q given twice", k)
		}
		*dst = v
	}
	return cm, nil
}
