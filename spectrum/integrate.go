package spectrum

import "math"

// This file integrates a diluted blackbody against the passbands directly
// (no tables). With u = 1/λ and a = c₂/T,
//
//	∫ B_λ(λ, T) S(λ) λ^q dλ = 2hc² ∫ p(u) / (e^{au} − 1) du,  p(u) = u^{3−q} S(1/u),
//
// and on each passband panel [λᵢ, λᵢ₊₁] (S linear in λ) it uses one of two
// exact-in-principle rules, chosen by the size of a·u₀ (u₀ = 1/λᵢ₊₁):
//
//   - a·u₀ ≥ 8 (Wien side): 1/(e^{au} − 1) = Σ_k e^{−kau}, p is a cubic in
//     v = u − u₀, and ∫₀^Δ vⁿ e^{−bv} dv = n!/bⁿ⁺¹ · P(n+1, bΔ) with P the
//     regularised incomplete gamma function. Every term is carried relative
//     to e^{−a·u₀}, so results are logarithms and never underflow, even at
//     T = 10⁻³ K where the fluxes are ~e^{−10⁷}.
//   - a·u₀ < 8: the integrand varies by less than 20 % across a panel and a
//     6-point Gauss–Legendre rule is accurate to ~1e-15.
//
// The same machinery gives T·∂I/∂T (needed for the Hermite table): the
// kernel's logarithmic T-derivative is a·u·e^{au}/(e^{au} − 1)².

// band is a set of passband columns sampled on one uniform λ grid, linear
// between nodes and zero outside, weighted by λ^q (q = 0 for energy
// integrals such as XYZ, q = 1 for photon-weighted means such as V).
type band struct {
	lam0, step float64
	n          int // number of nodes
	ncol       int
	q          int
	w          [3][]float64 // w[col][node]
}

// bandResult holds, per column, ln ∫ B_λ S λ^q dλ (B_λ in W m⁻² sr⁻¹ m⁻¹,
// λ in m) and its logarithmic derivative d ln I / d ln T.
type bandResult struct {
	ln, dln [3]float64
}

var (
	cmfBand, vBand band
)

func init() {
	cmfBand = band{lam0: cmfLambda0, step: cmfStep, n: len(cmfTable), ncol: 3, q: 0}
	for c := 0; c < 3; c++ {
		cmfBand.w[c] = make([]float64, len(cmfTable))
		for i := range cmfTable {
			cmfBand.w[c][i] = cmfTable[i][c]
		}
	}
	vBand = band{lam0: vLambda0, step: vStep, n: len(vTable), ncol: 1, q: 1}
	vBand.w[0] = vTable[:]
}

// Gauss–Legendre 6-point nodes and weights on [−1, 1].
var (
	gl6x = [6]float64{-0.9324695142031521, -0.6612093864662645, -0.2386191860831969,
		0.2386191860831969, 0.6612093864662645, 0.9324695142031521}
	gl6w = [6]float64{0.1713244923791704, 0.3607615730481386, 0.4679139345726910,
		0.4679139345726910, 0.3607615730481386, 0.1713244923791704}
)

// lambda returns node i's wavelength, m.
func (b *band) lambda(i int) float64 { return b.lam0 + float64(i)*b.step }

// taylor returns the coefficients cₙ of p(u) = u^m S(1/u) = Σ cₙ (u − u₀)ⁿ on
// the panel whose long end is λl = 1/u₀, where S(λl) = s1 and dS/dλ = slope.
// cₙ = u₀^{m−n} [s1·C(m,n) − slope·λl·C(m−1,n−1)].
func taylor(m int, u0, lamL, s1, slope float64) (c [5]float64) {
	bl := slope * lamL
	binom := [5][5]float64{{1}, {1, 1}, {1, 2, 1}, {1, 3, 3, 1}, {1, 4, 6, 4, 1}}
	for n := 0; n <= m; n++ {
		v := s1 * binom[m][n]
		if n >= 1 {
			v -= bl * binom[m-1][n-1]
		}
		for j := n; j < m; j++ {
			v *= u0
		}
		c[n] = v
	}
	return c
}

// gammaInts fills g[n] = ∫₀^Δ vⁿ e^{−bv} dv for n = 0..4.
func gammaInts(b, delta float64, g *[5]float64) {
	y := b * delta
	ey := math.Exp(-y)
	// q[n] = P(n+1, y) = e^{−y} Σ_{j>n} y^j/j!
	var q [5]float64
	if y >= 8 {
		term, sum := 1.0, 1.0
		for n := 0; n < 5; n++ {
			q[n] = 1 - ey*sum
			term *= y / float64(n+1)
			sum += term
		}
	} else {
		// term_j = e^{−y} y^j / j!
		term := ey
		for j := 1; j <= 5; j++ {
			term *= y / float64(j)
		}
		// term = e^{-y} y^5/5!
		sum, t := 0.0, term
		for j := 5; j < 200; j++ {
			sum += t
			t *= y / float64(j+1)
			if t < 1e-18*sum || t == 0 {
				break
			}
		}
		q[4] = sum
		t = term // e^{-y} y^5/5!
		for n := 4; n >= 1; n-- {
			t *= float64(n+1) / y // e^{-y} y^n/n!
			if y == 0 {
				t = 0
			}
			q[n-1] = q[n] + t
		}
	}
	// g[n] = n!/b^{n+1} q[n]
	f := 1 / b
	for n := 0; n < 5; n++ {
		if n > 0 {
			f *= float64(n) / b
		}
		g[n] = f * q[n]
	}
}

// integrate returns ln ∫ B_λ S λ^q dλ for every column at a = c₂/T.
func (b *band) integrate(a float64) bandResult {
	var (
		lnJ  [3][128]float64
		drJ  [3][128]float64
		okJ  [3][128]bool
		npan = b.n - 1
		m    = 3 - b.q
	)
	for i := 0; i < npan; i++ {
		lamS, lamL := b.lambda(i), b.lambda(i+1)
		u0, u1 := 1/lamL, 1/lamS
		du := b.step / (lamS * lamL)
		au0 := a * u0
		var s0, s1 [3]float64
		any := false
		for c := 0; c < b.ncol; c++ {
			s0[c], s1[c] = b.w[c][i], b.w[c][i+1]
			if s0[c] != 0 || s1[c] != 0 {
				any = true
			}
		}
		if !any {
			continue
		}
		var S0, S1 [3]float64
		if au0 >= 8 {
			var cs [3][5]float64
			for c := 0; c < b.ncol; c++ {
				cs[c] = taylor(m, u0, lamL, s1[c], (s1[c]-s0[c])/b.step)
			}
			var g [5]float64
			scale := 1.0 // e^{−(k−1) a u₀}
			for k := 1; k < 64; k++ {
				kb := float64(k) * a
				gammaInts(kb, du, &g)
				for c := 0; c < b.ncol; c++ {
					var j0, j1 float64
					for n := 0; n <= m; n++ {
						j0 += cs[c][n] * g[n]
						// d_n = u0 c_n + c_{n−1}
						j1 += u0 * cs[c][n] * g[n]
						j1 += cs[c][n] * g[n+1]
					}
					S0[c] += scale * j0
					S1[c] += scale * kb * j1
				}
				scale *= math.Exp(-au0)
				if scale < 1e-18 {
					break
				}
			}
		} else {
			mid, half := 0.5*(u0+u1), 0.5*(u1-u0)
			for g := 0; g < 6; g++ {
				u := mid + half*gl6x[g]
				lam := 1 / u
				om := -math.Expm1(-a * u) // 1 − e^{−au}
				f := math.Exp(-a*(u-u0)) / om
				fd := f * a * u / om
				um := u * u
				if m == 3 {
					um *= u
				}
				wgt := gl6w[g] * half * um
				for c := 0; c < b.ncol; c++ {
					sv := s0[c] + (s1[c]-s0[c])*(lam-lamS)/b.step
					S0[c] += wgt * sv * f
					S1[c] += wgt * sv * fd
				}
			}
		}
		for c := 0; c < b.ncol; c++ {
			if S0[c] > 0 {
				lnJ[c][i] = -au0 + math.Log(S0[c])
				drJ[c][i] = S1[c] / S0[c]
				okJ[c][i] = true
			}
		}
	}
	var r bandResult
	for c := 0; c < b.ncol; c++ {
		mx := math.Inf(-1)
		for i := 0; i < npan; i++ {
			if okJ[c][i] && lnJ[c][i] > mx {
				mx = lnJ[c][i]
			}
		}
		var sum, dsum float64
		for i := 0; i < npan; i++ {
			if okJ[c][i] {
				e := math.Exp(lnJ[c][i] - mx)
				sum += e
				dsum += e * drJ[c][i]
			}
		}
		r.ln[c] = mx + math.Log(sum) + math.Log(C1L)
		r.dln[c] = dsum / sum
	}
	return r
}

// wienCoef describes a column's T → 0 limit: only the panel at the long
// end of its support survives, ∫ ≈ 2hc² e^{−a u₀} Σₙ cₙ n!/aⁿ⁺¹.
type wienCoef struct {
	u0 float64
	c  [5]float64
	m  int
}

func (b *band) wien(col int) wienCoef {
	m := 3 - b.q
	for i := b.n - 2; i >= 0; i-- {
		s0, s1 := b.w[col][i], b.w[col][i+1]
		if s0 == 0 && s1 == 0 {
			continue
		}
		lamL := b.lambda(i + 1)
		u0 := 1 / lamL
		return wienCoef{u0: u0, c: taylor(m, u0, lamL, s1, (s1-s0)/b.step), m: m}
	}
	return wienCoef{}
}

// ln returns ln ∫ B_λ S λ^q dλ in the Wien limit at a = c₂/T, without the
// −a·u₀ term (the caller adds it) — i.e. ln(2hc² Σ cₙ n!/aⁿ⁺¹).
func (w *wienCoef) lnRest(a float64) float64 {
	var s float64
	f := 1 / a
	for n := 0; n <= w.m; n++ {
		if n > 0 {
			f *= float64(n) / a
		}
		s += w.c[n] * f
	}
	return math.Log(s) + math.Log(C1L)
}

// moments returns M_k = ∫ S(λ) λ^{q−k} dλ for k = 4, 5, 6 per column
// (the Rayleigh–Jeans expansion of B_λ), and ∫ S λ^q dλ (k = 0).
func (b *band) moments() (m [3][7]float64) {
	for i := 0; i < b.n-1; i++ {
		lamS := b.lambda(i)
		mid, half := lamS+0.5*b.step, 0.5*b.step
		for g := 0; g < 6; g++ {
			lam := mid + half*gl6x[g]
			wgt := gl6w[g] * half * math.Pow(lam, float64(b.q))
			for c := 0; c < b.ncol; c++ {
				sv := b.w[c][i] + (b.w[c][i+1]-b.w[c][i])*(lam-lamS)/b.step
				for k := 0; k <= 6; k++ {
					m[c][k] += wgt * sv * math.Pow(lam, -float64(k))
				}
			}
		}
	}
	return m
}
