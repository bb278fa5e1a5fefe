// Package golden compares rendered test images with golden PNG files
// within a tolerance, for the tests of render, overlay and the commands.
//
// Tolerances are in 8-bit sRGB code values (0–255) per colour channel: a
// largest absolute difference over all pixels and channels, and a mean
// absolute difference over all of them. Alpha is not compared (the
// golden images are opaque). Golden files are <dir>/<name>_golden.png,
// rewritten instead of compared when the caller's -regen flag is set.
package golden
