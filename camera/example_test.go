package camera_test

import (
	"fmt"

	"github.com/skyframe/skyframe/camera"
	"gonum.org/v1/gonum/spatial/r3"
)

// At β = 0.6 (γ = 1.25) a star 90° from the direction of motion appears at
// cos θ′ = β, i.e. 36.87° from the apex, with the transverse Doppler factor
// D = γ.
func ExampleBoost_Apply() {
	b, err := camera.NewBoost(r3.Vec{Z: 1}, 0.6)
	if err != nil {
		fmt.Println(err)
		return
	}
	n, d := b.Apply(r3.Vec{X: 1})
	fmt.Printf("n′ = (%.4f, %.4f, %.4f), D = %.4f\n", n.X, n.Y, n.Z, d)
	// Output: n′ = (0.8000, 0.0000, 0.6000), D = 1.2500
}

// Ahead, sideways and behind at β = 0.6.
func ExampleBoost_Doppler() {
	b, _ := camera.NewBoost(r3.Vec{Z: 1}, 0.6)
	for _, n := range []r3.Vec{{Z: 1}, {X: 1}, {Z: -1}} {
		fmt.Printf("%.2f ", b.Doppler(n))
	}
	fmt.Println()
	// Output: 2.00 1.25 0.50
}

// At γ = 1e8, where β rounds to 1, the star straight behind is still
// resolved: D = 1/(γ(1+β)) = 5e-9.
func ExampleNewBoostGamma() {
	b, _ := camera.NewBoostGamma(r3.Vec{X: 1}, 1e8)
	fmt.Printf("β = %v, 1−β = %.3g, D behind = %.6g\n", b.Beta(), b.OneMinusBeta(), b.Doppler(r3.Vec{X: -1}))
	// Output: β = 1, 1−β = 5e-17, D behind = 5e-09
}

// A ship 1 pc from the Sun toward a star 2 pc away sees it at half the
// distance, four times as bright.
func ExampleObserver_See() {
	o := camera.Observer{Position: r3.Vec{X: 1}}
	_, _, dilution, r := o.See(r3.Vec{X: 1}, 2)
	fmt.Printf("r = %v pc, dilution = %v\n", r, dilution)
	// Output: r = 1 pc, dilution = 4
}

func ExampleProjection_Forward() {
	p := camera.Projection{Kind: camera.Equirect, Width: 360, Height: 180}
	if err := p.Prepare(); err != nil {
		fmt.Println(err)
		return
	}
	// Default orientation: Forward = RA 0°, Right = RA 270°.
	x, y, ok := p.Forward(camera.FromRADec(270, 30))
	fmt.Printf("(%.1f, %.1f) %v\n", x, y, ok)
	// Output: (270.0, 60.0) true
}

func ExampleLookAt() {
	// Looking toward RA 90° with north up, RA 0° (+X) is on the right.
	o, _ := camera.LookAt(r3.Vec{Y: 1}, r3.Vec{Z: 1}, 0)
	ra, dec := camera.RADec(o.Right)
	fmt.Printf("right: RA %.0f°, Dec %.0f°\n", ra, dec)
	// Output: right: RA 0°, Dec 0°
}
