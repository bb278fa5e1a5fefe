package camera

import (
	"fmt"
	"math"
	"strings"

	"gonum.org/v1/gonum/spatial/r3"
)

// Kind is a map projection from the sphere of directions to an image.
type Kind int

// Projection kinds.
const (
	// Pinhole is the gnomonic (rectilinear) projection of a perspective
	// camera; FOV is the horizontal field of view.
	Pinhole Kind = iota
	// Equirect maps longitude and latitude about Forward linearly onto a
	// 360° × 180° image (plate carrée).
	Equirect
	// Fisheye is the equidistant azimuthal projection (r ∝ θ) in a circle
	// of diameter min(Width, Height) spanning FOV.
	Fisheye
	// Cube is a 6×1 strip of 90° pinhole faces: +Right, −Right, +Up, −Up,
	// +Forward, −Forward.
	Cube
)

var kindNames = [...]string{Pinhole: "pinhole", Equirect: "equirect", Fisheye: "fisheye", Cube: "cube"}

// String returns the name ParseKind accepts ("pinhole", "equirect",
// "fisheye", "cube"), or "Kind(n)" for an undefined kind.
func (k Kind) String() string {
	if k >= 0 && int(k) < len(kindNames) {
		return kindNames[k]
	}
	return fmt.Sprintf("Kind(%d)", int(k))
}

// ParseKind returns the kind named s ("pinhole", "equirect", "fisheye",
// "cube"; case and surrounding space ignored).
func ParseKind(s string) (Kind, error) {
	t := strings.ToLower(strings.TrimSpace(s))
	for k, name := range kindNames {
		if t == name {
			return Kind(k), nil
		}
	}
	return 0, fmt.Errorf("%w: unknown kind %q (want pinhole, equirect, fisheye or cube)", ErrProjection, s)
}

// MarshalText implements encoding.TextMarshaler.
func (k Kind) MarshalText() ([]byte, error) {
	if k < 0 || int(k) >= len(kindNames) {
		return nil, fmt.Errorf("%w: Kind = %d is not a projection", ErrProjection, int(k))
	}
	return []byte(kindNames[k]), nil
}

// UnmarshalText implements encoding.TextUnmarshaler using ParseKind.
func (k *Kind) UnmarshalText(b []byte) error {
	v, err := ParseKind(string(b))
	if err != nil {
		return err
	}
	*k = v
	return nil
}

// Limits and defaults of Projection.
const (
	MaxSize           = 32768 // largest Width or Height, pixels
	MinFOV            = 1e-6  // degrees: smallest non-zero Pinhole or Fisheye FOV (3.6 mas)
	DefaultPinholeFOV = 60.0  // degrees, horizontal
	MaxPinholeFOV     = 179.0 // degrees
	DefaultFisheyeFOV = 180.0 // degrees, circle diameter
	MaxFisheyeFOV     = 360.0 // degrees
)

// Projection maps directions (ICRS axes, as seen from inside the sky) to
// continuous pixel coordinates and back. Fill in the exported fields, check
// them with Validate, and optionally call Prepare once to cache the derived
// constants (Forward and Inverse work without it, only slower, and never
// modify the Projection, so one value may be shared by goroutines).
//
// Pixel coordinates: (0, 0) is the top-left corner of the image, x grows to
// the right (toward Orient.Right), y grows down (toward −Orient.Up); pixel
// (i, j) covers [i, i+1) × [j, j+1) and its centre is (i+0.5, j+0.5).
type Projection struct {
	Kind          Kind
	Width, Height int // pixels, 1 to MaxSize
	// FOV in degrees: Pinhole horizontal field, in [MinFOV, 179], default
	// 60; Fisheye circle diameter, in [MinFOV, 360], default 180; zero means
	// the default; ignored by Equirect and Cube.
	FOV float64
	// Tilt in degrees, Fisheye only: the fisheye axis is turned from
	// Orient.Forward toward Orient.Up by Tilt (so Forward appears below the
	// image centre, as in a tilted dome). In [−180, 180].
	Tilt float64
	// Orient is the camera attitude; the zero value means
	// DefaultOrientation.
	Orient Orientation

	key   projKey // the fields cache was derived from
	cache frame
	ready bool
}

type projKey struct {
	kind      Kind
	w, h      int
	fov, tilt float64
	o         Orientation
}

// frame holds what Forward and Inverse derive from a Projection.
type frame struct {
	f, r, u r3.Vec  // basis at the image centre (Fisheye: tilted axis)
	cx, cy  float64 // image centre, px
	k       float64 // Pinhole, Cube: px per unit tangent; Fisheye, Equirect: px per radian (x)
	ky      float64 // Equirect: px per radian (y)
	half    float64 // Fisheye: half the field, radians
	face    float64 // Cube: face size, px
}

func (p *Projection) keyOf() projKey {
	return projKey{p.Kind, p.Width, p.Height, p.FOV, p.Tilt, p.Orient}
}

// fovDeg is FOV with the kind's default applied.
func (p *Projection) fovDeg() float64 {
	switch p.Kind {
	case Pinhole:
		if p.FOV == 0 {
			return DefaultPinholeFOV
		}
		return p.FOV
	case Fisheye:
		if p.FOV == 0 {
			return DefaultFisheyeFOV
		}
		return p.FOV
	case Equirect:
		return 360
	case Cube:
		return 90
	}
	return math.NaN()
}

// FieldOfView returns the field in degrees that the projection uses: FOV
// with the kind's default applied for Pinhole (horizontal) and Fisheye
// (circle diameter), 360 for Equirect (horizontal) and 90 for each Cube face.
func (p Projection) FieldOfView() float64 { return p.fovDeg() }

func (p *Projection) derive() frame {
	o := p.Orient
	if o.IsZero() {
		o = DefaultOrientation()
	}
	fr := frame{f: o.Forward, r: o.Right, u: o.Up, cx: float64(p.Width) / 2, cy: float64(p.Height) / 2}
	switch p.Kind {
	case Pinhole:
		fr.k = fr.cx / math.Tan(p.fovDeg()*deg/2)
	case Equirect:
		fr.k = float64(p.Width) / (2 * math.Pi)
		fr.ky = float64(p.Height) / math.Pi
	case Fisheye:
		if p.Tilt != 0 {
			s, c := math.Sincos(p.Tilt * deg)
			fr.f = r3.Add(r3.Scale(c, o.Forward), r3.Scale(s, o.Up))
			fr.u = r3.Sub(r3.Scale(c, o.Up), r3.Scale(s, o.Forward))
		}
		fr.half = p.fovDeg() * deg / 2
		fr.k = float64(min(p.Width, p.Height)) / 2 / fr.half
	case Cube:
		fr.face = float64(p.Height)
		fr.k = fr.face / 2
	}
	return fr
}

// Prepare validates p and caches its derived constants for Forward and
// Inverse. Changing an exported field afterwards is safe: the cache is then
// ignored until Prepare is called again.
func (p *Projection) Prepare() error {
	if err := p.Validate(); err != nil {
		p.ready = false
		return err
	}
	p.cache = p.derive()
	p.key = p.keyOf()
	p.ready = true
	return nil
}

// Validate checks the exported fields, naming the first bad one: Kind
// defined; Width and Height in 1..32768; Pinhole FOV in [1e-6, 179] and
// Fisheye FOV in [1e-6, 360] degrees (0 meaning the default); Fisheye Tilt
// in [−180, 180]; Cube Width = 6·Height; Orient orthonormal and
// right-handed (or zero). Equirect accepts any size (2:1 gives square
// pixels). NaN and infinite values are rejected where a field is used.
func (p Projection) Validate() error {
	if p.Kind < 0 || int(p.Kind) >= len(kindNames) {
		return fmt.Errorf("%w: Kind = %d is not a projection", ErrProjection, int(p.Kind))
	}
	if p.Width < 1 || p.Width > MaxSize {
		return fmt.Errorf("%w: Width = %d, want 1 to %d", ErrProjection, p.Width, MaxSize)
	}
	if p.Height < 1 || p.Height > MaxSize {
		return fmt.Errorf("%w: Height = %d, want 1 to %d", ErrProjection, p.Height, MaxSize)
	}
	switch p.Kind {
	case Pinhole:
		if !(p.FOV == 0 || p.FOV >= MinFOV && p.FOV <= MaxPinholeFOV) {
			return fmt.Errorf("%w: FOV = %v° for pinhole, want %v to %v (0 for %v)", ErrProjection, p.FOV, MinFOV, MaxPinholeFOV, DefaultPinholeFOV)
		}
	case Fisheye:
		if !(p.FOV == 0 || p.FOV >= MinFOV && p.FOV <= MaxFisheyeFOV) {
			return fmt.Errorf("%w: FOV = %v° for fisheye, want %v to %v (0 for %v)", ErrProjection, p.FOV, MinFOV, MaxFisheyeFOV, DefaultFisheyeFOV)
		}
		if !(p.Tilt >= -180 && p.Tilt <= 180) {
			return fmt.Errorf("%w: Tilt = %v°, want [-180, 180]", ErrProjection, p.Tilt)
		}
	case Cube:
		if p.Width != 6*p.Height {
			return fmt.Errorf("%w: cube Width = %d with Height = %d, want Width = 6·Height = %d", ErrProjection, p.Width, p.Height, 6*p.Height)
		}
	}
	return p.Orient.Validate()
}

// current reports whether the cached constants match the exported fields.
func (p *Projection) current() bool {
	k := &p.key
	return p.ready && k.kind == p.Kind && k.w == p.Width && k.h == p.Height &&
		k.fov == p.FOV && k.tilt == p.Tilt && k.o == p.Orient
}

// Centre returns the direction seen at the image centre (W/2, H/2): Forward
// for Pinhole and Equirect, the tilted axis for Fisheye. For Cube it returns
// Forward, which is at the centre of the +Forward face, (4.5·H, H/2), not at
// the centre of the strip.
func (p Projection) Centre() r3.Vec {
	fr := p.derive()
	return fr.f
}

// ImageCircle returns the centre and radius, in pixels, of a Fisheye's
// image circle: centred on the frame, diameter min(Width, Height). ok is
// false for the other kinds.
func (p Projection) ImageCircle() (cx, cy, r float64, ok bool) {
	if p.Kind != Fisheye {
		return 0, 0, 0, false
	}
	return float64(p.Width) / 2, float64(p.Height) / 2, float64(min(p.Width, p.Height)) / 2, true
}

// CentreOrientation returns the orthonormal basis at the image centre:
// Forward toward Centre, Right along +x, Up along −y there. It equals Orient
// (or DefaultOrientation) except for a tilted Fisheye. For Cube it is the
// basis of the +Forward face.
func (p Projection) CentreOrientation() Orientation {
	fr := p.derive()
	return Orientation{Forward: fr.f, Right: fr.r, Up: fr.u}
}

// PixelScale returns the angular size of one pixel at the image centre (for
// Cube, at the centre of a face), in degrees per pixel: the derivative of
// angle with pixel position there, as FITS CDELT wants it. For Equirect it
// is the horizontal scale 360°/Width (the vertical one is 180°/Height).
func (p Projection) PixelScale() float64 {
	fr := p.derive()
	return rad / fr.k
}

// Forward maps direction dir (ICRS axes; need not be unit) to continuous
// pixel coordinates. ok is false, and x, y are NaN, where the projection is
// undefined: dir zero or not finite, dir on or behind the image plane of a
// Pinhole, dir exactly opposite a Fisheye axis. Directions that fall outside
// the image (or outside the fisheye circle) still give ok = true with
// coordinates outside [0, W] × [0, H]. Equirect longitudes are in (−180°,
// 180°] about Forward, so the point straight behind maps to x = W.
// Forward does not allocate.
func (p *Projection) Forward(dir r3.Vec) (x, y float64, ok bool) {
	if p.current() {
		return p.cache.forward(p.Kind, dir)
	}
	fr := p.derive()
	return fr.forward(p.Kind, dir)
}

// ForwardBatch is Forward over struct-of-arrays directions: for each
// k < len(x) it sets px[k], py[k] to Forward's x, y for (x[k], y[k], z[k]),
// bit for bit, and to NaN where Forward's ok is false. px and py must be at
// least as long as x, and y and z too. The projection's frame is derived
// once for the whole batch, and a tight loop lets consecutive directions'
// long dependency chains (square root, arctangent, divisions) overlap.
// ForwardBatch does not allocate.
func (p *Projection) ForwardBatch(x, y, z, px, py []float64) {
	n := len(x)
	y, z, px, py = y[:n], z[:n], px[:n], py[:n]
	fr := &p.cache
	if !p.current() {
		d := p.derive()
		fr = &d
	}
	kind := p.Kind
	for k := range x {
		u, v, ok := fr.forward(kind, r3.Vec{X: x[k], Y: y[k], Z: z[k]})
		if !ok {
			u, v = nan, nan
		}
		px[k], py[k] = u, v
	}
}

// Inverse maps continuous pixel coordinates to the unit direction seen
// there. ok is false outside the imaged region: outside [0, W] × [0, H] for
// Equirect and Cube, outside the circle of FOV for Fisheye (for a Pinhole
// every finite (x, y) is a direction). dir is then the zero vector.
// Inverse does not allocate.
func (p *Projection) Inverse(x, y float64) (dir r3.Vec, ok bool) {
	if p.current() {
		return p.cache.inverse(p.Kind, p.Width, p.Height, x, y)
	}
	fr := p.derive()
	return fr.inverse(p.Kind, p.Width, p.Height, x, y)
}

// InverseBeyond is Inverse continued past a Fisheye's image circle: the
// equidistant mapping θ = r/k holds out to θ = π (the direction opposite
// the centre), so that a position just outside the circle gets the
// direction a wider fisheye would image there. Inside the circle it is
// Inverse, bit for bit; for the other kinds it is Inverse.
func (p *Projection) InverseBeyond(x, y float64) (dir r3.Vec, ok bool) {
	if p.Kind != Fisheye {
		return p.Inverse(x, y)
	}
	if math.IsNaN(x+y) || math.IsInf(x+y, 0) {
		return r3.Vec{}, false
	}
	if p.current() {
		return p.cache.fisheyeInverse(x, y, math.Pi)
	}
	fr := p.derive()
	return fr.fisheyeInverse(x, y, math.Pi)
}

// fisheyeInverse is the Fisheye inverse out to θ = limit from the centre.
func (fr *frame) fisheyeInverse(x, y, limit float64) (r3.Vec, bool) {
	dx, dy := x-fr.cx, fr.cy-y
	s := hypot(dx, dy)
	th := s / fr.k
	if th > limit {
		return r3.Vec{}, false
	}
	if s == 0 {
		return fr.f, true
	}
	st, ct := math.Sincos(th)
	return fr.combine(ct, st*dx/s, st*dy/s), true
}

var nan = math.NaN()

func (fr *frame) forward(kind Kind, dir r3.Vec) (x, y float64, ok bool) {
	a := fr.f.X*dir.X + fr.f.Y*dir.Y + fr.f.Z*dir.Z
	b := fr.r.X*dir.X + fr.r.Y*dir.Y + fr.r.Z*dir.Z
	c := fr.u.X*dir.X + fr.u.Y*dir.Y + fr.u.Z*dir.Z
	if math.IsNaN(a+b+c) || math.IsInf(a+b+c, 0) {
		return nan, nan, false
	}
	switch kind {
	case Pinhole:
		if !(a > 0) {
			return nan, nan, false
		}
		return fr.cx + fr.k*b/a, fr.cy - fr.k*c/a, true
	case Equirect:
		if a == 0 && b == 0 && c == 0 {
			return nan, nan, false
		}
		lon := math.Atan2(b, a)
		lat := math.Atan2(c, hypot(a, b))
		return fr.cx + fr.k*lon, fr.cy - fr.ky*lat, true
	case Fisheye:
		s := hypot(b, c)
		if s == 0 {
			if a > 0 {
				return fr.cx, fr.cy, true
			}
			return nan, nan, false
		}
		rho := fr.k * math.Atan2(s, a) / s
		return fr.cx + rho*b, fr.cy - rho*c, true
	case Cube:
		return fr.cubeForward(a, b, c)
	}
	return nan, nan, false
}

// cubeForward picks the face with the largest component and projects onto
// it. (w, h, v) are the face's forward, right and up components.
func (fr *frame) cubeForward(a, b, c float64) (x, y float64, ok bool) {
	aa, ab, ac := math.Abs(a), math.Abs(b), math.Abs(c)
	var i, w, h, v float64
	switch {
	case aa >= ab && aa >= ac:
		if aa == 0 {
			return nan, nan, false
		}
		if a > 0 {
			i, w, h, v = 4, a, b, c
		} else {
			i, w, h, v = 5, -a, -b, c
		}
	case ab >= ac:
		if b > 0 {
			i, w, h, v = 0, b, -a, c
		} else {
			i, w, h, v = 1, -b, a, c
		}
	default:
		if c > 0 {
			i, w, h, v = 2, c, b, -a
		} else {
			i, w, h, v = 3, -c, b, a
		}
	}
	return (i+0.5)*fr.face + fr.k*h/w, fr.cy - fr.k*v/w, true
}

func (fr *frame) inverse(kind Kind, width, height int, x, y float64) (r3.Vec, bool) {
	if math.IsNaN(x+y) || math.IsInf(x+y, 0) {
		return r3.Vec{}, false
	}
	switch kind {
	case Pinhole:
		u, v := (x-fr.cx)/fr.k, (fr.cy-y)/fr.k
		return fr.along(1, u, v), true
	case Equirect:
		if x < 0 || x > float64(width) || y < 0 || y > float64(height) {
			return r3.Vec{}, false
		}
		lon, lat := (x-fr.cx)/fr.k, (fr.cy-y)/fr.ky
		sl, cl := math.Sincos(lon)
		sb, cb := math.Sincos(lat)
		return fr.combine(cb*cl, cb*sl, sb), true
	case Fisheye:
		return fr.fisheyeInverse(x, y, fr.half)
	case Cube:
		if x < 0 || x > float64(width) || y < 0 || y > float64(height) {
			return r3.Vec{}, false
		}
		i := math.Floor(x / fr.face)
		if i > 5 {
			i = 5
		}
		h := (x - (i+0.5)*fr.face) / fr.k
		v := (fr.cy - y) / fr.k
		switch i {
		case 0:
			return fr.along(-h, 1, v), true
		case 1:
			return fr.along(h, -1, v), true
		case 2:
			return fr.along(-v, h, 1), true
		case 3:
			return fr.along(v, h, -1), true
		case 4:
			return fr.along(1, h, v), true
		default:
			return fr.along(-1, -h, v), true
		}
	}
	return r3.Vec{}, false
}

// hypot is math.Hypot with a fast path for the magnitudes unit vectors have.
func hypot(a, b float64) float64 {
	s := a*a + b*b
	if s > 1e-290 && s < 1e290 {
		return math.Sqrt(s)
	}
	return math.Hypot(a, b)
}

// combine returns a·f + b·r + c·u.
func (fr *frame) combine(a, b, c float64) r3.Vec {
	return r3.Vec{
		X: a*fr.f.X + b*fr.r.X + c*fr.u.X,
		Y: a*fr.f.Y + b*fr.r.Y + c*fr.u.Y,
		Z: a*fr.f.Z + b*fr.r.Z + c*fr.u.Z,
	}
}

// along returns the unit vector of a·f + b·r + c·u.
func (fr *frame) along(a, b, c float64) r3.Vec {
	s := 1 / math.Sqrt(a*a+b*b+c*c)
	return fr.combine(a*s, b*s, c*s)
}
