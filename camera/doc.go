// Package camera turns catalogue directions into what a moving ship sees and
// where on an image it lands: the Lorentz boost (aberration and Doppler
// factor), the observer's position (parallax and 1/r² dilution), camera
// orientation and the image projections, plus ICRS and galactic
// coordinates.
//
// # Frames and units
//
// Catalogue frame S: barycentric ICRS axes, stars at rest, distances in
// parsecs, Sun at the origin. Ship frame S′: moves with velocity β·b̂
// relative to S and is reached by a pure boost, so its axes stay parallel to
// ICRS and apparent directions are ICRS unit vectors too. Speeds are in
// units of c; angles in the API are degrees except where a name says
// otherwise (Boost.Rapidity is dimensionless). Directions are
// gonum.org/v1/gonum/spatial/r3.Vec values.
//
// # Sign conventions
//
// n is the unit vector from the observer toward the star (the reverse of
// the light's propagation); cos θ = n·b̂, so θ = 0 is straight ahead. The
// Doppler factor D = γ(1 + β cos θ) is observed over emitted frequency: D > 1
// ahead (blueshift), D < 1 behind. Apply returns the apparent direction
//
//	n′ = (n + ((γ − 1) cos θ + γβ) b̂) / D,  cos θ′ = (cos θ + β)/(1 + β cos θ),
//
// which crowds the sky toward b̂. Boost.Inverse maps S′ back to S and
// D′(n′) = 1/D(n).
//
// # Precision
//
// A Boost carries γ, γβ and 1 − β = 1/(γ²(1+β)), not β alone, so it stays
// exact for γ up to at least 1e9 (β itself rounds to 1 above γ ≈ 1e8). The
// per-star kernel never forms 1 + β cos θ or (γ − 1) cos θ + γβ directly: it
// uses 1 + cos θ = |n + b̂|²/2, 1 + β cos θ = (1 − β) + β(1 + cos θ),
// β + cos θ = (1 + cos θ) − (1 − β) and n − cos θ b̂ = (n + b̂) − (1 + cos θ) b̂,
// which agree with a 400-bit evaluation to ~1e-14 ahead, sideways and
// straight behind. What float64 cannot avoid: n′ is stored with ~1e-16 rad
// of rounding, and the inverse boost magnifies angles near the apex by D, so
// Inverse(Apply(n)) returns n to max(1e-12, ~1e-15·D) rad.
//
// Input directions should be unit vectors; Apply and Doppler renormalise
// any whose squared length is off by more than 4e-16 (float32 catalogue
// vectors, for example), and return NaN for a zero or NaN vector.
//
// # Observer
//
// Observer.See places a star at dist·u (u its direction from the Sun),
// looks at it from Observer.Position and boosts the result. The dilution
// factor (dist/r)² multiplies the star's W = (R/r)², so W(P) = W⊙·(d⊙/r)².
// Unknown distances (+Inf, and also NaN, 0 or negative) are infinitely far:
// no parallax, dilution 1, r = +Inf. An observer exactly at a star (r = 0)
// gets r = 0 and dilution = +Inf as a flag, with the direction and D of u;
// callers skip such stars. Nothing here returns an error or panics for it.
//
// # Projections
//
// The sky is seen from inside. Pixel coordinates are continuous: (0, 0) is
// the image's top-left corner, x grows toward Orient.Right and y grows down
// (toward −Orient.Up); pixel (i, j) has its centre at (i+0.5, j+0.5). The
// image centre (W/2, H/2) shows Orient.Forward, except for a tilted fisheye
// (the centre shows the tilted axis) and the cube (Forward is at the centre
// of the +Forward face, (4.5·H, H/2)).
//
//   - Pinhole: gnomonic, x = W/2 + f·tan, f = (W/2)/tan(FOV/2); FOV is
//     horizontal (default 60°, at most 179°); directions on or behind the
//     image plane give ok = false.
//   - Equirect: 360° × 180°, longitude about Forward toward Right,
//     latitude toward Up, x = W/2 + lon·W/2π, y = H/2 − lat·H/π; W = 2H gives
//     square pixels. Straight behind is the seam at x = 0 ≡ W.
//   - Fisheye: equidistant azimuthal, radius ∝ angle from the axis, the
//     circle of diameter min(W, H) spanning FOV (default 180°, up to 360°).
//     Tilt turns the axis from Forward toward Up, so Forward appears below
//     the centre, as in a tilted dome. The point opposite the axis is
//     undefined (ok = false).
//   - Cube: a 6×1 strip of 90° pinhole faces of size H, in the order
//     +Right, −Right, +Up, −Up, +Forward, −Forward. The side faces keep Up
//     at the top; the +Up face has −Forward at its top, the −Up face has
//     +Forward at its top. Width must be 6·Height.
//
// Orientation: LookAt(forward, up, roll) builds an orthonormal right-handed
// frame (Right = Forward × Up). A zero or parallel up falls back to the
// north celestial pole (ICRS +Z), or to ICRS +X when forward is at a pole.
// Positive roll banks the camera to the right. The zero Orientation means
// DefaultOrientation: looking at RA 0°, Dec 0° with north up.
//
// Projection.Forward and Inverse never allocate and never modify the
// Projection, so one value can be shared by goroutines; Prepare caches the
// derived constants (a tangent, a tilt rotation) for speed.
//
// # Coordinates
//
// RADec / FromRADec convert ICRS vectors to right ascension and declination
// in degrees. The galactic frame is that of The Hipparcos and Tycho
// Catalogues (ESA SP-1200, Vol. 1, §1.5.3): north galactic pole at
// (α, δ) = (192.85948°, 27.12825°), galactic longitude of the north
// celestial pole 122.93192°.
//
// # Imports
//
// camera imports no other skyframe package; render and flight use it.
package camera
