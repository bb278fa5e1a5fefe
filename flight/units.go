package flight

import "math"

// Physical constants and unit conversions [pub]: the SI defining value of c,
// standard gravity of the 3rd CGPM (1901), the Julian year, the IAU light-year,
// the IAU 2012 B2 astronomical unit and the parsec as 648000/π au.
const (
	// C is the speed of light in m/s (SI definition).
	C = 299792458.0
	// G0 is standard gravity in m/s² (3rd CGPM, 1901).
	G0 = 9.80665
	// JulianYear is the Julian year in seconds (365.25 d of 86400 s).
	JulianYear = 365.25 * 86400.0
	// LightYear is the IAU light-year in metres (c × Julian year).
	LightYear = 9460730472580800.0
	// AU is the astronomical unit in metres (IAU 2012 Resolution B2).
	AU = 149597870700.0
	// Parsec is the parsec in metres: 648000/π au.
	Parsec = 648000 / math.Pi * AU

	// CPcPerYr is the speed of light in parsecs per Julian year.
	CPcPerYr = C * JulianYear / Parsec
	// LightYearPc is one light-year in parsecs.
	LightYearPc = LightYear / Parsec
	// AUPc is one astronomical unit in parsecs, π/648000.
	AUPc = AU / Parsec
)

// rapidityRate converts a proper acceleration in m/s² into the rate of change
// of rapidity with ship time, in 1/yr: dφ/dτ = a/c.
func rapidityRate(accel float64) float64 { return accel / C * JulianYear }

// AccelFromG converts an acceleration in units of standard gravity to m/s².
func AccelFromG(g float64) float64 { return g * G0 }

// maxRapidity bounds the rapidity any leg may reach: φ = 50 is γ ≈ 2.6e21,
// far past the γ = 1e8 the renderer is built for, and keeps sinh and cosh
// finite with margin.
const maxRapidity = 50
