package render_test

import (
	"fmt"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/render"
)

// At rest the CMB toward the solar apex is hotter by the dipole, T₀·β_s.
func ExampleCMBTemperatureAt() {
	apex := camera.FromGalacticLB(render.SunCMBL, render.SunCMBB)
	fmt.Printf("%.5f K\n", render.CMBTemperatureAt(camera.Boost{}, apex, render.CMBOptions{}))
	// Output: 2.72884 K
}
