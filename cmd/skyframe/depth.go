package main

import (
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/spf13/pflag"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/names"
	"github.com/skyframe/skyframe/render"
)

// Depth of the built-in sky's resolved stars (--sky-depth).
const (
	minSkyDepth = catalog.DefaultSynthMagLimit
	// autoSkyDepthMax caps --sky-depth auto: the whole sky to V = 12.5 has
	// about 3.5·10⁶ stars (0.13 GB); beyond it the unresolved layer carries
	// the light and the warning says how many stars are not drawn.
	autoSkyDepthMax = 12.5
)

// skyDepthFlag is --sky-depth: "auto" (NaN here) or a magnitude.
type skyDepthFlag struct{ v float64 }

func (f *skyDepthFlag) String() string {
	if math.IsNaN(f.v) {
		return "auto"
	}
	return strconv.FormatFloat(f.v, 'g', -1, 64)
}

func (f *skyDepthFlag) Set(s string) error {
	if strings.EqualFold(strings.TrimSpace(s), "auto") {
		f.v = math.NaN()
		return nil
	}
	v, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
	if err != nil || !(v >= minSkyDepth && v <= catalog.MaxSynthMagLimit) {
		return fmt.Errorf("want auto or a V magnitude from %g to %g", minSkyDepth, catalog.MaxSynthMagLimit)
	}
	f.v = v
	return nil
}

func (f *skyDepthFlag) Type() string { return "V|auto" }

func registerSkyDepth(fs *pflag.FlagSet, f *skyDepthFlag) {
	f.v = math.NaN()
	fs.Var(f, "sky-depth", fmt.Sprintf("built-in sky only: faintest V of its resolved stars, %g to %g, or auto (every star the image can show, as deep as the speed and view need, at most %g; the fainter ones are in the unresolved layer)",
		minSkyDepth, catalog.MaxSynthMagLimit, autoSkyDepthMax))
}

// builtInTemps is the temperature range of the built-in sky's stars: the
// Ballesteros relation at the ends of its B−V range, where TeffFromBV clamps.
func builtInTemps() (tmin, tmax float64) {
	return catalog.TeffFromBV(catalog.BVMax), catalog.TeffFromBV(catalog.BVMin)
}

// depthReport is the completeness of one frame's catalogue.
type depthReport struct {
	needed  render.Depth
	have    float64 // the catalogue's depth (estimated, or drawn to)
	deep    bool    // the built-in sky was drawn deeper for the frame
	builtIn bool    // the catalogue is the built-in sky
	// visible is the bound for the stars the image can show (built-in sky
	// only; 0 otherwise): the warning's threshold there, since the
	// unresolved layer carries the light of the fainter ones.
	visible float64
}

// complete reports whether the catalogue reaches the frame's bound (within
// 0.05 mag, the turnover estimate's rounding aside).
func (d depthReport) complete() bool {
	need := d.needed.Needed
	if d.visible != 0 {
		need = d.visible
	}
	return !(d.have < need-0.05)
}

// deepBuiltIn draws the built-in sky for the frame opt. Its resolved depth
// V_res is maxV when given (--sky-depth), else (auto) the completeness
// bound for the stars the image can show: those reaching the 8-bit
// just-visible level (render.JustVisible, V′ = Exposure + 6.54), between
// the default depth and catalog.MaxSynthMagLimit. Every cell of the
// sampling grid whose Doppler factors reach the frame is drawn to V_res, the
// others to the default depth, so the unresolved layer at V_res complements
// the stars exactly wherever the frame looks. The default sky's stars are
// all in it, with the same values.
func deepBuiltIn(opt render.Options, maxV float64) (*catalog.Stars, depthReport, error) {
	tmin, tmax := builtInTemps()
	prof, err := render.NewDepthProfile(opt, tmin, tmax)
	if err != nil {
		return nil, depthReport{}, err
	}
	vis := opt
	vis.Limit = visibleLimit(opt)
	visDep, err := render.NeededDepth(vis, tmin, tmax)
	if err != nil {
		return nil, depthReport{}, err
	}
	rep := depthReport{needed: prof.Depth, visible: visDep.Needed}
	vres := maxV
	if math.IsNaN(vres) {
		vres = math.Max(minSkyDepth, math.Min(autoSkyDepthMax, math.Ceil(visDep.Needed*10)/10))
	}
	rep.have = vres
	if vres <= minSkyDepth {
		return catalog.BuiltIn(), rep, nil
	}
	rep.deep = true
	b := opt.Observer.Boost
	dir := b.Dir()
	beta, gamma := b.Beta(), b.Gamma()
	dop := func(th float64) float64 { return gamma * (1 + beta*math.Cos(th)) }
	cell := func(c catalog.SynthCell) float64 {
		if beta == 0 {
			return vres
		}
		alpha := math.Acos(math.Max(-1, math.Min(1, r3.Dot(r3.Vec{X: c.Dir[0], Y: c.Dir[1], Z: c.Dir[2]}, dir))))
		th0, th1 := math.Max(0, alpha-c.Radius), math.Min(math.Pi, alpha+c.Radius)
		if math.IsInf(prof.NeededFor(dop(th1)*0.999, dop(th0)*1.001), -1) {
			return minSkyDepth
		}
		return vres
	}
	s := catalog.Synthetic(catalog.SynthOptions{MagLimit: vres, CellLimit: cell})
	return s, rep, nil
}

// visibleLimit is the faintest observed V the frame opt shows at all: a
// white star that peaks at the 8-bit just-visible level (render.JustVisible)
// or, when fainter, the frame's cull limit.
func visibleLimit(opt render.Options) float64 {
	v := opt.Exposure - render.ExposureForLimit(0)
	lim := opt.Limit
	if lim == 0 {
		lim = opt.Exposure + render.DefaultLimitOffset
	}
	return math.Min(v, lim)
}

// catalogueDepth is the completeness of a loaded catalogue for the frame
// opt: its estimated depth against the frame's bound over its temperatures.
func catalogueDepth(s *catalog.Stars, opt render.Options) (depthReport, error) {
	d := catalog.EstimateDepth(s)
	tmin, tmax := d.TMin, d.TMax
	if !(tmin > 0 && tmax >= tmin) {
		tmin, tmax = catalog.DefaultTeff, catalog.DefaultTeff
	}
	need, err := render.NeededDepth(opt, tmin, tmax)
	if err != nil {
		return depthReport{}, err
	}
	have := d.V
	if math.IsNaN(have) {
		have = d.Faintest
	}
	return depthReport{needed: need, have: have}, nil
}

// warnDepth writes the completeness warning of cmd to w when the catalogue
// is shallower than the frame needs: both magnitudes and the share of the
// stars and of the V-band light between them, estimated from the built-in
// sky's galaxy model over the whole sky at rest.
func warnDepth(w io.Writer, cmd string, d depthReport, builtIn bool) {
	if d.complete() || math.IsNaN(d.have) {
		return
	}
	what := "the catalogue"
	hint := "use a deeper catalogue (Hipparcos, Gaia)"
	need := d.needed
	if builtIn {
		what = "the built-in sky"
		hint = fmt.Sprintf("raise --sky-depth (at most %g) or leave it at auto", catalog.MaxSynthMagLimit)
		need.Needed = d.visible
	}
	n1, l1 := catalog.ModelSky(d.have, catalog.SynthOptions{})
	n2, l2 := catalog.ModelSky(need.Needed, catalog.SynthOptions{})
	fmt.Fprintf(w, "skyframe %s: warning: %s is complete to V ≈ %.1f, but this frame shows stars from catalogue V ≤ %.1f "+
		"(a %.0f K star brightens by %.1f mag at D = %.2f); about %.0f %% of those stars and %.0f %% of their light are missing "+
		"(galaxy model, whole sky at rest); %s",
		cmd, what, d.have, need.Needed, need.T, -need.DeltaV, need.D,
		100*(1-n1/n2), 100*(l2-l1)/l2, hint)
	if !builtIn {
		fmt.Fprintf(w, ", or add the galaxy model's light of the stars fainter than the catalogue with --unresolved on --unresolved-depth %.1f", d.have)
	}
	fmt.Fprintln(w)
}

// frameDepth settles the catalogue's depth for a frame: the built-in sky is
// drawn as deep as the frame needs (sc's stars and index are replaced; the
// default sky's stars keep their rows' values, so references resolved
// before stay valid), any other catalogue is checked against the frame's
// bound and a warning written to w when it falls short. A catalogue
// streamed from disk is not scanned for its depth.
func frameDepth(w io.Writer, cmd string, sc *scene, spec *frameSpec, skyDepth float64, streamed bool) error {
	if streamed {
		return nil
	}
	var rep depthReport
	var err error
	builtIn := sc.builtIn
	if builtIn {
		var s *catalog.Stars
		s, rep, err = deepBuiltIn(spec.Opt, skyDepth)
		if err != nil {
			return err
		}
		if s != catalog.BuiltIn() {
			p := spec.Opt.Observer.Position
			s = catalog.WithSun(s, [3]float64{p.X, p.Y, p.Z})
			sc.stars = s
			sc.index = names.NewIndex(s, sc.table)
		}
	} else if rep, err = catalogueDepth(sc.stars, spec.Opt); err != nil {
		return err
	}
	rep.builtIn = builtIn
	spec.depthRep = &rep
	if builtIn {
		sc.depthV = rep.have
	}
	warnDepth(w, cmd, rep, builtIn)
	return nil
}

// finitePtr returns &v, or nil for NaN and ±Inf.
func finitePtr(v float64) *float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return &v
}
