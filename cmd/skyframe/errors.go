package main

import (
	"errors"

	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/flight"
	flightjob "github.com/skyframe/skyframe/job"
	"github.com/skyframe/skyframe/overlay"
	"github.com/skyframe/skyframe/render"
	"github.com/skyframe/skyframe/scene"
)

// isInputError reports whether err is about the user's input (a catalogue or
// plan file, an output path naming a device, FIFO or directory, or an
// observer placed inside a star), which exits with status 2 like a usage
// error.
func isInputError(err error) bool {
	var pe *catalog.ParseError
	var ple *flight.PlanError
	var le *flight.LegError
	var je *flightjob.InputError
	var se *scene.InputError
	return errors.As(err, &pe) || errors.As(err, &ple) || errors.As(err, &le) || errors.As(err, &je) || errors.As(err, &se) ||
		errors.Is(err, render.ErrNotRegular) || errors.Is(err, overlay.ErrHUDFit) || errors.Is(err, render.ErrInsideStar) ||
		errors.Is(err, catalog.ErrVerify)
}
