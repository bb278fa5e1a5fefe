package spectrum

import (
	"math"
	"sync"
)

// Sample is the photometry of a blackbody of temperature T per unit
// dilution W (see Blackbody), as returned by Lookup.
type Sample struct {
	// LnY is ln of the illuminance Y = Km ∫ π B_λ ȳ dλ, lux per unit W.
	LnY float64
	// LnV is ln of the V-band flux (photon-weighted mean f_λ over the
	// Bessell V passband), W m⁻² nm⁻¹ per unit W.
	LnV float64
	// X and Y are the CIE 1931 chromaticity coordinates x, y.
	X, Y float64
}

// Table layout: nodes at ln T = tabLnT0 + i·tabH, i = 0..tabN.
const (
	tabPerDecade = 64
	tabDecades   = 12
	tabN         = tabPerDecade * tabDecades // intervals
	tabLnT0      = 0.0                       // ln 1 K
	tabH         = math.Ln10 / tabPerDecade
	tabInvH      = 1 / tabH
	// TableMinT and TableMaxT bound the tabulated range, K. Outside it
	// Lookup uses the Wien and Rayleigh–Jeans asymptotes.
	TableMinT = 1.0
	TableMaxT = 1e12
)

// cell holds, for one interval, cubic Hermite coefficients in t ∈ [0, 1)
// (f = c0 + t(c1 + t(c2 + t·c3))) of g_Y = ln Y + c₂u_Y/T,
// g_V = ln V + c₂u_V/T and of the chromaticity x, y; wy and wv are c₂u_Y/T
// and c₂u_V/T at the interval's left node. u_Y, u_V are 1/λ at the long end
// of each passband; removing that Wien term leaves functions smooth enough
// for the cubic to reach 1e-8 in ln at 64 nodes per decade.
type cell struct {
	gy, gv, cx, cy [4]float64
	wy, wv         float64
}

// photometry holds everything derived from the passbands once.
type photometry struct {
	tab     [tabN]cell
	wien    [4]wienCoef   // X, Y, Z, V
	rj      [4][3]float64 // M4, M5, M6 per X, Y, Z, V
	lnConst [4]float64    // ln of π·Km (XYZ) or π·1e-9/∫Sλdλ (V)
	uY, uV  float64
	lnRJc   [4]float64 // lnConst + ln(2ck) + ln M4
	vNorm   float64    // ∫ S λ dλ, m²
}

var (
	photOnce sync.Once
	phot     *photometry
)

func getPhot() *photometry {
	photOnce.Do(buildPhot)
	return phot
}

// direct integrates the four passbands at ln T with second radiation
// constant c2, returning ln X, ln Y, ln Z (lux per unit W) and ln V
// (W m⁻² nm⁻¹ per unit W) and their derivatives with respect to ln T.
func direct(lnT, c2 float64, lnConst *[4]float64) (ln, dln [4]float64) {
	a := c2 * math.Exp(-lnT)
	r := cmfBand.integrate(a)
	rv := vBand.integrate(a)
	for c := 0; c < 3; c++ {
		ln[c] = r.ln[c] + lnConst[c]
		dln[c] = r.dln[c]
	}
	ln[3] = rv.ln[0] + lnConst[3]
	dln[3] = rv.dln[0]
	return ln, dln
}

func bandConsts() (lnConst [4]float64, vNorm float64, rj [4][3]float64) {
	mc := cmfBand.moments()
	mv := vBand.moments()
	vNorm = mv[0][0]
	for c := 0; c < 3; c++ {
		lnConst[c] = math.Log(math.Pi * Km)
		rj[c] = [3]float64{mc[c][4], mc[c][5], mc[c][6]}
	}
	lnConst[3] = math.Log(math.Pi * 1e-9 / vNorm)
	rj[3] = [3]float64{mv[0][4], mv[0][5], mv[0][6]}
	return
}

// chroma returns x, y and their ln T-derivatives from ln X, ln Y, ln Z.
func chroma(ln, dln [4]float64) (x, y, dx, dy float64) {
	mx := math.Max(ln[0], math.Max(ln[1], ln[2]))
	rx, ry, rz := math.Exp(ln[0]-mx), math.Exp(ln[1]-mx), math.Exp(ln[2]-mx)
	s := rx + ry + rz
	x, y = rx/s, ry/s
	dbar := (rx*dln[0] + ry*dln[1] + rz*dln[2]) / s
	return x, y, x * (dln[0] - dbar), y * (dln[1] - dbar)
}

func buildPhot() {
	p := new(photometry)
	p.lnConst, p.vNorm, p.rj = bandConsts()
	for c := 0; c < 3; c++ {
		p.wien[c] = cmfBand.wien(c)
	}
	p.wien[3] = vBand.wien(0)
	p.uY, p.uV = p.wien[1].u0, p.wien[3].u0
	for c := 0; c < 4; c++ {
		p.lnRJc[c] = p.lnConst[c] + math.Log(2*C*KB) + math.Log(p.rj[c][0])
	}
	type node struct{ gy, dgy, gv, dgv, x, dx, y, dy, wy, wv float64 }
	var prev node
	for i := 0; i <= tabN; i++ {
		lnT := tabLnT0 + float64(i)*tabH
		ln, dln := direct(lnT, C2, &p.lnConst)
		invT := math.Exp(-lnT)
		var n node
		n.wy, n.wv = C2*p.uY*invT, C2*p.uV*invT
		n.gy, n.dgy = ln[1]+n.wy, dln[1]-n.wy
		n.gv, n.dgv = ln[3]+n.wv, dln[3]-n.wv
		n.x, n.y, n.dx, n.dy = chroma(ln, dln)
		if i > 0 {
			c := &p.tab[i-1]
			c.gy = hermite(prev.gy, prev.dgy, n.gy, n.dgy)
			c.gv = hermite(prev.gv, prev.dgv, n.gv, n.dgv)
			c.cx = hermite(prev.x, prev.dx, n.x, n.dx)
			c.cy = hermite(prev.y, prev.dy, n.y, n.dy)
			c.wy, c.wv = prev.wy, prev.wv
		}
		prev = n
	}
	phot = p
}

// hermite returns the cubic in t ∈ [0, 1] matching values f0, f1 and
// ln T-derivatives m0, m1 at the ends of an interval of width tabH.
func hermite(f0, m0, f1, m1 float64) [4]float64 {
	d0, d1 := m0*tabH, m1*tabH
	return [4]float64{f0, d0, 3*(f1-f0) - 2*d0 - d1, 2*(f0-f1) + d0 + d1}
}

func horner(c *[4]float64, t float64) float64 {
	return c[0] + t*(c[1]+t*(c[2]+t*c[3]))
}

// estrin evaluates the same cubic as horner with a shorter dependency
// chain (the two halves in parallel), for Lookup's hot path; t2 = t².
func estrin(c *[4]float64, t, t2 float64) float64 {
	return (c[0] + t*c[1]) + t2*(c[2]+t*c[3])
}

// Lookup returns the photometry per unit W of a blackbody at temperature
// T = exp(lnT) kelvin. It is allocation-free and needs no math library call
// inside the tabulated range 1 K ≤ T ≤ 10¹² K (the table is built on the
// first call, in a few milliseconds).
//
// Outside the range it uses asymptotes: above 10¹² K the Rayleigh–Jeans
// series B_λ = (2ckT/λ⁴)(1 − x/2 + x²/12), x = c₂/λT, with the passband
// moments ∫S/λ⁴, ∫S/λ⁵, ∫S/λ⁶ (truncation error below 10⁻³⁰); below 1 K
// the Wien limit in which only the long-wavelength end panel of each
// passband contributes (exact to e⁻¹⁰⁰). lnT = −Inf gives LnY = LnV = −Inf
// and the chromaticity of the red end of the spectrum locus; lnT = +Inf
// gives +Inf and the Rayleigh–Jeans chromaticity; NaN gives NaN fields.
func Lookup(lnT float64) Sample {
	// One code path for both forms, so they agree to the bit.
	var y, v, x, yy [1]float64
	LookupBatch([]float64{lnT}, y[:], v[:], x[:], yy[:])
	return Sample{LnY: y[0], LnV: v[0], X: x[0], Y: yy[0]}
}

// LookupBatch is Lookup over a slice, in struct-of-arrays form: for each
// k < len(lnT) it sets lnY[k], lnV[k], x[k], y[k] to the fields of
// Lookup(lnT[k]) (Lookup is this function on one value). The output
// slices must be at least as long as lnT; lnV may be nil, and then the
// V band is not computed (the others are unchanged). It allocates
// nothing; the table is fetched once for the whole slice, so per value it
// costs less than Lookup.
func LookupBatch(lnT, lnY, lnV, x, y []float64) {
	p := getPhot()
	n := len(lnT)
	lnY, x, y = lnY[:n], x[:n], y[:n]
	if lnV != nil {
		lnV = lnV[:n]
	}
	p.batch(lnT, lnY, lnV, x, y)
}

// batch is LookupBatch on slices of len(lnT); lnV nil skips the V band.
func (p *photometry) batch(lnT, lnY, lnV, x, y []float64) {
	for k, l := range lnT {
		s := (l - tabLnT0) * tabInvH
		if !(s >= 0 && s < tabN) {
			o := p.outside(l)
			lnY[k], x[k], y[k] = o.LnY, o.X, o.Y
			if lnV != nil {
				lnV[k] = o.LnV
			}
			continue
		}
		i := int(s)
		t := s - float64(i)
		c := &p.tab[i]
		// e^{−t·h} for t·h < 0.036: degree-7 Taylor, relative error < 1e-16,
		// in Estrin form (four short chains instead of one of seven steps).
		z := t * tabH
		z2 := z * z
		z4 := z2 * z2
		e := ((1 - z) + z2*(1.0/2-z*(1.0/6))) + z4*((1.0/24-z*(1.0/120))+z2*(1.0/720-z*(1.0/5040)))
		t2 := t * t
		lnY[k] = estrin(&c.gy, t, t2) - c.wy*e
		if lnV != nil {
			lnV[k] = estrin(&c.gv, t, t2) - c.wv*e
		}
		x[k] = estrin(&c.cx, t, t2)
		y[k] = estrin(&c.cy, t, t2)
	}
}

// outside evaluates the asymptotes (and NaN).
func (p *photometry) outside(lnT float64) Sample {
	if math.IsNaN(lnT) {
		nan := math.NaN()
		return Sample{nan, nan, nan, nan}
	}
	var ln [4]float64
	if lnT > tabLnT0 {
		// Rayleigh–Jeans: ln I = ln(const·2ck·M4) + ln T + ln(1 − ε).
		e := C2 * math.Exp(-lnT) // c₂/T, 0 at +Inf
		var r [3]float64
		for c := 0; c < 4; c++ {
			m := &p.rj[c]
			eps := e*m[1]/(2*m[0]) - e*e*m[2]/(12*m[0])
			ln[c] = p.lnRJc[c] + lnT + math.Log1p(-eps)
			if c < 3 {
				r[c] = m[0] - e/2*m[1] + e*e/12*m[2]
			}
		}
		sum := r[0] + r[1] + r[2]
		return Sample{LnY: ln[1], LnV: ln[3], X: r[0] / sum, Y: r[1] / sum}
	}
	// Wien limit.
	a := C2 * math.Exp(-lnT)
	for c := 0; c < 4; c++ {
		w := &p.wien[c]
		ln[c] = p.lnConst[c] - a*w.u0 + w.lnRest(a)
	}
	if math.IsInf(a, 1) {
		// T = 0: the ratios below have finite limits.
		wx, wy := &p.wien[0], &p.wien[1]
		return Sample{LnY: math.Inf(-1), LnV: math.Inf(-1),
			X: wx.c[0] / (wx.c[0] + wy.c[0]), Y: wy.c[0] / (wx.c[0] + wy.c[0])}
	}
	x, y, _, _ := chroma(ln, [4]float64{})
	return Sample{LnY: ln[1], LnV: ln[3], X: x, Y: y}
}
