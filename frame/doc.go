// Package frame assembles the files of one rendered frame from what
// render and the overlay layer produce. So far it builds the frame's
// OpenEXR image (EXRImage), which the still and flight commands write.
//
// Units and conventions: pixel values are scene-referred linear sRGB
// (IEC 61966-2-1 primaries, chromatically adapted to the frame's white
// point) in units of full scale at the frame's exposure, the same numbers
// as the FITS data; the overlay layer is linear RGB premultiplied by its
// alpha (the OpenEXR convention); the doppler layer is the dimensionless,
// luminance-weighted mean Doppler factor D of each pixel's starlight, 0
// where there is none. Image rows run top to bottom, as in render.Frame.
// The frame's physical state (β, γ, direction of motion, catalogue) is
// recorded as "skyframe:"-prefixed attributes beside the standard ones.
package frame
