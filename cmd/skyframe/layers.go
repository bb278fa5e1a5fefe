package main

import (
	"math"

	"github.com/spf13/pflag"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/overlay"
	"github.com/skyframe/skyframe/render"
)

// layerSet is a frame's linear layers (into the buffer and the FITS) and
// its overlays (drawn on the encoded image only).
type layerSet struct {
	render.Layers
	overlay.Options
}

// layerFlags are the outreach layer options shared by still and flight.
type layerFlags struct {
	cmb            bool
	grid           string
	gridStep       float64
	unity          bool
	markMotion     bool
	markDest       string
	lattice        int
	latticeStep    float64
	latticeConfirm bool
	labels         int
	labelIDs       []string
	hud            string
	hudTitle       string
}

func (f *layerFlags) register(fs *pflag.FlagSet) {
	fs.BoolVar(&f.cmb, "cmb", false, "add the cosmic microwave background at its true surface brightness (in the PNG and the FITS)")
	fs.StringVar(&f.grid, "grid", "none", "overlay a coordinate grid, aberrated like the stars: none, radec or galactic")
	fs.Float64Var(&f.gridStep, "grid-step", overlay.DefaultGraticuleStep, "grid line spacing in degrees (0 < step ≤ 90)")
	fs.BoolVar(&f.unity, "unity-circle", false, "overlay the circle where the Doppler factor is 1 (blueshift inside, redshift outside)")
	fs.BoolVar(&f.markMotion, "mark-motion", false, "mark the direction of motion")
	fs.StringVar(&f.markDest, "mark-destination", "", "mark a destination: RA,DEC (ICRS degrees) or a star id or name, seen from the ship")
	fs.IntVar(&f.lattice, "lattice", 0, "overlay a cubic lattice of N×N×N beacons at rest around the ship's position")
	fs.Float64Var(&f.latticeStep, "lattice-step", overlay.DefaultLatticeSpacing, "lattice beacon spacing in parsecs")
	fs.BoolVar(&f.latticeConfirm, "lattice-confirm", false, "allow a lattice of more than 1,000,000 beacons")
	fs.IntVar(&f.labels, "labels", 0, "label the N brightest stars in the frame")
	fs.StringArrayVar(&f.labelIDs, "label", nil, "label this star (id or name; repeatable)")
	fs.StringVar(&f.hud, "hud", "", "show a heads-up display in a corner: top-left, top-right, bottom-left, bottom-right (or tl, tr, bl, br)")
	fs.StringVar(&f.hudTitle, "hud-title", "", "title line of the heads-up display")
}

// layers converts the flags into render layers for scene sc, checking
// every value (usage errors, exit status 2). It raises opt.Brightest so that
// the frame lists the stars --labels asks for. The HUD, when asked for,
// holds what a single frame knows: β, γ and the signal rates from home (the
// Sun) and from --mark-destination; a flight fills in its clocks and
// distances per frame.
func (f *layerFlags) layers(sc *scene, opt *render.Options) (layerSet, error) {
	var l layerSet
	l.CMB = f.cmb
	g, err := overlay.ParseGraticuleFrame(f.grid)
	if err != nil {
		return l, usagef("--grid %q: want none, radec or galactic", f.grid)
	}
	if !(f.gridStep > 0 && f.gridStep <= 90) {
		return l, usagef("--grid-step %g: want degrees with 0 < step ≤ 90", f.gridStep)
	}
	l.Graticule = overlay.GraticuleOptions{Frame: g, Step: f.gridStep}
	l.UnityCircle = f.unity
	l.Markers.Motion = f.markMotion
	var dest *r3.Vec
	if f.markDest != "" {
		d, err := resolveDirection(sc.stars, "mark-destination", f.markDest, sc.observer.Position)
		if err != nil {
			return l, err
		}
		dest = &d
		l.Markers.Destination = dest
	}
	if f.lattice < 0 {
		return l, usagef("--lattice %d: want a count per side ≥ 0", f.lattice)
	}
	if !(f.latticeStep > 0) || math.IsInf(f.latticeStep, 0) {
		return l, usagef("--lattice-step %g: want a finite spacing > 0 parsecs", f.latticeStep)
	}
	l.Lattice = overlay.LatticeOptions{PerSide: f.lattice, Spacing: f.latticeStep, Origin: sc.observer.Position, Confirm: f.latticeConfirm}
	if n, err := l.Lattice.Count(); err != nil {
		if n > overlay.MaxBeacons {
			return l, usagef("--lattice %d: %d beacons is more than %d; add --lattice-confirm to draw them", f.lattice, n, overlay.MaxBeacons)
		}
		return l, usagef("--lattice %d: %v", f.lattice, err)
	}
	if f.labels < 0 {
		return l, usagef("--labels %d: want a count ≥ 0", f.labels)
	}
	l.Labels = overlay.LabelOptions{Brightest: f.labels, Stars: f.labelIDs}
	if _, err := overlay.ResolveLabels(sc.stars, f.labelIDs); err != nil {
		return l, usagef("--label: %v", err)
	}
	if opt != nil && f.labels > 0 {
		b := opt.Brightest
		if b == 0 {
			b = render.DefaultBrightest
		}
		opt.Brightest = max(b, f.labels)
	}
	if f.hud != "" {
		c, err := overlay.ParseCorner(f.hud)
		if err != nil {
			return l, usagef("--hud %q: want top-left, top-right, bottom-left or bottom-right", f.hud)
		}
		l.HUDCorner = c
		v := overlay.NoHUDValues()
		b := sc.observer.Boost
		v.Beta, v.Gamma, v.Title = b.Beta(), b.Gamma(), f.hudTitle
		if p := sc.observer.Position; r3.Norm(p) > 0 {
			v.RateHome = b.Doppler(r3.Scale(-1/r3.Norm(p), p))
		}
		if dest != nil {
			v.RateDest = b.Doppler(*dest)
		}
		l.HUD = &v
	} else if f.hudTitle != "" {
		return l, usagef("--hud-title needs --hud CORNER")
	}
	return l, nil
}
