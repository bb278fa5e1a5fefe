package camera

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/spatial/r3"
)

// Sentinel errors. Every error returned by this package wraps one of them
// (test with errors.Is) and names the offending value or field.
var (
	// ErrSpeed reports an unusable β, γ or rapidity.
	ErrSpeed = errors.New("camera: invalid speed")
	// ErrDirection reports an unusable direction vector (zero, NaN or Inf).
	ErrDirection = errors.New("camera: invalid direction")
	// ErrProjection reports an unusable projection or orientation.
	ErrProjection = errors.New("camera: invalid projection")
)

// MaxGamma is the largest Lorentz factor a Boost accepts: above it the
// intermediate (1/γ)² of 1 − β and 1/(1 + β cos θ) behind the ship approach
// the float64 range.
const MaxGamma = 1e150

// Boost is a pure Lorentz boost from the catalogue frame S to the ship frame
// S′, which moves with velocity β·b̂ relative to S. The zero value is the
// identity (β = 0) and is ready to use.
//
// A Boost carries γ, γβ and 1 − β as well as β, so that it stays accurate
// where β itself rounds to 1 (γ above ≈ 1e8): Apply and Doppler are tested
// against a 400-bit reference up to γ = 1e9, and nothing overflows up to
// MaxGamma = 1e150.
type Boost struct {
	dir          r3.Vec  // b̂, unit; zero when β = 0 and no direction was given
	beta         float64 // β, in [0, 1]
	gamma        float64 // γ ≥ 1; 0 in the zero value (read as 1)
	gammaBeta    float64 // γβ = sinh φ
	oneMinusBeta float64 // 1 − β = 1/(γ²(1+β)); 0 in the zero value (read as 1)
	rapidity     float64 // φ = atanh β
}

// NewBoost returns the boost with speed β (0 ≤ β < 1, in units of c) along
// dir. dir need not be unit; it is normalised. When β = 0 dir may be zero
// (or anything else): the boost is then the identity.
//
// For γ above about 1e8 β rounds to 1 in float64; use NewBoostGamma or
// NewBoostRapidity there.
func NewBoost(dir r3.Vec, beta float64) (Boost, error) {
	switch {
	case math.IsNaN(beta) || math.IsInf(beta, 0):
		return Boost{}, fmt.Errorf("%w: β = %v is not finite", ErrSpeed, beta)
	case beta < 0:
		return Boost{}, fmt.Errorf("%w: β = %v is negative (reverse the direction instead)", ErrSpeed, beta)
	case beta >= 1:
		return Boost{}, fmt.Errorf("%w: β = %v is not below 1 (give γ or the rapidity for speeds this close to c)", ErrSpeed, beta)
	}
	if beta == 0 {
		return identity(dir), nil
	}
	u, err := unitDir(dir)
	if err != nil {
		return Boost{}, err
	}
	omb := 1 - beta // exact for β ≥ 0.5 (Sterbenz), correctly rounded below
	g := 1 / math.Sqrt(omb*(1+beta))
	return Boost{
		dir:          u,
		beta:         beta,
		gamma:        g,
		gammaBeta:    g * beta,
		oneMinusBeta: omb,
		rapidity:     math.Atanh(beta),
	}, nil
}

// NewBoostGamma returns the boost with Lorentz factor 1 ≤ γ ≤ MaxGamma
// along dir. It keeps 1 − β = 1/(γ²(1+β)) to full precision. γ = 1 is
// the identity and then dir may be zero. For speeds with γ − 1 below about
// 1e-8 prefer NewBoost: γ itself then holds few significant digits of β.
func NewBoostGamma(dir r3.Vec, gamma float64) (Boost, error) {
	switch {
	case math.IsNaN(gamma) || math.IsInf(gamma, 0):
		return Boost{}, fmt.Errorf("%w: γ = %v is not finite", ErrSpeed, gamma)
	case gamma < 1:
		return Boost{}, fmt.Errorf("%w: γ = %v is below 1", ErrSpeed, gamma)
	case gamma > MaxGamma:
		return Boost{}, fmt.Errorf("%w: γ = %v is above %v", ErrSpeed, gamma, MaxGamma)
	}
	if gamma == 1 {
		return identity(dir), nil
	}
	u, err := unitDir(dir)
	if err != nil {
		return Boost{}, err
	}
	gb := math.Sqrt((gamma - 1) * (gamma + 1))
	beta := gb / gamma
	ig := 1 / gamma
	return Boost{
		dir:          u,
		beta:         beta,
		gamma:        gamma,
		gammaBeta:    gb,
		oneMinusBeta: ig * ig / (1 + beta),
		rapidity:     math.Asinh(gb),
	}, nil
}

// NewBoostRapidity returns the boost with rapidity φ ≥ 0 along dir
// (β = tanh φ, γ = cosh φ). φ = 0 is the identity and then dir may be zero.
// φ above acosh(MaxGamma) ≈ 346 is an error.
func NewBoostRapidity(dir r3.Vec, phi float64) (Boost, error) {
	switch {
	case math.IsNaN(phi) || math.IsInf(phi, 0):
		return Boost{}, fmt.Errorf("%w: rapidity φ = %v is not finite", ErrSpeed, phi)
	case phi < 0:
		return Boost{}, fmt.Errorf("%w: rapidity φ = %v is negative (reverse the direction instead)", ErrSpeed, phi)
	}
	if phi == 0 {
		return identity(dir), nil
	}
	g := math.Cosh(phi)
	if g > MaxGamma {
		return Boost{}, fmt.Errorf("%w: rapidity φ = %v gives γ = %v, above %v", ErrSpeed, phi, g, MaxGamma)
	}
	u, err := unitDir(dir)
	if err != nil {
		return Boost{}, err
	}
	e := math.Exp(-2 * phi)
	return Boost{
		dir:          u,
		beta:         math.Tanh(phi),
		gamma:        g,
		gammaBeta:    math.Sinh(phi),
		oneMinusBeta: 2 * e / (1 + e), // 1 − tanh φ without cancellation
		rapidity:     phi,
	}, nil
}

// identity returns the β = 0 boost, keeping dir when it is a usable direction
// so that Dir reports it.
func identity(dir r3.Vec) Boost {
	u, err := unitDir(dir)
	if err != nil {
		u = r3.Vec{}
	}
	return Boost{dir: u, gamma: 1, oneMinusBeta: 1}
}

// unitDir normalises v, or reports why it cannot.
func unitDir(v r3.Vec) (r3.Vec, error) {
	if !finiteVec(v) {
		return r3.Vec{}, fmt.Errorf("%w: (%v, %v, %v) is not finite", ErrDirection, v.X, v.Y, v.Z)
	}
	n := r3.Norm(v)
	if n == 0 {
		return r3.Vec{}, fmt.Errorf("%w: (%v, %v, %v) has zero length", ErrDirection, v.X, v.Y, v.Z)
	}
	return r3.Scale(1/n, v), nil
}

func finiteVec(v r3.Vec) bool {
	return !math.IsNaN(v.X) && !math.IsInf(v.X, 0) &&
		!math.IsNaN(v.Y) && !math.IsInf(v.Y, 0) &&
		!math.IsNaN(v.Z) && !math.IsInf(v.Z, 0)
}

// Beta returns β = v/c, in [0, 1]. It is exactly 1 when γ is so large that
// β rounds to 1; use OneMinusBeta for the gap.
func (b Boost) Beta() float64 { return b.beta }

// Gamma returns the Lorentz factor γ = 1/√(1−β²).
func (b Boost) Gamma() float64 {
	if b.gamma == 0 {
		return 1
	}
	return b.gamma
}

// GammaBeta returns γβ = sinh φ, the spatial part of the four-velocity in
// units of c.
func (b Boost) GammaBeta() float64 { return b.gammaBeta }

// Rapidity returns φ = atanh β.
func (b Boost) Rapidity() float64 { return b.rapidity }

// OneMinusBeta returns 1 − β, accurate to working precision even when β
// rounds to 1.
func (b Boost) OneMinusBeta() float64 {
	if b.gamma == 0 {
		return 1
	}
	return b.oneMinusBeta
}

// Dir returns b̂, the unit direction of the ship's velocity in S (ICRS axes).
// It is the zero vector for an identity boost built without a direction.
func (b Boost) Dir() r3.Vec { return b.dir }

// Velocity returns β·b̂, the ship's velocity in units of c.
func (b Boost) Velocity() r3.Vec { return r3.Scale(b.beta, b.dir) }

// Inverse returns the boost from S′ back to S (β → −β). It is stored as the
// same speed along −b̂, so Beta stays non-negative and Dir is reversed.
// Inverse().Apply(Apply(n)) returns n, and D′(n′) = 1/D(n).
func (b Boost) Inverse() Boost {
	b.dir = r3.Scale(-1, b.dir)
	return b
}

// consts returns the per-boost constants of the kernel with the zero value
// read as the identity.
func (b Boost) consts() (omb, beta, gamma, invGamma float64) {
	if b.gamma == 0 {
		return 1, 0, 1, 1
	}
	return b.oneMinusBeta, b.beta, b.gamma, 1 / b.gamma
}

// Doppler returns the Doppler factor D = γ(1 + β cos θ) (observed over
// emitted frequency) of light arriving from direction n (unit vector from
// the observer toward the source in S; cos θ = n·b̂). It is computed as
// γ[(1 − β) + β(1 + cos θ)] with 1 + cos θ = |n + b̂|²/2, which keeps full
// relative precision behind a fast ship where D → 1/(2γ).
//
// n should be a unit vector; a vector whose length differs from 1 by more
// than about 1e-15 is normalised first. Zero or NaN n gives NaN.
func (b Boost) Doppler(n r3.Vec) float64 {
	omb, beta, gamma, _ := b.consts()
	nx, ny, nz := unitish(n.X, n.Y, n.Z)
	sx, sy, sz := nx+b.dir.X, ny+b.dir.Y, nz+b.dir.Z
	sp := 0.5 * (sx*sx + sy*sy + sz*sz)
	return gamma * (omb + beta*sp)
}

// Apply returns the apparent direction n′ in S′ of light that arrives from
// direction n in S, and its Doppler factor D = γ(1 + β cos θ):
//
//	n′ = (n + ((γ − 1) cos θ + γβ) b̂) / D.
//
// The implementation uses the equivalent split n′ = cos θ′ b̂ + (n − cos θ b̂)/D
// with cos θ′ = (β + cos θ)/(1 + β cos θ) and β + cos θ = (1 + cos θ) − (1 − β),
// 1 + cos θ = |n + b̂|²/2, and n − cos θ b̂ = (n + b̂) − (1 + cos θ) b̂, so both
// the stars ahead and those straight behind keep full precision for γ up to
// 1e8 and beyond. n′ is a unit vector to within a few ulp.
//
// n should be a unit vector; a vector whose length differs from 1 by more
// than about 1e-15 is normalised first. Zero or NaN n gives NaN.
func (b Boost) Apply(n r3.Vec) (np r3.Vec, d float64) {
	omb, beta, gamma, ig := b.consts()
	x, y, z, d := kernel(b.dir.X, b.dir.Y, b.dir.Z, omb, beta, gamma, ig, n.X, n.Y, n.Z)
	return r3.Vec{X: x, Y: y, Z: z}, d
}

// ApplyBatch applies the boost to the unit vectors (x[i], y[i], z[i]) and
// writes n′ to (ox[i], oy[i], oz[i]) and D to d[i]. The slices may alias
// (in-place use, ox = x, is allowed); d may be nil when D is not wanted.
// It processes the length of the shortest slice given and never allocates.
func (b Boost) ApplyBatch(x, y, z, ox, oy, oz, d []float64) {
	n := min(len(x), len(y), len(z), len(ox), len(oy), len(oz))
	if d != nil {
		n = min(n, len(d))
	}
	x, y, z, ox, oy, oz = x[:n], y[:n], z[:n], ox[:n], oy[:n], oz[:n]
	omb, beta, gamma, ig := b.consts()
	bx, by, bz := b.dir.X, b.dir.Y, b.dir.Z
	if d == nil {
		for i := range x {
			ox[i], oy[i], oz[i], _ = kernel(bx, by, bz, omb, beta, gamma, ig, x[i], y[i], z[i])
		}
		return
	}
	d = d[:n]
	for i := range x {
		ox[i], oy[i], oz[i], d[i] = kernel(bx, by, bz, omb, beta, gamma, ig, x[i], y[i], z[i])
	}
}

// unitish returns (x, y, z) normalised when its squared length is not 1 to
// within a few ulp; the branch is almost never taken for unit input.
func unitish(x, y, z float64) (float64, float64, float64) {
	m := x*x + y*y + z*z
	if m-1 > 4e-16 || 1-m > 4e-16 {
		s := 1 / math.Sqrt(m)
		return x * s, y * s, z * s
	}
	return x, y, z
}

// kernel is the per-star transform shared by Apply and ApplyBatch. It is
// small enough to be inlined.
func kernel(bx, by, bz, omb, beta, gamma, ig, nx, ny, nz float64) (ox, oy, oz, d float64) {
	nx, ny, nz = unitish(nx, ny, nz)
	sx, sy, sz := nx+bx, ny+by, nz+bz   // n + b̂, exact where n ≈ −b̂
	sp := 0.5 * (sx*sx + sy*sy + sz*sz) // 1 + cos θ
	q := omb + beta*sp                  // 1 + β cos θ
	iq := 1 / q
	par := (sp - omb) * iq // cos θ′ = (β + cos θ)/(1 + β cos θ)
	iD := iq * ig          // 1/D
	// p = n − cos θ b̂ = (n + b̂) − (1 + cos θ) b̂. Where n and b̂ are unit
	// only to an ulp, p keeps a parallel residue of that size; behind a fast
	// ship 1/D would magnify it, so project it out.
	px, py, pz := sx-sp*bx, sy-sp*by, sz-sp*bz
	r := px*bx + py*by + pz*bz
	px, py, pz = px-r*bx, py-r*by, pz-r*bz
	ox = par*bx + px*iD
	oy = par*by + py*iD
	oz = par*bz + pz*iD
	return ox, oy, oz, gamma * q
}
