package main

import (
	"fmt"
	"math"
	"runtime/debug"
	"strings"
	"unsafe"

	"github.com/dustin/go-humanize"

	"github.com/skyframe/skyframe/overlay"
	"github.com/skyframe/skyframe/render"
)

// overlayBytes estimates, from above, what the overlays of l hold for
// a w×h frame: every lattice beacon visible, and every graticule line traced at
// MaxSegment-pixel steps along twice the frame's perimeter (a line never
// crosses the frame more often in practice). A graticule step of 1e-9° is 10¹¹
// lines; a lattice of 10⁵ per side is 10¹⁵ beacons: both are refused by
// checkMemory with the figure instead of exhausting memory.
func overlayBytes(l overlay.Options, w, h int) int64 {
	var n float64
	if l.Lattice.PerSide > 0 {
		per := float64(l.Lattice.PerSide)
		n += per * per * per * float64(unsafe.Sizeof(overlay.Beacon{}))
	}
	if l.Graticule.Frame != overlay.GraticuleNone {
		step := l.Graticule.Step
		if step == 0 {
			step = overlay.DefaultGraticuleStep
		}
		lines := math.Ceil(360/step) + 2*math.Ceil(90/step)
		perLine := 4*float64(w+h)/overlay.MaxSegment + 2
		n += lines * perLine * float64(unsafe.Sizeof(overlay.Vertex{}))
	}
	if n > math.MaxInt64/2 {
		return math.MaxInt64 / 2
	}
	return int64(n)
}

// checkMemory refuses, with exit status 2 and the figures, a request whose
// estimated peak exceeds the --memory budget, before anything of that size
// is allocated; hint names what to change. Within the budget it sets the
// Go runtime's soft memory limit to the budget, so the collector works
// harder before the process grows beyond it.
func checkMemory(need render.MemoryNeed, budget int64, hint string) error {
	if total := need.Total(); total > budget {
		var parts []string
		for _, p := range []struct {
			name string
			n    int64
		}{
			{"frame buffer", need.Buffer}, {"image", need.Image}, {"PNG encoder", need.Encode},
			{"render working set", need.Work}, {"catalogue", need.Catalogue}, {"overlays", need.Overlays},
			{"other outputs", need.Files},
		} {
			if p.n > 0 {
				parts = append(parts, p.name+" "+memBytes(p.n))
			}
		}
		return usagef("--memory %s: this request needs about %s (%s); raise --memory or %s",
			humanize.IBytes(uint64(budget)), memBytes(total), strings.Join(parts, ", "), hint)
	}
	debug.SetMemoryLimit(budget)
	return nil
}

// memBytes prints a byte count in SI units ("12.9 GB"), and counts too
// large for any machine in powers of ten.
func memBytes(n int64) string {
	if n >= 1e18 {
		return fmt.Sprintf("%.2g bytes", float64(n))
	}
	return humanize.Bytes(uint64(n))
}
