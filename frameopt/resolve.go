package frameopt

import (
	"fmt"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/exr"
	"github.com/skyframe/skyframe/frame"
	"github.com/skyframe/skyframe/render"
	"github.com/skyframe/skyframe/spectrum"
)

// Frame is the parsed, non-directional part of Options with defaults
// applied.
type Frame struct {
	Kind          camera.Kind
	Width, Height int
	FOV, Tilt     float64 // degrees; FOV 0: the projection's default
	Roll          float64 // degrees
	Exposure      float64 // V magnitude at full scale
	Limit         float64 // 0: Exposure + render.DefaultLimitOffset
	FWHM          float64 // pixels
	Tone          render.ToneMode
	White         spectrum.WhitePoint
	Beaming       spectrum.Beaming
	Depth         int
	Shutter       float64 // degrees of the frame interval
}

// Check validates every option; given reports which were set explicitly
// (nil: all), and only those are checked, as defaults are valid. It
// returns every problem found, in Defs order.
func Check(o *Options, given func(name string) bool) []*Error {
	var errs []*Error
	for i := range Defs {
		d := &Defs[i]
		if given != nil && !given(d.Name) {
			continue
		}
		if err := d.check(o); err != nil {
			errs = append(errs, &Error{Def: d, Msg: err.Error()})
		}
	}
	return errs
}

// Frame returns the parsed options. Values are assumed checked (Check);
// anything unparsable falls back to its default.
func (o *Options) Frame() Frame {
	f := Frame{FOV: o.FOV, Tilt: o.Tilt, Roll: o.Roll, Limit: o.Limit, FWHM: o.FWHM, Depth: o.Depth}
	f.Kind, _ = kind(o)
	var err error
	if f.Width, f.Height, err = o.FrameSize(); err != nil {
		f.Width, f.Height = DefaultSize(f.Kind)
	}
	if o.Exposure != nil {
		f.Exposure = *o.Exposure
	} else {
		f.Exposure, _ = presetExposure(o.Preset)
	}
	f.Shutter = DefaultShutter
	if o.Shutter != nil {
		f.Shutter = *o.Shutter
	}
	if f.FWHM == 0 {
		f.FWHM = render.DefaultFWHM
	}
	if f.Depth == 0 {
		f.Depth = 8
	}
	f.Tone = render.ToneShoulder
	if t, err := render.ParseTone(o.Tone); err == nil {
		f.Tone = t
	}
	f.White, _ = spectrum.ParseWhitePoint(o.White)
	f.Beaming, _ = spectrum.ParseBeaming(o.Beaming)
	return f
}

// EXR resolves the OpenEXR options (exr-type, exr-compression,
// exr-layers; checked by their definitions). Messages name the flags.
func (o *Options) EXR() (frame.EXROptions, error) {
	var x frame.EXROptions
	var err error
	if o.EXRType != "" {
		if x.Type, err = exr.ParsePixelType(o.EXRType); err != nil {
			return x, fmt.Errorf("--exr-type %q: want half or float", o.EXRType)
		}
	}
	if o.EXRCompression != "" {
		if x.Compression, err = exr.ParseCompression(o.EXRCompression); err != nil {
			return x, fmt.Errorf("--exr-compression %q: want zip or none", o.EXRCompression)
		}
	}
	if x.Layers, err = frame.ParseEXRLayers(o.EXRLayers); err != nil {
		return x, fmt.Errorf("--exr-layers: %v", err)
	}
	return x, nil
}
