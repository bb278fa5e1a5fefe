package main

import (
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/flight"
	"github.com/skyframe/skyframe/frameopt"
	"github.com/skyframe/skyframe/names"
	"github.com/skyframe/skyframe/overlay"
)

// planLayers turns a plan's overlay options (checked with line numbers by
// flight.ParsePlan) into render layers. The stars the plan names were
// resolved by flight.Plan.Bind.
func planLayers(plan *flight.Plan, index *names.Index) (layerSet, error) {
	sc := &scene{stars: index.Stars(), index: index, observer: camera.Observer{Position: plan.Trajectory().Start().Pos}, heading: r3.Vec{X: 1}}
	if s := plan.Trajectory().Start(); r3.Norm(s.Dir) > 0 {
		sc.heading = r3.Unit(s.Dir)
	}
	o := plan.Frame
	o.MarkDestination = "" // follows the ship: set per frame
	l, err := frameLayers(&o, sc, nil)
	if err != nil {
		return l, usagef("%s: overlays: %v", plan.Name, err)
	}
	return l, nil
}

// frameLayers specialises the plan's layers to frame fs: the destination
// marker and HUD follow the ship.
func (j *flightJob) frameLayers(fs flight.FrameState, obs camera.Observer) layerSet {
	l := j.layers
	tr := j.plan.Trajectory()
	if md := j.plan.Frame.MarkDestination; md != "" {
		sc := &scene{stars: j.stars, index: j.index, observer: obs, heading: fs.State.Dir}
		if d, err := frameopt.ParseDirection(md, frameopt.PointDir); err == nil {
			if u, err := d.CatalogueDir(obs, fs.State.Dir, sc.starFinder()); err == nil {
				l.Markers.Destination = &u
			}
		}
	} else if l.Markers.Motion {
		d := r3.Sub(tr.Destination(), fs.State.Pos)
		if n := r3.Norm(d); n > 0 {
			u := r3.Scale(1/n, d)
			l.Markers.Destination = &u
		}
	}
	if l.HUD != nil {
		v := overlay.NoHUDValues()
		v.Title = j.plan.Title
		if j.plan.Frame.HUDTitle != "" {
			v.Title = j.plan.Frame.HUDTitle
		}
		v.Beta, v.Gamma = fs.State.Beta, fs.State.Gamma
		v.TauYears, v.TYears = fs.State.Tau, fs.State.T
		v.TravelledLy = fs.State.Travelled / flight.LightYearPc
		v.RemainingLy = fs.State.Remaining / flight.LightYearPc
		v.RateHome, v.RateDest = signalRates(tr, fs.State)
		l.HUD = &v
	}
	l.Lattice.Origin = tr.Start().Pos
	_ = obs
	return l
}

// wideHUDValues stand for a flight's heads-up display when checking that it
// fits: every line present, with values as wide as a flight shows.
func wideHUDValues(title string) overlay.HUDValues {
	return overlay.HUDValues{Beta: 0.99999999, Gamma: 7071.07, TauYears: 1234.5, TYears: 12345.6, TravelledLy: 12345.6,
		RemainingLy: 12345.6, RateHome: 1.2345e-4, RateDest: 14142.1, Title: title}
}
