package analysis_test

import (
	"fmt"

	"github.com/skyframe/skyframe/analysis"
)

// At β = 0.6 a star at θ = 90° appears at cos θ′ = β, θ′ = 53.13°, and a star
// straight ahead has D = 2 (physics.md check values).
func ExampleAberration() {
	t, err := analysis.Aberration(analysis.Betas(0.6), 3) // θ = 0°, 90°, 180°
	if err != nil {
		panic(err)
	}
	for i, th := range t.X {
		fmt.Printf("θ = %3.0f°  θ′ = %6.2f°\n", th, t.Columns[0].Y[i])
	}
	// Output:
	// θ =   0°  θ′ =   0.00°
	// θ =  90°  θ′ =  53.13°
	// θ = 180°  θ′ = 180.00°
}

// The bolometric flux ratio straight ahead at β = 0.6 (D = 2) under the three
// point-source conventions: D², D³, D⁴.
func ExampleConventions() {
	t, err := analysis.Conventions(analysis.Speed{Beta: 0.6}, 5772, 2) // θ′ = 0°, 180°
	if err != nil {
		panic(err)
	}
	for _, name := range []string{"doppler", "flux_exact", "flux_d3", "flux_d4"} {
		fmt.Printf("%-10s ahead %.4g  behind %.4g\n", name, t.Column(name).Y[0], t.Column(name).Y[1])
	}
	// Output:
	// doppler    ahead 2  behind 0.5
	// flux_exact ahead 4  behind 0.25
	// flux_d3    ahead 8  behind 0.125
	// flux_d4    ahead 16  behind 0.0625
}
