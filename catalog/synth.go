package catalog

import (
	"math"
	"math/rand/v2"
	"runtime"
	"sync"
)

// Identifier ranges of the built-in sky. Gaia source_id values are below
// 12·4¹²·2³⁵ ≈ 6.92·10¹⁸ and HR, HD, HIP and Tycho numbers are far smaller, so
// identifiers at or above 9·10¹⁸ cannot clash with a real catalogue.
const (
	// SyntheticIDBase + i is the identifier of the i-th sampled star (i ≥ 0).
	SyntheticIDBase int64 = 9_000_000_000_000_000_000
	// NearbyIDBase + k is the identifier of the k-th invented nearby star
	// (k = 1, 2, …, in the order of NearbyStars).
	NearbyIDBase int64 = 9_100_000_000_000_000_000
)

// Defaults of SynthOptions.
const (
	// DefaultSynthSeed is the seed of BuiltIn and of SynthOptions{Seed: 0}.
	DefaultSynthSeed uint64 = 0x5eed_51c7_f4a3_0001
	// DefaultSynthMagLimit is the faintest V of BuiltIn.
	DefaultSynthMagLimit = 8.0
	// MaxSynthMagLimit caps SynthOptions.MagLimit: the whole sky to V = 15
	// has about 3·10⁷ stars (1.1 GB of columns); SynthOptions.CellLimit
	// keeps a frame to the cells it needs.
	MaxSynthMagLimit = 15.0
	// MinSynthMagLimit is the brightest useful limit.
	MinSynthMagLimit = -2.0
)

// Source and Format of synthetic catalogues.
const (
	SyntheticSource = "built-in sky"
	SyntheticFormat = "synthetic"
)

// SynthOptions selects a synthetic sky. The zero value gives BuiltIn's sky.
type SynthOptions struct {
	// Seed of the PCG generator; 0 means DefaultSynthSeed. Equal options give
	// identical catalogues.
	Seed uint64
	// MagLimit is the faintest V kept; 0 means DefaultSynthMagLimit. Values
	// are clamped to [MinSynthMagLimit, MaxSynthMagLimit]; NaN means the
	// default.
	MagLimit float64
	// NoNearby leaves out the invented stars of NearbyStars.
	NoNearby bool
	// NoExtinction switches the dust layer off (no dimming, no reddening).
	NoExtinction bool
	// CellLimit, when not nil, gives the faintest V wanted in each cell of
	// the sampling grid (72 × 40 cells equal in galactic l and sin b); a
	// cell keeps its stars to the smaller of that and MagLimit (NaN: to
	// MagLimit), so a frame pays only for the depth it needs where it
	// needs it. It is called once per cell, from one goroutine.
	CellLimit func(SynthCell) float64
}

func (o SynthOptions) seed() uint64 {
	if o.Seed == 0 {
		return DefaultSynthSeed
	}
	return o.Seed
}

func (o SynthOptions) magLimit() float64 {
	v := o.MagLimit
	if v == 0 || math.IsNaN(v) {
		return DefaultSynthMagLimit
	}
	return math.Max(MinSynthMagLimit, math.Min(MaxSynthMagLimit, v))
}

var (
	builtInOnce  sync.Once
	builtInStars *Stars
)

// BuiltIn returns the default sky: Synthetic(SynthOptions{}), every star to
// V = 8 (about 42 000) plus the invented nearby stars. It is built once, on
// first use, and shared: callers must not modify it (copy the columns they
// want to change). Safe for concurrent use.
func BuiltIn() *Stars {
	builtInOnce.Do(func() { builtInStars = Synthetic(SynthOptions{}) })
	return builtInStars
}

// Synthetic builds a synthetic sky, a catalogue drawn from a Milky-Way-like
// model; it is deterministic for given options. The nearby stars come first,
// in the order of NearbyStars and whatever MagLimit (they are destinations,
// not background), then the sampled stars in sky-cell order. Every star has a
// distance, B−V and Teff; Epoch is 2000, Source SyntheticSource and Format
// SyntheticFormat.
//
// Model. Stars are drawn from a local luminosity function φ(M_V) (Allen,
// Astrophysical Quantities, 3rd ed. 1973, §117, V column, with a calibration
// of up to +0.5 dex at the luminous end and −0.3 dex for late-B–A stars,
// fitted to the Bright Star Catalogue counts by magnitude and colour), split
// into
//
//   - main-sequence stars of the thin disk, whose scale height grows from
//     50 pc (O) to 300 pc (G–M dwarfs) with absolute magnitude (Mihalas &
//     Binney 1981, Table 4-16 [mem]) and whose colour follows the
//     Schmidt-Kaler (1982) B−V against M_V relation with 0.06 mag scatter
//     and a red tail for stars evolving off the upper main sequence;
//   - red giants and the red clump (B−V ≈ 1.0 at M_V ≈ +0.7), and bright
//     giants and supergiants at M_V < −2.5, with a giant share of φ that peaks
//     at the clump, a fifth of the giants being yellow (B−V 0.4–0.9);
//   - old stars (dwarfs fainter than the M_V = 3.5 turn-off, and giants) shared
//     between the thin disk (scale height 300 pc), a thick disk (900 pc, 10 %
//     of old stars at the Sun) and a halo (ρ ∝ r^−3, axis ratio 0.64,
//     0.5 %).
//
// Disks are exponential in galactocentric radius R (scale lengths 2.6 and
// 3.6 kpc) and in height |z|, with the Sun at R0 = 8.2 kpc and z⊙ = +20 pc;
// each component's density equals its share of φ at the Sun (Jurić et al.
// 2008, ApJ 673, 864 for the disk and halo parameters [mem]; Bland-Hawthorn &
// Gerhard 2016, ARA&A 54, 529 for R0 and z⊙ [mem]). Light is dimmed by a
// dust disk (1.1 mag/kpc in the plane at the Sun, scale height 112.5 pc,
// scale length 2.34 kpc, so that the dust thickens toward the inner Galaxy)
// and reddened by E(B−V) = A_V/3.1 (Cardelli, Clayton & Mathis 1989). There is no bulge,
// no spiral structure and no clusters: to V = 8 the bulge contributes no
// stars and the rest only modulates the counts.
//
// Sampling. The sky is cut into 72 × 40 cells equal in galactic l and sin b,
// and apparent magnitude into slices: V ≤ 2, then one magnitude each
// (2 < V ≤ 3, …). For each cell the model integrates, along the line of
// sight through its centre on a logarithmic grid of 80 distances from 5 pc
// to 30 kpc, the cumulative number of stars per steradian
// C(r) = ∫ ρ r² dr of every density component, and the distance modulus
// with extinction m(r) = 5 log10(r/10 pc) + A(r). For each 0.25-mag bin of
// M_V the stars of slice (V₁, V₂] lie where V₁ < M_V + m(r) ≤ V₂, so the
// expected count is φ ΔM ΔΩ [C(r(V₂)) − C(r(V₁))]. Each (cell, slice) has
// its own random stream, seeded from Seed, the cell and the slice: the
// number of its stars is Poisson-drawn, and each star's bin, M_V (rejection
// within the bin), distance (inverse of C) and direction (uniform within
// the cell) follow. A sky to V_lim draws the slices down to the one holding
// V_lim and keeps the stars with V ≤ V_lim, so a star's values never depend
// on the limit, on SynthOptions.CellLimit or on the number of goroutines
// (cells are drawn in parallel): a deeper sky only adds fainter stars. The
// star j of slice s in cell c has identifier SyntheticIDBase +
// s·10¹⁰ + c·10⁶ + j; rows come slice by slice, cell by cell. The cost is
// proportional to the number of cells and of stars drawn, not to the number
// of stars in the model volume (about 1–2·10⁶ stars per second and core,
// BenchmarkSyntheticDeep). The invented stars of NearbyStars fill the
// sphere of 5 pc that the sampled population leaves empty.
//
// Values. B−V is the reddened colour a catalogue would list; Teff is from the
// intrinsic colour (B−V)₀ through the Ballesteros (2012) relation, so it is
// the star's own temperature. Every synthetic star has a distance. There are
// no proper motions or radial velocities. Teff outside the validity range of
// TeffFromBV carries FlagTeffExtrapolated.
//
// Counts. The default V = 8 sky has about 42 000 stars; to V = 6, 10, 12
// and 14 about 4 800, 3.1·10⁵, 2.1·10⁶ and 1.5·10⁷ (TestSyntheticCounts
// compares them with a published star-count relation, NASA Space Math
// problem 103). The model constants
// and their sources are in synth_model.go.
func Synthetic(opt SynthOptions) *Stars {
	s := &Stars{Epoch: 2000, Source: SyntheticSource, Format: SyntheticFormat}
	if !opt.NoNearby {
		for k := range nearbyStars {
			s.Append(nearbyStars[k].star(k))
		}
	}
	g := newSynthGen(opt)
	g.run(s, opt)
	return s
}

// Sky and distance grids.
const (
	synthNL    = 72   // cells in galactic longitude
	synthNB    = 40   // cells in sin b
	synthNR    = 80   // points of the line-of-sight grid
	synthRMin  = 5.0  // pc, inner edge of the sampled population
	synthRMax  = 3e4  // pc
	synthDM    = 0.25 // mag, width of an absolute-magnitude bin
	synthMMax0 = 16.0 // faintest M_V of the luminosity function
)

// synthComp is one population bin: stars of one geometry, colour law and
// 0.25-mag bin of M_V.
type synthComp struct {
	mBin int       // index of the bin; bright edge synthPhiMMin + mBin·synthDM
	geom int       // density geometry
	law  colourLaw // colour relation
	w    float64   // stars pc⁻³ at the Sun in the bin
}

type synthGen struct {
	seed   uint64
	vlim   float64
	dust   bool
	keepV  bool    // record each kept star's float64 V in its block (SkyCache)
	lastV  float64 // the V of the star draw kept last
	nM     int     // number of M bins
	comps  []synthComp
	lnR    [synthNR]float64
	r      [synthNR]float64
	mu     [synthNR]float64 // 5 log10(r/10)
	dlnR   float64
	cumPhi []float64 // per-cell cumulative expected counts over comps

	// Per-cell line-of-sight tables.
	cum [geomCount][synthNR]float64 // C_g(r_k), stars sr⁻¹ per unit density at the Sun
	mod [synthNR]float64            // m(r_k) = μ + A
	ext [synthNR]float64            // A(r_k)
}

func newSynthGen(opt SynthOptions) *synthGen { return newSynthGenLimit(opt, opt.magLimit()) }

// newSynthGenLimit is newSynthGen with the limit vlim given unclamped.
func newSynthGenLimit(opt SynthOptions, vlim float64) *synthGen {
	g := &synthGen{
		seed: opt.seed(),
		vlim: vlim,
		dust: !opt.NoExtinction,
	}
	g.dlnR = math.Log(synthRMax/synthRMin) / (synthNR - 1)
	for k := range g.lnR {
		g.lnR[k] = math.Log(synthRMin) + float64(k)*g.dlnR
		g.r[k] = math.Exp(g.lnR[k])
		g.mu[k] = 5*g.lnR[k]/math.Ln10 - 5
	}
	// Every bin of the luminosity function, whatever the limit, so that the
	// population (and the random draws made from it) never depends on it.
	g.nM = int(math.Ceil((synthMMax0 - synthPhiMMin) / synthDM))
	for j := 0; j < g.nM; j++ {
		m := synthPhiMMin + (float64(j)+0.5)*synthDM
		phi := synthPhi(m) * synthDM
		fg := interpUniform(synthGiantFrac[:], synthPhiMMin, 1, m)
		ms, gi := phi*(1-fg), phi*fg
		add := func(geom int, law colourLaw, w float64) {
			if w > 0 {
				g.comps = append(g.comps, synthComp{mBin: j, geom: geom, law: law, w: w})
			}
		}
		fThin := 1 - synthThickF - synthHaloF
		if m < synthOldTurnoff {
			add(geomThin0+synthMSHeight(m), lawMS, ms)
		} else {
			add(geomOld, lawMS, ms*fThin)
			add(geomThick, lawThickMS, ms*synthThickF)
			add(geomHalo, lawHaloMS, ms*synthHaloF)
		}
		if m < -2.5 {
			add(geomLum, lawLuminous, gi)
		} else {
			add(geomOld, lawGiant, gi*fThin)
			add(geomThick, lawThickGiant, gi*synthThickF)
			add(geomHalo, lawHaloGiant, gi*synthHaloF)
		}
	}
	g.cumPhi = make([]float64, len(g.comps))
	return g
}

// Magnitude slices and identifiers of the sampled stars. Slice 0 holds the
// stars with V ≤ synthSlice0, slice s ≥ 1 those with
// synthSlice0 + s − 1 < V ≤ synthSlice0 + s. Each (cell, slice) is drawn from
// its own random stream, seeded from the sky's seed, the cell and the slice,
// so a star never depends on how deep, or in which cells, a sky was asked
// for: a deeper sky only adds stars. The star j of slice s in cell c has the
// identifier SyntheticIDBase + s·synthSliceStride + c·synthCellStride + j.
const (
	synthSlice0      = 2.0
	synthSliceStride = 10_000_000_000
	synthCellStride  = 1_000_000
	synthCells       = synthNL * synthNB
)

// synthSliceOf returns the slice of magnitude v.
func synthSliceOf(v float64) int {
	if v <= synthSlice0 {
		return 0
	}
	return int(math.Ceil(v - synthSlice0))
}

// synthCellGeom returns the bounds of cell c: sin b in [s0, s1], l in
// [l0, l1] degrees.
func synthCellGeom(c int) (s0, s1, l0, l1 float64) {
	ib, il := c/synthNL, c%synthNL
	s0 = -1 + 2*float64(ib)/synthNB
	s1 = -1 + 2*float64(ib+1)/synthNB
	l0 = 360 * float64(il) / synthNL
	l1 = 360 * float64(il+1) / synthNL
	return
}

// SynthCell describes a cell of the synthetic sky's sampling grid for
// SynthOptions.CellLimit: Dir is the ICRS unit vector of its centre and
// Radius (radians) the angular radius of a cap around Dir holding the
// whole cell.
type SynthCell struct {
	Dir    [3]float64
	Radius float64
}

// synthCellCap returns the cap holding cell c, from a table computed once
// (a frame of the built-in sky asks for every cell's).
func synthCellCap(c int) SynthCell { return synthCaps()[c] }

// synthCaps holds every cell's cap, in cell order.
var synthCaps = sync.OnceValue(func() *[synthCells]SynthCell {
	var t [synthCells]SynthCell
	for c := range t {
		t[c] = cellCap(c)
	}
	return &t
})

// cellCap computes the cap holding cell c.
func cellCap(c int) SynthCell {
	s0, s1, l0, l1 := synthCellGeom(c)
	sc := 0.5 * (s0 + s1)
	lc := 0.5 * (l0 + l1) * math.Pi / 180
	cc := math.Sqrt(1 - sc*sc)
	cx, cy, cz := cc*math.Cos(lc), cc*math.Sin(lc), sc
	// The farthest point of the cell from its centre is on its boundary;
	// sample the boundary finely (the cell is small) and widen slightly.
	minDot := 1.0
	const n = 16
	for i := 0; i <= n; i++ {
		f := float64(i) / n
		for _, pt := range [][2]float64{{s0, l0 + f*(l1-l0)}, {s1, l0 + f*(l1-l0)}, {s0 + f*(s1-s0), l0}, {s0 + f*(s1-s0), l1}} {
			sb, l := pt[0], pt[1]*math.Pi/180
			cb := math.Sqrt(math.Max(0, 1-sb*sb))
			d := cx*cb*math.Cos(l) + cy*cb*math.Sin(l) + cz*sb
			minDot = math.Min(minDot, d)
		}
	}
	x, y, z := galacticToICRS(cx, cy, cz)
	return SynthCell{Dir: [3]float64{x, y, z}, Radius: math.Acos(math.Max(-1, minDot)) * 1.02}
}

// synthBlock holds the stars of one (cell, slice), and for a SkyCache the
// exact V each was drawn with.
type synthBlock struct {
	s Stars
	v []float64
	// vmax bounds v from above (it is at least 0): a limit at or above
	// it keeps every star without reading v.
	vmax float64
}

// run samples every sky cell to its limit and appends the stars to s, slice
// by slice and, within a slice, cell by cell.
func (g *synthGen) run(s *Stars, opt SynthOptions) {
	limits := make([]float64, synthCells)
	nSlices := 0
	for c := range limits {
		lim := g.vlim
		if opt.CellLimit != nil {
			if l := opt.CellLimit(synthCellCap(c)); l < lim {
				lim = l // NaN keeps the global limit
			}
		}
		limits[c] = lim
		nSlices = max(nSlices, synthSliceOf(lim)+1)
	}
	blocks := make([][]synthBlock, synthCells)
	all := make([]int, synthCells)
	for c := range all {
		all[c] = c
	}
	g.drawCells(all, limits, blocks)
	n := s.Len()
	for c := range blocks {
		for _, b := range blocks[c] {
			n += b.s.Len()
		}
	}
	s.grow(n)
	for sl := 0; sl < nSlices; sl++ {
		for c := range blocks {
			if sl < len(blocks[c]) {
				s.appendStars(&blocks[c][sl].s)
			}
		}
	}
}

// cell samples the slices of cell c down to limit lim.
func (g *synthGen) cell(c int, lim float64) []synthBlock {
	if lim < MinSynthMagLimit {
		return nil
	}
	ns := synthSliceOf(lim) + 1
	out := make([]synthBlock, ns)
	s0, s1, l0, l1 := synthCellGeom(c)
	sb := 0.5 * (s0 + s1)
	cb := math.Sqrt(1 - sb*sb)
	lc := 0.5 * (l0 + l1) * math.Pi / 180
	// Tables deep enough for the last slice's faint edge.
	g.vlim = synthSlice0 + float64(ns-1)
	g.lineOfSight(cb*math.Cos(lc), sb)
	dOmega := 4 * math.Pi / synthCells
	// Cumulative counts per geometry at each M bin's centre, at the slice
	// edges: cLo for the bright edge of the current slice, cHi for its faint
	// edge (the next slice's bright edge).
	cLo := make([]float64, g.nM*geomCount)
	cHi := make([]float64, g.nM*geomCount)
	for sl := 0; sl < ns; sl++ {
		v1, v2 := math.Inf(-1), synthSlice0+float64(sl)
		if sl > 0 {
			v1 = v2 - 1
			cLo, cHi = cHi, cLo
		}
		for j := 0; j < g.nM; j++ {
			m := synthPhiMMin + (float64(j)+0.5)*synthDM
			k, f := g.limit(v2 - m)
			for gi := 0; gi < geomCount; gi++ {
				cHi[j*geomCount+gi] = g.cumAt(gi, k, f)
			}
		}
		rng := rand.New(rand.NewPCG(g.seed^0x9e3779b97f4a7c15, uint64(sl)<<32|uint64(c)))
		total := 0.0
		for i := range g.comps {
			cp := &g.comps[i]
			idx := cp.mBin*geomCount + cp.geom
			d := cHi[idx]
			if sl > 0 {
				d -= cLo[idx]
			}
			total += cp.w * dOmega * d
			g.cumPhi[i] = total
		}
		n := min(poisson(rng, total), synthCellStride-1)
		id := SyntheticIDBase + int64(sl)*synthSliceStride + int64(c)*synthCellStride
		blk := &out[sl].s
		blk.grow(n)
		for j := 0; j < n; j++ {
			g.draw(rng, blk, id+int64(j), total, v1, v2, lim, s0, s1, l0, l1)
			if g.keepV && len(out[sl].v) < blk.Len() {
				out[sl].v = append(out[sl].v, g.lastV)
				out[sl].vmax = max(out[sl].vmax, g.lastV)
			}
		}
	}
	return out
}

// drawCells draws each cell c of todo to limits[c] into blocks[c], on up
// to 8 goroutines, each with its own copy of g's per-cell state. A cell's
// blocks come from its own random streams, so they do not depend on the
// goroutine or the order.
func (g *synthGen) drawCells(todo []int, limits []float64, blocks [][]synthBlock) {
	cells := make(chan int)
	var wg sync.WaitGroup
	for range min(runtime.GOMAXPROCS(0), 8, len(todo)) {
		wg.Go(func() {
			w := *g
			w.cumPhi = make([]float64, len(g.comps))
			for c := range cells {
				blocks[c] = w.cell(c, limits[c])
			}
		})
	}
	for _, c := range todo {
		cells <- c
	}
	close(cells)
	wg.Wait()
}

// lineOfSight fills the per-cell tables for the direction with cos b·cos l =
// cbl and sin b = sb (galactic).
func (g *synthGen) lineOfSight(cbl, sb float64) {
	var prev [geomCount]float64
	prevA, prevR := 0.0, 0.0
	prevDust := 0.0
	rgcSun2 := synthR0*synthR0 + (synthZSun/synthHaloQ)*(synthZSun/synthHaloQ) + synthHaloCore*synthHaloCore
	dustSun := math.Exp(-synthZSun / synthDustH) // dust is not normalised at the Sun
	// Beyond the distance where even the most luminous bin is fainter than
	// the limit nothing is needed: the tables are held constant there and the
	// modulus set to +Inf.
	modStop := g.vlim - synthPhiMMin
	for k := 0; k < synthNR; k++ {
		if k > 1 && g.mod[k-1] > modStop {
			for ; k < synthNR; k++ {
				for i := range g.cum {
					g.cum[i][k] = g.cum[i][k-1]
				}
				g.ext[k] = g.ext[k-1]
				g.mod[k] = math.Inf(1)
			}
			break
		}
		r := g.r[k]
		// Galactocentric cylindrical R and height z of the point.
		rp := r * math.Sqrt(math.Max(0, 1-sb*sb)) // projected on the plane
		x := synthR0 - r*cbl
		yy := rp*rp - (r*cbl)*(r*cbl)
		R := math.Sqrt(math.Max(0, x*x+yy))
		z := r*sb + synthZSun
		az := math.Abs(z)
		var rho [geomCount]float64
		// e = exp(−(|z| − z⊙)/synthHBase); exp(−(|z| − z⊙)/h) = e^n.
		e := math.Exp(-(az - synthZSun) / synthHBase)
		er := math.Exp(-(R - synthR0) / synthLBase)
		thinR := ipow(er, synthThinLN)
		for i, n := range synthThinN {
			rho[geomThin0+i] = thinR * ipow(e, n)
		}
		rho[geomThick] = ipow(er, synthThickLN) * ipow(e, synthThickN)
		rgc2 := R*R + (z/synthHaloQ)*(z/synthHaloQ) + synthHaloCore*synthHaloCore
		// (r/r⊙)^−3 with n = synthHaloN = 3, as q^−3/2 of the squares.
		q := rgc2 / rgcSun2
		rho[geomHalo] = 1 / (q * math.Sqrt(q))
		r3 := r * r * r
		dust := 0.0
		if g.dust {
			dust = synthDustA0 / 1000 * dustSun * ipow(e, synthDustN) * ipow(er, synthDustLN)
		}
		if k == 0 {
			for i := range rho {
				g.cum[i][0] = 0
				prev[i] = rho[i] * r3
			}
			// Dust between the Sun and the inner edge.
			prevA = dust * r
			g.ext[0] = prevA
		} else {
			for i := range rho {
				v := rho[i] * r3
				g.cum[i][k] = g.cum[i][k-1] + 0.5*(prev[i]+v)*g.dlnR
				prev[i] = v
			}
			prevA += 0.5 * (prevDust + dust) * (r - prevR)
			g.ext[k] = prevA
		}
		prevDust, prevR = dust, r
		g.mod[k] = g.mu[k] + g.ext[k]
	}
}

// limit finds where the modulus grid reaches target: segment k and fraction
// f with m(r) = target at ln r = lnR[k] + f·dlnR. k = −1 when even the inner
// edge is too far; k = synthNR−1, f = 0 when the whole grid qualifies.
func (g *synthGen) limit(target float64) (int, float64) {
	if target < g.mod[0] {
		return -1, 0
	}
	if target >= g.mod[synthNR-1] {
		return synthNR - 1, 0
	}
	lo, hi := 0, synthNR-1 // mod[lo] ≤ target < mod[hi]
	for hi-lo > 1 {
		mid := (lo + hi) / 2
		if g.mod[mid] <= target {
			lo = mid
		} else {
			hi = mid
		}
	}
	return lo, (target - g.mod[lo]) / (g.mod[lo+1] - g.mod[lo])
}

// cumAt interpolates C_g at segment k, fraction f.
func (g *synthGen) cumAt(geom, k int, f float64) float64 {
	if k < 0 {
		return 0
	}
	c := &g.cum[geom]
	if k >= synthNR-1 {
		return c[synthNR-1]
	}
	return c[k] + f*(c[k+1]-c[k])
}

// draw samples one star of the current cell with v1 < V ≤ v2 and appends it
// to s when V ≤ lim (the draws are made either way, so the stars kept never
// depend on lim).
func (g *synthGen) draw(rng *rand.Rand, s *Stars, id int64, total, v1, v2, lim, s0, s1, l0, l1 float64) {
	// Component, by inverse of the cumulative expected counts.
	u := rng.Float64() * total
	lo, hi := 0, len(g.cumPhi)-1
	for lo < hi {
		mid := (lo + hi) / 2
		if g.cumPhi[mid] < u {
			lo = mid + 1
		} else {
			hi = mid
		}
	}
	cp := &g.comps[lo]
	// M_V within the bin, weighted by the volume in which the star falls in
	// the slice, C(r(v2 − M)) − C(r(v1 − M)); C(r(v2 − M_bright)) bounds it.
	mb := synthPhiMMin + float64(cp.mBin)*synthDM
	k0, f0 := g.limit(v2 - mb)
	cMax := g.cumAt(cp.geom, k0, f0)
	var m, c1, c2 float64
	var k int
	var f float64
	for try := 0; ; try++ {
		m = mb + synthDM*rng.Float64()
		k, f = g.limit(v2 - m)
		c2 = g.cumAt(cp.geom, k, f)
		c1 = 0
		if !math.IsInf(v1, -1) {
			k1, f1 := g.limit(v1 - m)
			c1 = g.cumAt(cp.geom, k1, f1)
		}
		if c2 > c1 && (rng.Float64()*cMax <= c2-c1 || try > 64) {
			break
		}
		if try > 64 {
			break
		}
	}
	// Distance: invert C on [C(r(v1 − M)), C(r(v2 − M))].
	c := &g.cum[cp.geom]
	t := c1 + rng.Float64()*(c2-c1)
	kk := k
	if kk > synthNR-2 {
		kk = synthNR - 2
	}
	kk = max(kk, 0)
	a, b := 0, kk+1 // c[a] ≤ t ≤ c[b]
	for b-a > 1 {
		mid := (a + b) / 2
		if c[mid] <= t {
			a = mid
		} else {
			b = mid
		}
	}
	var fr float64
	if d := c[a+1] - c[a]; d > 0 {
		fr = (t - c[a]) / d
	}
	if a == k && fr > f && k < synthNR-1 {
		fr = f
	}
	lnr := g.lnR[a] + fr*g.dlnR
	mod := g.mod[a] + fr*(g.mod[a+1]-g.mod[a])
	ext := g.ext[a] + fr*(g.ext[a+1]-g.ext[a])
	v := math.Min(m+mod, v2)
	if v <= v1 {
		v = math.Nextafter(v1, v2)
	}
	// Direction, uniform within the cell.
	sb := s0 + (s1-s0)*rng.Float64()
	l := (l0 + (l1-l0)*rng.Float64()) * math.Pi / 180
	bv0 := synthColour(cp.law, m, rng)
	if v > lim {
		return
	}
	g.lastV = v
	cb := math.Sqrt(math.Max(0, 1-sb*sb))
	sl, cl := math.Sincos(l)
	x, y, z := galacticToICRS(cb*cl, cb*sl, sb)
	bv := bv0 + ext/synthRV
	s.ID = append(s.ID, id)
	s.X = append(s.X, float32(x))
	s.Y = append(s.Y, float32(y))
	s.Z = append(s.Z, float32(z))
	s.Dist = append(s.Dist, float32(math.Exp(lnr)))
	s.Vmag = append(s.Vmag, float32(v))
	var fl Flag
	if !BVInRange(bv0) {
		fl = FlagTeffExtrapolated
	}
	s.Teff = append(s.Teff, float32(TeffFromBV(bv0)))
	s.BV = append(s.BV, float32(bv))
	s.Flags = append(s.Flags, fl)
}

// ipow returns x^n for n ≥ 0 by repeated squaring.
func ipow(x float64, n int) float64 {
	p := 1.0
	for n > 0 {
		if n&1 != 0 {
			p *= x
		}
		x *= x
		n >>= 1
	}
	return p
}

// poisson draws a Poisson variate of mean lam: by sequential inversion below
// 500, else from the normal approximation (relative error of the shape
// ≲ 1/√lam, far below the model's own uncertainty).
func poisson(rng *rand.Rand, lam float64) int {
	if !(lam > 0) {
		return 0
	}
	if lam >= 500 {
		n := math.Round(lam + math.Sqrt(lam)*rng.NormFloat64())
		return int(math.Max(0, n))
	}
	u := rng.Float64()
	p := math.Exp(-lam)
	c := p
	n := 0
	for u > c && n < 10000 {
		n++
		p *= lam / float64(n)
		c += p
	}
	return n
}

// grow makes room for n stars in the core columns.
func (s *Stars) grow(n int) {
	if n <= cap(s.ID) {
		return
	}
	s.ID = append(make([]int64, 0, n), s.ID...)
	s.X = append(make([]float32, 0, n), s.X...)
	s.Y = append(make([]float32, 0, n), s.Y...)
	s.Z = append(make([]float32, 0, n), s.Z...)
	s.Dist = append(make([]float32, 0, n), s.Dist...)
	s.Vmag = append(make([]float32, 0, n), s.Vmag...)
	s.Teff = append(make([]float32, 0, n), s.Teff...)
	s.BV = append(make([]float32, 0, n), s.BV...)
	s.Flags = append(make([]Flag, 0, n), s.Flags...)
}

// appendStars appends the core columns of b (a block of sampled stars: no
// optional columns, no names).
func (s *Stars) appendStars(b *Stars) { s.appendRows(b, 0, b.Len()) }

// appendRows appends the core columns of b's rows lo ≤ i < hi.
func (s *Stars) appendRows(b *Stars, lo, hi int) {
	s.ID = append(s.ID, b.ID[lo:hi]...)
	s.X = append(s.X, b.X[lo:hi]...)
	s.Y = append(s.Y, b.Y[lo:hi]...)
	s.Z = append(s.Z, b.Z[lo:hi]...)
	s.Dist = append(s.Dist, b.Dist[lo:hi]...)
	s.Vmag = append(s.Vmag, b.Vmag[lo:hi]...)
	s.Teff = append(s.Teff, b.Teff[lo:hi]...)
	s.BV = append(s.BV, b.BV[lo:hi]...)
	s.Flags = append(s.Flags, b.Flags[lo:hi]...)
}

// padOptional extends the optional columns present to Len rows, as Concat
// fills them for rows without: proper motion 0, radial velocity NaN.
func (s *Stars) padOptional() {
	n := s.Len()
	if s.PMRA != nil {
		for len(s.PMRA) < n {
			s.PMRA, s.PMDec = append(s.PMRA, 0), append(s.PMDec, 0)
		}
	}
	if s.RV != nil {
		nan := float32(math.NaN())
		for len(s.RV) < n {
			s.RV = append(s.RV, nan)
		}
	}
}
