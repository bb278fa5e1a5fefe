package main

import (
	"strings"

	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/scene"
	"github.com/spf13/pflag"
)

// physicsFlags are the options shared by every command that transforms the
// sky (scene.Physics), with the built-in sky's depth.
type physicsFlags struct {
	scene.Physics
	skyDepth skyDepthFlag
}

// Default heading: the galactic centre (ICRS, ESA SP-1200 galactic pole and
// origin), so a default frame looks into the densest part of the sky.
const defaultToward = "266.405,-28.936"

func (p *physicsFlags) register(fs *pflag.FlagSet, defaultSpeed float64) {
	fs.StringVar(&p.Catalog, "catalog", "", "star catalogue (BSC5, Hipparcos, Gaia CSV/ECSV, CSV/TSV, Parquet, skyframe cache; gzip ok): a file, a directory, a quoted glob or a comma-separated list, read as one; default: the built-in synthetic sky")
	fs.StringVar(&p.CatalogFormat, "catalog-format", "", "catalogue format, overriding detection: "+formatNames())
	fs.Float64Var(&p.Speed, "speed", defaultSpeed, "ship speed β = v/c, 0 ≤ β < 1")
	fs.Float64Var(&p.Gamma, "gamma", 0, "Lorentz factor γ ≥ 1 instead of --speed (exact up to γ = 1e8 and beyond)")
	fs.Float64Var(&p.Rapidity, "rapidity", 0, "rapidity φ = atanh β instead of --speed")
	fs.StringVar(&p.Toward, "toward", defaultToward, "direction of motion as RA,DEC (ICRS degrees; the same apparent or as catalogue:RA,DEC, since aberration keeps the axis of motion), or a star id or name from the catalogue")
	fs.StringVar(&p.Position, "position", "0,0,0", "ship position X,Y,Z in parsecs (ICRS axes, Sun at origin), or a star id or name; the Sun is a star of the sky from everywhere but the origin itself, where the view is the catalogue's own night sky without it; a position inside the Sun (within 695 700 km of the origin) or any star is refused")
	if fs.Lookup("beaming") == nil { // still takes it as a frame option (frameopt)
		fs.StringVar(&p.Beaming, "beaming", "exact", "point-source beaming convention: exact (flux ∝ D²), d3, d4 (moving-source conventions of published figures)")
	}
	fs.StringSliceVar(&p.Columns, "column", nil, "generic CSV/TSV column map, FIELD=NAME, repeatable (fields: "+strings.Join(catalog.ColumnFields, ", ")+"; add ra-hours if RA is in hours)")
	fs.Float64Var(&p.Epoch, "epoch", 0, "propagate positions by proper motion to this Julian epoch (e.g. 2100); 0 keeps the catalogue epoch")
	registerNames(fs, &p.Names)
	registerSkyDepth(fs, &p.skyDepth)
}

func formatNames() string {
	s := ""
	for f := catalog.FormatAuto + 1; ; f++ {
		name := f.String()
		if _, err := catalog.ParseFormat(name); err != nil || name == "" {
			break
		}
		if s != "" {
			s += ", "
		}
		s += name
	}
	return s
}

// resolve resolves the physics flags of fs into a scene (scene.Physics.Resolve);
// rows the catalogue skips are reported on stderr.
func (p *physicsFlags) resolve(e *env, fs *pflag.FlagSet) (*scene.Scene, error) {
	if f := fs.Lookup("beaming"); f != nil {
		p.Beaming = f.Value.String()
	}
	p.Changed = fs.Changed
	p.Maps = &unresolvedMaps
	return p.Physics.Resolve(e.ctx, e.stderr)
}
