package main

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/spf13/pflag"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/catalog"
	framefiles "github.com/skyframe/skyframe/frame"
	"github.com/skyframe/skyframe/frameopt"
	"github.com/skyframe/skyframe/names"
	"github.com/skyframe/skyframe/overlay"
	"github.com/skyframe/skyframe/render"
	"github.com/skyframe/skyframe/scene"
)

func layerScene(t *testing.T) *scene.Scene {
	t.Helper()
	s := &catalog.Stars{Epoch: 2000, Source: "test", Format: "in-code"}
	s.Append(catalog.Star{ID: 7, Name: "Testar", RA: 10, Dec: 5, Dist: 3, Vmag: 1, Teff: 5000, BV: math.NaN(), RV: math.NaN()})
	b, err := camera.NewBoost(camera.FromRADec(10, 5), 0.6)
	if err != nil {
		t.Fatal(err)
	}
	return &scene.Scene{Stars: s, Index: names.NewIndex(s, nil), Observer: camera.Observer{Boost: b}, Heading: camera.FromRADec(10, 5)}
}

// layerFlags parses frame-option flags and converts them to layers as
// still does: the definitions' checks, then frameLayers.
type layerFlags struct {
	o   frameopt.Options
	err error
}

func parseLayerFlags(t *testing.T, args ...string) *layerFlags {
	t.Helper()
	fs := pflag.NewFlagSet("t", pflag.ContinueOnError)
	var f layerFlags
	frameopt.Register(fs, &f.o)
	if err := fs.Parse(args); err != nil {
		t.Fatal(err)
	}
	f.err = checkFrameFlags(fs, &f.o)
	return &f
}

func (f *layerFlags) layers(sc *scene.Scene, opt *render.Options) (framefiles.Layers, error) {
	if f.err != nil {
		return framefiles.Layers{}, f.err
	}
	return scene.FrameLayers(&f.o, sc, opt)
}

// Bad layer options are usage errors (exit status 2) naming the flag.
func TestLayerFlagsErrors(t *testing.T) {
	cases := []struct {
		args []string
		text string
	}{
		{[]string{"--grid", "ecliptic"}, "--grid"},
		{[]string{"--grid", "radec", "--grid-step", "0"}, "--grid-step"},
		{[]string{"--grid-step", "-3"}, "--grid-step"},
		{[]string{"--lattice", "101"}, "1030301"},
		{[]string{"--lattice", "-1"}, "--lattice"},
		{[]string{"--lattice", "3", "--lattice-step", "0"}, "--lattice-step"},
		{[]string{"--label", "Nosuch"}, `"Nosuch"`},
		{[]string{"--labels", "-2"}, "--labels"},
		{[]string{"--hud", "centre"}, "--hud"},
		{[]string{"--hud-title", "x"}, "--hud"},
		{[]string{"--mark-destination", "Nosuch"}, "--mark-destination"},
		{[]string{"--text-size", "0"}, "--text-size"},
		{[]string{"--text-size", "-4"}, "--text-size"},
		{[]string{"--text-size", "1000"}, "--text-size"},
	}
	for _, c := range cases {
		_, err := parseLayerFlags(t, c.args...).layers(layerScene(t), nil)
		var ue usageError
		if !(errors.As(err, &ue) || isInputError(err)) || !strings.Contains(err.Error(), c.text) {
			t.Errorf("%v: have %v, want a usage error naming %s", c.args, err, c.text)
		}
	}
}

func TestLayerFlagsConvert(t *testing.T) {
	f := parseLayerFlags(t, "--cmb", "--grid", "galactic", "--grid-step", "20", "--unity-circle", "--mark-motion",
		"--mark-destination", "Testar", "--lattice", "101", "--lattice-confirm", "--labels", "25", "--label", "7",
		"--hud", "br", "--hud-title", "hello")
	var opt render.Options
	l, err := f.layers(layerScene(t), &opt)
	if err != nil {
		t.Fatal(err)
	}
	if !l.CMB || l.Graticule.Frame != overlay.GraticuleGalactic || l.Graticule.Step != 20 || !l.UnityCircle || !l.Markers.Motion ||
		l.Markers.Destination == nil || l.Lattice.PerSide != 101 || !l.Lattice.Confirm || l.Labels.Brightest != 25 ||
		len(l.Labels.Stars) != 1 || l.HUD == nil || l.HUDCorner != overlay.BottomRight || l.HUD.Title != "hello" {
		t.Errorf("layers %+v", l)
	}
	if opt.Brightest != 25 {
		t.Errorf("Options.Brightest = %d, want 25 for --labels 25", opt.Brightest)
	}
	// Destination straight ahead at β = 0.6: signals arrive at D = 2 per
	// second [cp: physics.md β = 0.6 check values].
	if d := l.HUD.RateDest; math.Abs(d-2) > 1e-9 {
		t.Errorf("destination rate %g, want 2", d)
	}
	if err := l.Validate(); err != nil {
		t.Error(err)
	}
	// No flags: no layers.
	l, err = parseLayerFlags(t).layers(layerScene(t), &opt)
	if err != nil || l.CMB || l.Graticule.Frame != overlay.GraticuleNone || l.HUD != nil || l.Lattice.PerSide != 0 {
		t.Errorf("defaults: %+v, %v", l, err)
	}
}
