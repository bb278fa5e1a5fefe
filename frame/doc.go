// Package frame writes the set of files of one rendered frame, for still
// and for every flight frame alike: the tone-mapped PNG (8 or 16 bits per
// channel, with its text chunks, PNGMeta), the overlays drawn on it or kept
// apart as an RGBA overlay layer (OverlayLayer), the 32-bit float FITS file
// with the physical state and WCS (FITSCards), the OpenEXR file (EXRImage,
// EXRFile) and the JSON sidecar (Sidecar). Spec describes a frame beyond
// its render.Frame (projection, tone, depth, overlays, how the files name
// it); Spec.Write writes a set atomically (all files renamed into place
// only when every one was written). Layers are a frame's linear layers and
// overlays.
//
// Units and conventions: pixel values are scene-referred linear sRGB
// (IEC 61966-2-1 primaries, chromatically adapted to the frame's white
// point) in units of full scale at the frame's exposure, the same numbers
// in FITS and EXR; the overlay layer PNG is sRGB with straight alpha, the
// EXR overlay layer linear RGB premultiplied by its alpha (the OpenEXR
// convention); the doppler layer is the dimensionless, luminance-weighted
// mean Doppler factor D of each pixel's starlight, 0 where there is none.
// Image rows run top to bottom, as in render.Frame. Directions are ICRS
// unit vectors, angles degrees, magnitudes V. The frame's physical state
// (β, γ, direction of motion, catalogue) is recorded as "skyframe:"-
// prefixed keys and attributes beside the standard ones. The package never
// prints and never reads the clock.
package frame
