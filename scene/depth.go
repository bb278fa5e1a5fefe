package scene

import (
	"math"

	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/names"
	"github.com/skyframe/skyframe/render"
	"github.com/skyframe/skyframe/sky"
)

// FrameDepth settles the catalogue's depth for a frame (sky.Source.Frame,
// as a flight's frames do): the built-in sky is drawn as deep as the frame
// needs (sc's stars and index are replaced; the default sky and the Sun
// come first with the same rows, so references resolved before stay
// valid), any other catalogue is checked against the frame's bound; it
// returns the warning (for command cmd) when the catalogue falls short. A
// catalogue streamed from disk is not scanned for its depth.
func FrameDepth(cmd string, sc *Scene, spec *Spec, skyDepth float64, streamed bool) (string, error) {
	if streamed {
		return "", nil
	}
	var rep sky.Report
	if sc.BuiltIn {
		fr, err := sky.NewSource(catalog.BuiltIn(), true).Frame([]render.Options{spec.Opt}, skyDepth)
		if err != nil {
			return "", err
		}
		if s := fr.Catalogue(spec.Opt.Observer.Position); s != sc.Stars {
			sc.Stars = s
			sc.Index = names.NewIndex(s, sc.Table)
		}
		rep = fr.Report
		sc.DepthV = fr.Depth
	} else {
		var err error
		if rep, err = sky.ForCatalogue(sc.Stars, spec.Opt); err != nil {
			return "", err
		}
	}
	spec.DepthRep = &rep
	return rep.Warning(cmd, ""), nil
}

// finitePtr returns &v, or nil for NaN and ±Inf.
func finitePtr(v float64) *float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return &v
}
