package main

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/sky"
	"github.com/spf13/pflag"
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
