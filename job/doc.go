// Package job holds the batch-job logic of a flight that does not depend
// on how a frame is rendered: removal of temporary files an interrupted
// writer left (RemoveStaleTemps, by render.TempPrefix), file hashes
// (SHA256), the disk-space estimate (FrameBytes, FreeSpace) and the
// photosensitivity (flash) check over the frames' luminance
// (MeanLuminance, FlashWarning), and how a frame is integrated over its
// shutter (PlanExposure: the streak knots and the diffuse layers'
// instants; Instants: the observer and camera at those offsets).
//
// A frame depends only on the plan and its index, so shards and resumed
// runs write the same bytes as a single run. The command owns flags,
// printing, progress, the clock and signals; this package returns values
// and errors and never prints.
//
// Names of frame files are relative to the output directory and
// slash-separated; OutDir arguments are operating-system paths. Times are
// Julian years, distances parsecs, luminance relative (0 black, 1 white,
// linear).
package job
