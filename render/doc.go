// Package render turns a star catalogue into an image of the sky seen from
// a moving observer: per-star relativistic transform and photometry, a
// pixel-exact Gaussian splat into a linear HDR buffer, tone mapping and
// sRGB encoding at output, and a JSON sidecar with the physical state.
//
// # Pipeline
//
// For each star (catalogue row i) Render
//
//  1. asks camera.Observer.See for the apparent direction n′ (unit vector,
//     ICRS axes, ship frame), the Doppler factor D and the dilution
//     (d⊙/r)² from moving the observer;
//  2. takes the star's observed photometry from spectrum.ObserveBatch, the
//     one definition the census, the stars table and the depth bound use
//     too: T′ = D·T, the observed dilution W′ = W₀·(d⊙/r)²·
//     Beaming.WScale(D), where W₀ is fixed by the catalogue V and the rest
//     temperature so that at rest, from the Sun, the observed V′ equals the
//     catalogue V exactly, and V′ = V − 2.5·log10(F′_V/F_V);
//  3. with the per-unit-W table photometry at ln T′ (spectrum.Lookup):
//     illuminance Y = W′·e^LnY lux, X = (x/y)·Y, Z = ((1−x−y)/y)·Y;
//  4. culls stars with V′ > Options.Limit (default Exposure + 10 mag);
//  5. projects n′ with camera.Projection.Forward, dropping stars that are
//     undefined there (behind a pinhole), whose PSF would lie wholly
//     outside the image, or that fall outside a fisheye's circle;
//  6. converts XYZ to linear sRGB (spectrum.XYZToLinearSRGB, then
//     spectrum.GamutMap for out-of-gamut colours), multiplies by the
//     exposure scale and deposits the star with the PSF.
//
// # Stars as discs
//
// A star whose apparent angular radius ρ′ (ρ = asin √W from its rest
// dilution at the observer, W = (R/r)², R from its luminosity and
// temperature through the catalogue V; ρ′ ≈ ρ/D) exceeds DiscThreshold =
// half a pixel of the image centre's scale is not splatted: after the
// point stars it is drawn as a disc, pixel by pixel through the exact
// inverse aberration, each point a blackbody at D·T limb-darkened by the
// linear law with u = LimbDarkening (0.6, Eddington), with the star's flux
// (drawDiscs in disc.go). An observer inside a star's radius, or at its
// centre, is an *InsideStarError naming the star.
//
// # Units
//
// Buffer values are linear sRGB in units of full scale. The exposure is
// given in V magnitudes: a 6504 K blackbody (WhiteTemperature, the CCT of
// D65) of apparent V = Exposure, centred on a pixel, has peak-pixel
// luminance exactly 1 with the default 1.5 px PSF. With E_ref the
// illuminance (lux) of that star and p₀ the fraction of a pixel-centred
// default PSF in its central pixel (0.3221),
//
//	value = Scale · illuminance · PSF weight,  Scale = 1/(E_ref·p₀).
//
// Scale does not change with Options.FWHM, so a wider PSF spreads the same
// light. The exposure is fixed by the caller, never adapted to the frame.
// The naked-eye preset NakedEyeExposure() = 6.5 + 2.5·log10(8/255/12.92)
// = −0.037 mag makes a V = 6.5 white star's peak encode to 8/255; the zero
// Exposure, 0 mag, is within 0.04 mag of it.
//
// # Pixels and the PSF
//
// Continuous pixel coordinates have (0, 0) at the top-left corner of the
// image, x to the right, y down; pixel (i, j) spans [i, i+1)×[j, j+1) and
// its centre is (i+0.5, j+0.5). The PSF is a circular Gaussian (FWHM
// default 1.5 px, σ = FWHM/2.3548) integrated over each pixel as
// wx[i]·wy[j] with wx[i] = (erf((i+1−x)/σ√2) − erf((i−x)/σ√2))/2, on a
// window of 2k+1 pixels per axis centred on the star's pixel, the tails
// beyond it added to the window's edge pixels (from tables, within
// 8·10⁻⁷ of the star's flux per weight). k = ⌈3.09·σ⌉ is the narrowest
// window with at most 10⁻³ of the flux beyond it on either side (5×5
// pixels for the default PSF), so a star inside the image deposits its
// flux to rounding and the deposit's centroid is the star position to
// 10⁻³ px for FWHM ≥ 1.5 px (see PSF). Light that falls outside the
// image is lost; in an equirectangular frame it wraps across the ±180°
// seam; in a cube strip it is clipped to the star's own face (it is not
// carried to the geometrically adjacent face). Stars are circular in the
// image even where a projection stretches the sky (equirect near the
// poles).
//
// # Doppler channel
//
// With Options.Doppler the buffer keeps, per pixel, the luminance-weighted
// mean Doppler factor Σ(Yᵢ·Dᵢ)/ΣYᵢ over the stars deposited there (Yᵢ the
// luminance star i put into that pixel); unlit pixels hold 0.
//
// # Determinism
//
// The output is bit-identical for any Options.Workers and GOMAXPROCS:
// stars are transformed in fixed chunks of 8192, binned in catalogue order
// into 128×128-pixel tiles, and each pixel sums its stars' deposits (each
// formed in float64) in catalogue order in float32, straight into the
// frame buffer, so the sums also do not depend on how a streamed catalogue
// is split into chunks (the rule: a pixel's value is the float32 sum of
// its deposits in catalogue order; tiles only decide which worker adds
// them, never their order). A record whose window crosses a tile edge is
// binned into each tile it lights and adds only that tile's pixels. Hence
// nothing that only regroups the work changes a bit: the number of passes
// Render makes over an in-memory catalogue (RenderRows), a stream's chunk
// lengths, a shard or resumed flight, a --memory budget, a reused frame
// (RenderInto) or the unrolled 5×5 splat (TestRenderStreamMatchesRender,
// TestRenderIntoMatchesRender, TestDeterministicAcrossWorkers). For a pixel
// lit by k stars the rounding error of the sum is at most about k·6·10⁻⁸
// of its value [cp: float32 has a 24-bit significand]. Library code never reads the
// clock, never uses global randomness and never sets GOMAXPROCS.
//
// Two per-pixel loops run eight pixels a step in AVX2 assembly where the
// CPU has it (amd64, golang.org/x/sys/cpu; the purego build tag turns
// them off): the adaptive grid's bilinear fill along a row (interpRow)
// and the tone map's table path (toner.row, for pixels whose channels are
// all below toneFast). Each computes exactly what its Go loop computes,
// every float32 product and sum rounded in the same order and no fused
// multiply-add, so frames are the same bit for bit on machines with and
// without it (TestInterpRowAVX2, TestToneRowAVX2).
//
// The order rule for catalogues read only as deep as a frame needs: the
// canonical order of a catalogue is (catalogue V, input row), the order
// of a sorted cache (catalog.SortByV). RenderChunks reads a sorted cache
// only through the bins of its magnitude index that DepthBins says can
// hold a drawn star (the frame's limit plus the largest brightening in
// view, NeededDepth, plus the brightening of stars the observer has moved
// toward, and any star that could be resolved as a disc). Every star left
// out would have been culled, and a culled star deposits nothing, so the
// drawn stars and their order — hence every pixel's sum — are those of
// the whole cache: the frame is bit-identical to the full read of the
// same cache. A catalogue in another order (a text file, an unsorted
// cache) gives the same stars, deposits and totals, its pixel sums
// differing only by the float32 rounding of a different order of
// addition; sorting it (catalog pack does) makes it bit-identical. The
// fainter remainder is what the unresolved-light layer stands for.
// NewDepthProfile refines the bound by Doppler factor (a patch of sky);
// DepthProfiles reuses a recent profile's table for frames with the same
// Doppler range, temperatures and beaming, with the same result.
//
// # Motion blur
//
// Prepared.RenderMotion integrates a frame over its exposure from the
// observer and camera at K evenly spaced knots (K odd, the middle one the
// frame's instant): each star is transformed at every knot, its on-screen
// path interpolated by quadratics through runs of three knots, and the PSF
// deposited at n sub-positions per segment at the midpoints of equal time
// steps, weight 1/n each (n from the segment's on-screen speed, successive
// sub-positions at most StreakSpacing = 0.75 FWHM apart, at most
// MaxStreakSamples), so a streak is continuous and its summed flux is the
// star's. A path that crosses between cube faces or leaves the
// projection's domain (behind a pinhole) is interpolated through the
// star's directions instead, cut where it changes face or leaves the
// image, and its sub-positions listed one by one, each projected on its
// own: the part in the frame is drawn, and on a cube each sub-position's
// kernel is renormalised to its face, so the faces share the star's flux
// by the time it spends on each. A star drawn as a disc is sampled once at
// the middle knot and its samples moved along its centre's path, turned
// with it at sub-positions at most one sample spacing apart and added to
// the pixels they land in, so its light is kept (disc_blur.go).
// Photometry is the middle knot's. ChooseKnots picks K
// from probe paths (the quadratic within KnotTolerance = 0.05 px of the
// exact path).
// Layers.AddLinearMotion adds the diffuse layers as their time mean by
// Gauss–Legendre quadrature at LayerTimes' instants. Both are
// bit-identical for any worker count.
//
// # Tone and encoding
//
// ToneLinear clips channels to [0, 1]; ToneShoulder leaves luminance below
// 0.5 unchanged, rolls it smoothly toward 1 above, scaling R, G, B
// together, and desaturates toward equal-luminance grey whatever channel
// still exceeds 1, so hues hold. The IEC 61966-2-1 sRGB transfer curve is
// applied once, at output, to 8- or 16-bit NRGBA images.//
// # Layers
//
// A frame is built in two stages. The linear stage writes into the buffer,
// so it is also in the FITS data: the stars, then (Layers.CMB) the cosmic
// microwave background, each pixel at the surface brightness of a blackbody
// at T′ = T₀·D_sun·D_ship for its direction times the pixel's solid angle,
// on the stars' photometric scale, then (Layers.Unresolved) the light of
// the stars too faint to draw, an UnresolvedSky of diluted blackbodies
// W_k(n)·B(T_k) in the catalogue frame, seen through the exact inverse
// aberration: each component keeps its dilution and has T′ = D·T_k, so its
// bolometric surface brightness goes as D⁴ (AddDiffuse; sub-sampled where
// D or the catalogue-frame footprint changes fast within a pixel;
// evaluated exactly at the nodes of an adaptive grid of cells checked to
// DiffuseOptions.Tolerance, 10⁻³ of the pixel's brightest channel, or
// EightBitTolerance for frames written only as 8-bit sRGB, which also
// accept per channel an error within EightBitCodes of its 8-bit code's
// step (DiffuseOptions.Codes: where the layer is too dim for its shape to
// show in the codes the grid need not follow it) and continue a fisheye's
// layer past the circle their mask cuts, BeyondRim;
// the components' photometry comes from a table over ln D built for each
// rapidity, kept for the next drawing at the same one). A uniform layer
// and stars carrying the same flux give the same buffer total.
// Options.ExtendedScale scales all extended light (discs and these
// layers) against point stars, so that a reduced preview keeps the full
// frame's value per pixel. A DiffuseMemo keeps the layer for the next frame with the same
// one (a view held on the ship at constant velocity), which replays it bit
// for bit; or lends it (DiffusePending) for the tone map to add
// (Frame.ToNRGBAPending), which then takes the pixels the stars leave black
// from the layer's own kept image and tone-maps only the lit ones, the same
// image byte for byte. A layer it does not hold yet (the camera turning,
// the ship accelerating) it records without drawing and defers
// (DiffusePending) to the tone map, which adds it to each row of the
// buffer as it tone-maps the row, instead of in a pass of its own over the
// buffer. Tone mapping and sRGB encoding follow; the 8-bit codes of
// pixels the tone map leaves as they are come from a table on the float32
// bits, equal to the computed codes for every value.
// The overlays (coordinate graticule, the D = 1 circle, the lattice of
// beacons, markers, star labels and the heads-up display) are drawn on
// the encoded image by package overlay; they never reach the FITS data.
//
// # Output
//
// The file encoders — PNG, FITS with its WCS — are in package imgfile (and
// OpenEXR in package exr), which use no render types; ToNRGBA and
// ToNRGBA64 make the images they encode. WriteFileAtomic writes any file
// through a temporary file in the same directory, fsync and rename, so no
// partial file is ever left.
package render
