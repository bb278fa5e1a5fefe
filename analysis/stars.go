package analysis

import (
	"cmp"
	"encoding/csv"
	"encoding/json"
	"io"
	"math"
	"slices"
	"strconv"

	"github.com/parquet-go/parquet-go"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/spectrum"
)

// StarColumns are the columns of the star table (`skyframe stars`), in
// order; a table of several speeds puts "beta" in front of them.
var StarColumns = []string{"id", "name", "ra_deg", "dec_deg", "dist_pc", "temp_k", "vmag",
	"theta_deg", "theta_obs_deg", "ra_obs_deg", "dec_obs_deg", "doppler", "temp_obs_k", "vmag_obs",
	"bv_obs", "flux_ratio", "cie_x", "cie_y"}

// StarRow is one row of the star table (`skyframe stars`): catalogue
// values, then the star as seen from the ship.
type StarRow struct {
	ID        int64    `json:"id" parquet:"id"`
	Name      string   `json:"name" parquet:"name"`
	RA        float64  `json:"ra_deg" parquet:"ra_deg"`
	Dec       float64  `json:"dec_deg" parquet:"dec_deg"`
	Dist      *float64 `json:"dist_pc" parquet:"dist_pc,optional"`
	Temp      float64  `json:"temp_k" parquet:"temp_k"`
	Vmag      float64  `json:"vmag" parquet:"vmag"`
	Theta     float64  `json:"theta_deg" parquet:"theta_deg"`
	ThetaObs  float64  `json:"theta_obs_deg" parquet:"theta_obs_deg"`
	RAObs     float64  `json:"ra_obs_deg" parquet:"ra_obs_deg"`
	DecObs    float64  `json:"dec_obs_deg" parquet:"dec_obs_deg"`
	Doppler   float64  `json:"doppler" parquet:"doppler"`
	TempObs   float64  `json:"temp_obs_k" parquet:"temp_obs_k"`
	VmagObs   float64  `json:"vmag_obs" parquet:"vmag_obs"`
	BVObs     float64  `json:"bv_obs" parquet:"bv_obs"`
	FluxRatio float64  `json:"flux_ratio" parquet:"flux_ratio"`
	CIEx      float64  `json:"cie_x" parquet:"cie_x"`
	CIEy      float64  `json:"cie_y" parquet:"cie_y"`
}

// SpeedRow is a row of a table of several speeds: the speed, then the star.
type SpeedRow struct {
	Beta float64 `json:"beta" parquet:"beta"`
	StarRow
}

// ObserveStars computes every star's apparent state for observer obs
// (catalogue s, with name(i) the name of star i, moving toward unit
// vector heading under the beaming convention), sorted by observed V.
//
// Catalogue values are taken at their printed precision (Short32). The
// observed V and colour are spectrum.Observe's (the photometry the renderer
// and the census use): the catalogue V plus the change in magnitude,
// −2.5 log₁₀ of (W′/W)·(V flux per unit W at D·T)/(at T), so that no change
// (β = 0, at the Sun) leaves V exactly as it is.
func ObserveStars(s *catalog.Stars, name func(i int) string, heading r3.Vec, beaming spectrum.Beaming, obs camera.Observer) []StarRow {
	rows := make([]StarRow, 0, s.Len())
	for i := 0; i < s.Len(); i++ {
		st := s.At(i)
		u := r3.Vec{X: st.Dir[0], Y: st.Dir[1], Z: st.Dir[2]}
		n, d, dil, r := obs.See(u, st.Dist)
		if r == 0 || !(d > 0) || math.IsInf(d, 1) {
			continue // the ship is at this star
		}
		T, V := Short32(st.Teff), Short32(st.Vmag)
		if !(T > 0) || math.IsInf(T, 0) || math.IsNaN(V) || math.IsInf(V, 0) {
			continue
		}
		from := u // direction from the ship, catalogue frame
		if !math.IsInf(st.Dist, 0) {
			from = r3.Unit(r3.Sub(r3.Scale(st.Dist, u), obs.Position))
		}
		ph := spectrum.Observe(V, T, d, dil, beaming)
		vObs, cx, cy := ph.V, ph.X, ph.Y
		wScale := dil * beaming.WScale(d)
		raObs, decObs := camera.RADec(n)
		tObs := d * T
		row := StarRow{
			ID: st.ID, Name: name(i), RA: st.RA, Dec: st.Dec, Temp: T, Vmag: V,
			Theta: angleDeg(from, heading), ThetaObs: angleDeg(n, heading),
			RAObs: raObs, DecObs: decObs, Doppler: d, TempObs: tObs, VmagObs: vObs,
			BVObs: spectrum.BV(tObs), FluxRatio: wScale * d * d * d * d, CIEx: cx, CIEy: cy,
		}
		if !math.IsInf(st.Dist, 0) {
			dist := Short32(st.Dist)
			row.Dist = &dist
		}
		rows = append(rows, row)
	}
	// Sort an index, not the 170-byte rows (moving them was most of the
	// time); ties in V′ by id, then by catalogue order.
	idx := make([]int, len(rows))
	for k := range idx {
		idx[k] = k
	}
	slices.SortFunc(idx, func(a, b int) int {
		if c := cmp.Compare(rows[a].VmagObs, rows[b].VmagObs); c != 0 {
			return c
		}
		if c := cmp.Compare(rows[a].ID, rows[b].ID); c != 0 {
			return c
		}
		return cmp.Compare(a, b)
	})
	out := make([]StarRow, len(rows))
	for k, i := range idx {
		out[k] = rows[i]
	}
	return out
}

// angleDeg is the angle between unit vectors a and b in degrees, from
// atan2(|a×b|, a·b) (accurate near 0° and 180°).
func angleDeg(a, b r3.Vec) float64 {
	return math.Atan2(r3.Norm(r3.Cross(a, b)), r3.Dot(a, b)) * 180 / math.Pi
}

// fmtShort writes v in the shortest form that reads back to v.
func fmtShort(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// WriteStarRows writes rows in format; beta, when not nil, holds each
// row's speed and adds the beta column; credit, when not empty, is
// recorded in Parquet metadata (key star_names).
func WriteStarRows(w io.Writer, rows []StarRow, beta []float64, format, credit string) error {
	// The schema names are those the table has always carried.
	var meta []parquet.WriterOption
	if credit != "" {
		meta = append(meta, parquet.KeyValueMetadata("star_names", credit))
	}
	switch format {
	case "json":
		enc := json.NewEncoder(w)
		enc.SetIndent("", "  ")
		if beta == nil {
			return enc.Encode(rows)
		}
		return enc.Encode(withSpeeds(rows, beta))
	case "parquet":
		if beta == nil {
			pw := parquet.NewGenericWriter[StarRow](w, append(meta, parquet.NewSchema("starRow", parquet.SchemaOf(StarRow{})))...)
			if _, err := pw.Write(rows); err != nil {
				return err
			}
			return pw.Close()
		}
		pw := parquet.NewGenericWriter[SpeedRow](w, append(meta, parquet.NewSchema("speedRow", parquet.SchemaOf(SpeedRow{})))...)
		if _, err := pw.Write(withSpeeds(rows, beta)); err != nil {
			return err
		}
		return pw.Close()
	}
	cw := csv.NewWriter(w)
	if format == "tsv" {
		cw.Comma = '\t'
	}
	head := StarColumns
	if beta != nil {
		head = append([]string{"beta"}, StarColumns...)
	}
	if err := cw.Write(head); err != nil {
		return err
	}
	g := fmtShort
	for k, r := range rows {
		dist := ""
		if r.Dist != nil {
			dist = g(*r.Dist)
		}
		rec := []string{strconv.FormatInt(r.ID, 10), r.Name, g(r.RA), g(r.Dec), dist, g(r.Temp), g(r.Vmag),
			g(r.Theta), g(r.ThetaObs), g(r.RAObs), g(r.DecObs), g(r.Doppler), g(r.TempObs), g(r.VmagObs),
			g(r.BVObs), g(r.FluxRatio), g(r.CIEx), g(r.CIEy)}
		if beta != nil {
			rec = append([]string{g(beta[k])}, rec...)
		}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

func withSpeeds(rows []StarRow, beta []float64) []SpeedRow {
	out := make([]SpeedRow, len(rows))
	for k, r := range rows {
		out[k] = SpeedRow{Beta: beta[k], StarRow: r}
	}
	return out
}

// Short32 returns the float64 nearest to the shortest decimal that reads
// back as the float32 v: catalogue columns are stored as float32, and
// -1.46 should print as -1.46, not -1.4600000381469727.
func Short32(v float64) float64 {
	f, err := strconv.ParseFloat(strconv.FormatFloat(v, 'g', -1, 32), 64)
	if err != nil {
		return v
	}
	return f
}
