// Package job is the batch logic of a flight: a bound plan (Job) rendered
// frame by frame into an output directory. Load reads, binds and checks a
// plan with the run's settings (LoadOptions: frames, shard, output
// directory, preview); Run renders the job's frames (the lock, the resume
// check, space checks, stale temporary files; the clock and progress come
// in through RunOptions), Verify checks a finished directory and Estimate
// measures one representative frame. It names each frame's files and
// refuses patterns under which two would collide (Files,
// CheckOutputNames), renders and writes a frame (RenderFrame: PNG, FITS,
// EXR and overlay layer through package frame, then the sealed JSON
// sidecar last, each file atomically), identifies the inputs a frame is
// made of (Inputs: plan text, tool version, catalogue and names file
// contents by SHA-256), checks a written frame for resume and verification
// (CheckFrame: the sidecar's seal, the inputs' hash, each image's size and
// SHA-256), holds the output directory's lock for a frame range
// (LockFrames), checks the disk space before and while rendering
// (CheckSpace, CheckSpaceLeft; the free space comes from Job.FreeSpace, a
// seam tests set), removes the temporary files an interrupted writer left
// (RemoveStaleTemps, by render.TempPrefix) and runs the photosensitivity
// (flash) check over the frames' luminance (MeanLuminance, FlashWarning).
// PlanExposure decides how a frame is integrated over its shutter (the
// streak knots and the diffuse layers' instants); Instants gives the
// observer and camera at those offsets.
//
// A frame depends only on the plan and its index, so shards and resumed
// runs write the same bytes as a single run. With RunOptions.Overlap a
// run draws each frame while the previous one is encoded and written
// (one goroutine writes; frames are written, and Done called, in order),
// for a second frame's image and files in memory (OverlapBytes); with
// RunOptions.HeldLayer a held view's unresolved layer is left to the tone
// map, for its values and image in memory (HeldLayerBytes), and any other
// frame's is added by the tone map row by row. Frames
// written only as 8-bit PNG (no FITS, OpenEXR or 16-bit files) draw their
// unresolved layer to render.EightBitTolerance and render.EightBitCodes and
// past a fisheye's circle (frame.Layers.ForEightBit), and leave their
// buffer black through the tone map for the next frame. The command owns
// flags, printing, progress, the clock (times such as a lock's start are passed
// in) and signals; this package returns values and errors (*InputError for
// problems with the plan, settings or output directory, exit status 2) and
// never prints.
//
// Names of frame files are relative to the output directory and
// slash-separated; OutDir and other directory arguments are
// operating-system paths. Times are Julian years, distances parsecs,
// luminance relative (0 black, 1 white, linear).
package job
