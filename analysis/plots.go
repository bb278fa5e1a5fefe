package analysis

import (
	"fmt"
	"image/color"
	"math"
	"strconv"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/plotutil"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"github.com/skyframe/skyframe/camera"
)

// axisMode selects an axis scale.
type axisMode int

const (
	axisLinear axisMode = iota
	axisLog
	axisInverted // linear, increasing downward (magnitudes: brighter up)
)

var limitColor = color.Gray{Y: 80}

// newPanel returns a plot with the package's text sizes and a light grid.
func newPanel(title, xl, yl string) *plot.Plot {
	p := plot.New()
	p.Title.Text = title
	p.Title.TextStyle.Font.Size = TextSize
	p.Title.Padding = 4
	for _, a := range []*plot.Axis{&p.X, &p.Y} {
		a.Label.TextStyle.Font.Size = TextSize
		a.Tick.Label.Font.Size = TextSize
		a.Label.Padding = 2
	}
	p.X.Label.Text, p.Y.Label.Text = xl, yl
	p.Legend.TextStyle.Font.Size = TextSize
	p.Legend.Padding = 1
	p.Legend.ThumbnailWidth = 0.35 * vg.Inch
	g := plotter.NewGrid()
	g.Vertical.Color = color.Gray{Y: 225}
	g.Horizontal.Color = color.Gray{Y: 225}
	p.Add(g)
	return p
}

func setAxis(a *plot.Axis, m axisMode) {
	switch m {
	case axisLog:
		// Log axes plot log10 of the values on a linear scale: gonum/plot
		// places a log axis's label glyph box at the arithmetic midpoint,
		// which leaves a large empty margin.
		a.Tick.Marker = logTicks()
	case axisInverted:
		a.Scale = plot.InvertedScale{Normalizer: plot.LinearScale{}}
		a.Tick.Marker = linearTicks()
	default:
		a.Tick.Marker = linearTicks()
	}
}

// points keeps the finite points (positive ones on log axes).
func points(x, y []float64, xm, ym axisMode) plotter.XYs {
	xy := make(plotter.XYs, 0, len(x))
	for i := range x {
		if !finite(x[i]) || !finite(y[i]) || (xm == axisLog && x[i] <= 0) || (ym == axisLog && y[i] <= 0) {
			continue
		}
		p := plotter.XY{X: x[i], Y: y[i]}
		if xm == axisLog {
			p.X = math.Log10(p.X)
		}
		if ym == axisLog {
			p.Y = math.Log10(p.Y)
		}
		xy = append(xy, p)
	}
	return xy
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// addLines draws columns of t: solid coloured lines for curves, dashed grey
// for limits. Columns with no finite point are left out.
func addLines(p *plot.Plot, x []float64, cols []Column, xm, ym axisMode, legend bool) error {
	k := 0
	for _, c := range cols {
		xy := points(x, c.Y, xm, ym)
		if len(xy) < 2 {
			continue
		}
		l, err := plotter.NewLine(xy)
		if err != nil {
			return fmt.Errorf("analysis: column %q: %w", c.Name, err)
		}
		l.Width = vg.Points(1.6)
		if c.Limit {
			l.Color = limitColor
			l.Dashes = []vg.Length{vg.Points(5), vg.Points(3)}
			l.Width = vg.Points(1.2)
		} else {
			l.Color = plotutil.Color(k)
			k++
		}
		p.Add(l)
		if legend && c.Label != "" {
			p.Legend.Add(c.Label, l)
		}
	}
	return nil
}

func degreeTicks() plot.Ticker {
	var t plot.ConstantTicks
	for v := 0; v <= 180; v += 15 {
		lab := ""
		if v%30 == 0 {
			lab = strconv.Itoa(v)
		}
		t = append(t, plot.Tick{Value: float64(v), Label: lab})
	}
	return t
}

func linePanel(t *Table, cols []Column, title, yl string, xm, ym axisMode, legend bool) (*plot.Plot, error) {
	if err := t.check(); err != nil {
		return nil, err
	}
	p := newPanel(title, t.XLabel, yl)
	setAxis(&p.X, xm)
	setAxis(&p.Y, ym)
	if err := addLines(p, t.X, cols, xm, ym, legend); err != nil {
		return nil, err
	}
	if t.XName == "theta_deg" || t.XName == "theta_obs_deg" {
		p.X.Min, p.X.Max = 0, 180
		p.X.Tick.Marker = degreeTicks()
	}
	return p, nil
}

// AberrationFigure plots θ′ against θ for every speed, with the β = 0
// diagonal.
func AberrationFigure(t *Table) (*Figure, error) {
	if err := t.check(); err != nil {
		return nil, err
	}
	cols := append([]Column{{Name: "rest", Label: "β = 0 (no aberration)", Y: t.X, Limit: true}}, t.Columns...)
	p, err := linePanel(t, cols, "", t.YLabel, axisLinear, axisLinear, true)
	if err != nil {
		return nil, err
	}
	p.Y.Min, p.Y.Max = 0, 180
	p.Y.Tick.Marker = degreeTicks()
	p.Legend.Top, p.Legend.Left = true, true
	p.Legend.XOffs, p.Legend.YOffs = 4, -4
	return &Figure{Name: t.Name, Caption: "Aberration, exact Lorentz transform: cos θ′ = (cos θ + β)/(1 + β cos θ)\nθ, θ′: angles from the direction of motion in the rest and ship frames", Panels: []*plot.Plot{p}}, nil
}

// DopplerFigure plots D against θ′ for every speed, log y.
func DopplerFigure(t *Table) (*Figure, error) {
	if err := t.check(); err != nil {
		return nil, err
	}
	cols := append([]Column{{Name: "rest", Label: "", Y: constant(len(t.X), 1), Limit: true}}, t.Columns...)
	p, err := linePanel(t, cols, "", t.YLabel+" (log scale)", axisLinear, axisLog, true)
	if err != nil {
		return nil, err
	}
	p.Legend.Top = true
	p.Legend.XOffs, p.Legend.YOffs = -4, -4
	return &Figure{Name: t.Name, Caption: "Doppler factor seen from the ship: D = ν_obs/ν_emit = 1/(γ(1 − β cos θ′))\nθ′: apparent angle from the direction of motion; T′ = D·T", Panels: []*plot.Plot{p}}, nil
}

func constant(n int, v float64) []float64 {
	y := make([]float64, n)
	for i := range y {
		y[i] = v
	}
	return y
}

// DeltaVFigure plots ΔV against θ′, one panel per table (speed), brighter
// up; the legend is drawn on the first panel.
func DeltaVFigure(tables []*Table) (*Figure, error) {
	if len(tables) == 0 {
		return nil, fmt.Errorf("%w: no ΔV tables", ErrTable)
	}
	f := &Figure{Name: "dv", Caption: "Change in V magnitude of blackbody stars, exact beaming (T′ = D·T, W′ = W/D², bolometric F′/F = D²)\nΔV = V′ − V, negative = brighter (up); dashed: T → ∞ limit +2.5 log10 D (hot stars ahead fade in V)"}
	for k, t := range tables {
		title := t.Title
		if i := lastComma(title); i >= 0 {
			title = title[i+2:]
		}
		p, err := linePanel(t, t.Columns, title, t.YLabel, axisLinear, axisInverted, k == 0)
		if err != nil {
			return nil, err
		}
		p.Legend.Top, p.Legend.Left = false, true
		p.Legend.XOffs, p.Legend.YOffs = 4, 4
		f.Panels = append(f.Panels, p)
	}
	return f, nil
}

// lastComma finds the ", " before the speed in a ΔV title.
func lastComma(s string) int {
	for i := 0; i+len(", β") <= len(s); i++ {
		if s[i:i+2] == ", " && (s[i+2:i+2+len("β")] == "β" || s[i+2] == 'g' || s[i+2:i+2+len("γ")] == "γ") {
			return i
		}
	}
	return -1
}

// BrighteningFigure plots the bolometric and V-band flux ratios against D,
// log-log.
func BrighteningFigure(t *Table) (*Figure, error) {
	if err := t.check(); err != nil {
		return nil, err
	}
	p, err := linePanel(t, t.Columns, "", t.YLabel+" (log scale)", axisLog, axisLog, true)
	if err != nil {
		return nil, err
	}
	p.Legend.XOffs, p.Legend.YOffs = -4, 4
	p.Y.Min = math.Max(p.Y.Min, -4) // F′/F ≥ 1e-4
	return &Figure{Name: t.Name, Caption: "Flux ratio of a blackbody star seen with Doppler factor D, exact beaming\n(T′ = D·T, W′ = W/D²): bolometric F′/F = D²; V band → 1/D as T → ∞,\nso a hot star ahead fades in V while its bolometric flux rises", Panels: []*plot.Plot{p}}, nil
}

// ConventionsFigure plots the convention comparison: bolometric flux ratio
// (log) and ΔV against θ′ under the exact, D³ and D⁴ conventions.
func ConventionsFigure(t *Table) (*Figure, error) {
	if err := t.check(); err != nil {
		return nil, err
	}
	var flux, dv []Column
	for _, c := range conventions {
		fc, vc := t.Column("flux_"+c.String()), t.Column("dv_"+c.String())
		if fc == nil || vc == nil {
			return nil, fmt.Errorf("%w: conventions table lacks %s columns", ErrTable, c)
		}
		flux, dv = append(flux, *fc), append(dv, *vc)
	}
	p1, err := linePanel(t, flux, "bolometric flux ratio", t.YLabel+" (log scale)", axisLinear, axisLog, true)
	if err != nil {
		return nil, err
	}
	p1.Legend.Top = true
	p1.Legend.XOffs, p1.Legend.YOffs = -4, -4
	temp := ""
	if i := lastIndex(t.Title, "T = "); i >= 0 {
		temp = " of a " + t.Title[i+4:] + " blackbody"
	}
	p2, err := linePanel(t, dv, "ΔV"+temp, "ΔV = V′ − V (mag; up = brighter)", axisLinear, axisInverted, false)
	if err != nil {
		return nil, err
	}
	speed := t.Title
	if i := lastIndex(speed, "conventions, "); i >= 0 {
		speed = speed[i+len("conventions, "):]
	}
	return &Figure{Name: t.Name, Cols: 2, Caption: "Point-source beaming conventions at " + speed + "\nexact transform F′/F = D² (same rest-frame distance) vs published moving-source conventions D³, D⁴; ΔV curves differ by 2.5 log10 D per power", Panels: []*plot.Plot{p1, p2}}, nil
}

func lastIndex(s, sub string) int {
	for i := len(s) - len(sub); i >= 0; i-- {
		if s[i:i+len(sub)] == sub {
			return i
		}
	}
	return -1
}

// Figures builds every curve figure: aberration, doppler, dv, brightening,
// conventions (in that order).
func (cs *CurveSet) Figures() ([]*Figure, error) {
	var out []*Figure
	for _, mk := range []func() (*Figure, error){
		func() (*Figure, error) { return AberrationFigure(cs.Aberration) },
		func() (*Figure, error) { return DopplerFigure(cs.Doppler) },
		func() (*Figure, error) { return DeltaVFigure(cs.DeltaV) },
		func() (*Figure, error) { return BrighteningFigure(cs.Brightening) },
		func() (*Figure, error) { return ConventionsFigure(cs.Conventions) },
	} {
		f, err := mk()
		if err != nil {
			return nil, err
		}
		out = append(out, f)
	}
	return out, nil
}

// Tables returns every curve table, in the order of Figures (the ΔV tables
// one per speed).
func (cs *CurveSet) Tables() []*Table {
	t := []*Table{cs.Aberration, cs.Doppler}
	t = append(t, cs.DeltaV...)
	return append(t, cs.Brightening, cs.Conventions)
}

// speedTicks labels a rapidity axis with round values of β (or γ beyond
// φ = 6).
func speedTicks(lo, hi float64) plot.Ticker {
	return plot.TickerFunc(func(min, max float64) []plot.Tick {
		var ts []plot.Tick
		if max <= 6 {
			cands := []float64{0, 0.3, 0.6, 0.8, 0.9, 0.95, 0.99, 0.999, 0.9999, 0.99999}
			if max < 1 {
				cands = []float64{0, 0.1, 0.2, 0.3, 0.4, 0.5, 0.6, 0.7, 0.75}
			}
			for _, b := range cands {
				if phi := math.Atanh(b); phi >= min-1e-9 && phi <= max+1e-9 {
					ts = append(ts, plot.Tick{Value: phi, Label: strconv.FormatFloat(b, 'g', -1, 64)})
				}
			}
			return ts
		}
		for _, t := range (plot.DefaultTicks{}).Ticks(min, max) {
			if t.Label != "" {
				t.Label = "γ=" + strconv.FormatFloat(math.Cosh(t.Value), 'g', 3, 64)
			}
			ts = append(ts, t)
		}
		return ts
	})
}

// CensusFigure plots a census against speed in four panels: star counts
// (whole sky, forward, rear), illuminance, half-count radius and the
// chromaticity of the integrated starlight. The x axis is linear in rapidity
// atanh β and labelled in β.
func (t *CensusTable) Figure() (*Figure, error) {
	if t == nil || len(t.Rows) == 0 {
		return nil, fmt.Errorf("%w: empty census", ErrTable)
	}
	n := len(t.Rows)
	x := make([]float64, n)
	col := func() []float64 { return make([]float64, n) }
	vis, fwd, rear, lux, vlux, half, iso, cx, cy := col(), col(), col(), col(), col(), col(), col(), col(), col()
	for i, r := range t.Rows {
		b, err := r.Speed.Boost(t.Options.Heading)
		if err != nil {
			return nil, err
		}
		x[i] = b.Rapidity()
		vis[i], fwd[i], rear[i] = float64(r.Visible), float64(r.Forward), float64(r.Rear)
		lux[i], vlux[i] = r.Illuminance, r.VisibleIlluminance
		half[i] = r.HalfAngle
		iso[i] = math.Acos(b.Beta()) * 180 / math.Pi
		cx[i], cy[i] = r.CIEx, r.CIEy
	}
	lim := strconv.FormatFloat(t.Options.LimitMag, 'g', 4, 64)
	xl := "ship speed β (axis linear in rapidity atanh β)"
	tab := &Table{Name: "census", XLabel: xl, X: x}
	mk := func(title, yl string, ym axisMode, cols []Column) (*plot.Plot, error) {
		p, err := linePanel(tab, cols, title, yl, axisLinear, ym, true)
		if err != nil {
			return nil, err
		}
		p.X.Tick.Marker = speedTicks(x[0], x[n-1])
		for _, c := range cols {
			if c.Limit {
				continue
			}
			if xy := points(x, c.Y, axisLinear, ym); len(xy) > 0 {
				s, err := plotter.NewScatter(xy)
				if err == nil {
					s.GlyphStyle.Radius = vg.Points(1.8)
					s.GlyphStyle.Shape = draw.CircleGlyph{}
					s.GlyphStyle.Color = color.Gray{Y: 60}
					p.Add(s)
				}
			}
		}
		return p, nil
	}
	tab.Columns = []Column{{Name: "v", Y: vis}, {Name: "f", Y: fwd}, {Name: "r", Y: rear}, {Name: "i", Y: lux}, {Name: "vi", Y: vlux}, {Name: "h", Y: half}, {Name: "iso", Y: iso}, {Name: "x", Y: cx}, {Name: "y", Y: cy}}
	p1, err := mk("stars with V′ ≤ "+lim, "number of stars", axisLinear, []Column{
		{Label: "whole sky", Y: vis}, {Label: "forward (θ′ ≤ 90°)", Y: fwd}, {Label: "rear (θ′ > 90°)", Y: rear}})
	if err != nil {
		return nil, err
	}
	p1.Legend.YOffs = 0.3 * vg.Inch // above the rear count, below the forward one
	p1.Y.Min = 0
	// Speeds at which the catalogue is too shallow: open red rings on the
	// whole-sky count, and the title says from which depth.
	var inc plotter.XYs
	for i := range t.Rows {
		if t.Incomplete(i) {
			inc = append(inc, plotter.XY{X: x[i], Y: vis[i]})
		}
	}
	if len(inc) > 0 {
		if s, err := plotter.NewScatter(inc); err == nil {
			s.GlyphStyle.Radius = vg.Points(5)
			s.GlyphStyle.Shape = draw.RingGlyph{}
			s.GlyphStyle.Color = color.RGBA{R: 200, A: 255}
			p1.Add(s)
			p1.Legend.Add(fmt.Sprintf("incomplete: catalogue to V ≈ %.1f", t.DepthV), s)
		}
	}
	p2, err := mk("illuminance from starlight", "illuminance (lux, log scale)", axisLog, []Column{
		{Label: "all stars", Y: lux}, {Label: "stars with V′ ≤ " + lim, Y: vlux}})
	if err != nil {
		return nil, err
	}
	p2.Legend.Top, p2.Legend.Left = true, true
	p3, err := mk("half-count radius", "radius about the heading (deg)", axisLinear, []Column{
		{Label: "half of the visible stars within", Y: half}, {Label: "isotropic sky: arccos β", Y: iso, Limit: true}})
	if err != nil {
		return nil, err
	}
	p3.Y.Min = 0
	p4, err := mk("integrated starlight chromaticity", "CIE 1931 chromaticity", axisLinear, []Column{
		{Label: "x", Y: cx}, {Label: "y", Y: cy}})
	if err != nil {
		return nil, err
	}
	p4.Legend.Top = true
	ra, dec := camera.RADec(t.Options.Heading)
	pos := t.Options.Position
	where := "from the Sun"
	if pos.X != 0 || pos.Y != 0 || pos.Z != 0 {
		where = fmt.Sprintf("from (%.4g, %.4g, %.4g) pc", pos.X, pos.Y, pos.Z)
	}
	caption := fmt.Sprintf("Sky census of %s (%d stars) against speed, limiting magnitude V′ ≤ %s\nheading RA %.2f°, Dec %.2f° (ICRS), %s; %s beaming; T′ = D·T, counts in the ship frame",
		t.Source, t.Stars, lim, ra, dec, where, t.Options.Beaming)
	return &Figure{Name: "census", Cols: 2, Caption: caption, Panels: []*plot.Plot{p1, p2, p3, p4}}, nil
}
