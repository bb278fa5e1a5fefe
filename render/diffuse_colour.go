package render

import (
	"fmt"
	"math"
	"slices"
	"sync"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/spectrum"
)

// lnDTable holds, for one drawing of the unresolved layer, the photometry
// of each of its components against u = ln D: a blackbody at T_k seen
// with Doppler factor D is one at D·T_k, so every direction of a frame
// needs the spectrum tables at the same K points shifted by the same ln D.
// Tabulated once per drawing (on its first evaluation), on nodes
// u_m = u0 + m·h over the frame's whole range of D, e^−φ ≤ D ≤ e^φ (φ the
// rapidity), each direction then costs one index and K linear
// interpolations instead of K lookups with two divisions each.
//
// Per node m and component it keeps Y_m = e^(ln Y) (spectrum.Sample.LnY),
// the step Δ = ln Y_{m+1} − ln Y_m, and the ratios X/Y = x/y and Z/Y =
// (1 − x − y)/y with their steps to the next node, so a direction reads
// one node. ln Y is interpolated linearly, not Y: across the tables' range
// it is close to linear in ln T (its second derivative is −c₂/λT in the
// Wien limit, about −50 at 300 K), so with h = 1/2048 linear interpolation
// errs by at most h²·|lnY″|/8, 1.5·10⁻⁶ relative at 300 K and a few 10⁻⁸
// at the layer's 2000–60000 K, against the 2·10⁻⁵ to which the layer is
// checked (TestDiffuseAtSpeedIndependent). Y = Y_m·e^(fΔ) takes e^x from
// its degree-4 Taylor series while |x| ≤ 1/16 (error < 10⁻⁸; |Δ| = h·|lnY′|
// is below 0.01 above 1500 K), from expFast beyond. The chromaticity
// ratios vary more slowly (TestLnDTable measures both against
// spectrum.LookupBatch: at most 1.9·10⁻⁶ down to 250 K).
type lnDTable struct {
	u0, invH float64
	n        int // nodes
	k        int // components
	// v[(m·k + c)·lnDStride + {0…5}] = Y, Δ, X/Y, its step, Z/Y, its
	// step, for component c at node m.
	v []float64
}

// lnDStride is the number of values per node and component.
const lnDStride = 6

// badDilution reports a dilution wk of the component at T K toward n that
// is negative, infinite or NaN.
func badDilution(wk, T float64, n r3.Vec) error {
	return fmt.Errorf("%w: dilution %g of the %g K component toward (%.6f, %.6f, %.6f), want finite ≥ 0",
		ErrDiffuse, wk, T, n.X, n.Y, n.Z)
}

// lnDTableStep is the node spacing h in ln D, and lnDTableMaxNodes caps a
// table's size (K·6·8 bytes per node: 0.8 MB for the built-in sky's 7
// components at 0.5 c, 2.9 MB at 0.97 c, 11 MB at most);
// beyond φ ≈ 8 (γ ≈ 1500) the layer looks the tables up directly.
const (
	lnDTableStep     = 1.0 / 2048
	lnDTableMaxNodes = 1 << 15
)

// newLnDTable tabulates the components with ln T_k = lnT[k] for a boost of
// rapidity phi, or returns nil when the range needs more than
// lnDTableMaxNodes nodes or a node falls outside the spectrum tables'
// finite values.
func newLnDTable(lnT []float64, phi float64) *lnDTable {
	span := 2*phi + 2*lnDTableStep // a node beyond each end
	n := int(math.Ceil(span/lnDTableStep)) + 1
	if !(phi >= 0) || n > lnDTableMaxNodes {
		return nil
	}
	K := len(lnT)
	// The looked-up values at every node, then the table from each node
	// and the next.
	ly, x, y := make([]float64, n*K), make([]float64, n*K), make([]float64, n*K)
	lt := make([]float64, K)
	for m := range n {
		u := -phi - lnDTableStep + float64(m)*lnDTableStep
		for c, l := range lnT {
			lt[c] = l + u
		}
		spectrum.LookupBatch(lt, ly[m*K:(m+1)*K], nil, x[m*K:(m+1)*K], y[m*K:(m+1)*K])
	}
	t := &lnDTable{u0: -phi - lnDTableStep, invH: 1 / lnDTableStep, n: n, k: K, v: make([]float64, n*K*lnDStride)}
	for i := range ly {
		rx, rz := x[i]/y[i], (1-x[i]-y[i])/y[i]
		if math.IsInf(ly[i], 0) || math.IsNaN(ly[i]+rx+rz) || math.IsInf(rx+rz, 0) {
			return nil
		}
		e := t.v[i*lnDStride : (i+1)*lnDStride]
		e[0], e[2], e[4] = math.Exp(ly[i]), rx, rz
		if j := i + K; j < len(ly) { // the last node's steps are never read
			e[1], e[3], e[5] = ly[j]-ly[i], x[j]/y[j]-rx, (1-x[j]-y[j])/y[j]-rz
		}
	}
	return t
}

// lnDTables keeps the most recently built tables for lnDTableFor: the
// frames of a cruise, and the instants of a frame blurred while coasting,
// draw their layers at one rapidity, so they share one table (2.9 ms to
// build at 0.5 c; a table is only read once built).
var lnDTables struct {
	sync.Mutex
	recent [2]lnDEntry // most recent first
}

type lnDEntry struct {
	lnT []float64
	phi float64
	t   *lnDTable // nil: newLnDTable had none
}

// lnDTableFor returns newLnDTable(lnT, phi), the same table as the last
// call or the one before with the same components and rapidity (the same
// bits: the table depends on nothing else).
func lnDTableFor(lnT []float64, phi float64) *lnDTable {
	lnDTables.Lock()
	for i, e := range lnDTables.recent {
		if e.lnT != nil && e.phi == phi && slices.Equal(e.lnT, lnT) {
			lnDTables.recent[0], lnDTables.recent[i] = e, lnDTables.recent[0]
			lnDTables.Unlock()
			return e.t
		}
	}
	lnDTables.Unlock()
	t := newLnDTable(lnT, phi)
	lnDTables.Lock()
	lnDTables.recent[1] = lnDTables.recent[0]
	lnDTables.recent[0] = lnDEntry{lnT: slices.Clone(lnT), phi: phi, t: t}
	lnDTables.Unlock()
	return t
}

// at returns the node m and fraction t ∈ [0, 1) of u = ln D, and false
// outside the table.
func (t *lnDTable) at(u float64) (m int, f float64, ok bool) {
	s := (u - t.u0) * t.invH
	if !(s >= 0 && s < float64(t.n-1)) {
		return 0, 0, false
	}
	m = int(s)
	return m, s - float64(m), true
}

// radiance is diffuseSampler.radiance from the table at node m, fraction
// f: Σ_k W_k Y_k and the matching X and Z, with the dilutions w (checked
// as there; temps and n only name a bad one).
func (t *lnDTable) radiance(m int, f float64, w, temps []float64, n r3.Vec) (sx, sy, sz float64, err error) {
	K := t.k
	a := t.v[m*K*lnDStride : (m+1)*K*lnDStride : (m+1)*K*lnDStride]
	for c, wk := range w[:K] {
		if wk == 0 {
			continue
		}
		if !(wk > 0) || math.IsInf(wk, 0) {
			return 0, 0, 0, badDilution(wk, temps[c], n)
		}
		e := a[c*lnDStride : (c+1)*lnDStride : (c+1)*lnDStride]
		x := f * e[1]
		var g float64
		if x <= 1.0/16 && x >= -1.0/16 {
			g = 1 + x*(1+x*(1.0/2+x*(1.0/6+x*(1.0/24))))
		} else {
			g = expFast(x)
		}
		yk := wk * e[0] * g
		sx += (e[2] + f*e[3]) * yk
		sy += yk
		sz += (e[4] + f*e[5]) * yk
	}
	return sx, sy, sz, nil
}
