package flight

import (
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
)

func BenchmarkTrajectoryAtTau(b *testing.B) {
	to := r3.Vec{X: 10}
	tr, err := NewTrajectory(RestAt(r3.Vec{}), []LegSpec{
		BoostSpec{Accel: G0, Dir: r3.Vec{X: 1}, ShipYears: 1},
		CruiseSpec{ShipYears: 1},
		VoyageSpec{Accel: G0, To: &to, BetaCap: 0.95},
	}, nil)
	if err != nil {
		b.Fatal(err)
	}
	end := tr.End().Tau
	b.ReportAllocs()
	var s State
	for i := 0; b.Loop(); i++ {
		s = tr.AtTau(end * float64(i%1000) / 1000)
	}
	_ = s
}

func BenchmarkTrajectoryAtT(b *testing.B) {
	to := r3.Vec{X: 10}
	tr, err := NewTrajectory(RestAt(r3.Vec{}), []LegSpec{VoyageSpec{Accel: G0, To: &to}}, nil)
	if err != nil {
		b.Fatal(err)
	}
	end := tr.End().T
	b.ReportAllocs()
	var s State
	for i := 0; b.Loop(); i++ {
		s = tr.AtT(end * float64(i%1000) / 1000)
	}
	_ = s
}
