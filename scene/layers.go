package scene

import (
	"errors"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/flight"
	"github.com/skyframe/skyframe/frame"
	"github.com/skyframe/skyframe/frameopt"
	"github.com/skyframe/skyframe/names"
	"github.com/skyframe/skyframe/overlay"
	"github.com/skyframe/skyframe/render"
	"github.com/skyframe/skyframe/sky"
	"gonum.org/v1/gonum/spatial/r3"
)

// FrameLayers converts the overlay options (already checked by frameopt)
// into render layers for scene sc, resolving the stars they name (usage
// errors, exit status 2). It raises opt.Brightest so that the frame lists
// the stars labels asks for. The HUD, when asked for, holds what a single
// frame knows: β, γ and the signal rates from home (the Sun) and from
// mark-destination; a flight fills in its clocks and distances per frame.
func FrameLayers(o *frameopt.Options, sc *Scene, opt *render.Options) (frame.Layers, error) {
	var l frame.Layers
	l.CMB = o.CMB
	var err error
	if l.Unresolved, l.UnresolvedDepth, err = unresolvedLayer(sc.Maps, sc.Stars, o.Unresolved, o.UnresolvedDepth, sc.DepthV); err != nil {
		return l, err
	}
	g, _ := overlay.ParseGraticuleFrame(o.Grid)
	if o.Grid == "" {
		g = overlay.GraticuleNone
	}
	l.Graticule = overlay.GraticuleOptions{Frame: g, Step: o.GridStep}
	l.UnityCircle = o.UnityCircle
	l.Markers.Motion = o.MarkMotion
	var dest *r3.Vec
	if o.MarkDestination != "" {
		d, err := frameopt.ParseDirection(o.MarkDestination, frameopt.PointDir)
		if err != nil {
			return l, usagef("--mark-destination: %v", err)
		}
		v, err := d.CatalogueDir(sc.Observer, sc.Heading, sc.starFinder())
		if err != nil {
			if errors.Is(err, frameopt.ErrUnknownStar) {
				return l, sc.starError("mark-destination", frameopt.PointDir.Spellings(), d.Star)
			}
			return l, usagef("--mark-destination: %v", err)
		}
		dest = &v
		l.Markers.Destination = dest
	}
	l.Lattice = overlay.LatticeOptions{PerSide: o.Lattice, Spacing: o.LatticeStep, Origin: sc.Observer.Position, Confirm: o.LatticeConfirm}
	custom := map[int64]string{}
	for _, v := range o.Label {
		q, text := splitLabel(v)
		i, err := findStar(sc.Index, "label", "", q)
		if err != nil {
			return l, err
		}
		if text != "" {
			custom[sc.Stars.ID[i]] = text
		}
	}
	x := sc.Index
	l.Labels = overlay.LabelOptions{Brightest: o.Labels, Stars: LabelStars(o.Label), Find: x.Find,
		Text: func(id int64, name string) string {
			if t, ok := custom[id]; ok {
				return t
			}
			return x.LabelByID(id, name)
		}}
	if opt != nil && o.Labels > 0 {
		b := opt.Brightest
		if b == 0 {
			b = render.DefaultBrightest
		}
		opt.Brightest = max(b, o.Labels)
	}
	if o.HUD != "" {
		c, err := overlay.ParseCorner(o.HUD)
		if err != nil {
			return l, usagef("--hud %q: want top-left, top-right, bottom-left or bottom-right", o.HUD)
		}
		l.HUDCorner = c
		v := overlay.NoHUDValues()
		b := sc.Observer.Boost
		v.Beta, v.Gamma, v.Title = b.Beta(), b.Gamma(), o.HUDTitle
		if p := sc.Observer.Position; r3.Norm(p) > 0 {
			v.RateHome = b.Doppler(r3.Scale(-1/r3.Norm(p), p))
		}
		if dest != nil {
			v.RateDest = b.Doppler(*dest)
		}
		l.HUD = &v
	}
	l.TextSize = o.TextSize
	return l, nil
}

// LabelStars returns the star references of label values (STAR or
// STAR=TEXT) without their custom texts.
func LabelStars(values []string) []string {
	out := make([]string, len(values))
	for k, v := range values {
		out[k], _ = splitLabel(v)
	}
	return out
}

// CheckHUDFit refuses, before anything renders, a heads-up display that
// has no room in the front safe area of fisheye projection p (exit
// status 2, naming where it came from). v stands for the display's values.
func CheckHUDFit(l frame.Layers, p camera.Projection, v overlay.HUDValues, where string) error {
	if err := l.CheckHUDFit(p, v); err != nil {
		return usagef("%s: %v", where, err)
	}
	return nil
}

// PlanLayers turns a plan's overlay options (checked with line numbers by
// flight.ParsePlan) into render layers. The stars the plan names were
// resolved by flight.Plan.Bind.
func PlanLayers(plan *flight.Plan, index *names.Index, maps *sky.UnresolvedMaps) (frame.Layers, error) {
	sc := &Scene{Stars: index.Stars(), Index: index, Observer: camera.Observer{Position: plan.Trajectory().Start().Pos}, Heading: r3.Vec{X: 1}, Maps: maps}
	if s := plan.Trajectory().Start(); r3.Norm(s.Dir) > 0 {
		sc.Heading = r3.Unit(s.Dir)
	}
	o := plan.Frame
	o.MarkDestination = "" // follows the ship: set per frame
	l, err := FrameLayers(&o, sc, nil)
	if err != nil {
		return l, usagef("%s: overlays: %v", plan.Name, err)
	}
	return l, nil
}
