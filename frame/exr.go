package frame

import (
	"errors"
	"fmt"
	"image"
	"math"
	"path/filepath"
	"slices"
	"strconv"
	"strings"

	"github.com/skyframe/skyframe/exr"
	"github.com/skyframe/skyframe/render"
	"github.com/skyframe/skyframe/spectrum"
)

// OpenEXR output of a frame (EXRImage). The file is scene-referred and
// linear: R, G, B are linear sRGB in units of full scale at the frame's
// exposure (the FITS data, to half-float rounding), adapted so that a
// source of the white point's chromaticity is neutral. Channels:
//
//	R, G, B                    the combined frame (every linear contribution)
//	stars.R, .G, .B            the stars alone
//	cmb.R, .G, .B              the cosmic microwave background alone
//	unresolved.R, .G, .B       the unresolved starlight alone
//	overlay.R, .G, .B, .A      the overlays (graticule, labels, HUD, …), linear,
//	                           RGB premultiplied by A (the OpenEXR convention)
//	doppler.D                  the luminance-weighted mean Doppler factor of the
//	                           starlight in each pixel, 0 where none (always FLOAT)
//
// Layer names for the EXR layers option are the prefixes: stars, cmb,
// unresolved, overlay, doppler. Adding a linear layer to render.Layers
// (with its name in render.Layers.Names and a kept buffer in
// AddLinearKept) adds it here without further change.

// EXR layer names beside the linear contributions' (render.LayerStars,
// LayerCMB, LayerUnresolved).
const (
	EXROverlay = "overlay"
	EXRDoppler = "doppler"
)

// EXRLayerNames lists every name EXROptions.Layers accepts.
var EXRLayerNames = []string{render.LayerStars, render.LayerCMB, render.LayerUnresolved, EXROverlay, EXRDoppler}

// ErrEXRLayer reports an unknown EXR layer name or a layer the frame does
// not have.
var ErrEXRLayer = errors.New("frame: EXR layer")

// EXROptions choose what a frame's OpenEXR file holds. The zero value writes
// HALF channels with ZIP compression and every layer the frame has.
type EXROptions struct {
	Type        exr.PixelType
	Compression exr.Compression
	// Layers names the layers written beside the combined R, G, B; nil
	// means every layer the frame has (the stars layer only when there is
	// another contribution: alone it equals R, G, B). A named layer the
	// frame does not have is an error.
	Layers []string
	// FPS is a flight's frame rate, written as framesPerSecond when > 0.
	FPS float64
}

// ParseEXRLayers parses a comma-separated list of layer names, or "all"
// (nil: every layer) or "none" (no layer beside R, G, B).
func ParseEXRLayers(s string) ([]string, error) {
	s = strings.TrimSpace(s)
	switch strings.ToLower(s) {
	case "", "all":
		return nil, nil
	case "none":
		return []string{}, nil
	}
	var out []string
	for _, n := range strings.Split(s, ",") {
		n = strings.ToLower(strings.TrimSpace(n))
		if !slices.Contains(EXRLayerNames, n) {
			return nil, fmt.Errorf("%w %q: want all, none or a comma-separated list of %s", ErrEXRLayer, n, strings.Join(EXRLayerNames, ", "))
		}
		if !slices.Contains(out, n) {
			out = append(out, n)
		}
	}
	return out, nil
}

// EXRInput is what a frame's OpenEXR file is made of.
type EXRInput struct {
	// Frame is the rendered frame with every linear layer added; its
	// Doppler channel, when rendered with Options.Doppler, is the doppler
	// layer.
	Frame *render.Frame
	// Contributions are the linear contributions kept apart
	// (render.Layers.AddLinearKept); nil when not kept.
	Contributions []render.Contribution
	// Overlay is the overlays alone, sRGB-encoded over a transparent
	// background, the frame's size; nil when there are none.
	Overlay *image.NRGBA
	// Sidecar is the frame's physical state, recorded as attributes.
	Sidecar render.Sidecar
}

// sRGB primaries, IEC 61966-2-1 (the ITU-R BT.709 primaries).
var srgbPrimaries = [3][2]float32{{0.64, 0.33}, {0.30, 0.60}, {0.15, 0.06}}

// EXRImage assembles the OpenEXR image of a frame (see the channel list
// above) with the standard attributes — chromaticities (the sRGB
// primaries and the white point in use), envmap for equirectangular
// frames, framesPerSecond for flights, comments — and the physical state
// as "skyframe:" attributes. Layers the options name that the input does
// not have are errors wrapping ErrEXRLayer.
func EXRImage(in EXRInput, o EXROptions) (*exr.Image, error) {
	f := in.Frame
	if f == nil {
		return nil, fmt.Errorf("%w: nil frame", ErrEXRLayer)
	}
	w, h := f.W, f.H
	n := w * h
	img := &exr.Image{Width: w, Height: h}
	rgb := func(prefix string, pix []float32) {
		ch := [3][]float32{make([]float32, n), make([]float32, n), make([]float32, n)}
		for i := range n {
			ch[0][i], ch[1][i], ch[2][i] = pix[3*i], pix[3*i+1], pix[3*i+2]
		}
		for k, c := range []string{"R", "G", "B"} {
			img.Channels = append(img.Channels, exr.Channel{Name: prefix + c, Type: o.Type, Pix: ch[k]})
		}
	}
	rgb("", f.Pix)

	want := o.Layers
	explicit := want != nil
	if !explicit {
		for _, c := range in.Contributions {
			if c.Name != render.LayerStars || len(in.Contributions) > 1 {
				want = append(want, c.Name)
			}
		}
		if in.Overlay != nil {
			want = append(want, EXROverlay)
		}
		if f.Doppler != nil {
			want = append(want, EXRDoppler)
		}
	}
	for _, name := range want {
		switch name {
		case EXROverlay:
			if in.Overlay == nil {
				return nil, fmt.Errorf("%w %s: the frame has no overlays", ErrEXRLayer, name)
			}
			if b := in.Overlay.Bounds(); b.Dx() != w || b.Dy() != h {
				return nil, fmt.Errorf("%w %s: overlay image %d×%d, frame %d×%d", ErrEXRLayer, name, b.Dx(), b.Dy(), w, h)
			}
			img.Channels = append(img.Channels, overlayChannels(in.Overlay, o.Type)...)
		case EXRDoppler:
			if f.Doppler == nil {
				return nil, fmt.Errorf("%w %s: the frame was rendered without its Doppler channel", ErrEXRLayer, name)
			}
			img.Channels = append(img.Channels, exr.Channel{Name: "doppler.D", Type: exr.Float, Pix: f.Doppler})
		default:
			i := slices.IndexFunc(in.Contributions, func(c render.Contribution) bool { return c.Name == name })
			if i < 0 {
				return nil, fmt.Errorf("%w %s: the frame has no such contribution", ErrEXRLayer, name)
			}
			if len(in.Contributions[i].Pix) != 3*n {
				return nil, fmt.Errorf("%w %s: %d values, want %d", ErrEXRLayer, name, len(in.Contributions[i].Pix), 3*n)
			}
			rgb(name+".", in.Contributions[i].Pix)
		}
	}
	img.Attributes = exrAttributes(in, o)
	return img, nil
}

// overlayChannels converts 8-bit sRGB, straight-alpha overlays to linear,
// premultiplied overlay.R, G, B, A.
func overlayChannels(m *image.NRGBA, t exr.PixelType) []exr.Channel {
	var lin [256]float32
	for i := range lin {
		lin[i] = float32(spectrum.DecodeSRGB(float64(i) / 255))
	}
	b := m.Bounds()
	w, h := b.Dx(), b.Dy()
	ch := [4][]float32{make([]float32, w*h), make([]float32, w*h), make([]float32, w*h), make([]float32, w*h)}
	for y := range h {
		row := m.Pix[y*m.Stride : y*m.Stride+4*w]
		for x := range w {
			p := row[4*x : 4*x+4]
			a := float32(p[3]) / 255
			i := y*w + x
			ch[0][i], ch[1][i], ch[2][i], ch[3][i] = lin[p[0]]*a, lin[p[1]]*a, lin[p[2]]*a, a
		}
	}
	out := make([]exr.Channel, 4)
	for k, c := range []string{"R", "G", "B", "A"} {
		out[k] = exr.Channel{Name: EXROverlay + "." + c, Type: t, Pix: ch[k]}
	}
	return out
}

// exrAttributes are the standard and skyframe attributes of the file.
func exrAttributes(in EXRInput, o EXROptions) []exr.Attribute {
	s := in.Sidecar
	f := in.Frame
	wx, wy := f.Options.Color.White.Chromaticity()
	a := []exr.Attribute{
		{Name: "chromaticities", Value: exr.Chromaticities{
			Red: srgbPrimaries[0], Green: srgbPrimaries[1], Blue: srgbPrimaries[2],
			White: [2]float32{float32(wx), float32(wy)}}},
		{Name: "comments", Value: "Simulated sky: blackbody stars, no extinction. Linear sRGB, 1 = full scale at the exposure; lux = value / skyframe:scalePerLux."},
	}
	if f.Options.Projection.Kind.String() == "equirect" {
		a = append(a, exr.Attribute{Name: "envmap", Value: exr.EnvLatLong})
	}
	if o.FPS > 0 {
		a = append(a, exr.Attribute{Name: "framesPerSecond", Value: rational(o.FPS)})
	}
	str := func(k, v string) {
		if v != "" {
			a = append(a, exr.Attribute{Name: "skyframe:" + k, Value: v})
		}
	}
	num := func(k string, v float64) { a = append(a, exr.Attribute{Name: "skyframe:" + k, Value: v}) }
	str("software", strings.TrimSpace(s.Tool+" "+s.Version))
	num("beta", s.Beta)
	num("lorentzFactor", s.Gamma)
	num("rapidity", s.Rapidity)
	if s.Heading != nil {
		num("headingRA", s.Heading.RA)
		num("headingDec", s.Heading.Dec)
	}
	str("positionPc", strconv.FormatFloat(s.PositionPC[0], 'g', -1, 64)+","+strconv.FormatFloat(s.PositionPC[1], 'g', -1, 64)+","+strconv.FormatFloat(s.PositionPC[2], 'g', -1, 64))
	num("lookRA", s.Look.Forward.RA)
	num("lookDec", s.Look.Forward.Dec)
	str("projection", s.Projection.Kind)
	num("fovDeg", s.Projection.FOV)
	if s.Projection.Tilt != 0 {
		num("tiltDeg", s.Projection.Tilt)
	}
	num("exposureV", s.ExposureV)
	num("scalePerLux", s.Scale)
	str("beaming", s.Beaming)
	str("whitePoint", s.White)
	layers := []string{render.LayerStars}
	if in.Contributions != nil {
		layers = layers[:0]
		for _, c := range in.Contributions {
			layers = append(layers, c.Name)
		}
	}
	a = append(a, exr.Attribute{Name: "skyframe:layers", Value: layers})
	str("catalog", filepath.Base(s.Catalog.Source))
	a = append(a, exr.Attribute{Name: "skyframe:starsDrawn", Value: s.Counts.Drawn})
	return a
}

// rational writes a frame rate as a fraction: whole rates as N/1, NTSC-style
// rates (N·1000/1001) as such, others to 1/1000.
func rational(fps float64) exr.Rational {
	if fps == math.Trunc(fps) && fps < math.MaxInt32 {
		return exr.Rational{N: int32(fps), D: 1}
	}
	if n := math.Round(fps * 1001); math.Abs(n/1001-fps) < 1e-9 && n < math.MaxInt32 {
		return exr.Rational{N: int32(n), D: 1001}
	}
	return exr.Rational{N: int32(math.Round(math.Min(fps*1000, math.MaxInt32))), D: 1000}
}
