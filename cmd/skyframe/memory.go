package main

import (
	"fmt"
	"runtime/debug"
	"strings"

	"github.com/dustin/go-humanize"

	"github.com/skyframe/skyframe/render"
)

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
