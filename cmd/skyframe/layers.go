package main

import (
	"errors"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	framefiles "github.com/skyframe/skyframe/frame"
	"github.com/skyframe/skyframe/frameopt"
	"github.com/skyframe/skyframe/overlay"
	"github.com/skyframe/skyframe/render"
)

// frameLayers converts the overlay options (already checked by frameopt)
// into render layers for scene sc, resolving the stars they name (usage
// errors, exit status 2). It raises opt.Brightest so that the frame lists
// the stars labels asks for. The HUD, when asked for, holds what a single
// frame knows: β, γ and the signal rates from home (the Sun) and from
// mark-destination; a flight fills in its clocks and distances per frame.
func frameLayers(o *frameopt.Options, sc *scene, opt *render.Options) (framefiles.Layers, error) {
	var l framefiles.Layers
	l.CMB = o.CMB
	var err error
	if l.Unresolved, l.UnresolvedDepth, err = unresolvedLayer(sc.stars, o.Unresolved, o.UnresolvedDepth, sc.depthV); err != nil {
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
		v, err := d.CatalogueDir(sc.observer, sc.heading, sc.starFinder())
		if err != nil {
			if errors.Is(err, frameopt.ErrUnknownStar) {
				return l, sc.starError("mark-destination", frameopt.PointDir.Spellings(), d.Star)
			}
			return l, usagef("--mark-destination: %v", err)
		}
		dest = &v
		l.Markers.Destination = dest
	}
	l.Lattice = overlay.LatticeOptions{PerSide: o.Lattice, Spacing: o.LatticeStep, Origin: sc.observer.Position, Confirm: o.LatticeConfirm}
	custom := map[int64]string{}
	for _, v := range o.Label {
		q, text := splitLabel(v)
		i, err := findStar(sc.index, "label", "", q)
		if err != nil {
			return l, err
		}
		if text != "" {
			custom[sc.stars.ID[i]] = text
		}
	}
	x := sc.index
	l.Labels = overlay.LabelOptions{Brightest: o.Labels, Stars: labelStars(o.Label), Find: x.Find,
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
		b := sc.observer.Boost
		v.Beta, v.Gamma, v.Title = b.Beta(), b.Gamma(), o.HUDTitle
		if p := sc.observer.Position; r3.Norm(p) > 0 {
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

// labelStars returns the star references of label values (STAR or
// STAR=TEXT) without their custom texts.
func labelStars(values []string) []string {
	out := make([]string, len(values))
	for k, v := range values {
		out[k], _ = splitLabel(v)
	}
	return out
}

// checkHUDFit refuses, before anything renders, a heads-up display that
// has no room in the front safe area of fisheye projection p (exit
// status 2, naming where it came from). v stands for the display's values.
func checkHUDFit(l framefiles.Layers, p camera.Projection, v overlay.HUDValues, where string) error {
	if err := l.CheckHUDFit(p, v); err != nil {
		return usagef("%s: %v", where, err)
	}
	return nil
}
