package analysis

import (
	"fmt"
	"math"
	"strconv"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/spectrum"
)

// Defaults of CurveOptions.
var (
	// DefaultSpeeds are the speeds drawn when CurveOptions.Speeds is empty.
	DefaultSpeeds = []float64{0.3, 0.6, 0.9, 0.99}
	// DefaultTemps are the stellar temperatures (K) of the ΔV and
	// brightening curves: an M dwarf, the Sun (IAU 2015 B3 nominal 5772 K),
	// an A star and an O/B star.
	DefaultTemps = []float64{3000, 5772, 10000, 30000}
)

const (
	// DefaultPoints is the number of samples per curve.
	DefaultPoints = 361
	// DefaultConventionTemp is the temperature of the convention comparison, K.
	DefaultConventionTemp = 5772
	maxPoints             = 1 << 20
)

// CurveOptions selects what Curves samples. The zero value draws
// DefaultSpeeds and DefaultTemps with DefaultPoints samples.
type CurveOptions struct {
	// Speeds, one curve (or panel) each; default DefaultSpeeds.
	Speeds []Speed
	// Temps are blackbody temperatures in kelvin; default DefaultTemps.
	Temps []float64
	// Points per curve (≥ 2); default DefaultPoints.
	Points int
	// ConventionSpeed is the speed of the beaming-convention comparison;
	// the zero value means the fastest of Speeds.
	ConventionSpeed Speed
	// ConventionTemp is the temperature of the convention comparison's ΔV,
	// K; default DefaultConventionTemp.
	ConventionTemp float64
}

// CurveSet holds the tables of every transform curve.
type CurveSet struct {
	// Speeds and Temps actually used (defaults filled in).
	Speeds []Speed
	Temps  []float64
	// Aberration: θ′ (deg) against θ (deg), one column per speed.
	Aberration *Table
	// Doppler: D against θ′ (deg), one column per speed.
	Doppler *Table
	// DeltaV: one table per speed, ΔV (mag) against θ′ (deg), one column
	// per temperature plus the T → ∞ limit +2.5 log₁₀ D.
	DeltaV []*Table
	// Brightening: flux ratios against D — bolometric (D²), V band per
	// temperature and the Rayleigh–Jeans limit 1/D — over the D range of
	// the fastest speed.
	Brightening *Table
	// Conventions compares the exact, D³ and D⁴ point-source conventions at
	// ConventionSpeed against θ′ (see Conventions).
	Conventions *Table
}

// Curves samples every transform curve.
func Curves(opt CurveOptions) (*CurveSet, error) {
	cs := &CurveSet{Speeds: opt.Speeds, Temps: opt.Temps}
	if len(cs.Speeds) == 0 {
		cs.Speeds = Betas(DefaultSpeeds...)
	}
	if len(cs.Temps) == 0 {
		cs.Temps = DefaultTemps
	}
	n := opt.Points
	if n == 0 {
		n = DefaultPoints
	}
	var err error
	if cs.Aberration, err = Aberration(cs.Speeds, n); err != nil {
		return nil, err
	}
	if cs.Doppler, err = DopplerCurve(cs.Speeds, n); err != nil {
		return nil, err
	}
	for _, s := range cs.Speeds {
		t, err := DeltaV(s, cs.Temps, n)
		if err != nil {
			return nil, err
		}
		cs.DeltaV = append(cs.DeltaV, t)
	}
	fast := fastest(cs.Speeds)
	b, _ := fast.Boost(axis) // validated above
	dmax := b.Doppler(axis)
	if dmax < 1.01 {
		dmax = 1.01
	}
	if cs.Brightening, err = Brightening(cs.Temps, 1/dmax, dmax, n); err != nil {
		return nil, err
	}
	cv := opt.ConventionSpeed
	if cv == (Speed{}) {
		cv = fast
	}
	ct := opt.ConventionTemp
	if ct == 0 {
		ct = DefaultConventionTemp
	}
	if cs.Conventions, err = Conventions(cv, ct, n); err != nil {
		return nil, err
	}
	return cs, nil
}

// fastest returns the speed with the largest γ.
func fastest(speeds []Speed) Speed {
	var best Speed
	bestG := 0.0
	for _, s := range speeds {
		b, err := s.Boost(axis)
		if err == nil && b.Gamma() > bestG {
			best, bestG = s, b.Gamma()
		}
	}
	return best
}

func checkPoints(n int) error {
	if n < 2 || n > maxPoints {
		return fmt.Errorf("%w: %d (want 2..%d)", ErrPoints, n, maxPoints)
	}
	return nil
}

func checkTemps(temps []float64) error {
	if len(temps) == 0 {
		return fmt.Errorf("%w: none given", ErrTemperature)
	}
	for _, t := range temps {
		if !(t > 0) || math.IsInf(t, 0) {
			return fmt.Errorf("%w: T = %v K (want finite T > 0)", ErrTemperature, t)
		}
	}
	return nil
}

// angleGrid returns n angles from 0° to 180° inclusive.
func angleGrid(n int) []float64 {
	x := make([]float64, n)
	for i := range x {
		x[i] = 180 * float64(i) / float64(n-1)
	}
	x[n-1] = 180
	return x
}

// dirAt is the unit vector at angle θ (deg) from the axis.
func dirAt(thetaDeg float64) r3.Vec {
	s, c := math.Sincos(thetaDeg * math.Pi / 180)
	if thetaDeg == 180 {
		s, c = 0, -1
	}
	return r3.Vec{X: s, Z: c}
}

// Aberration tabulates the apparent angle θ′ against the rest angle θ
// (0..180°, n samples) for each speed, from camera.Boost.Apply.
func Aberration(speeds []Speed, n int) (*Table, error) {
	t := &Table{
		Name:   "aberration",
		Title:  "Aberration: cos θ′ = (cos θ + β)/(1 + β cos θ)",
		XName:  "theta_deg",
		XLabel: "rest-frame angle from the direction of motion θ (deg)",
		YLabel: "apparent angle θ′ (deg)",
	}
	return angleTable(t, speeds, n, "theta_obs_", func(b camera.Boost) func(th float64) float64 {
		return func(th float64) float64 {
			np, _ := b.Apply(dirAt(th))
			return angleTo(np, axis)
		}
	})
}

// angleTable fills t (its header set) with the angle grid of n samples
// and one column per speed, named prefix+speedName, whose values are
// column(boost along the axis)(angle).
func angleTable(t *Table, speeds []Speed, n int, prefix string, column func(camera.Boost) func(float64) float64) (*Table, error) {
	if err := validateSpeeds(speeds); err != nil {
		return nil, err
	}
	if err := checkPoints(n); err != nil {
		return nil, err
	}
	t.X = angleGrid(n)
	for _, s := range speeds {
		b, _ := s.Boost(axis)
		f := column(b)
		y := make([]float64, n)
		for i, th := range t.X {
			y[i] = f(th)
		}
		t.Columns = append(t.Columns, Column{Name: prefix + speedName(s), Label: s.Label(), Y: y})
	}
	return t, nil
}

// speedName is a CSV-safe speed tag: "b0.9" or "g100".
func speedName(s Speed) string {
	if s.Gamma != 0 {
		return "g" + strconv.FormatFloat(s.Gamma, 'g', 6, 64)
	}
	return "b" + strconv.FormatFloat(s.Beta, 'g', 6, 64)
}

// dopplerAtObs returns the Doppler factor of a star seen at apparent angle
// θ′ (deg): D = 1/D_inv(n′), D_inv the Doppler factor of the inverse boost
// (physics.md: D′(n′) = 1/D(n)).
func dopplerAtObs(inv interface{ Doppler(r3.Vec) float64 }, thetaObsDeg float64) float64 {
	return 1 / inv.Doppler(dirAt(thetaObsDeg))
}

// DopplerCurve tabulates the Doppler factor D = 1/(γ(1 − β cos θ′)) of a star
// against its apparent angle θ′ (0..180°, n samples) for each speed.
func DopplerCurve(speeds []Speed, n int) (*Table, error) {
	t := &Table{
		Name:   "doppler",
		Title:  "Doppler factor D = 1/(γ(1 − β cos θ′)) = ν_obs/ν_emit",
		XName:  "theta_obs_deg",
		XLabel: "apparent angle from the direction of motion θ′ (deg)",
		YLabel: "Doppler factor D",
	}
	return angleTable(t, speeds, n, "doppler_", func(b camera.Boost) func(th float64) float64 {
		inv := b.Inverse()
		return func(th float64) float64 { return dopplerAtObs(inv, th) }
	})
}

// deltaV returns V′ − V of a blackbody of temperature T seen with Doppler
// factor D under the given beaming convention: the per-star photometry of
// spectrum.Observe for a star of V = 0.
func deltaV(T, D float64, beam spectrum.Beaming) float64 {
	return spectrum.Observe(0, T, D, 1, beam).V
}

func tempName(T float64) string { return "T" + strconv.FormatFloat(T, 'g', 6, 64) }

func tempLabel(T float64) string { return strconv.FormatFloat(T, 'g', 6, 64) + " K" }

// DeltaV tabulates ΔV = V′ − V (exact convention; negative = brighter)
// against θ′ (0..180°, n samples) for blackbodies of the given temperatures
// at one speed, plus the T → ∞ (Rayleigh–Jeans) limit ΔV = +2.5 log₁₀ D.
func DeltaV(s Speed, temps []float64, n int) (*Table, error) {
	if err := validateSpeeds([]Speed{s}); err != nil {
		return nil, err
	}
	if err := checkTemps(temps); err != nil {
		return nil, err
	}
	if err := checkPoints(n); err != nil {
		return nil, err
	}
	b, _ := s.Boost(axis)
	inv := b.Inverse()
	t := &Table{
		Name:   "dv_" + speedName(s),
		Title:  "ΔV, exact beaming (T′ = DT, W′ = W/D²), " + s.LongLabel(),
		XName:  "theta_obs_deg",
		XLabel: "apparent angle θ′ (deg)",
		YLabel: "ΔV = V′ − V (mag)",
		X:      angleGrid(n),
	}
	d := make([]float64, n)
	for i, th := range t.X {
		d[i] = dopplerAtObs(inv, th)
	}
	for _, T := range temps {
		y := make([]float64, n)
		for i := range y {
			y[i] = deltaV(T, d[i], spectrum.BeamingExact)
		}
		t.Columns = append(t.Columns, Column{Name: "dv_" + tempName(T), Label: tempLabel(T), Y: y})
	}
	rj := make([]float64, n)
	for i := range rj {
		rj[i] = 2.5 * math.Log10(d[i])
	}
	t.Columns = append(t.Columns, Column{Name: "dv_rj_limit", Label: "T → ∞: +2.5 log D", Y: rj, Limit: true})
	return t, nil
}

// Brightening tabulates flux ratios F′/F against the Doppler factor D, on a
// logarithmic grid of n points from dMin to dMax (exact convention): the
// bolometric ratio (D², the same for every temperature), the V-band ratio
// VFlux′/VFlux for each temperature, and the V-band Rayleigh–Jeans limit 1/D.
func Brightening(temps []float64, dMin, dMax float64, n int) (*Table, error) {
	if err := checkTemps(temps); err != nil {
		return nil, err
	}
	if err := checkPoints(n); err != nil {
		return nil, err
	}
	if !(dMin > 0) || !(dMax > dMin) || math.IsInf(dMax, 0) {
		return nil, fmt.Errorf("%w: Doppler range [%v, %v]", ErrSpeed, dMin, dMax)
	}
	t := &Table{
		Name:   "brightening",
		Title:  "Bolometric vs V-band flux ratio, exact beaming (T′ = DT, W′ = W/D²)",
		XName:  "doppler",
		XLabel: "Doppler factor D (behind < 1 < ahead)",
		YLabel: "flux ratio F′/F",
		X:      make([]float64, n),
	}
	l0, l1 := math.Log(dMin), math.Log(dMax)
	for i := range t.X {
		t.X[i] = math.Exp(l0 + (l1-l0)*float64(i)/float64(n-1))
	}
	t.X[0], t.X[n-1] = dMin, dMax
	bol := make([]float64, n)
	ref := spectrum.Blackbody{T: temps[0], W: 1}
	for i, D := range t.X {
		bol[i] = ref.Observed(D, spectrum.BeamingExact).Bolometric() / ref.Bolometric()
	}
	t.Columns = append(t.Columns, Column{Name: "bolometric", Label: "bolometric (all T): D²", Y: bol})
	for _, T := range temps {
		bb := spectrum.Blackbody{T: T, W: 1}
		v0 := bb.VFlux()
		y := make([]float64, n)
		for i, D := range t.X {
			y[i] = bb.Observed(D, spectrum.BeamingExact).VFlux() / v0
		}
		t.Columns = append(t.Columns, Column{Name: "v_" + tempName(T), Label: "V, " + tempLabel(T), Y: y})
	}
	rj := make([]float64, n)
	for i, D := range t.X {
		rj[i] = 1 / D
	}
	t.Columns = append(t.Columns, Column{Name: "v_rj_limit", Label: "V, T → ∞: 1/D", Y: rj, Limit: true})
	return t, nil
}

// conventions in the order of the comparison.
var conventions = []spectrum.Beaming{spectrum.BeamingExact, spectrum.BeamingD3, spectrum.BeamingD4}

// Conventions compares the point-source beaming conventions at one speed,
// against θ′ (0..180°, n samples). Columns: "doppler" (D), then the
// bolometric flux ratio under each convention ("flux_exact", "flux_d3",
// "flux_d4": D², D³, D⁴) and the ΔV of a blackbody of temperature T under
// each ("dv_exact", "dv_d3", "dv_d4"). The D³ and D⁴ ΔV curves lie
// −2.5 log₁₀ D and −5 log₁₀ D below the exact one, which is how to tell which
// convention a published figure used.
func Conventions(s Speed, T float64, n int) (*Table, error) {
	if err := validateSpeeds([]Speed{s}); err != nil {
		return nil, err
	}
	if err := checkTemps([]float64{T}); err != nil {
		return nil, err
	}
	if err := checkPoints(n); err != nil {
		return nil, err
	}
	b, _ := s.Boost(axis)
	inv := b.Inverse()
	t := &Table{
		Name:   "conventions",
		Title:  "Point-source beaming conventions, " + s.LongLabel() + ", T = " + tempLabel(T),
		XName:  "theta_obs_deg",
		XLabel: "apparent angle θ′ (deg)",
		YLabel: "bolometric flux ratio F′/F",
		X:      angleGrid(n),
	}
	d := make([]float64, n)
	for i, th := range t.X {
		d[i] = dopplerAtObs(inv, th)
	}
	t.Columns = append(t.Columns, Column{Name: "doppler", Label: "D", Y: d})
	bb := spectrum.Blackbody{T: T, W: 1}
	f0 := bb.Bolometric()
	for _, c := range conventions {
		y := make([]float64, n)
		for i := range y {
			y[i] = bb.Observed(d[i], c).Bolometric() / f0
		}
		t.Columns = append(t.Columns, Column{Name: "flux_" + c.String(), Label: conventionLabel(c), Y: y})
	}
	for _, c := range conventions {
		y := make([]float64, n)
		for i := range y {
			y[i] = deltaV(T, d[i], c)
		}
		t.Columns = append(t.Columns, Column{Name: "dv_" + c.String(), Label: conventionLabel(c), Y: y})
	}
	return t, nil
}

func conventionLabel(c spectrum.Beaming) string {
	switch c {
	case spectrum.BeamingD3:
		return "D³ convention: F′/F = D³"
	case spectrum.BeamingD4:
		return "D⁴ convention: F′/F = D⁴"
	}
	return "exact: F′/F = D²"
}
