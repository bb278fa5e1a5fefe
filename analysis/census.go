package analysis

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"slices"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/spectrum"
)

// DefaultLimitMag is the naked-eye limiting magnitude used by the command
// line (V = 6.5, a dark-sky naked-eye limit [cp]).
const DefaultLimitMag = 6.5

// CensusOptions configures Census. The zero value looks along the galactic
// centre direction from the Sun, counts stars with V′ ≤ 0 and uses the exact
// beaming convention.
type CensusOptions struct {
	// Heading is the direction of motion (ICRS, normalised here); the zero
	// vector means the galactic centre, camera.FromGalacticLB(0, 0).
	Heading r3.Vec
	// Position of the ship in parsecs, ICRS axes, Sun at the origin.
	Position r3.Vec
	// LimitMag: a star is visible when its observed V′ ≤ LimitMag.
	LimitMag float64
	// Beaming convention of the point-source transform.
	Beaming spectrum.Beaming
}

// CensusRow is the census at one speed.
type CensusRow struct {
	Speed Speed
	// Beta and Gamma of the speed (Beta may round to 1 for huge γ).
	Beta, Gamma float64
	// Visible counts stars with V′ ≤ LimitMag; Forward those of them with
	// θ′ ≤ 90°, Rear those with θ′ > 90° (Forward + Rear = Visible).
	Visible, Forward, Rear int
	// Illuminance is the total illuminance of all stars, lux (ΣY);
	// VisibleIlluminance that of the visible stars only.
	Illuminance, VisibleIlluminance float64
	// X, Y, Z are the summed tristimulus values (lux) of all stars; CIEx,
	// CIEy the chromaticity of the integrated starlight.
	X, Y, Z    float64
	CIEx, CIEy float64
	// HalfAngle is the smallest angular radius about the direction of
	// motion (deg) holding at least half of the visible stars; NaN when
	// none is visible.
	HalfAngle float64
	// Brightest is the smallest observed V′; NaN when no star is counted.
	Brightest float64
	// NeededV is the catalogue depth this speed needs to count every star
	// that can reach LimitMag (the completeness bound over the whole sky,
	// set by the caller); 0 when not known.
	NeededV float64
}

// Incomplete reports whether the catalogue (depth t.DepthV) is shallower
// than speed row i needs (NeededV), by more than 0.05 mag; false when
// either is not known.
func (t *CensusTable) Incomplete(i int) bool {
	r := t.Rows[i]
	return t.DepthV != 0 && r.NeededV != 0 && t.DepthV < r.NeededV-0.05
}

// CensusTable is the census of one catalogue against speed.
type CensusTable struct {
	// Source names the catalogue; Stars is the number of stars used,
	// Skipped those left out (no usable V or temperature, or the ship
	// at the star).
	Source         string
	Stars, Skipped int
	// Options as used (Heading normalised, defaults filled in).
	Options CensusOptions
	Rows    []CensusRow
	// DepthV is the catalogue's completeness limit (V), set by the caller;
	// 0 when not known.
	DepthV float64
}

// Census counts and measures the sky seen from the ship for each speed.
func Census(stars *catalog.Stars, speeds []Speed, opt CensusOptions) (*CensusTable, error) {
	if stars == nil || stars.Len() == 0 {
		return nil, ErrNoStars
	}
	if err := validateSpeeds(speeds); err != nil {
		return nil, err
	}
	if math.IsNaN(opt.LimitMag) || math.IsInf(opt.LimitMag, 0) {
		return nil, fmt.Errorf("%w: V = %v", ErrLimit, opt.LimitMag)
	}
	if opt.Heading == (r3.Vec{}) {
		opt.Heading = camera.FromGalacticLB(0, 0)
	}
	hn := r3.Norm(opt.Heading)
	if !(hn > 0) || math.IsInf(hn, 0) {
		return nil, fmt.Errorf("%w: %v", ErrHeading, opt.Heading)
	}
	opt.Heading = r3.Scale(1/hn, opt.Heading)
	for _, v := range []float64{opt.Position.X, opt.Position.Y, opt.Position.Z} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("analysis: ship position %v is not finite", opt.Position)
		}
	}
	if opt.Beaming.FluxExponent() == 0 {
		return nil, fmt.Errorf("analysis: unknown beaming %v", opt.Beaming)
	}

	n := stars.Len()
	w := newCensusWork(stars)
	tab := &CensusTable{Source: stars.SourceName(), Stars: len(w.idx), Skipped: n - len(w.idx), Options: opt}
	for _, s := range speeds {
		b, err := s.Boost(opt.Heading)
		if err != nil {
			return nil, err
		}
		obs := camera.Observer{Position: opt.Position, Boost: b}
		row := w.measure(obs, s, opt)
		tab.Rows = append(tab.Rows, row)
	}
	return tab, nil
}

// censusWork holds the speed-independent per-star values and scratch
// columns, so each speed costs one batch transform and one table look-up
// per star.
type censusWork struct {
	idx           []int // rows of stars with usable V and T
	x, y, z, dist []float32
	vmag          []float64
	lnT, lnV0     []float64 // ln T, ln(V flux per unit W at T)
	nx, ny, nz    []float64
	d, dil, r     []float64
	lnD, lnDil    []float64
	obs           spectrum.ObservedBatch // per-star photometry at one speed
	angles        []float64
}

func newCensusWork(s *catalog.Stars) *censusWork {
	w := &censusWork{}
	for i := 0; i < s.Len(); i++ {
		v, T := float64(s.Vmag[i]), float64(s.Teff[i])
		if math.IsNaN(v) || math.IsInf(v, 0) || !(T > 0) || math.IsInf(T, 0) {
			continue
		}
		w.idx = append(w.idx, i)
		w.x = append(w.x, s.X[i])
		w.y = append(w.y, s.Y[i])
		w.z = append(w.z, s.Z[i])
		w.dist = append(w.dist, s.Dist[i])
		w.vmag = append(w.vmag, v)
		lnT := math.Log(T)
		lnV := spectrum.Lookup(lnT).LnV
		w.lnT = append(w.lnT, lnT)
		w.lnV0 = append(w.lnV0, lnV)
	}
	m := len(w.idx)
	col := func() []float64 { return make([]float64, m) }
	w.nx, w.ny, w.nz = col(), col(), col()
	w.d, w.dil, w.r = col(), col(), col()
	w.lnD, w.lnDil = col(), col()
	w.obs = spectrum.ObservedBatch{V: col(), LnW: col(), LnT: col(), LnY: col(), LnV: col(), X: col(), Y: col()}
	w.angles = make([]float64, 0, m)
	return w
}

func (w *censusWork) measure(obs camera.Observer, s Speed, opt CensusOptions) CensusRow {
	obs.SeeBatch(w.x, w.y, w.z, w.dist, w.nx, w.ny, w.nz, w.d, w.dil, w.r)
	for i, D := range w.d {
		w.lnD[i], w.lnDil[i] = math.Log(D), math.Log(w.dil[i])
	}
	// The one per-star photometry (V′, W′, T′ and its colour); stars the
	// ship sits on get meaningless values here and are skipped below.
	spectrum.ObserveBatch(opt.Beaming, w.vmag, w.lnT, w.lnV0, w.lnD, w.lnDil, w.obs)
	ph := &w.obs
	b := obs.Boost
	row := CensusRow{Speed: s, Beta: b.Beta(), Gamma: b.Gamma(), HalfAngle: math.NaN(), Brightest: math.NaN()}
	h := opt.Heading
	w.angles = w.angles[:0]
	var sx, sy, sz, visY float64
	for i := range w.d {
		if w.r[i] == 0 || !(w.d[i] > 0) {
			continue // the ship is at this star
		}
		vObs, cx, cy := ph.V[i], ph.X[i], ph.Y[i]
		Y := math.Exp(ph.LnW[i] + ph.LnY[i])
		if Y > 0 && cy > 0 {
			sx += cx / cy * Y
			sy += Y
			sz += (1 - cx - cy) / cy * Y
		}
		if !(vObs <= opt.LimitMag) {
			continue
		}
		row.Visible++
		visY += Y
		if !(row.Brightest <= vObs) {
			row.Brightest = vObs
		}
		n := r3.Vec{X: w.nx[i], Y: w.ny[i], Z: w.nz[i]}
		if r3.Dot(n, h) >= 0 {
			row.Forward++
		} else {
			row.Rear++
		}
		w.angles = append(w.angles, angleTo(n, h))
	}
	row.X, row.Y, row.Z = sx, sy, sz
	row.Illuminance, row.VisibleIlluminance = sy, visY
	if t := sx + sy + sz; t > 0 {
		row.CIEx, row.CIEy = sx/t, sy/t
	} else {
		row.CIEx, row.CIEy = math.NaN(), math.NaN()
	}
	row.HalfAngle = halfCountRadius(w.angles)
	return row
}

// halfCountRadius returns the smallest radius holding at least half of the
// angles (the ⌈N/2⌉-th smallest), NaN for none. It sorts a in place.
func halfCountRadius(a []float64) float64 {
	if len(a) == 0 {
		return math.NaN()
	}
	slices.Sort(a)
	return a[(len(a)+1)/2-1]
}

// CensusColumns are the CSV header of CensusTable.WriteCSV, in order.
var CensusColumns = []string{"beta", "gamma", "visible", "forward", "rear",
	"illuminance_lux", "visible_illuminance_lux", "cie_x", "cie_y",
	"half_angle_deg", "brightest_vmag", "needed_v", "complete"}

// WriteCSV writes one row per speed under the CensusColumns header.
func (t *CensusTable) WriteCSV(w io.Writer) error {
	cw := csv.NewWriter(w)
	if err := cw.Write(CensusColumns); err != nil {
		return err
	}
	for i, r := range t.Rows {
		need, complete := "", ""
		if r.NeededV != 0 {
			need = fmtNum(r.NeededV)
		}
		if t.DepthV != 0 && r.NeededV != 0 {
			complete = fmt.Sprint(!t.Incomplete(i))
		}
		rec := []string{fmtNum(r.Beta), fmtNum(r.Gamma),
			fmt.Sprint(r.Visible), fmt.Sprint(r.Forward), fmt.Sprint(r.Rear),
			fmtNum(r.Illuminance), fmtNum(r.VisibleIlluminance),
			fmtNum(r.CIEx), fmtNum(r.CIEy), fmtNum(r.HalfAngle), fmtNum(r.Brightest), need, complete}
		if err := cw.Write(rec); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}
