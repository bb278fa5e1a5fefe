package frameopt

import (
	"fmt"
	"strings"
)

// Elsewhere lists the options of `skyframe still` that are not frame
// options, with where a flight plan says the same thing (a flight's ship
// moves along its legs, its files are named per frame).
var Elsewhere = []struct{ Flag, Plan string }{
	{"catalog", "catalogue.path"},
	{"catalog-format", "catalogue.format"},
	{"column", "catalogue.columns"},
	{"names", "catalogue.names"},
	{"sky-depth", "— (flights draw the built-in sky to its default depth)"},
	{"epoch", "— (proper motions: still only)"},
	{"speed", "[start] speed and the [[leg]] tables"},
	{"gamma", "[[leg]] gamma_cap and accelerations"},
	{"rapidity", "the [[leg]] tables"},
	{"toward", "[start] ra, dec and the legs' directions"},
	{"position", "[start] position or star"},
	{"output", "output.dir, output.frames, output.png"},
	{"fits", "output.fits"},
	{"exr", "output.exr"},
	{"sidecar", "output.sidecar"},
	{"no-sidecar", "output.sidecar = false"},
	{"overlay-layer", "output.overlay_layer = true"},
	{"memory", "— (still only: flights hold the catalogue in memory)"},
	{"workers", "— (flight --workers on the command line)"},
}

// Markdown returns the README's table of frame options: flag, plan key,
// default, meaning, one row per definition, generated from Defs.
func Markdown() string {
	var b strings.Builder
	b.WriteString("| option (`still`) | plan key (`flight`) | default | meaning |\n|---|---|---|---|\n")
	for i := range Defs {
		d := &Defs[i]
		flag := "`--" + d.Name
		if d.Arg != "" {
			flag += " " + d.Arg
		}
		flag += "`"
		key := "`" + d.Path() + "`"
		if d.Keyed {
			key += " (keyed)"
		}
		def := d.Default
		if def == "" {
			def = "—"
		}
		fmt.Fprintf(&b, "| %s | %s | %s | %s |\n", flag, key, esc(def), esc(d.Help))
	}
	return b.String()
}

func esc(s string) string { return strings.ReplaceAll(s, "|", "\\|") }
