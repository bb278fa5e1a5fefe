package main

import (
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/flight"
	framefiles "github.com/skyframe/skyframe/frame"
	"github.com/skyframe/skyframe/names"
)

// planLayers turns a plan's overlay options (checked with line numbers by
// flight.ParsePlan) into render layers. The stars the plan names were
// resolved by flight.Plan.Bind.
func planLayers(plan *flight.Plan, index *names.Index) (framefiles.Layers, error) {
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
