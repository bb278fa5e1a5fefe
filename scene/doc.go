// Package scene resolves what the command line (or a plan) asks for into
// the physical state of an observation and the description of a frame:
// the catalogue (read from files, globs and lists, or streamed from a
// cache file chunk by chunk with the stars the options name picked out
// first), the IAU names table, the ship's position, heading and velocity
// (Physics.Resolve → Scene), the view direction, up and projection (Build
// → Spec), how deep the catalogue must go for the frame (FrameDepth), the
// linear layers and overlays a frame's options ask for (FrameLayers,
// PlanLayers) and the set of output files (OutputPaths, WriteFrame).
//
// Units and conventions: directions are ICRS unit vectors, RA and Dec in
// degrees, positions in parsecs with the Sun at the origin, magnitudes V.
// A direction given as RA,DEC is apparent (as seen from the ship);
// catalogue:RA,DEC is in the catalogue frame; a star is where its light
// appears (package frameopt parses them). The heading (--toward) is the
// same in both frames, since aberration keeps the axis of motion.
//
// Errors about the user's input are *InputError (the command exits with
// status 2); their messages name the flag (--look, --toward, …) so that a
// still's messages read as before, and a plan's are prefixed with its file
// and key by the caller. The package never prints and never reads the
// clock: rows skipped in a catalogue are reported on an io.Writer the
// caller gives, completeness warnings are returned as text, progress goes
// to a callback.
package scene
