package main

import (
	"fmt"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/flight"
	"github.com/skyframe/skyframe/overlay"
	"github.com/skyframe/skyframe/render"
)

// planLayers turns a plan's [overlays] table into render layers, checking
// every value before any frame is rendered:
//
//	cmb    = true                      the cosmic microwave background
//	grid   = true | "radec" | "galactic"  an aberrated grid, with the D = 1
//	                                   circle and the motion and destination markers
//	labels = true | "N" | "id,name,…"  label the 10 (or N) brightest stars, or these
//	hud    = true | "top-left" | …     the heads-up display (clocks, distances, rates)
func planLayers(plan *flight.Plan, sc *scene) (layerSet, *layerFlags, error) {
	ov := plan.Overlays
	lf := &layerFlags{grid: "none", gridStep: overlay.DefaultGraticuleStep, latticeStep: overlay.DefaultLatticeSpacing}
	where := func(key string) string { return fmt.Sprintf("%s: overlays.%s", plan.Name, key) }
	switch v := ov.CMB.(type) {
	case nil:
	case bool:
		lf.cmb = v
	default:
		return layerSet{}, nil, usagef("%s = %v: want true or false", where("cmb"), v)
	}
	switch v := ov.Grid.(type) {
	case nil:
	case bool:
		if v {
			lf.grid = "radec"
		}
	case string:
		lf.grid = v
	default:
		return layerSet{}, nil, usagef("%s = %v: want true, \"radec\" or \"galactic\"", where("grid"), v)
	}
	if lf.grid != "none" {
		lf.unity, lf.markMotion = true, true
	}
	switch v := ov.Labels.(type) {
	case nil:
	case bool:
		if v {
			lf.labels = render.DefaultBrightest
		}
	case string:
		if n, err := strconv.Atoi(strings.TrimSpace(v)); err == nil {
			lf.labels = n
		} else {
			for _, id := range strings.Split(v, ",") {
				if id = strings.TrimSpace(id); id != "" {
					lf.labelIDs = append(lf.labelIDs, id)
				}
			}
		}
	default:
		return layerSet{}, nil, usagef("%s = %v: want true, a count or a list of star ids", where("labels"), v)
	}
	switch v := ov.HUD.(type) {
	case nil:
	case bool:
		if v {
			lf.hud = "top-left"
		}
	case string:
		lf.hud = v
	default:
		return layerSet{}, nil, usagef("%s = %v: want true or a corner", where("hud"), v)
	}
	l, err := lf.layers(sc, nil)
	if err != nil {
		return l, nil, usagef("%s: overlays: %v", plan.Name, err)
	}
	return l, lf, nil
}

// frameLayers specialises the plan's layers to frame fs: the destination
// marker and HUD follow the ship.
func (j *flightJob) frameLayers(fs flight.FrameState, obs camera.Observer) layerSet {
	l := j.layers
	if j.layerFlags == nil {
		return l
	}
	tr := j.plan.Trajectory()
	if l.Markers.Motion {
		d := r3.Sub(tr.Destination(), fs.State.Pos)
		if n := r3.Norm(d); n > 0 {
			u := r3.Scale(1/n, d)
			l.Markers.Destination = &u
		}
	}
	if l.HUD != nil {
		v := overlay.NoHUDValues()
		v.Title = j.plan.Title
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
