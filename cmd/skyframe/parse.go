package main

import (
	"math"
	"strconv"
	"strings"
)

// parseFloats splits "a,b[,c]" into exactly n finite numbers, naming the flag
// in any error.
func parseFloats(flag, s string, n int) ([]float64, error) {
	parts := strings.Split(s, ",")
	if len(parts) != n {
		return nil, usagef("--%s %q: want %d comma-separated numbers", flag, s, n)
	}
	out := make([]float64, n)
	for i, p := range parts {
		v, err := strconv.ParseFloat(strings.TrimSpace(p), 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, usagef("--%s %q: %q is not a finite number", flag, s, p)
		}
		out[i] = v
	}
	return out, nil
}

// parseRADec reads "RA,DEC" in ICRS degrees.
func parseRADec(flag, s string) (ra, dec float64, err error) {
	v, err := parseFloats(flag, s, 2)
	if err != nil {
		return 0, 0, err
	}
	if v[1] < -90 || v[1] > 90 {
		return 0, 0, usagef("--%s %q: declination %g is outside [-90, 90]", flag, s, v[1])
	}
	return math.Mod(math.Mod(v[0], 360)+360, 360), v[1], nil
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// checkFinite names a flag whose value is NaN or infinite.
func checkFinite(flag string, v float64) error {
	if !finite(v) {
		return usagef("--%s %v: want a finite number", flag, v)
	}
	return nil
}
