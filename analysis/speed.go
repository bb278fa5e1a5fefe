package analysis

import (
	"errors"
	"fmt"
	"math"
	"strconv"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
)

// Errors returned for bad input. Each is wrapped with the offending value.
var (
	ErrSpeed       = errors.New("analysis: invalid speed")
	ErrNoSpeeds    = errors.New("analysis: no speeds given")
	ErrTemperature = errors.New("analysis: invalid temperature")
	ErrLimit       = errors.New("analysis: limiting magnitude must be finite")
	ErrPoints      = errors.New("analysis: invalid number of points")
	ErrHeading     = errors.New("analysis: invalid direction of motion")
	ErrNoStars     = errors.New("analysis: no stars")
	ErrTable       = errors.New("analysis: malformed table")
)

// Speed is a ship speed: β = v/c, or, when Gamma is non-zero, the Lorentz
// factor γ instead (exact where β rounds to 1, γ above about 1e8). The zero
// value is at rest.
type Speed struct {
	// Beta is v/c, 0 ≤ β < 1; used when Gamma is zero.
	Beta float64
	// Gamma, when non-zero, is the Lorentz factor, 1 ≤ γ ≤ camera.MaxGamma.
	Gamma float64
}

// Betas returns speeds given as β.
func Betas(beta ...float64) []Speed {
	s := make([]Speed, len(beta))
	for i, b := range beta {
		s[i] = Speed{Beta: b}
	}
	return s
}

// Gammas returns speeds given as γ.
func Gammas(gamma ...float64) []Speed {
	s := make([]Speed, len(gamma))
	for i, g := range gamma {
		s[i] = Speed{Gamma: g}
	}
	return s
}

// Validate reports whether the speed is physical: 0 ≤ β < 1, or a finite
// γ ≥ 1.
func (s Speed) Validate() error {
	if s.Gamma != 0 {
		if !(s.Gamma >= 1) || s.Gamma > camera.MaxGamma {
			return fmt.Errorf("%w: γ = %v (want 1 ≤ γ ≤ %g)", ErrSpeed, s.Gamma, camera.MaxGamma)
		}
		return nil
	}
	if !(s.Beta >= 0 && s.Beta < 1) {
		return fmt.Errorf("%w: β = %v (want 0 ≤ β < 1)", ErrSpeed, s.Beta)
	}
	return nil
}

// Boost returns the Lorentz boost of this speed toward dir (a unit vector;
// any non-zero vector is normalised).
func (s Speed) Boost(dir r3.Vec) (camera.Boost, error) {
	if err := s.Validate(); err != nil {
		return camera.Boost{}, err
	}
	var b camera.Boost
	var err error
	if s.Gamma != 0 {
		b, err = camera.NewBoostGamma(dir, s.Gamma)
	} else {
		b, err = camera.NewBoost(dir, s.Beta)
	}
	if err != nil {
		return camera.Boost{}, fmt.Errorf("%w: %v", ErrSpeed, err)
	}
	return b, nil
}

// Label is a short legend text: "β = 0.9" or "γ = 100".
func (s Speed) Label() string {
	if s.Gamma != 0 {
		return "γ = " + strconv.FormatFloat(s.Gamma, 'g', 6, 64)
	}
	return "β = " + strconv.FormatFloat(s.Beta, 'g', 6, 64)
}

// LongLabel names both β and γ: "β = 0.9, γ = 2.294".
func (s Speed) LongLabel() string {
	b, err := s.Boost(axis)
	if err != nil {
		return s.Label()
	}
	if s.Gamma != 0 {
		return fmt.Sprintf("γ = %s (1 − β = %.3g)", strconv.FormatFloat(s.Gamma, 'g', 6, 64), b.OneMinusBeta())
	}
	return fmt.Sprintf("β = %s, γ = %.4g", strconv.FormatFloat(s.Beta, 'g', 6, 64), b.Gamma())
}

// axis is the direction of motion used for the curves (only angles to it
// matter there).
var axis = r3.Vec{Z: 1}

func validateSpeeds(speeds []Speed) error {
	if len(speeds) == 0 {
		return ErrNoSpeeds
	}
	for _, s := range speeds {
		if err := s.Validate(); err != nil {
			return err
		}
	}
	return nil
}

// angleTo returns the angle in degrees between unit vectors n and h,
// accurate near 0° and 180° (atan2 of |n×h| and n·h).
func angleTo(n, h r3.Vec) float64 {
	return math.Atan2(r3.Norm(r3.Cross(n, h)), r3.Dot(n, h)) * 180 / math.Pi
}
