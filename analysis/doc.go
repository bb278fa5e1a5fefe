// Package analysis computes the science outputs of skyframe — curves of the
// per-star transform against angle and a census of the visible sky against
// speed — as plain tables, and builds figures from them with gonum/plot.
//
// # Frames, units and signs
//
// The frames are those of package camera: the catalogue frame S (ICRS axes,
// stars at rest) and the ship frame S′ moving with velocity β·b̂. θ is the
// angle between the direction toward a star and the direction of motion b̂
// in S (the rest angle), θ′ the same angle in S′ (the apparent angle); θ = 0
// is straight ahead. Angles in tables are degrees. The Doppler factor is D =
// γ(1 + β cos θ) = 1/(γ(1 − β cos θ′)), observed over emitted frequency.
// Speeds are given as β or, for speeds too close to light for β to carry, as
// γ (Speed).
//
// Magnitudes are Johnson V as defined by package spectrum (Bessell V band,
// V = 0 ↔ 3.631 × 10⁻¹¹ W m⁻² nm⁻¹). ΔV = V′ − V is the observed minus the
// rest-frame magnitude: negative means brighter. Flux ratios are observed
// over rest-frame flux of the same star. Illuminance is in lux (CIE Y with
// Km = 683 lm/W), chromaticity is CIE 1931 (x, y).
//
// # Beaming
//
// Curves and the census use the exact point-source transform (T′ = D·T,
// W′ = W/D², bolometric F′/F = D²) unless a spectrum.Beaming says otherwise;
// the convention comparison (Conventions) puts the exact transform beside the
// D³ and D⁴ moving-source conventions of published figures, whose bolometric
// ratios are exactly D³ and D⁴.
//
// # Curves
//
// Curves samples, for each speed, the aberration θ′(θ), the Doppler factor
// D(θ′), ΔV(θ′) of blackbodies of several temperatures, and, against D, the
// bolometric and V-band flux ratios with their limits D² and 1/D (the
// Rayleigh–Jeans limit: a very hot star ahead fades in V while its
// bolometric flux rises).
//
// # Census
//
// Census transforms every star of a catalogue for each speed (camera.Observer,
// then the per-unit-W photometry of spectrum.Lookup at ln T′) and reports the
// number of stars with V′ ≤ the limiting magnitude, over the whole sky and in
// the forward (θ′ ≤ 90°) and rear (θ′ > 90°) hemispheres of the ship frame, so
// that forward + rear = visible exactly; the total illuminance of all stars and
// of the visible ones; the chromaticity of the integrated starlight (ΣX, ΣY,
// ΣZ); and the half-count radius: the smallest angular radius about the
// direction of motion that holds at least half of the visible stars. At β = 0
// from the Sun every V′ equals the catalogue V exactly (same table, D = 1), so
// the census reproduces the catalogue's own counts.
//
// # Figures
//
// A Figure is one or more *plot.Plot panels under a caption that states the
// physics parameters; it writes PNG or SVG to an io.Writer. Text is 10 pt
// (captions 11 pt), so a 6 × 4 in figure stays readable at 100–150 dpi.
//
// Library code here never prints, never reads the clock and keeps no mutable
// global state; errors are prefixed "analysis:" and wrap the sentinels below.
//
// # Star table
//
// ObserveStars lists every star as seen from the ship (catalogue values,
// rest and apparent angle to the heading, apparent RA/Dec, D, T′, V′, B−V′,
// bolometric flux ratio, chromaticity), sorted by V′; WriteStarRows writes
// it as CSV, TSV, JSON or Parquet (the `stars` command).
//
// Imports: analysis uses catalog, camera and spectrum; sky, scene and
// cmd/skyframe use it.
package analysis
