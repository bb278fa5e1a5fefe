package frame

import (
	"context"
	"errors"
	"fmt"
	"image"
	"image/draw"
	"io"
	"math"
	"path/filepath"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/exr"
	"github.com/skyframe/skyframe/imgfile"
	"github.com/skyframe/skyframe/overlay"
	"github.com/skyframe/skyframe/render"
	"github.com/skyframe/skyframe/spectrum"
)

// Spec is everything about a frame that its files record beyond the
// physics of the render.Frame: the projection and render options, the
// tone curve and bit depth of the PNG, the overlays and how the files
// describe the frame. Still and every flight frame build one.
type Spec struct {
	Proj camera.Projection
	Opt  render.Options
	Tone render.ToneMode
	// Depth is the PNG's bits per channel: 8 (or 0) or 16.
	Depth int
	// Look describes the view direction (a keyword, RA,Dec or a star).
	Look string
	// Source is the PNG "Source" text; empty: "skyframe still".
	Source string
	Layers Layers
	// Credit is the attribution of the star names the labels show,
	// recorded as PNG text; empty: none shown.
	Credit string
	EXR    EXROptions
	// Version is the tool version recorded in the files ("skyframe
	// Version").
	Version string
	// Stars is the catalogue rendered (sidecar, labels, FITS CATALOG).
	Stars *catalog.Stars
	// Heading is the ship's direction of motion (ICRS unit vector) and
	// Beaming the beaming convention the FITS header records.
	Heading r3.Vec
	Beaming spectrum.Beaming
	// DepthV and NeededV, when not nil, are recorded in the sidecar's
	// catalogue section: the catalogue's depth and the depth the frame
	// needs (V magnitudes).
	DepthV, NeededV *float64
}

// Sidecar returns the frame's sidecar content, with its layers and
// catalogue depth.
func (s *Spec) Sidecar(f *render.Frame) render.Sidecar {
	side := f.Sidecar("skyframe", s.Version, s.Stars, s.Tone)
	s.Layers.SidecarInfo(&side)
	if s.DepthV != nil || s.NeededV != nil {
		side.Catalog.DepthV, side.Catalog.NeededV = s.DepthV, s.NeededV
	}
	return side
}

// Image tone-maps f for the PNG at s.Depth bits per channel.
func (s *Spec) Image(f *render.Frame) draw.Image {
	if s.Depth == 16 {
		return f.ToNRGBA64(s.Tone)
	}
	return f.ToNRGBA(s.Tone)
}

// OverlayLayer draws the overlays alone on a transparent image (sRGB,
// straight alpha), the overlay layer file's content.
func (s *Spec) OverlayLayer(f *render.Frame) (*image.NRGBA, error) {
	over, err := overlay.Layer(f, s.Stars, s.Layers.Options)
	if err != nil {
		return nil, err
	}
	return overlay.Straight(over), nil
}

// DrawOverlays draws the overlays on img.
func (s *Spec) DrawOverlays(img draw.Image, f *render.Frame) error {
	return overlay.Draw(img, f, s.Stars, s.Layers.Options)
}

// PNGMeta records the frame's parameters as PNG text chunks. Besides the
// standard keywords (Software, Source, Comment; PNG spec §11.3.4.2) every
// key is prefixed "skyframe:" so that none takes a standard or widely read
// meaning (Pillow, for one, would report a text chunk named "gamma" as the
// display gamma instead of the gAMA chunk's). Equirectangular frames carry
// the GPano panorama XMP (imgfile.GPanoXMP) so viewers show them as a sphere.
func (s *Spec) PNGMeta(side render.Sidecar) []imgfile.KV {
	source := s.Source
	if source == "" {
		source = "skyframe still"
	}
	m := map[string]string{
		"Software": "skyframe " + s.Version,
		"Source":   source,
		"Comment":  "Simulated sky: blackbody stars, no extinction; see the JSON sidecar for the full state.",
	}
	for k, v := range map[string]string{
		"beta":           fmtFloat(side.Beta),
		"lorentz_factor": fmtFloat(side.Gamma),
		"rapidity":       fmtFloat(side.Rapidity),
		"position_pc":    fmt.Sprintf("%g,%g,%g", side.PositionPC[0], side.PositionPC[1], side.PositionPC[2]),
		"projection":     s.Proj.Kind.String(),
		"fov_deg":        fmtFloat(s.Proj.FieldOfView()),
		"exposure_v":     fmtFloat(side.ExposureV),
		"scale_per_lux":  fmtFloat(side.Scale),
		"tone":           side.Tone,
		"beaming":        side.Beaming,
		"white_point":    side.White,
		"layers":         strings.Join(s.Layers.Layers.Names(), ","),
		"catalog":        side.Catalog.Source,
		"look":           s.Look,
		"stars_drawn":    fmt.Sprint(side.Counts.Drawn),
	} {
		m["skyframe:"+k] = v
	}
	if side.Heading != nil {
		m["skyframe:heading"] = fmt.Sprintf("%+v", *side.Heading)
	}
	if s.Credit != "" {
		m["skyframe:star_names"] = s.Credit
	}
	if s.Proj.Kind == camera.Equirect {
		m[imgfile.XMPKeyword] = imgfile.GPanoXMP(s.Proj.Width, s.Proj.Height)
	}
	return imgfile.SortedKV(m)
}

func fmtFloat(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// FITSCards are the FITS header cards of frame f: its physical state
// (imgfile.FITSMeta) and, when the projection has one, its WCS.
func (s *Spec) FITSCards(f *render.Frame) ([]imgfile.Card, error) {
	b := f.Options.Observer.Boost
	ra, dec := camera.RADec(s.Heading)
	pos := f.Options.Observer.Position
	limit := f.Options.Limit
	if math.IsInf(limit, 0) {
		limit = 0
	}
	meta := imgfile.FITSMeta{
		Object: s.Look, Creator: "skyframe " + s.Version,
		Beta: b.Beta(), Gamma: b.Gamma(), MotionRA: ra, MotionDec: dec,
		Position: [3]float64{pos.X, pos.Y, pos.Z}, Exposure: f.Options.Exposure, Limit: limit,
		FWHM: f.Options.FWHM, Beaming: s.Beaming.String(), Projection: s.Proj.Kind.String(),
		FOV: s.Proj.FieldOfView(), Tilt: s.Proj.Tilt, Catalog: s.Stars.SourceName(), Stars: f.Stats.Drawn,
		ScalePerLux: f.Scale, ExtendedScale: f.Options.ExtendedScale, White: f.Options.Color.White.String(), Layers: s.Layers.Layers.Names(),
	}
	cards, err := meta.Cards()
	if err != nil {
		return nil, err
	}
	wcs, err := imgfile.WCSCards(s.Proj)
	if errors.Is(err, imgfile.ErrNoWCS) {
		return cards, nil
	}
	if err != nil {
		return nil, err
	}
	return append(cards, wcs...), nil
}

// EXRFile assembles the frame's OpenEXR image: f, its kept linear
// contributions, the overlays alone and the sidecar's physical state. The
// overlays are layer when not nil (the overlay layer file's image), else
// drawn here on a transparent image; they are left out when nothing is
// drawn. A layer asked for by s.EXR.Layers that the frame does not have is
// an error wrapping ErrEXRLayer.
func (s *Spec) EXRFile(f *render.Frame, kept []render.Contribution, side render.Sidecar, layer *image.NRGBA) (*exr.Image, error) {
	in := EXRInput{Frame: f, Contributions: kept, Sidecar: side}
	ov := layer
	if ov == nil {
		ov = image.NewNRGBA(image.Rect(0, 0, f.W, f.H))
		if err := s.DrawOverlays(ov, f); err != nil {
			return nil, err
		}
	}
	for i := 3; i < len(ov.Pix); i += 4 {
		if ov.Pix[i] != 0 {
			in.Overlay = ov
			break
		}
	}
	return EXRImage(in, s.EXR)
}

// Paths are the files one frame writes; an empty path is not written.
// With Overlay set, the overlays go there alone and PNG holds the sky
// without them.
type Paths struct{ PNG, FITS, Sidecar, EXR, Overlay string }

// Write writes the files of frame f (kept: its linear contributions kept
// apart, for the EXR file) as one set: each to a temporary file, all
// renamed into place only when every one was written, so a failure never
// leaves a new image beside an old sidecar. Writes stop once ctx is done.
func (s *Spec) Write(ctx context.Context, f *render.Frame, kept []render.Contribution, out Paths) error {
	side := s.Sidecar(f)
	meta := s.PNGMeta(side)
	img := s.Image(f)
	var layer *image.NRGBA
	if out.Overlay != "" {
		var err error
		if layer, err = s.OverlayLayer(f); err != nil {
			return err
		}
	} else if err := s.DrawOverlays(img, f); err != nil {
		return err
	}
	var set render.FileSet
	defer set.Abort()
	err := set.Add(out.PNG, func(w io.Writer) error {
		return imgfile.WritePNG(ctxWriter{ctx, w}, img, meta)
	})
	if err != nil {
		return err
	}
	if layer != nil {
		lmeta := append([]imgfile.KV{{Key: "Description", Value: "skyframe overlays alone (sRGB, straight alpha) for " + filepath.Base(out.PNG)}}, meta...)
		if err := set.Add(out.Overlay, func(w io.Writer) error {
			return imgfile.WritePNG(ctxWriter{ctx, w}, layer, lmeta)
		}); err != nil {
			return err
		}
	}
	if out.FITS != "" {
		cards, err := s.FITSCards(f)
		if err != nil {
			return err
		}
		if err := set.Add(out.FITS, func(w io.Writer) error {
			return imgfile.WriteFITS(ctxWriter{ctx, w}, f.W, f.H, f.Pix, cards)
		}); err != nil {
			return err
		}
	}
	if out.EXR != "" {
		img, err := s.EXRFile(f, kept, side, nil)
		if err != nil {
			return err
		}
		enc := exr.Encoder{Compression: s.EXR.Compression}
		if err := set.Add(out.EXR, func(w io.Writer) error {
			return enc.Encode(ctxWriter{ctx, w}, img)
		}); err != nil {
			return err
		}
	}
	if out.Sidecar != "" {
		if err := set.Add(out.Sidecar, func(w io.Writer) error {
			return render.WriteSidecar(w, side)
		}); err != nil {
			return err
		}
	}
	return set.Commit()
}

// ctxWriter fails every write once ctx is done, so that encoding a large
// frame stops at the next write (at most one PNG strip or buffer) and the
// atomic writer removes its temporary file.
type ctxWriter struct {
	ctx context.Context
	w   io.Writer
}

func (c ctxWriter) Write(p []byte) (int, error) {
	if err := c.ctx.Err(); err != nil {
		return 0, context.Cause(c.ctx)
	}
	return c.w.Write(p)
}
