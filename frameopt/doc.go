// Package frameopt is the one definition of a frame's options: the table
// Defs lists every option of a rendered frame (name, type, default, help,
// validation, the directions it accepts, whether camera keys may change it
// over time), and from it come both the command-line flags of
// `skyframe still` (Register) and the plan keys of `skyframe flight`
// (Options.Set with the plan's TOML values). A value is checked by the same
// function whichever way it arrives; callers name the flag (--fwhm) or the
// plan file, line and key (camera.fwhm) around the message.
//
// # Names
//
// A plan key is its flag's name with '-' replaced by '_' (--grid-step is
// overlays.grid_step), in the plan table Def.Table ([camera] or
// [overlays]).
//
// # Directions
//
// A direction option accepts some of these spellings (Def.Dirs):
//
//	ahead, behind            the direction of motion and its opposite
//	RA,DEC                   apparent: where the audience sees it, in the
//	                         ship's frame (ICRS axes, degrees)
//	catalogue:RA,DEC         a direction in the catalogue (rest) frame,
//	                         shown where it appears from the ship
//	STAR                     a star id or name: where the star appears
//
// RA,DEC means the apparent direction everywhere (still and plans, look, up,
// toward, mark-destination, camera keys), because frames are composed for
// an audience: a still previews exactly the frame a plan key gives. The
// direction of motion (toward) is the same in both frames (aberration keeps
// the axis of motion fixed), so toward accepts both spellings with one
// result.
//
// # Units
//
// Angles are degrees, exposures and limits V magnitudes, FWHM pixels,
// lattice spacing parsecs, shutter angle degrees of the frame interval.
//
// # Adding an option
//
// Add one entry to Defs (and its field to Options): the still flag, the
// plan key, the README table (go test ./frameopt -run README -update) and
// the drift tests all follow from it. Then use the field where the frame is
// built (render options or layers).
package frameopt
