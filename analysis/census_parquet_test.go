package analysis

import (
	"bytes"
	"math"
	"testing"

	"github.com/parquet-go/parquet-go"
)

// The Parquet census reads back through parquet-go into the same values,
// column for column (NaN where NaN).
func TestCensusParquet(t *testing.T) {
	tab, err := Census(randomSky(300, 3), Betas(0, 0.5, 0.9), CensusOptions{LimitMag: 6})
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := tab.WriteParquet(&buf); err != nil {
		t.Fatal(err)
	}
	recs, err := parquet.Read[censusRecord](bytes.NewReader(buf.Bytes()), int64(buf.Len()))
	if err != nil {
		t.Fatal(err)
	}
	if len(recs) != len(tab.Rows) {
		t.Fatalf("%d rows, want %d", len(recs), len(tab.Rows))
	}
	same := func(a, b float64) bool { return a == b || (math.IsNaN(a) && math.IsNaN(b)) }
	for i, r := range tab.Rows {
		g := recs[i]
		if !same(g.Beta, r.Beta) || !same(g.Gamma, r.Gamma) || g.Visible != int64(r.Visible) ||
			g.Forward != int64(r.Forward) || g.Rear != int64(r.Rear) || !same(g.Illuminance, r.Illuminance) ||
			!same(g.VisibleIlluminance, r.VisibleIlluminance) || !same(g.CIEx, r.CIEx) || !same(g.CIEy, r.CIEy) ||
			!same(g.HalfAngle, r.HalfAngle) || !same(g.Brightest, r.Brightest) {
			t.Errorf("row %d: read back %+v, wrote %+v", i, g, r)
		}
	}
	f, err := parquet.OpenFile(bytes.NewReader(buf.Bytes()), int64(buf.Len()))
	if err != nil {
		t.Fatal(err)
	}
	for k, c := range f.Schema().Columns() {
		if c[0] != CensusColumns[k] {
			t.Errorf("column %d is %q, want %q", k, c[0], CensusColumns[k])
		}
	}
}
