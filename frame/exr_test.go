package frame

import (
	"errors"
	"slices"
	"testing"

	"github.com/skyframe/skyframe/exr"
)

func TestParseEXRLayers(t *testing.T) {
	for s, want := range map[string][]string{
		"":                      nil,
		"all":                   nil,
		"none":                  {},
		"cmb, Stars,cmb":        {"cmb", "stars"},
		"overlay,doppler":       {"overlay", "doppler"},
		"unresolved":            {"unresolved"},
		"stars,cmb,unresolved ": {"stars", "cmb", "unresolved"},
	} {
		got, err := ParseEXRLayers(s)
		if err != nil || !slices.Equal(got, want) || (got == nil) != (want == nil) {
			t.Errorf("%q: %v (%v), want %v", s, got, err, want)
		}
	}
	for _, s := range []string{"nebula", "stars,", "R"} {
		if _, err := ParseEXRLayers(s); !errors.Is(err, ErrEXRLayer) {
			t.Errorf("%q: %v, want ErrEXRLayer", s, err)
		}
	}
}

// Frame rates as OpenEXR rationals: whole rates exactly, the NTSC-family
// rates as N/1001 (SMPTE practice: 30000/1001 ≈ 29.97), others to 1/1000.
func TestRational(t *testing.T) {
	for fps, want := range map[float64]exr.Rational{
		24: {N: 24, D: 1}, 30: {N: 30, D: 1}, 60: {N: 60, D: 1},
		30000.0 / 1001: {N: 30000, D: 1001}, 24000.0 / 1001: {N: 24000, D: 1001},
		12.5: {N: 12500, D: 1000},
	} {
		if got := rational(fps); got != want {
			t.Errorf("%g fps: %v, want %v", fps, got, want)
		}
	}
}
