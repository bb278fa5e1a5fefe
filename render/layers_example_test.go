package render_test

import (
	"fmt"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/render"
)

// The D = 1 circle at β = 0.6 lies at θ′ = acos(1/3) from the direction of
// motion.
func ExampleUnityAngle() {
	b, _ := camera.NewBoost(camera.FromRADec(0, 0), 0.6)
	fmt.Printf("%.4f°\n", render.UnityAngle(b))
	// Output: 70.5288°
}

// At rest the CMB toward the solar apex is hotter by the dipole, T₀·β_s.
func ExampleCMBTemperatureAt() {
	apex := camera.FromGalacticLB(render.SunCMBL, render.SunCMBB)
	fmt.Printf("%.5f K\n", render.CMBTemperatureAt(camera.Boost{}, apex, render.CMBOptions{}))
	// Output: 2.72884 K
}
