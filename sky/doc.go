// Package sky decides how much of the whole sky a frame needs: how deep a
// catalogue must go for the frame (its completeness bound), whether a
// catalogue reaches that depth and what share of the stars and light it
// misses when it does not, and, for the built-in synthetic sky, which
// stars to draw for the frame — as deep as it needs, only in the sky cells
// whose light can reach it — with the Sun added, so that the unresolved
// layer can take over exactly where the drawn stars stop. For a census
// (Census) it finds the depth each speed needs over the whole sky and draws
// the built-in sky that deep.
//
// Units and conventions: magnitudes are Johnson V as the renderer computes
// them (render.BrighteningV), catalogue V as seen from the origin (the
// Sun), observed V′ from the ship; temperatures in kelvin; positions in
// parsecs on ICRS axes with the Sun at the origin. A frame is described by
// its render.Options (projection, observer, exposure, limit, beaming); a
// frame integrated over an exposure (motion blur) by the options of each
// of its instants, the frame's own first.
//
// Determinism: the stars drawn for a frame depend only on that frame's
// options, never on the frames drawn before (catalog.SkyCache gives
// catalog.Synthetic's rows exactly), so the frames of a flight come out the
// same in one process, resumed or sharded. A frame's catalogue is built
// in the storage of one the caller has released (Source.Release), which
// changes where its rows are, never what they are. The package never
// prints; a warning is returned as text for the command to write.
package sky
