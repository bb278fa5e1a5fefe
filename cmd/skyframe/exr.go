package main

import (
	"errors"
	"image"

	"github.com/skyframe/skyframe/exr"
	framefiles "github.com/skyframe/skyframe/frame"
	"github.com/skyframe/skyframe/frameopt"
	"github.com/skyframe/skyframe/overlay"
	"github.com/skyframe/skyframe/render"
)

// exrOptions resolves the OpenEXR options (checked by frameopt).
func exrOptions(o *frameopt.Options) (framefiles.EXROptions, error) {
	var x framefiles.EXROptions
	var err error
	if o.EXRType != "" {
		if x.Type, err = exr.ParsePixelType(o.EXRType); err != nil {
			return x, usagef("--exr-type %q: want half or float", o.EXRType)
		}
	}
	if o.EXRCompression != "" {
		if x.Compression, err = exr.ParseCompression(o.EXRCompression); err != nil {
			return x, usagef("--exr-compression %q: want zip or none", o.EXRCompression)
		}
	}
	if x.Layers, err = framefiles.ParseEXRLayers(o.EXRLayers); err != nil {
		return x, usagef("--exr-layers: %v", err)
	}
	return x, nil
}

// stillEXR assembles a still's OpenEXR image: the frame, its kept linear
// contributions, the overlays drawn alone on a transparent image (when any
// are selected) and the sidecar's physical state. A layer asked for by
// --exr-layers that the frame does not have is a usage error.
func stillEXR(f *render.Frame, kept []render.Contribution, side render.Sidecar, sc *scene, spec *frameSpec) (*exr.Image, error) {
	in := framefiles.EXRInput{Frame: f, Contributions: kept, Sidecar: side}
	ov := image.NewNRGBA(image.Rect(0, 0, f.W, f.H))
	if err := overlay.Draw(ov, f, sc.stars, spec.layers.Options); err != nil {
		return nil, err
	}
	for i := 3; i < len(ov.Pix); i += 4 {
		if ov.Pix[i] != 0 {
			in.Overlay = ov
			break
		}
	}
	img, err := framefiles.EXRImage(in, spec.exr)
	if errors.Is(err, framefiles.ErrEXRLayer) {
		return nil, usagef("--exr-layers: %v", err)
	}
	return img, err
}
