package analysis

import (
	"io"

	"github.com/parquet-go/parquet-go"
)

// censusRecord is one Parquet row of a census: the CensusColumns, in order.
type censusRecord struct {
	Beta               float64 `parquet:"beta"`
	Gamma              float64 `parquet:"gamma"`
	Visible            int64   `parquet:"visible"`
	Forward            int64   `parquet:"forward"`
	Rear               int64   `parquet:"rear"`
	Illuminance        float64 `parquet:"illuminance_lux"`
	VisibleIlluminance float64 `parquet:"visible_illuminance_lux"`
	CIEx               float64 `parquet:"cie_x"`
	CIEy               float64 `parquet:"cie_y"`
	HalfAngle          float64 `parquet:"half_angle_deg"`
	Brightest          float64 `parquet:"brightest_vmag"`
}

// WriteParquet writes one row per speed as Apache Parquet with the
// CensusColumns (counts as INT64, the rest as DOUBLE; NaN where WriteCSV
// writes NaN).
func (t *CensusTable) WriteParquet(w io.Writer) error {
	pw := parquet.NewGenericWriter[censusRecord](w)
	recs := make([]censusRecord, len(t.Rows))
	for i, r := range t.Rows {
		recs[i] = censusRecord{Beta: r.Beta, Gamma: r.Gamma, Visible: int64(r.Visible), Forward: int64(r.Forward),
			Rear: int64(r.Rear), Illuminance: r.Illuminance, VisibleIlluminance: r.VisibleIlluminance,
			CIEx: r.CIEx, CIEy: r.CIEy, HalfAngle: r.HalfAngle, Brightest: r.Brightest}
	}
	if _, err := pw.Write(recs); err != nil {
		return err
	}
	return pw.Close()
}
