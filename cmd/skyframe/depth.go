package main

import (
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/spf13/pflag"

	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/names"
	"github.com/skyframe/skyframe/render"
	"github.com/skyframe/skyframe/sky"
)

// Depth of the built-in sky's resolved stars (--sky-depth).
const (
	minSkyDepth = catalog.DefaultSynthMagLimit
	// autoSkyDepthMax caps --sky-depth auto (sky.AutoMaxDepth).
	autoSkyDepthMax = sky.AutoMaxDepth
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

// frameDepth settles the catalogue's depth for a frame (sky.Source.Frame,
// as a flight's frames do): the built-in sky is drawn as deep as the frame
// needs (sc's stars and index are replaced; the default sky and the Sun
// come first with the same rows, so references resolved before stay
// valid), any other catalogue is checked against the frame's bound; a
// warning is written to w when the catalogue falls short. A catalogue
// streamed from disk is not scanned for its depth.
func frameDepth(w io.Writer, cmd string, sc *scene, spec *frameSpec, skyDepth float64, streamed bool) error {
	if streamed {
		return nil
	}
	var rep sky.Report
	if sc.builtIn {
		fr, err := sky.NewSource(catalog.BuiltIn(), true).Frame([]render.Options{spec.Opt}, skyDepth)
		if err != nil {
			return err
		}
		if s := fr.Catalogue(spec.Opt.Observer.Position); s != sc.stars {
			sc.stars = s
			sc.index = names.NewIndex(s, sc.table)
		}
		rep = fr.Report
		sc.depthV = fr.Depth
	} else {
		var err error
		if rep, err = sky.ForCatalogue(sc.stars, spec.Opt); err != nil {
			return err
		}
	}
	spec.depthRep = &rep
	if msg := rep.Warning(cmd, ""); msg != "" {
		fmt.Fprintln(w, msg)
	}
	return nil
}

// finitePtr returns &v, or nil for NaN and ±Inf.
func finitePtr(v float64) *float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return &v
}
