// Package exr writes (and reads back) OpenEXR images: single-part,
// scan-line files with HALF or FLOAT channels, uncompressed or with ZIP
// compression, and any header attributes of the predefined types.
//
// It is written from the published description of the format, not from
// any implementation:
//
//   - "OpenEXR File Layout" (F. Kainz, P. Stanczyk et al., Academy Software
//     Foundation, openexr.com/en/latest/OpenEXRFileLayout.html; the
//     repository's docs/OpenEXRFileLayout.rst): magic number 20000630,
//     version field 2, the header as a sequence of (name, type, size,
//     value) attributes ended by a null byte, the line offset table (one
//     unsigned 64-bit file offset per scan-line block), scan-line blocks
//     (y, data size, data), channels in alphabetical order within a line,
//     little-endian integers and IEEE 754 floats, and the byte layout of
//     every predefined attribute type. TestSpecSampleFile rebuilds the
//     document's annotated 415-byte sample file byte for byte.
//   - "Technical Introduction to OpenEXR" (same source): required
//     attributes, the data and display windows, the HALF type (IEEE 754-2008
//     binary16), channel and layer names ("layer.channel"), and the ZIP
//     compressor: blocks of 16 scan lines, the bytes split into two halves
//     (even-indexed bytes first, then odd-indexed ones), a byte-wise
//     predictor (each byte replaced by its difference from the previous one
//     plus 128, modulo 256) and zlib (RFC 1950) compression; a block whose
//     compressed form is not smaller than its raw bytes is stored raw.
//   - "Standard Optional Attributes" (same source): chromaticities,
//     whiteLuminance, framesPerSecond (rational), envmap (0 = latitude-
//     longitude, i.e. equirectangular), owner, comments, capDate.
//
// # Pixels
//
// An Image holds planar float32 samples, one slice of Width×Height values
// per channel, rows top to bottom (y grows downward, the OpenEXR pixel-space
// convention), pixels left to right; the data and display windows are both
// (0, 0)–(Width−1, Height−1). HALF channels are rounded to the nearest
// binary16 value (ties to even); finite values beyond the largest half
// (±65504) are stored as ±65504, not as infinity, so a very bright star never
// turns into an infinite pixel in a compositor; NaN and ±Inf are kept.
// FLOAT channels store the float32 values unchanged.
//
// # Determinism
//
// The output depends only on the image and the Encoder's Compression:
// blocks are compressed in parallel (Encoder.Workers) but written in order,
// with the same zlib level, so the bytes do not depend on the worker count.
package exr
