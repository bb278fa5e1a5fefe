package catalog

import (
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"sync"

	"gonum.org/v1/gonum/spatial/r3"
)

// UnresolvedSky is the light of the synthetic sky's stars fainter than a
// resolved depth V_res: the model of Synthetic (the same luminosity
// function, colour laws, density components and dust), integrated along each
// line of sight over every star with V > V_res down to the model's faint end
// (M_V = 16) and out to 30 kpc, and held as a sky map.
//
// In each direction n (catalogue frame, ICRS unit vector) the intensity is a
// sum of diluted blackbodies with fixed temperatures,
//
//	I_λ(n) = Σ_k W_k(n) B_λ(T_k),
//
// W_k dimensionless. A star of magnitude V and temperature T has dilution
// W = 10^(−0.4 V)·W₀(T), W₀(T) being the dilution of a V = 0 blackbody at T
// (the function given to NewUnresolvedSky, normally spectrum.FromV(T, 0).W);
// the stars of temperature bin k are summed with W₀(T_k), so the V-band light
// of the map equals the model's V-band light exactly and only the colours
// within a bin are merged. W_k = π·W₀(T_k)·S_k, S_k being the V-band flux per
// steradian of bin k in units of a V = 0 star.
//
// The map is a grid in galactic longitude (2°) and latitude (0.5° within 5°
// of the plane, coarser towards the poles) read by bilinear interpolation.
// Resolved stars (Synthetic to V_res) plus this map make the whole model sky:
// moving V_res moves light between the two without changing the total
// (TestUnresolvedSplitConservesLight). The stars of the invented solar
// neighbourhood (NearbyStars, inside 5 pc) are not part of it.
//
// Safe for concurrent use once built.
type UnresolvedSky struct {
	depth float64
	temps []float64
	w0    []float64 // W₀(T_k)
	lat   []float64 // latitude nodes, degrees, ascending, −90 … 90
	// s[(ib·unresNL + il)·K + k] = S_k at node (l = il·2°, b = lat[ib]).
	s []float64
	// latIndex maps floor((b + 90)·unresLatRes) to the node at or below b.
	latIndex []int32
	// latInv[ib] = 1/(lat[ib+1] − lat[ib]), so a lookup multiplies.
	latInv []float64
}

// Grid and temperature bins of UnresolvedSky.
const (
	unresNL     = 180 // longitude nodes, 2° apart
	unresLatRes = 4   // entries of latIndex per degree
	// Gauss–Legendre points per segment of the line-of-sight grid.
	unresGL = 4
	// Colours drawn per population bin for its temperature histogram.
	unresColourDraws = 256
)

// Bounds of NewUnresolvedSky's depth: brighter than MinUnresolvedDepth the
// model has no stars (the map is the whole model sky); fainter than
// MaxUnresolvedDepth it has no light left worth drawing.
const (
	MinUnresolvedDepth = -30.0
	MaxUnresolvedDepth = 30.0
)

// unresTempEdges are the edges of the temperature bins, K; stars outside
// them join the first or last bin. Each bin is drawn at the geometric mean of
// its edges.
var unresTempEdges = [...]float64{2000, 3200, 4000, 5000, 6200, 8000, 12000, 60000}

// unresLatNodes returns the latitude nodes: 0.5° steps within 5° of the
// plane, 1° to 20°, 2.5° to 50°, 5° to the poles.
func unresLatNodes() []float64 {
	var pos []float64
	for b := 0.0; b < 5; b += 0.5 {
		pos = append(pos, b)
	}
	for b := 5.0; b < 20; b++ {
		pos = append(pos, b)
	}
	for b := 20.0; b < 50; b += 2.5 {
		pos = append(pos, b)
	}
	for b := 50.0; b <= 90; b += 5 {
		pos = append(pos, b)
	}
	out := make([]float64, 0, 2*len(pos)-1)
	for i := len(pos) - 1; i > 0; i-- {
		out = append(out, -pos[i])
	}
	return append(out, pos...)
}

// NewUnresolvedSky builds the map of the light of the synthetic sky's stars
// fainter than depth (V), for the model selected by opt (opt.NoExtinction
// removes the dust; Seed, MagLimit and NoNearby do not matter: the map is the
// model's expectation, not a sample). w0(T) must return the dilution of a
// blackbody at T K whose V-band flux equals that of a V = 0 star (the
// catalogue package has no photometry of its own; pass
// func(T) { b, _ := spectrum.FromV(T, 0); return b.W }).
//
// depth must lie in [MinUnresolvedDepth, MaxUnresolvedDepth]. Building takes
// a few tenths of a second of CPU, spread over GOMAXPROCS goroutines; the
// result does not depend on their number.
func NewUnresolvedSky(depth float64, w0 func(T float64) float64, opt SynthOptions) (*UnresolvedSky, error) {
	if math.IsNaN(depth) || depth < MinUnresolvedDepth || depth > MaxUnresolvedDepth {
		return nil, fmt.Errorf("catalog: unresolved light: resolved depth V = %v: want a magnitude in [%g, %g]", depth, MinUnresolvedDepth, MaxUnresolvedDepth)
	}
	if w0 == nil {
		return nil, fmt.Errorf("catalog: unresolved light: no V-band dilution function")
	}
	K := len(unresTempEdges) - 1
	u := &UnresolvedSky{depth: depth, temps: make([]float64, K), w0: make([]float64, K), lat: unresLatNodes()}
	for k := range u.temps {
		u.temps[k] = math.Sqrt(unresTempEdges[k] * unresTempEdges[k+1])
		u.w0[k] = w0(u.temps[k])
		if !(u.w0[k] > 0) || math.IsInf(u.w0[k], 0) {
			return nil, fmt.Errorf("catalog: unresolved light: V-band dilution at %.0f K is %v, want a positive finite number", u.temps[k], u.w0[k])
		}
	}
	u.latIndex = make([]int32, 180*unresLatRes+1)
	ib := 0
	for i := range u.latIndex {
		b := float64(i)/unresLatRes - 90
		for ib+1 < len(u.lat)-1 && u.lat[ib+1] <= b {
			ib++
		}
		u.latIndex[i] = int32(ib)
	}
	u.latInv = make([]float64, len(u.lat)-1)
	for ib := range u.latInv {
		u.latInv[ib] = 1 / (u.lat[ib+1] - u.lat[ib])
	}

	tab := newUnresTables(opt)
	u.s = make([]float64, len(u.lat)*unresNL*K)
	rows := make(chan int)
	var wg sync.WaitGroup
	workers := min(runtime.GOMAXPROCS(0), len(u.lat))
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			g := newSynthGenLimit(opt, unresVLim)
			for ib := range rows {
				sb := math.Sin(u.lat[ib] * math.Pi / 180)
				cb := math.Cos(u.lat[ib] * math.Pi / 180)
				for il := 0; il < unresNL; il++ {
					l := float64(il) * 360 / unresNL * math.Pi / 180
					g.lineOfSight(cb*math.Cos(l), sb)
					tab.flux(g, depth, u.s[(ib*unresNL+il)*K:(ib*unresNL+il+1)*K])
				}
			}
		}()
	}
	for ib := range u.lat {
		rows <- ib
	}
	close(rows)
	wg.Wait()
	return u, nil
}

// unresVLim is the limit given to the line-of-sight tables of the map: faint
// enough that they run over the whole distance grid.
const unresVLim = 60.0

// Depth returns the resolved depth V_res the map was built for.
func (u *UnresolvedSky) Depth() float64 { return u.depth }

// Temperatures returns the temperatures T_k of the components, K, ascending;
// the same for every direction. The slice is shared: do not modify it.
func (u *UnresolvedSky) Temperatures() []float64 { return u.temps }

// Dilutions writes W_k(n) for the ICRS unit vector n into w, which must
// have len(Temperatures()) elements. n need not be exactly unit (any
// length below 10¹⁵⁰ gives its direction's values); a zero
// vector gives the value at the galactic centre's direction of the grid's
// origin (l = 0, b = 0). No allocation.
func (u *UnresolvedSky) Dilutions(n r3.Vec, w []float64) {
	u.interp(n, w)
	for k := range w {
		w[k] *= math.Pi * u.w0[k]
	}
}

// VRadiance returns the map's V-band surface brightness in direction n: the
// V-band flux per steradian in units of a V = 0 star (Σ_k S_k). One S10
// (one V = 10 star per square degree) is 10⁻⁴·(180/π)² ≈ 0.3283 of them.
func (u *UnresolvedSky) VRadiance(n r3.Vec) float64 {
	var buf [len(unresTempEdges) - 1]float64
	u.interp(n, buf[:])
	s := 0.0
	for _, v := range buf {
		s += v
	}
	return s
}

// AllSkyV returns the V-band flux of the whole map, ∫ VRadiance dΩ, in units
// of a V = 0 star (the magnitude of the whole sky's unresolved light is
// −2.5 log₁₀ of it), integrated over the grid cells with the bilinear
// interpolant integrated exactly.
func (u *UnresolvedSky) AllSkyV() float64 {
	K := len(u.temps)
	rowSum := func(ib int) float64 {
		s := 0.0
		for i := ib * unresNL * K; i < (ib+1)*unresNL*K; i++ {
			s += u.s[i]
		}
		return s * 2 * math.Pi / unresNL
	}
	total := 0.0
	for ib := 0; ib+1 < len(u.lat); ib++ {
		b0, b1 := u.lat[ib]*math.Pi/180, u.lat[ib+1]*math.Pi/180
		// ∫_b0^b1 (f0 (b1−b)/h + f1 (b−b0)/h) cos b db, exactly.
		f0, f1 := rowSum(ib), rowSum(ib+1)
		h := b1 - b0
		i0 := (math.Cos(b0) - math.Cos(b1) - h*math.Sin(b0)) / h
		i1 := (h*math.Sin(b1) + math.Cos(b1) - math.Cos(b0)) / h
		total += f0*i0 + f1*i1
	}
	return total
}

// interp writes the bilinear interpolation of S_k at n into w.
func (u *UnresolvedSky) interp(n r3.Vec, w []float64) {
	gx, gy, gz := icrsToGalactic(n.X, n.Y, n.Z)
	l := math.Atan2(gy, gx) * 180 / math.Pi
	if l < 0 {
		l += 360
	}
	// |n| < 10¹⁵⁰ (Dilutions): the sum of squares cannot overflow, and
	// math.Hypot's scaling is not needed.
	b := math.Atan2(gz, math.Sqrt(gx*gx+gy*gy)) * 180 / math.Pi
	fl := l * unresNL / 360
	il := int(fl)
	fl -= float64(il)
	il %= unresNL
	il1 := (il + 1) % unresNL
	j := int((b + 90) * unresLatRes)
	j = max(0, min(len(u.latIndex)-1, j))
	ib := int(u.latIndex[j])
	fb := (b - u.lat[ib]) * u.latInv[ib]
	fb = max(0, min(1, fb))
	K := len(u.temps)
	r0, r1 := ib*unresNL*K, (ib+1)*unresNL*K
	p00 := u.s[r0+il*K : r0+il*K+K]
	p01 := u.s[r0+il1*K:][:len(p00)]
	p10 := u.s[r1+il*K:][:len(p00)]
	p11 := u.s[r1+il1*K:][:len(p00)]
	w = w[:len(p00)]
	for k, v00 := range p00 {
		a := v00 + fl*(p01[k]-v00)
		c := p10[k] + fl*(p11[k]-p10[k])
		w[k] = a + fb*(c-a)
	}
}

// unresTables holds, per density geometry g and temperature bin k, the
// V-band light of the population bins of geometry g fainter than an absolute
// magnitude x:
//
//	L_gk(x) = Σ_c w_c h_ck (1/ΔM) ∫_{max(M_c, x)}^{M_c+ΔM} 10^(−0.4 M) dM,
//
// tabulated over x, where w_c is the bin's stars pc⁻³ at the Sun, h_ck the
// share of its stars in temperature bin k, and M is uniform within the bin,
// exactly the distribution Synthetic samples.
type unresTables struct {
	x0, dx float64
	n      int
	L      [geomCount][][len(unresTempEdges) - 1]float64 // [g][i][k] at x = x0 + i·dx
}

const unresTabDX = 0.01 // mag

func newUnresTables(opt SynthOptions) *unresTables {
	g := newSynthGenLimit(opt, unresVLim)
	const K = len(unresTempEdges) - 1
	t := &unresTables{x0: synthPhiMMin, dx: unresTabDX}
	mEnd := synthPhiMMin + float64(g.nM)*synthDM
	t.n = int(math.Round((mEnd-t.x0)/t.dx)) + 1
	for gi := range t.L {
		t.L[gi] = make([][K]float64, t.n)
	}
	rng := rand.New(rand.NewPCG(0x756e7265736f6c76, 0x6564206c69676874))
	const a = 0.4 * math.Ln10
	for _, c := range g.comps {
		// Temperature histogram of the bin, from its colour law.
		var h [K]float64
		mb := synthPhiMMin + float64(c.mBin)*synthDM
		for i := 0; i < unresColourDraws; i++ {
			m := mb + synthDM*(float64(i)+0.5)/unresColourDraws
			T := TeffFromBV(synthColour(c.law, m, rng))
			h[unresTempBin(T)]++
		}
		for k := range h {
			h[k] /= unresColourDraws
		}
		// ∫_{max(mb,x)}^{mb+ΔM} e^{−aM} dM / ΔM, on the x grid.
		me := mb + synthDM
		for i := 0; i < t.n; i++ {
			x := t.x0 + float64(i)*t.dx
			lo := math.Max(mb, x)
			if lo >= me {
				break
			}
			v := c.w * (math.Exp(-a*lo) - math.Exp(-a*me)) / (a * synthDM)
			row := &t.L[c.geom][i]
			for k := range h {
				row[k] += v * h[k]
			}
		}
	}
	return t
}

// unresTempBin returns the temperature bin of T.
func unresTempBin(T float64) int {
	for k := 1; k < len(unresTempEdges)-1; k++ {
		if T < unresTempEdges[k] {
			return k - 1
		}
	}
	return len(unresTempEdges) - 2
}

// Gauss–Legendre nodes and weights on [0, 1].
var unresGLX, unresGLW = func() ([unresGL]float64, [unresGL]float64) {
	xs := [unresGL]float64{-0.8611363115940526, -0.3399810435848563, 0.3399810435848563, 0.8611363115940526}
	ws := [unresGL]float64{0.3478548451374538, 0.6521451548625461, 0.6521451548625461, 0.3478548451374538}
	for i := range xs {
		xs[i] = 0.5 * (xs[i] + 1)
		ws[i] *= 0.5
	}
	return xs, ws
}()

// flux writes into out (zeroed first) the V-band flux per steradian, in
// units of a V = 0 star, of the stars fainter than depth along the line of
// sight whose tables g holds, per temperature bin: over each segment of the
// distance grid C_g and the modulus m are linear in the segment's parameter
// (the same interpolation Synthetic samples from), so the segment gives
// ΔC_g ∫₀¹ 10^(−0.4 m(t)) L_g(depth − m(t)) dt.
func (t *unresTables) flux(g *synthGen, depth float64, out []float64) {
	const K = len(unresTempEdges) - 1
	var acc [K]float64
	var dC [geomCount]float64
	for s := 0; s+1 < synthNR; s++ {
		m0, m1 := g.mod[s], g.mod[s+1]
		if math.IsInf(m1, 0) {
			break
		}
		for gi := range dC {
			dC[gi] = g.cum[gi][s+1] - g.cum[gi][s]
		}
		for q := 0; q < unresGL; q++ {
			m := m0 + unresGLX[q]*(m1-m0)
			p := (depth - m - t.x0) / t.dx
			if p >= float64(t.n-1) {
				continue // fainter than the faintest bin: no stars
			}
			i, f := 0, 0.0
			if p > 0 {
				i = int(p)
				f = p - float64(i)
			}
			e := unresGLW[q] * math.Exp(-0.4*math.Ln10*m)
			for gi := range dC {
				if !(dC[gi] > 0) {
					continue
				}
				c := e * dC[gi]
				a, b := &t.L[gi][i], &t.L[gi][i+1]
				for k := range acc {
					acc[k] += c * (a[k] + f*(b[k]-a[k]))
				}
			}
		}
	}
	copy(out, acc[:])
}

// ModelSky returns the synthetic sky model's expected whole-sky number of
// stars with V ≤ v (outside 5 pc; the invented nearby stars are not
// counted) and their V-band light in units of a V = 0 star: the
// expectation Synthetic samples, integrated over the sampling grid's
// cells. It takes some tens of milliseconds.
func ModelSky(v float64, opt SynthOptions) (n, light float64) {
	g := newSynthGenLimit(opt, unresVLim)
	tab := newUnresTables(opt)
	dOmega := 4 * math.Pi / synthCells
	var faint, all [len(unresTempEdges) - 1]float64
	for c := 0; c < synthCells; c++ {
		s0, s1, l0, l1 := synthCellGeom(c)
		sb := 0.5 * (s0 + s1)
		cb := math.Sqrt(1 - sb*sb)
		lc := 0.5 * (l0 + l1) * math.Pi / 180
		g.lineOfSight(cb*math.Cos(lc), sb)
		for i := range g.comps {
			cp := &g.comps[i]
			m := synthPhiMMin + (float64(cp.mBin)+0.5)*synthDM
			k, f := g.limit(v - m)
			n += cp.w * dOmega * g.cumAt(cp.geom, k, f)
		}
		tab.flux(g, v, faint[:])
		tab.flux(g, MinUnresolvedDepth, all[:])
		for k := range all {
			light += (all[k] - faint[k]) * dOmega
		}
	}
	return n, light
}
