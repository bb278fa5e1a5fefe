package flight_test

import (
	"fmt"
	"os"

	"github.com/skyframe/skyframe/flight"
	"gonum.org/v1/gonum/spatial/r3"
)

// One ship-year at 1 g from rest.
func ExampleBoostSpec() {
	tr, err := flight.NewTrajectory(flight.RestAt(r3.Vec{}),
		[]flight.LegSpec{flight.BoostSpec{Accel: flight.G0, Dir: r3.Vec{X: 1}, ShipYears: 1}}, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	s := tr.End()
	fmt.Printf("β = %.4f, γ = %.4f, t = %.4f yr, x = %.4f ly\n", s.Beta, s.Gamma, s.T, s.Pos.X/flight.LightYearPc)
	// Output:
	// β = 0.7748, γ = 1.5818, t = 1.1873 yr, x = 0.5636 ly
}

// Accelerate at 1 g to the midpoint of 4.3 ly and decelerate to rest.
func ExampleTurnoverTimes() {
	tau, t, err := flight.TurnoverTimes(flight.G0, 4.3*flight.LightYearPc)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("ship %.3f yr, catalogue %.3f yr\n", tau, t)
	// Output:
	// ship 3.560 yr, catalogue 5.929 yr
}

// A voyage with a speed cap: accelerate, coast at β = 0.9, decelerate.
func ExampleVoyageSpec() {
	to := r3.Vec{X: 10}
	tr, err := flight.NewTrajectory(flight.RestAt(r3.Vec{}),
		[]flight.LegSpec{flight.VoyageSpec{Accel: flight.G0, To: &to, BetaCap: 0.9}}, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	e := tr.End()
	mid := tr.AtT(e.T / 2)
	fmt.Printf("τ = %.3f yr, t = %.3f yr; midway β = %.2f, remaining %.2f pc\n", e.Tau, e.T, mid.Beta, mid.Remaining)
	fmt.Printf("arrival: β = %v, position %v pc\n", e.Beta, e.Pos)
	// Output:
	// τ = 17.434 yr, t = 37.454 yr; midway β = 0.90, remaining 5.00 pc
	// arrival: β = 0, position {10 0 0} pc
}

// Doppler factors seen from a ship at 0.6 c.
func ExampleState_Doppler() {
	s, _ := flight.MovingAt(r3.Vec{}, r3.Vec{X: 1}, 0.6)
	fmt.Printf("γ = %.2f, ahead %.2f, behind %.2f, abeam %.2f\n",
		s.Gamma, s.Doppler(r3.Vec{X: 1}), s.Doppler(r3.Vec{X: -1}), s.Doppler(r3.Vec{Y: 1}))
	// Output:
	// γ = 1.25, ahead 2.00, behind 0.50, abeam 1.25
}

// A dry run of a plan: the kinematics of a few frames as CSV.
func ExampleWriteDryRunCSV() {
	plan := []byte(`
[[leg]]
kind = "boost"
accel_g = 1
ship_years = 1
ra = 0
dec = 0

[show]
seconds = 1
fps = 3
`)
	p, err := flight.ParsePlan(plan, "example.toml")
	if err != nil {
		fmt.Println(err)
		return
	}
	if err := flight.WriteDryRunCSV(os.Stdout, p, flight.All); err != nil {
		fmt.Println(err)
	}
	// Output:
	// frame,tau_yr,t_yr,beta,gamma,x_pc,y_pc,z_pc,doppler_ahead,doppler_behind,rate_home,rate_dest,camera_deg_s,centre_px_frame
	// 0,0,0,0,1,0,0,0,1,1,1,1,0,0
	// 1,0.5,0.522498304021,0.474721281666,1.13618780441,0.040449057202,0,0,1.67556033514,0.59681527369,0.59681527369,1.67556033514,0,0
	// 2,1,1.18731240171,0.774827262643,1.5818454538,0.17281356539,0,0,2.8075024367,0.356188470909,0.356188470909,2.8075024367,0,0
}

// Splitting 10 frames between three workers.
func ExampleShard_Frames() {
	for k := 0; k < 3; k++ {
		fmt.Println(flight.Shard{K: k, N: 3}.Frames(10, flight.All))
	}
	// Output:
	// [0 1 2]
	// [3 4 5]
	// [6 7 8 9]
}
