// Package imgfile encodes frames into image files and knows nothing of how
// they were rendered: it takes pixels (an image.Image, or a []float32
// buffer) and metadata, never render types, so any stage can write files.
//
//   - PNG (PNGEncoder, WritePNG): 8- or 16-bit sRGB with sRGB, gAMA and cHRM
//     chunks and the metadata as tEXt (Latin-1) or iTXt (UTF-8) chunks
//     (W3C PNG Specification, 2nd ed., §11.3). Its own encoder deflates
//     strips of rows in parallel into one zlib stream, byte-identical for
//     any worker count: at the fast level (the default) with package
//     rowflate, which matches only runs one pixel back and one row up, and
//     at the others with github.com/klauspost/compress/flate (about 1.5×
//     the speed of compress/flate at its fastest level, and smaller).
//   - FITS (WriteFITS, ReadFITS, ReadFITSHeader, FITSMeta): a BITPIX −32
//     primary array, 2-D or a 3-plane cube (R, G, B), with the header cards
//     given (FITS Standard 4.0, IAU FITS Working Group 2016). FITS rows run
//     bottom-up, so buffer pixel (x, y), y down from the top, is FITS pixel
//     (x+1, H−y).
//   - WCS (WCSCards): the celestial world coordinates of a
//     camera.Projection (TAN pinhole, ARC fisheye, CAR equirectangular; none
//     for the cube strip), after aberration: the apparent ICRS directions
//     seen from the ship (Greisen & Calabretta 2002, Calabretta & Greisen
//     2002).
//
// OpenEXR is in package exr. Writing any of them to disk atomically is
// render.WriteFileAtomic's job.
//
// Units: buffer values are whatever the caller's linear scale is (for
// skyframe frames, linear sRGB with 1 = full scale at the exposure; see
// FITSMeta for the BUNIT written); angles in the WCS are degrees.
package imgfile
