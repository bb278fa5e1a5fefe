package analysis

import (
	"encoding/csv"
	"fmt"
	"io"
	"strconv"
)

// Table holds the numbers behind one figure: columns of Y values sampled on
// a shared X grid.
type Table struct {
	// Name is a short file-name stem ("aberration").
	Name string
	// Title states the quantity and its physics parameters.
	Title string
	// XName is the CSV header of X; XLabel the axis label with units.
	XName, XLabel string
	// YLabel is the axis label of the columns, with units.
	YLabel string
	// X is the sampling grid.
	X []float64
	// Columns are the sampled curves, each with len(Y) == len(X).
	Columns []Column
}

// Column is one sampled curve of a Table.
type Column struct {
	// Name is the CSV header ("dv_T5772").
	Name string
	// Label is the legend text.
	Label string
	// Y holds the values at Table.X; NaN where undefined.
	Y []float64
	// Limit marks a reference or limiting curve (drawn dashed).
	Limit bool
}

// Column returns the column with the given CSV name, or nil.
func (t *Table) Column(name string) *Column {
	for i := range t.Columns {
		if t.Columns[i].Name == name {
			return &t.Columns[i]
		}
	}
	return nil
}

func (t *Table) check() error {
	if t == nil || len(t.X) == 0 || len(t.Columns) == 0 {
		return fmt.Errorf("%w: empty", ErrTable)
	}
	for _, c := range t.Columns {
		if len(c.Y) != len(t.X) {
			return fmt.Errorf("%w: %s column %q has %d values for %d X", ErrTable, t.Name, c.Name, len(c.Y), len(t.X))
		}
	}
	return nil
}

// WriteCSV writes the table as CSV: a header (XName, then the column names)
// and one row per X, numbers in shortest round-trip form.
func (t *Table) WriteCSV(w io.Writer) error {
	if err := t.check(); err != nil {
		return err
	}
	cw := csv.NewWriter(w)
	rec := make([]string, 0, 1+len(t.Columns))
	rec = append(rec, t.XName)
	for _, c := range t.Columns {
		rec = append(rec, c.Name)
	}
	if err := cw.Write(rec); err != nil {
		return err
	}
	for i, x := range t.X {
		rec = rec[:0]
		rec = append(rec, fmtNum(x))
		for _, c := range t.Columns {
			rec = append(rec, fmtNum(c.Y[i]))
		}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

func fmtNum(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
