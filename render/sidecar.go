package render

import (
	"encoding/json"
	"fmt"
	"io"
	"math"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/catalog"
)

// Sidecar is the full physical state behind a frame, written as JSON next
// to the image so the picture can be reproduced and measured. Angles are
// degrees, positions parsecs, magnitudes Johnson V, directions ICRS.
type Sidecar struct {
	Tool    string `json:"tool"`
	Version string `json:"version"`

	Beta     float64 `json:"beta"`
	Gamma    float64 `json:"gamma"`
	Rapidity float64 `json:"rapidity"`
	// Heading is the direction of motion (absent at rest).
	Heading *Direction `json:"heading,omitempty"`
	// PositionPC is the observer's position, pc, Sun at the origin.
	PositionPC [3]float64 `json:"position_pc"`

	Look       Look           `json:"look"`
	Projection ProjectionInfo `json:"projection"`

	ExposureV float64 `json:"exposure_v"`
	// LimitV is the cull limit; absent when culling is off (+Inf).
	LimitV *float64 `json:"limit_v,omitempty"`
	FWHMPx float64  `json:"fwhm_px"`
	Scale  float64  `json:"scale_per_lux"`
	// ExtendedScale is Options.ExtendedScale when set (a preview): the
	// factor on extended light (star discs, CMB, unresolved starlight)
	// against the point stars' scale_per_lux.
	ExtendedScale float64 `json:"extended_scale,omitempty"`
	Tone          string  `json:"tone"`
	Beaming       string  `json:"beaming"`
	White         string  `json:"white_point"`
	// PSF is the point spread function model.
	PSF string `json:"psf"`

	Catalog CatalogInfo `json:"catalog"`
	Counts  Counts      `json:"stars"`
	// CMB is true when the frame holds the cosmic microwave background.
	CMB bool `json:"cmb,omitempty"`
	// Unresolved describes the unresolved-starlight layer, when drawn.
	Unresolved *UnresolvedInfo `json:"unresolved,omitempty"`
	// Brightest are the brightest drawn stars, brightest first.
	Brightest []StarInfo `json:"brightest"`
}

// UnresolvedInfo describes the diffuse layer of the stars too faint to be
// drawn (AddDiffuse).
type UnresolvedInfo struct {
	// DepthV is the resolved depth: the layer holds the model's light of
	// the stars fainter than this V magnitude.
	DepthV float64 `json:"depth_v"`
	// Components is the number of diluted-blackbody components per
	// direction.
	Components int `json:"components"`
	// GridTolerance is the largest error the adaptive grid left where it
	// checked its interpolation, relative to the pixel's largest channel
	// (DiffuseOptions.GridTolerance): 0.001 by default, 0.004 for frames
	// written only as 8-bit sRGB; absent when every pixel was evaluated.
	GridTolerance float64 `json:"grid_tolerance,omitempty"`
	// GridCodes, when present, is the error in 8-bit sRGB code steps the
	// grid also accepted per channel where that exceeds GridTolerance
	// (DiffuseOptions.Codes): 0.45 for frames written only as 8-bit sRGB.
	GridCodes float64 `json:"grid_codes,omitempty"`
}

// Direction is a unit vector given as ICRS right ascension and declination.
type Direction struct {
	RA  float64 `json:"ra_deg"`
	Dec float64 `json:"dec_deg"`
}

// Look is the camera orientation.
type Look struct {
	Forward Direction `json:"forward"`
	Up      Direction `json:"up"`
	Right   Direction `json:"right"`
}

// ProjectionInfo describes the projection of the frame.
type ProjectionInfo struct {
	Kind   string  `json:"kind"`
	Width  int     `json:"width"`
	Height int     `json:"height"`
	FOV    float64 `json:"fov_deg"`
	Tilt   float64 `json:"tilt_deg"`
}

// CatalogInfo names the star list.
type CatalogInfo struct {
	Source string  `json:"source"`
	Format string  `json:"format"`
	Rows   int     `json:"rows"`
	Epoch  float64 `json:"epoch"`
	// DepthV is the catalogue's completeness limit (estimated from its
	// magnitude counts, or the depth the built-in sky was drawn to) and
	// NeededV the depth the frame needs to be complete (NeededDepth: for the
	// built-in sky, for the stars the image can show; for a catalogue file,
	// for the frame's cull limit); absent when not known. A flight records
	// them per frame.
	DepthV  *float64 `json:"depth_v,omitempty"`
	NeededV *float64 `json:"needed_v,omitempty"`
}

// Counts are the frame's star counts (see Stats).
type Counts struct {
	Total    int `json:"total"`
	Drawn    int `json:"drawn"`
	Culled   int `json:"culled"`
	OffFrame int `json:"off_frame"`
	Invalid  int `json:"invalid"`
}

// DirectionOf returns the RA/Dec of v (which need not be unit length); the
// zero vector gives (0, 0).
func DirectionOf(v r3.Vec) Direction {
	ra, dec := camera.RADec(v)
	return Direction{RA: ra, Dec: dec}
}

// Sidecar collects the frame's state. stars is the list that was rendered
// (nil leaves the catalogue fields empty); tone is the mode the image was
// written with.
func (f *Frame) Sidecar(tool, version string, stars *catalog.Stars, tone ToneMode) Sidecar {
	o := &f.Options
	b := o.Observer.Boost
	look := o.Projection.Orient
	if look.IsZero() {
		look = camera.DefaultOrientation()
	}
	s := Sidecar{
		Tool: tool, Version: version,
		Beta: b.Beta(), Gamma: b.Gamma(), Rapidity: b.Rapidity(),
		PositionPC: [3]float64{o.Observer.Position.X, o.Observer.Position.Y, o.Observer.Position.Z},
		Look:       Look{Forward: DirectionOf(look.Forward), Up: DirectionOf(look.Up), Right: DirectionOf(look.Right)},
		Projection: ProjectionInfo{Kind: o.Projection.Kind.String(), Width: o.Projection.Width,
			Height: o.Projection.Height, FOV: o.Projection.FieldOfView(), Tilt: o.Projection.Tilt},
		ExposureV: o.Exposure, FWHMPx: o.FWHM, Scale: f.Scale, ExtendedScale: o.ExtendedScale,
		Tone: tone.String(), Beaming: o.Beaming.String(), White: o.Color.White.String(),
		PSF: "gaussian, pixel-integrated, truncated at 4 sigma",
		Counts: Counts{Total: f.Stats.Total, Drawn: f.Stats.Drawn, Culled: f.Stats.Culled,
			OffFrame: f.Stats.OffFrame, Invalid: f.Stats.Invalid},
		Brightest: append([]StarInfo(nil), f.Stats.Brightest...),
	}
	if b.Beta() > 0 {
		d := DirectionOf(b.Dir())
		s.Heading = &d
	}
	if !math.IsInf(o.Limit, 1) {
		l := o.Limit
		s.LimitV = &l
	}
	if stars != nil {
		s.Catalog = CatalogInfo{Source: stars.SourceName(), Format: stars.Format, Rows: f.Stats.Total, Epoch: stars.Epoch}
	}
	return s
}

// WriteSidecar writes s to w as indented JSON followed by a newline.
// Non-finite numbers, which JSON cannot hold, are an error.
func WriteSidecar(w io.Writer, s Sidecar) error {
	data, err := json.MarshalIndent(s, "", "  ")
	if err != nil {
		return fmt.Errorf("render: sidecar: %w", err)
	}
	data = append(data, '\n')
	if _, err := w.Write(data); err != nil {
		return fmt.Errorf("render: sidecar: %w", err)
	}
	return nil
}
