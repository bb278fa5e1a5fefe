// Package rowflate deflates (RFC 1951) rows of pixels quickly, for images
// that are mostly runs: a rendered sky is black between its stars and
// smooth where diffuse light covers it, so nearly all of it repeats the
// pixel before or the pixel above.
//
// An Encoder looks for a match at only two distances, one pixel (bpp
// bytes) and one line back, and takes the longer (greedy, no hash table,
// no lazy matching); everything else is a literal. A run of zeros after
// zeros is found 32 bytes a step and written as matches of the most
// length. Each block is written with dynamic Huffman codes (RFC 1951
// §3.2.7) built from the block's own symbol counts, length-limited to 15
// bits (7 for the code-length code) by the package-merge algorithm
// (Larmore and Hirschberg 1990). A block ends once it holds BlockTokens
// symbols (a run of zeros may take it a few hundred past). Incompressible
// data grows by under 1 %. The stream ends with a sync flush (an empty
// stored block, ending on a byte boundary), so that the streams of
// consecutive strips of rows concatenate into one, or with the final
// block.
//
// Units: bytes. Distances never exceed the 32 KiB window, so a line
// longer than that is matched against the pixel before only. The output is
// a deterministic function of the lines given, their bpp and line length.
package rowflate
