// Package overlay draws the annotations of a frame on its tone-mapped,
// sRGB-encoded image: the coordinate graticule (lines of constant RA/Dec or
// galactic l/b, aberrated like the stars), the circle where the Doppler
// factor is 1, a lattice of beacons at rest around the ship, markers for
// the direction of motion and the destination, star labels and the
// heads-up display. It is the only package that uses the 2D drawing
// library (git.sr.ht/~sbinet/gg, the maintained fork of fogleman/gg) and
// fonts (the Go fonts, golang.org/x/image/font/gofont, parsed with
// golang.org/x/image/font/opentype; never system fonts, so output is the
// same on every machine).
//
// The word "grid" is kept for the renderer's tiles; the coordinate lines
// drawn here are the graticule.
//
// # Coordinates and units
//
// Pixel coordinates are those of package camera: continuous, (0, 0) at the
// image's top-left corner, x toward Orient.Right, y down; pixel (i, j) has
// its centre at (i+0.5, j+0.5). Sky coordinates are degrees. Directions are
// unit vectors on ICRS axes; catalogue-frame directions (the graticule, the
// beacons, the destination) are aberrated with camera.Boost.Apply before
// they are projected, so every overlay lies where the stars are drawn.
// Sizes of strokes and text scale with the frame: one overlay "point" is
// one pixel up to a 720-pixel short side, proportionally more above.
//
// # Fulldome frames
//
// A fisheye frame is a domemaster (Dome Master Show File Format 1.0,
// sec. II, Fulldome Standards group, fulldome.org): the image centre is
// the dome's zenith, the bottom of the frame its front, left and right
// those of a viewer at the centre facing the front. DomeAzAlt gives the
// dome azimuth (from the front, positive to the viewer's right) and
// altitude of a pixel. There, nothing is drawn outside the image circle,
// labels are placed wholly inside it, and the heads-up display goes into
// the convention's unidirectional safe area (FrontSafeArea: ±50° azimuth,
// 10–60° altitude), turned about the centre so its lines run level along
// the dome; if it cannot fit even at half size, Draw and CheckHUDFit
// return an error wrapping ErrHUDFit. Flat projections keep the corner
// layout.
//
// Label and HUD text is drawn with a dark halo; Options.TextSize scales
// it (overlay points, default 11).
//
// # Order and compositing
//
// Layer renders the overlays selected by Options into a transparent RGBA
// image (alpha-premultiplied, sRGB-encoded colours), in this order:
// graticule, D = 1 circle, lattice, markers, labels, heads-up display; Draw
// composites that layer over the frame's image (Porter–Duff "over").
// Overlays never reach the linear buffer or the FITS data.
//
// # Errors
//
// Options are checked before anything is drawn (Options.Validate; unknown
// label names by Draw or ResolveLabels); errors wrap ErrGraticule,
// ErrLattice, ErrLabel or ErrOverlay, and the image is left unchanged.
//
// # Imports
//
// overlay imports camera, catalog and render (for the frame it annotates);
// render never imports it.
package overlay
