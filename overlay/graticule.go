package overlay

import (
	"errors"
	"fmt"
	"math"

	"git.sr.ht/~sbinet/gg"
	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
)

// GraticuleFrame selects the coordinate system of the coordinate graticule.
type GraticuleFrame int

const (
	// GraticuleNone draws no graticule (the zero value).
	GraticuleNone GraticuleFrame = iota
	// GraticuleEquatorial draws lines of constant ICRS right ascension and
	// declination.
	GraticuleEquatorial
	// GraticuleGalactic draws lines of constant galactic longitude and latitude
	// (ESA SP-1200 galactic frame, see camera.FromGalacticLB).
	GraticuleGalactic
)

// String returns "none", "radec" or "galactic".
func (g GraticuleFrame) String() string {
	switch g {
	case GraticuleNone:
		return "none"
	case GraticuleEquatorial:
		return "radec"
	case GraticuleGalactic:
		return "galactic"
	}
	return fmt.Sprintf("GraticuleFrame(%d)", int(g))
}

// ParseGraticuleFrame parses "none", "radec" (also "equatorial", "icrs") or
// "galactic" (case-sensitive lower case).
func ParseGraticuleFrame(s string) (GraticuleFrame, error) {
	switch s {
	case "none", "":
		return GraticuleNone, nil
	case "radec", "equatorial", "icrs":
		return GraticuleEquatorial, nil
	case "galactic":
		return GraticuleGalactic, nil
	}
	return GraticuleNone, fmt.Errorf("%w: unknown frame %q (want none, radec or galactic)", ErrGraticule, s)
}

// DefaultGraticuleStep is the graticule spacing in degrees when GraticuleOptions.Step is 0.
const DefaultGraticuleStep = 15.0

// ErrGraticule reports unusable graticule options.
var ErrGraticule = errors.New("overlay: graticule")

// GraticuleOptions configure the coordinate graticule layer. The zero value draws no
// graticule.
type GraticuleOptions struct {
	// Frame is the coordinate system; GraticuleNone draws nothing.
	Frame GraticuleFrame
	// Step is the spacing of the lines in degrees, in both coordinates;
	// 0 means DefaultGraticuleStep. It must be in (0, 90].
	Step float64
}

func (o GraticuleOptions) step() (float64, error) {
	s := o.Step
	if s == 0 {
		s = DefaultGraticuleStep
	}
	if !(s > 0 && s <= 90) {
		return 0, fmt.Errorf("%w: Step %g°, want 0 < step ≤ 90", ErrGraticule, o.Step)
	}
	return s, nil
}

// LineKind tells what a Polyline traces.
type LineKind int

const (
	// Meridian is a line of constant longitude (RA or galactic l).
	Meridian LineKind = iota
	// Parallel is a line of constant latitude (Dec or galactic b).
	Parallel
	// UnityLine is the circle of directions where the Doppler factor is 1.
	UnityLine
)

// Vertex is one point of an overlay line.
type Vertex struct {
	// X, Y are continuous pixel coordinates (see the package doc).
	X, Y float64
	// Dir is the apparent direction drawn there (ship frame, ICRS axes).
	Dir r3.Vec
	// Lon and Lat are the coordinates of the point in degrees: for graticule
	// lines the catalogue-frame longitude and latitude of the graticule's frame
	// (RA/Dec or l/b); for the D = 1 circle the azimuth about the direction
	// of motion and the apparent angle θ′ from it.
	Lon, Lat float64
}

// Polyline is a connected piece of an overlay line: consecutive vertices are
// at most MaxSegment pixels apart and the projection is continuous between
// them.
type Polyline struct {
	Kind LineKind
	// Value is the constant coordinate of the line in degrees (the
	// longitude of a Meridian, the latitude of a Parallel, θ′ of the
	// D = 1 circle).
	Value  float64
	Points []Vertex
}

// MaxSegment is the longest straight piece, in pixels, used to draw a
// curved overlay line.
const MaxSegment = 2.0

// traceMaxDepth bounds the bisection of one initial segment: 2° / 2⁴⁸ is
// below the float64 resolution of the parameter, so a segment still longer
// than MaxSegment there is a discontinuity of the projection.
const traceMaxDepth = 48

// tracer samples a curve on the sky adaptively into polylines.
type tracer struct {
	p       *camera.Projection
	curve   func(s float64) (dir r3.Vec, lon, lat float64)
	centre  r3.Vec
	cullR   float64 // half-angle of a cone around centre holding the image; ≥ π: none
	fisheye bool
	cx, cy  float64
	r2      float64 // fisheye circle radius²

	kind  LineKind
	value float64
	out   []Polyline
	cur   []Vertex
}

type traceSample struct {
	s       float64
	v       Vertex
	ok, vis bool
}

func newTracer(p *camera.Projection) *tracer {
	t := &tracer{p: p, centre: p.Centre(), cullR: 4}
	w, h := float64(p.Width), float64(p.Height)
	switch p.Kind {
	case camera.Pinhole:
		f := (w / 2) / math.Tan(p.FieldOfView()*math.Pi/360)
		t.cullR = math.Atan(math.Hypot(w/2, h/2) / f)
	case camera.Fisheye:
		t.fisheye = true
		t.cx, t.cy = w/2, h/2
		r := math.Min(w, h) / 2
		t.r2 = r * r
		t.cullR = p.FieldOfView() * math.Pi / 360
	}
	return t
}

// visible reports whether the pixel (x, y) of a defined direction is on
// the imaged sky (inside the circle of a fisheye).
func (t *tracer) visible(x, y float64) bool {
	if !t.fisheye {
		return true
	}
	dx, dy := x-t.cx, y-t.cy
	return dx*dx+dy*dy <= t.r2
}

func (t *tracer) sample(s float64) traceSample {
	dir, lon, lat := t.curve(s)
	x, y, ok := t.p.Forward(dir)
	return traceSample{s: s, v: Vertex{X: x, Y: y, Dir: dir, Lon: lon, Lat: lat}, ok: ok, vis: ok && t.visible(x, y)}
}

func angle(a, b r3.Vec) float64 { return math.Atan2(r3.Norm(r3.Cross(a, b)), r3.Dot(a, b)) }

// culled reports whether the short arc from a to b certainly misses the
// cone of the image: both ends are farther from the centre than the cone
// radius plus twice their separation.
func (t *tracer) culled(a, b *traceSample) bool {
	if t.cullR >= math.Pi {
		return false
	}
	d := angle(a.v.Dir, b.v.Dir)
	if !(d < 0.2) {
		return false
	}
	return math.Min(angle(a.v.Dir, t.centre), angle(b.v.Dir, t.centre))-2*d > t.cullR
}

func (t *tracer) flush() {
	if len(t.cur) >= 2 {
		t.out = append(t.out, Polyline{Kind: t.kind, Value: t.value, Points: t.cur})
	}
	t.cur = nil
}

// restart ends the current line and starts a new one at b if b is visible.
func (t *tracer) restart(b *traceSample) {
	t.flush()
	if b.vis {
		t.cur = append(t.cur, b.v)
	}
}

// trace samples the curve over s ∈ [s0, s1] starting from n equal steps.
func (t *tracer) trace(kind LineKind, value, s0, s1 float64, n int) {
	t.kind, t.value = kind, value
	a := t.sample(s0)
	t.cur = nil
	if a.vis {
		t.cur = append(t.cur, a.v)
	}
	for k := 1; k <= n; k++ {
		s := s1
		if k < n {
			s = s0 + (s1-s0)*float64(k)/float64(n)
		}
		b := t.sample(s)
		t.seg(&a, &b, 0)
		a = b
	}
	t.flush()
}

func (t *tracer) seg(a, b *traceSample, depth int) {
	dx, dy := b.v.X-a.v.X, b.v.Y-a.v.Y
	d2 := dx*dx + dy*dy
	if a.vis && b.vis && d2 <= MaxSegment*MaxSegment {
		t.cur = append(t.cur, b.v)
		return
	}
	if a.ok && b.ok && a.vis != b.vis && d2 <= 0.25 {
		t.restart(b) // the edge of a fisheye circle, bracketed to half a pixel
		return
	}
	mid := 0.5 * (a.s + b.s)
	if depth >= traceMaxDepth || mid == a.s || mid == b.s || t.culled(a, b) {
		t.restart(b)
		return
	}
	m := t.sample(mid)
	t.seg(a, &m, depth+1)
	t.seg(&m, b, depth+1)
}

// catalogueDir returns the catalogue-frame unit vector of (lon, lat) in the
// graticule's frame.
func (g GraticuleFrame) catalogueDir(lon, lat float64) r3.Vec {
	if g == GraticuleGalactic {
		return camera.FromGalacticLB(lon, lat)
	}
	return camera.FromRADec(lon, lat)
}

// GraticuleLines returns the coordinate graticule of opt as polylines in pixel
// coordinates of p, seen through boost b: each catalogue-frame graticule point
// (at infinity, so no parallax) is aberrated with b.Apply and projected with
// p.Forward. Lines are sampled adaptively until consecutive vertices are at
// most MaxSegment pixels apart, and split where the projection is
// discontinuous (the equirect seam, the plane of a pinhole, the rim of a
// fisheye, cube face edges) or the line leaves the imaged part of the sky.
// Meridians run through the poles; parallels are drawn every Step degrees
// strictly between the poles. GraticuleNone gives no lines.
func GraticuleLines(p camera.Projection, b camera.Boost, opt GraticuleOptions) ([]Polyline, error) {
	if opt.Frame == GraticuleNone {
		return nil, nil
	}
	if opt.Frame != GraticuleEquatorial && opt.Frame != GraticuleGalactic {
		return nil, fmt.Errorf("%w: unknown Frame %d", ErrGraticule, int(opt.Frame))
	}
	step, err := opt.step()
	if err != nil {
		return nil, err
	}
	if err := p.Prepare(); err != nil {
		return nil, err
	}
	t := newTracer(&p)
	var lineLon float64
	t.curve = func(s float64) (r3.Vec, float64, float64) {
		n, _ := b.Apply(opt.Frame.catalogueDir(lineLon, s))
		return n, lineLon, s
	}
	for k := 0; float64(k)*step < 360-1e-9; k++ {
		lineLon = float64(k) * step
		t.trace(Meridian, lineLon, -90, 90, 90)
	}
	var lineLat float64
	t.curve = func(s float64) (r3.Vec, float64, float64) {
		n, _ := b.Apply(opt.Frame.catalogueDir(s, lineLat))
		return n, s, lineLat
	}
	kmax := int(math.Ceil(90/step)) - 1
	for k := -kmax; k <= kmax; k++ {
		lineLat = float64(k) * step
		if math.Abs(lineLat) >= 90 {
			continue
		}
		t.trace(Parallel, lineLat, 0, 360, 180)
	}
	return t.out, nil
}

// UnityAngle returns the apparent angle θ′ from the direction of motion, in
// degrees, at which the Doppler factor is exactly 1:
// D = 1/(γ(1 − β cos θ′)) = 1 gives cos θ′ = (1 − 1/γ)/β, evaluated as
// θ′ = atan2(√(2(γ+1)), γβ) (the same angle, without cancellation). It is
// 90° in the limit β → 0 and tends to √(2/γ) rad for large γ.
func UnityAngle(b camera.Boost) float64 {
	return math.Atan2(math.Sqrt(2*(b.Gamma()+1)), b.GammaBeta()) * 180 / math.Pi
}

// UnityCircle returns the circle of apparent directions where the Doppler
// factor is 1 (see UnityAngle), as polylines in pixel coordinates of p:
// inside it light is blueshifted, outside redshifted. At rest (β = 0) every
// direction has D = 1 and there is no circle: it returns no lines.
func UnityCircle(p camera.Projection, b camera.Boost) ([]Polyline, error) {
	if b.Beta() == 0 {
		return nil, nil
	}
	if err := p.Prepare(); err != nil {
		return nil, err
	}
	th := UnityAngle(b)
	ax := b.Dir()
	e1 := r3.Cross(ax, r3.Vec{Z: 1})
	if r3.Norm(e1) < 1e-6 {
		e1 = r3.Cross(ax, r3.Vec{X: 1})
	}
	e1 = r3.Unit(e1)
	e2 := r3.Cross(ax, e1)
	ct, st := math.Cos(th*math.Pi/180), math.Sin(th*math.Pi/180)
	t := newTracer(&p)
	t.curve = func(s float64) (r3.Vec, float64, float64) {
		c, sn := math.Cos(s*math.Pi/180), math.Sin(s*math.Pi/180)
		n := r3.Add(r3.Scale(ct, ax), r3.Scale(st, r3.Add(r3.Scale(c, e1), r3.Scale(sn, e2))))
		return n, s, th
	}
	t.trace(UnityLine, th, 0, 360, 180)
	return t.out, nil
}

// lineStyle is how one family of overlay lines is stroked.
type lineStyle struct {
	r, g, b, a float64
	width      float64 // pixels at scale 1
	dash       []float64
}

var (
	styleEquatorial       = lineStyle{0.42, 0.72, 0.86, 0.42, 1, nil}
	styleEquatorialMajor  = lineStyle{0.52, 0.82, 0.95, 0.75, 1.4, nil}
	styleGalactic         = lineStyle{0.93, 0.66, 0.38, 0.42, 1, []float64{5, 3}}
	styleGalacticMajor    = lineStyle{1.00, 0.74, 0.44, 0.75, 1.4, []float64{5, 3}}
	styleUnity            = lineStyle{0.96, 0.36, 0.78, 0.90, 1.5, []float64{7, 4}}
	markerMotionColour    = [4]float64{0.40, 1.00, 0.62, 0.95}
	markerDestColour      = [4]float64{1.00, 0.85, 0.30, 0.95}
	overlayShadowStrength = 0.55
)

// overlayScale is the size of one overlay "point" in pixels: 1 up to a
// 720-pixel short side, proportionally larger above.
func overlayScale(w, h int) float64 {
	if h > w {
		h = w
	}
	return math.Max(1, float64(h)/720)
}

// strokeLines draws the polylines with style st.
func strokeLines(dc *gg.Context, lines []Polyline, st lineStyle, scale float64) {
	dc.SetRGBA(st.r, st.g, st.b, st.a)
	dc.SetLineWidth(st.width * scale)
	if st.dash != nil {
		d := make([]float64, len(st.dash))
		for i, v := range st.dash {
			d[i] = v * scale
		}
		dc.SetDash(d...)
	} else {
		dc.SetDash()
	}
	for _, l := range lines {
		dc.NewSubPath()
		for i, v := range l.Points {
			if i == 0 {
				dc.MoveTo(v.X, v.Y)
			} else {
				dc.LineTo(v.X, v.Y)
			}
		}
		dc.Stroke()
	}
	dc.SetDash()
}

// drawGraticule strokes graticule lines, the equator or galactic plane (latitude 0)
// and the prime meridian bolder than the rest.
func drawGraticule(dc *gg.Context, lines []Polyline, frame GraticuleFrame, scale float64) {
	minor, major := styleEquatorial, styleEquatorialMajor
	if frame == GraticuleGalactic {
		minor, major = styleGalactic, styleGalacticMajor
	}
	var lo, hi []Polyline
	for _, l := range lines {
		if l.Value == 0 {
			hi = append(hi, l)
		} else {
			lo = append(lo, l)
		}
	}
	strokeLines(dc, lo, minor, scale)
	strokeLines(dc, hi, major, scale)
}

// projectVisible projects an apparent direction, reporting false where the
// projection is undefined or (fisheye) outside the circle.
func projectVisible(p *camera.Projection, n r3.Vec) (x, y float64, ok bool) {
	x, y, ok = p.Forward(n)
	if !ok {
		return x, y, false
	}
	w, h := float64(p.Width), float64(p.Height)
	if p.Kind == camera.Fisheye {
		r := math.Min(w, h) / 2
		if (x-w/2)*(x-w/2)+(y-h/2)*(y-h/2) > r*r {
			return x, y, false
		}
	}
	return x, y, true
}

// drawMotionMarker draws a ring with a centre dot at the direction of
// motion (apparent = catalogue direction: aberration leaves the axis fixed).
func drawMotionMarker(dc *gg.Context, x, y, scale float64) {
	c := markerMotionColour
	r := 7 * scale
	dc.SetRGBA(0, 0, 0, overlayShadowStrength)
	dc.SetLineWidth(3 * scale)
	dc.DrawCircle(x, y, r)
	dc.Stroke()
	dc.SetRGBA(c[0], c[1], c[2], c[3])
	dc.SetLineWidth(1.4 * scale)
	dc.DrawCircle(x, y, r)
	dc.Stroke()
	for _, d := range [][2]float64{{1, 0}, {-1, 0}, {0, 1}, {0, -1}} {
		dc.MoveTo(x+d[0]*r, y+d[1]*r)
		dc.LineTo(x+d[0]*(r+4*scale), y+d[1]*(r+4*scale))
	}
	dc.Stroke()
	dc.DrawCircle(x, y, 1.2*scale)
	dc.Fill()
}

// drawDestinationMarker draws an open diamond at the destination.
func drawDestinationMarker(dc *gg.Context, x, y, scale float64) {
	c := markerDestColour
	r := 6 * scale
	path := func() {
		dc.NewSubPath()
		dc.MoveTo(x, y-r)
		dc.LineTo(x+r, y)
		dc.LineTo(x, y+r)
		dc.LineTo(x-r, y)
		dc.ClosePath()
	}
	path()
	dc.SetRGBA(0, 0, 0, overlayShadowStrength)
	dc.SetLineWidth(3 * scale)
	dc.Stroke()
	path()
	dc.SetRGBA(c[0], c[1], c[2], c[3])
	dc.SetLineWidth(1.4 * scale)
	dc.Stroke()
}
