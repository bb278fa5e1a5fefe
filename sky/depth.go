package sky

import (
	"fmt"
	"math"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/render"
	"github.com/skyframe/skyframe/spectrum"
)

// Depths of the built-in sky's resolved stars.
const (
	// MinDepth is the built-in sky's own depth (catalog.BuiltIn): a frame
	// never draws it shallower.
	MinDepth = catalog.DefaultSynthMagLimit
	// AutoMaxDepth caps the depth chosen for a frame: the whole sky to
	// V = 12.5 has about 3.5·10⁶ stars (0.13 GB); beyond it the unresolved
	// layer carries the light and the warning says how many stars are not
	// drawn.
	AutoMaxDepth = 12.5
)

// BuiltInTemps is the temperature range of the built-in sky's stars: the
// Ballesteros relation at the ends of its B−V range, where
// catalog.TeffFromBV clamps.
func BuiltInTemps() (tmin, tmax float64) {
	return catalog.TeffFromBV(catalog.BVMax), catalog.TeffFromBV(catalog.BVMin)
}

// VisibleLimit is the faintest observed V the frame opt shows at all: a
// white star that peaks at the 8-bit just-visible level
// (render.JustVisible) or, when fainter, the frame's cull limit.
func VisibleLimit(opt render.Options) float64 {
	v := opt.Exposure - render.ExposureForLimit(0)
	lim := opt.Limit
	if lim == 0 {
		lim = opt.Exposure + render.DefaultLimitOffset
	}
	return math.Min(v, lim)
}

// Report is the completeness of one frame's catalogue.
type Report struct {
	// Needed is the frame's bound over the catalogue's temperatures: the
	// faintest catalogue V that can reach the frame's limit.
	Needed render.Depth
	// Have is the catalogue's depth: estimated from its magnitude counts,
	// or the depth the built-in sky was drawn to.
	Have float64
	// BuiltIn is set for the built-in sky, Deep when it was drawn deeper
	// than its default for the frame.
	BuiltIn, Deep bool
	// Visible is, for the built-in sky, the bound for the stars the image
	// can show (VisibleLimit): the completeness threshold there, since the
	// unresolved layer carries the light of the fainter ones. 0 otherwise.
	Visible float64
	// Hint, when set, replaces the warning's advice (a command without
	// --sky-depth gives its own).
	Hint string
}

// Threshold is the catalogue V the frame needs to be complete: Visible for
// the built-in sky, else Needed.Needed.
func (r Report) Threshold() float64 {
	if r.Visible != 0 {
		return r.Visible
	}
	return r.Needed.Needed
}

// Complete reports whether the catalogue reaches the frame's threshold
// (within 0.05 mag, the turnover estimate's rounding aside). A catalogue of
// unknown depth (NaN) counts as complete: there is nothing to compare.
func (r Report) Complete() bool {
	return !(r.Have < r.Threshold()-0.05)
}

// Missing estimates the share of the stars, and of their V-band light,
// with catalogue V ≤ Threshold that the catalogue (complete to Have) lacks:
// from the built-in sky's galaxy model over the whole sky at rest
// (catalog.ModelSky). Zero when complete.
func (r Report) Missing() (stars, light float64) {
	if r.Complete() || math.IsNaN(r.Have) {
		return 0, 0
	}
	n1, l1 := catalog.ModelSky(r.Have, catalog.SynthOptions{})
	n2, l2 := catalog.ModelSky(r.Threshold(), catalog.SynthOptions{})
	return 1 - n1/n2, (l2 - l1) / l2
}

// Warning returns the completeness warning of the command cmd (its name,
// e.g. "still"), one line without its newline, or "" when the catalogue is
// complete for the frame. what names the frame when cmd renders several
// ("frame 120 (the worst)"); empty for one.
func (r Report) Warning(cmd, what string) string {
	if r.Complete() || math.IsNaN(r.Have) {
		return ""
	}
	cat := "the catalogue"
	hint := "use a deeper catalogue (Hipparcos, Gaia)"
	if r.BuiltIn {
		cat = "the built-in sky"
		hint = fmt.Sprintf("raise --sky-depth (at most %g) or leave it at auto", catalog.MaxSynthMagLimit)
	}
	if r.Hint != "" {
		hint = r.Hint
	}
	frame := "this frame"
	if what != "" {
		frame = what
	}
	ms, ml := r.Missing()
	s := fmt.Sprintf("skyframe %s: warning: %s is complete to V ≈ %.1f, but %s shows stars from catalogue V ≤ %.1f "+
		"(a %.0f K star brightens by %.1f mag at D = %.2f); about %.0f %% of those stars and %.0f %% of their light are missing "+
		"(galaxy model, whole sky at rest); %s",
		cmd, cat, r.Have, frame, r.Threshold(), r.Needed.T, -r.Needed.DeltaV, r.Needed.D, 100*ms, 100*ml, hint)
	if !r.BuiltIn && r.Hint == "" {
		s += fmt.Sprintf(", or add the galaxy model's light of the stars fainter than the catalogue with --unresolved on --unresolved-depth %.1f", r.Have)
	}
	return s
}

// ForCatalogue is the completeness of catalogue s for the frame opt: its
// estimated depth (catalog.EstimateDepth) against the frame's bound over its
// temperatures.
func ForCatalogue(s *catalog.Stars, opt render.Options) (Report, error) {
	d := catalog.EstimateDepth(s)
	return forDepth(d, opt)
}

// forDepth is ForCatalogue for a catalogue whose depth estimate is d.
func forDepth(d catalog.Depth, opt render.Options) (Report, error) {
	tmin, tmax := d.TMin, d.TMax
	if !(tmin > 0 && tmax >= tmin) {
		tmin, tmax = catalog.DefaultTeff, catalog.DefaultTeff
	}
	need, err := render.NeededDepth(opt, tmin, tmax)
	if err != nil {
		return Report{}, err
	}
	have := d.V
	if math.IsNaN(have) {
		have = d.Faintest
	}
	return Report{Needed: need, Have: have}, nil
}

// Worst returns the report of reps that falls shortest of its threshold
// (Have − Threshold smallest) and its index; −1 when every one is
// complete.
func Worst(reps []Report) (Report, int) {
	k := -1
	for i, r := range reps {
		if r.Complete() || math.IsNaN(r.Have) {
			continue
		}
		if k < 0 || r.Have-r.Threshold() < reps[k].Have-reps[k].Threshold() {
			k = i
		}
	}
	if k < 0 {
		return Report{}, -1
	}
	return reps[k], k
}

// WholeSky is the completeness of catalogue s (depth estimate d; see
// catalog.EstimateDepth) for a list of the whole sky seen at boost b to
// observed V′ ≤ limit under beam: every Doppler factor from γ(1 − β) to
// γ(1 + β) is in view. builtIn takes the built-in sky's temperatures
// (BuiltInTemps) instead of the catalogue's.
func WholeSky(d catalog.Depth, builtIn bool, b camera.Boost, limit float64, beam spectrum.Beaming) Report {
	tmin, tmax := d.TMin, d.TMax
	if builtIn {
		tmin, tmax = BuiltInTemps()
	} else if !(tmin > 0 && tmax >= tmin) {
		tmin, tmax = catalog.DefaultTeff, catalog.DefaultTeff
	}
	dmax := b.Gamma() + b.GammaBeta()
	dmin := 1 / dmax
	dv, T, D := render.MaxBrightening(tmin, tmax, dmin, dmax, beam)
	have := d.V
	if math.IsNaN(have) {
		have = d.Faintest
	}
	return Report{Needed: render.Depth{Needed: limit - dv, DeltaV: dv, T: T, D: D, DMin: dmin, DMax: dmax}, Have: have, BuiltIn: builtIn}
}
