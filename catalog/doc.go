// Package catalog reads star catalogues into Stars, the struct-of-arrays form
// the per-star transform consumes, and builds the synthetic sky used when no
// catalogue is given.
//
// Frames and units: positions are ICRS unit vectors from the Sun at the
// catalogue epoch (J2000.0 unless Stars.Epoch says otherwise); distances are
// parsecs from the Sun, +Inf when the catalogue gives no usable parallax
// (such stars are treated as infinitely far and carry FlagNoDistance);
// magnitudes are Johnson V; temperatures are kelvin; proper motions are
// mas/yr with μα including cos δ; radial velocities km/s.
//
// The package sits at the start of the pipeline and imports no other
// skyframe package.
package catalog
