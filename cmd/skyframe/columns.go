package main

import (
	"strings"

	"github.com/skyframe/skyframe/catalog"
)

// columnFields are the FIELD names accepted by --column FIELD=NAME.
var columnFields = []string{"id", "ra", "dec", "vmag", "bv", "teff", "parallax", "dist", "name", "pmra", "pmdec", "rv"}

// parseColumnMap reads --column FIELD=NAME pairs (and the bare word
// "ra-hours") into a catalog.ColumnMap.
func parseColumnMap(pairs []string) (catalog.ColumnMap, error) {
	var cm catalog.ColumnMap
	for _, p := range pairs {
		if p == "ra-hours" {
			cm.RAHours = true
			continue
		}
		k, v, ok := strings.Cut(p, "=")
		k = strings.ToLower(strings.TrimSpace(k))
		v = strings.TrimSpace(v)
		if !ok || v == "" {
			return cm, usagef("--column %q: want FIELD=NAME (fields: %s)", p, strings.Join(columnFields, ", "))
		}
		dst := map[string]*string{"id": &cm.ID, "ra": &cm.RA, "dec": &cm.Dec, "vmag": &cm.Vmag, "bv": &cm.BV,
			"teff": &cm.Teff, "parallax": &cm.Parallax, "dist": &cm.Dist, "name": &cm.Name,
			"pmra": &cm.PMRA, "pmdec": &cm.PMDec, "rv": &cm.RV}[k]
		if dst == nil {
			return cm, usagef("--column %q: unknown field %q (fields: %s)", p, k, strings.Join(columnFields, ", "))
		}
		*dst = v
	}
	return cm, nil
}
