package spectrum

import (
	"fmt"
	"math"
	"strings"
)

// Beaming selects how a point source's flux scales with the Doppler factor
// D = ν_observed/ν_emitted. The zero value is BeamingExact.
type Beaming int

const (
	// BeamingExact is the exact transform for an observer moving through a
	// field of sources at rest, compared at the same rest-frame distance:
	// the star is again a diluted blackbody with T′ = D·T and W′ = W/D², so
	// the bolometric flux ratio is F′/F = D².
	BeamingExact Beaming = iota
	// BeamingD3 scales W by 1/D, giving F′/F = D³: the convention of
	// published figures for a moving source compared at the emission-time
	// distance in the observer's frame (continuous-jet form).
	BeamingD3
	// BeamingD4 leaves W unchanged, giving F′/F = D⁴: the moving-source
	// convention for a discrete blob (and the surface-brightness law).
	BeamingD4
)

var beamingNames = [...]string{"exact", "d3", "d4"}

// String returns "exact", "d3" or "d4" (Beaming(n) for other values).
func (b Beaming) String() string {
	if b >= 0 && int(b) < len(beamingNames) {
		return beamingNames[b]
	}
	return fmt.Sprintf("Beaming(%d)", int(b))
}

// ParseBeaming parses "exact", "d3" or "d4" (case-insensitive; "D2" is
// accepted for exact).
func ParseBeaming(s string) (Beaming, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "exact", "d2", "":
		return BeamingExact, nil
	case "d3":
		return BeamingD3, nil
	case "d4":
		return BeamingD4, nil
	}
	return 0, fmt.Errorf("spectrum: unknown beaming %q (want exact, d3 or d4)", s)
}

// MarshalText implements encoding.TextMarshaler.
func (b Beaming) MarshalText() ([]byte, error) {
	if b < 0 || int(b) >= len(beamingNames) {
		return nil, fmt.Errorf("spectrum: invalid beaming %d", int(b))
	}
	return []byte(b.String()), nil
}

// UnmarshalText implements encoding.TextUnmarshaler via ParseBeaming.
func (b *Beaming) UnmarshalText(text []byte) error {
	v, err := ParseBeaming(string(text))
	if err != nil {
		return err
	}
	*b = v
	return nil
}

// FluxExponent returns n in F′/F = Dⁿ for the bolometric flux: 2, 3 or 4
// (0 for an invalid value).
func (b Beaming) FluxExponent() int {
	switch b {
	case BeamingExact:
		return 2
	case BeamingD3:
		return 3
	case BeamingD4:
		return 4
	}
	return 0
}

// WScale returns the factor applied to the dilution W when the temperature
// is multiplied by D: D⁻² (exact), D⁻¹ (d3) or 1 (d4). Since the bolometric
// flux is Wσ T⁴, the flux ratio is D^FluxExponent. Invalid values give NaN.
func (b Beaming) WScale(D float64) float64 {
	switch b {
	case BeamingExact:
		return 1 / (D * D)
	case BeamingD3:
		return 1 / D
	case BeamingD4:
		return 1
	}
	return math.NaN()
}
