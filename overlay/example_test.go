package overlay_test

import (
	"fmt"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/overlay"
)

// The D = 1 circle at β = 0.6 lies at θ′ = acos(1/3) from the direction of
// motion.
func ExampleUnityAngle() {
	b, _ := camera.NewBoost(camera.FromRADec(0, 0), 0.6)
	fmt.Printf("%.4f°\n", overlay.UnityAngle(b))
	// Output: 70.5288°
}
