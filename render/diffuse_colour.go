package render

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/spectrum"
)

// lnDTable holds, for one drawing of the unresolved layer, the photometry
// of each of its components against u = ln D: a blackbody at T_k seen
// with Doppler factor D is one at D·T_k, so every direction of a frame
// needs the spectrum tables at the same K points shifted by the same ln D.
// Tabulated once per drawing on nodes u_m = u0 + m·h over the frame's
// whole range of D, e^−φ ≤ D ≤ e^φ (φ the rapidity), each direction then
// costs one index and K linear interpolations instead of K lookups with
// two divisions each.
//
// Per node and component it keeps ln Y (spectrum.Sample.LnY) and the
// ratios X/Y = x/y and Z/Y = (1 − x − y)/y. ln Y is interpolated, not Y:
// across the tables' range it is close to linear in ln T (its second
// derivative is −c₂/λT in the Wien limit, about −50 at 300 K), so with
// h = 1/2048 linear interpolation errs by at most h²·|lnY″|/8, 1.5·10⁻⁶
// relative at 300 K and a few 10⁻⁸ at the layer's 2000–60000 K, against
// the 2·10⁻⁵ to which the layer is checked (TestDiffuseAtSpeedIndependent);
// the chromaticity ratios vary more slowly (TestLnDTable measures both
// against spectrum.LookupBatch: at most 1.9·10⁻⁶ down to 250 K).
type lnDTable struct {
	u0, invH float64
	n        int       // nodes
	k        int       // components
	v        []float64 // v[(m·k + c)·3 + {0,1,2}] = ln Y, X/Y, Z/Y at node m
}

// badDilution reports a dilution wk of the component at T K toward n that
// is negative, infinite or NaN.
func badDilution(wk, T float64, n r3.Vec) error {
	return fmt.Errorf("%w: dilution %g of the %g K component toward (%.6f, %.6f, %.6f), want finite ≥ 0",
		ErrDiffuse, wk, T, n.X, n.Y, n.Z)
}

// lnDTableStep is the node spacing h in ln D, and lnDTableMaxNodes caps a
// table's size (K·3·8 bytes per node: 0.4 MB at 0.5 c, 1.4 MB at 0.97 c);
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
	t := &lnDTable{u0: -phi - lnDTableStep, invH: 1 / lnDTableStep, n: n, k: K, v: make([]float64, n*K*3)}
	lt, ly, x, y := make([]float64, K), make([]float64, K), make([]float64, K), make([]float64, K)
	for m := range n {
		u := t.u0 + float64(m)*lnDTableStep
		for c, l := range lnT {
			lt[c] = l + u
		}
		spectrum.LookupBatch(lt, ly, nil, x, y)
		for c := range K {
			e := t.v[(m*K+c)*3:]
			e[0], e[1], e[2] = ly[c], x[c]/y[c], (1-x[c]-y[c])/y[c]
			if math.IsInf(e[0], 0) || math.IsNaN(e[0]+e[1]+e[2]) || math.IsInf(e[1]+e[2], 0) {
				return nil
			}
		}
	}
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
	a := t.v[m*K*3 : (m+1)*K*3 : (m+1)*K*3]
	b := t.v[(m+1)*K*3 : (m+2)*K*3 : (m+2)*K*3]
	for c, wk := range w[:K] {
		if wk == 0 {
			continue
		}
		if !(wk > 0) || math.IsInf(wk, 0) {
			return 0, 0, 0, badDilution(wk, temps[c], n)
		}
		a0, a1, a2 := a[3*c], a[3*c+1], a[3*c+2]
		yk := wk * expFast(a0+f*(b[3*c]-a0))
		sx += (a1 + f*(b[3*c+1]-a1)) * yk
		sy += yk
		sz += (a2 + f*(b[3*c+2]-a2)) * yk
	}
	return sx, sy, sz, nil
}
