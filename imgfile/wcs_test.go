package imgfile

import (
	"bytes"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
)

// wcsEval evaluates a celestial FITS WCS from header keywords, written from
// the papers and independent of camera's inverse projections:
// Greisen & Calabretta (2002, A&A 395, 1061) eq. (1)–(3) for pixel →
// intermediate world coordinates, Calabretta & Greisen (2002, A&A 395,
// 1077) §5.1.3 (TAN), §5.1.5 (ARC), §5.2.3 (CAR) for the native spherical
// coordinates, §2.4 eqs. (8)–(10) for the native pole and eq. (2) for the
// rotation to celestial coordinates [pub].
type wcsEval struct {
	code           string
	crpix, cdelt   [2]float64
	pc             [2][2]float64
	alphaP, deltaP float64 // celestial coordinates of the native pole, deg
	phiP           float64 // LONPOLE, deg
}

const d2r = math.Pi / 180

func sind(x float64) float64 { return math.Sin(x * d2r) }
func cosd(x float64) float64 { return math.Cos(x * d2r) }

// arg(x, y) of Paper II: the angle of the point (x, y), in degrees.
func argd(x, y float64) float64 { return math.Atan2(y, x) / d2r }

func newWCSEval(h FITSHeader) (*wcsEval, error) {
	f := func(key string, def float64) (float64, error) {
		if _, ok := h.Get(key); !ok {
			return def, nil
		}
		return h.Float(key)
	}
	c1, err := h.String("CTYPE1")
	if err != nil {
		return nil, err
	}
	c2, err := h.String("CTYPE2")
	if err != nil {
		return nil, err
	}
	if len(c1) != 8 || len(c2) != 8 || c1[:5] != "RA---" || c2[:5] != "DEC--" || c1[5:] != c2[5:] {
		return nil, fmt.Errorf("CTYPE %q %q", c1, c2)
	}
	e := &wcsEval{code: c1[5:]}
	for i, k := range []string{"1", "2"} {
		if e.crpix[i], err = f("CRPIX"+k, 0); err != nil {
			return nil, err
		}
		if e.cdelt[i], err = f("CDELT"+k, 1); err != nil {
			return nil, err
		}
		for j, l := range []string{"1", "2"} {
			def := 0.0
			if i == j {
				def = 1
			}
			if e.pc[i][j], err = f("PC"+k+"_"+l, def); err != nil {
				return nil, err
			}
		}
	}
	alpha0, err := h.Float("CRVAL1")
	if err != nil {
		return nil, err
	}
	delta0, err := h.Float("CRVAL2")
	if err != nil {
		return nil, err
	}
	var phi0, theta0 float64 // native coordinates of the reference point
	switch e.code {
	case "TAN", "ARC":
		theta0 = 90
	case "CAR":
		theta0 = 0
	default:
		return nil, fmt.Errorf("projection %s", e.code)
	}
	// LONPOLE default: 0 if δ0 ≥ θ0, else 180 (Paper II §2.4) [pub].
	defLon := 180.0
	if delta0 >= theta0 {
		defLon = 0
	}
	if theta0 == 90 {
		defLon = 180
	}
	if e.phiP, err = f("LONPOLE", defLon); err != nil {
		return nil, err
	}
	latpole, err := f("LATPOLE", 90)
	if err != nil {
		return nil, err
	}
	if theta0 == 90 {
		e.alphaP, e.deltaP = alpha0, delta0
		return e, nil
	}
	// Paper II eqs. (8)–(9): δp = ψ ± acos(sin δ0 / √(1 − cos²θ0 sin²(φp − φ0))),
	// ψ = arg(cos θ0 cos(φp − φ0), sin θ0); keep solutions in [−90, 90],
	// the one closest to LATPOLE.
	psi := argd(cosd(theta0)*cosd(e.phiP-phi0), sind(theta0))
	r := math.Sqrt(1 - cosd(theta0)*cosd(theta0)*sind(e.phiP-phi0)*sind(e.phiP-phi0))
	const tol = 1e-10
	if r < tol {
		// θ0 = 0 and |φp − φ0| = 90°: requires δ0 = 0, and δp is LATPOLE.
		if math.Abs(delta0) > tol {
			return nil, fmt.Errorf("LONPOLE %g with θ0 = 0 needs CRVAL2 = 0, have %g", e.phiP, delta0)
		}
		e.deltaP = math.Max(-90, math.Min(90, latpole))
		return e, e.setAlphaP(alpha0, delta0, phi0, theta0)
	}
	q := sind(delta0) / r
	if math.Abs(q) > 1+tol {
		return nil, fmt.Errorf("no native pole: |sin δ0 / r| = %g > 1", math.Abs(q))
	}
	omega := math.Acos(math.Max(-1, math.Min(1, q))) / d2r
	best, found := 0.0, false
	for _, dp := range []float64{psi + omega, psi - omega} {
		dp = math.Remainder(dp, 360)
		if dp < -90-1e-9 || dp > 90+1e-9 {
			continue
		}
		dp = math.Max(-90, math.Min(90, dp))
		if !found || math.Abs(dp-latpole) < math.Abs(best-latpole) {
			best, found = dp, true
		}
	}
	if !found {
		return nil, errors.New("no valid δp")
	}
	e.deltaP = best
	return e, e.setAlphaP(alpha0, delta0, phi0, theta0)
}

// setAlphaP applies Paper II eq. (10) for αp, with its special cases:
// reference point at a celestial pole (αp = α0, δp = ±θ0), or native pole
// at a celestial pole (δp = ±90°) [pub].
func (e *wcsEval) setAlphaP(alpha0, delta0, phi0, theta0 float64) error {
	const tol = 1e-10
	if z := cosd(e.deltaP) * cosd(delta0); math.Abs(z) < tol {
		switch {
		case math.Abs(cosd(delta0)) < tol:
			e.alphaP = alpha0
			e.deltaP = theta0
			if delta0 < 0 {
				e.deltaP = -theta0
			}
		case e.deltaP > 0:
			e.alphaP = alpha0 + e.phiP - phi0 - 180
		default:
			e.alphaP = alpha0 - e.phiP + phi0
		}
		return nil
	}
	x := (sind(theta0) - sind(e.deltaP)*sind(delta0)) / (cosd(e.deltaP) * cosd(delta0))
	y := sind(e.phiP-phi0) * cosd(theta0) / cosd(delta0)
	if x == 0 && y == 0 {
		return errors.New("αp undefined")
	}
	e.alphaP = alpha0 - argd(x, y)
	return nil
}

// world returns the unit vector of the celestial coordinates at FITS pixel
// coordinates (p1, p2).
func (e *wcsEval) world(p1, p2 float64) r3.Vec {
	// Paper I eq. (1)-(3): x_i = s_i Σ_j m_ij (p_j − r_j).
	d1, d2 := p1-e.crpix[0], p2-e.crpix[1]
	x := e.cdelt[0] * (e.pc[0][0]*d1 + e.pc[0][1]*d2)
	y := e.cdelt[1] * (e.pc[1][0]*d1 + e.pc[1][1]*d2)
	var phi, theta float64
	switch e.code {
	case "TAN", "ARC":
		// Zenithal: R_θ = √(x² + y²), φ = arg(−y, x) (Paper II eq. 14-15).
		rt := math.Hypot(x, y)
		phi = argd(-y, x)
		if e.code == "TAN" {
			theta = math.Atan2(180/math.Pi, rt) / d2r // R_θ = (180°/π) cot θ (eq. 54)
		} else {
			theta = 90 - rt // R_θ = 90° − θ (eq. 80)
		}
	case "CAR":
		phi, theta = x, y // eq. (84)
	}
	// Paper II eq. (2).
	dphi := phi - e.phiP
	alpha := e.alphaP + argd(sind(theta)*cosd(e.deltaP)-cosd(theta)*sind(e.deltaP)*cosd(dphi),
		-cosd(theta)*sind(dphi))
	delta := math.Asin(math.Max(-1, math.Min(1, sind(theta)*sind(e.deltaP)+cosd(theta)*cosd(e.deltaP)*cosd(dphi)))) / d2r
	return r3.Vec{X: cosd(delta) * cosd(alpha), Y: cosd(delta) * sind(alpha), Z: sind(delta)}
}

func randUnit(rng *rand.Rand) r3.Vec {
	for {
		v := r3.Vec{X: 2*rng.Float64() - 1, Y: 2*rng.Float64() - 1, Z: 2*rng.Float64() - 1}
		if n := r3.Norm(v); n > 0.1 && n <= 1 {
			return r3.Scale(1/n, v)
		}
	}
}

// headerOf writes the WCS cards through WriteFITS and reads them back, so
// the test also covers their formatting.
func headerOf(t *testing.T, cards []Card) FITSHeader {
	t.Helper()
	var buf bytes.Buffer
	if err := WriteFITS(&buf, 1, 1, make([]float32, 3), cards); err != nil {
		t.Fatal(err)
	}
	hdr, err := ReadFITSHeader(&buf)
	if err != nil {
		t.Fatal(err)
	}
	return hdr
}

// TestWCSMatchesProjection is the key check: for random orientations
// (with roll, and tilt for the fisheye) and random directions, the pixel
// that camera.Projection.Forward gives must map back through the header's
// WCS, evaluated independently from Greisen & Calabretta (2002) and
// Calabretta & Greisen (2002) [pub], to the same direction. The error is
// measured in pixels by projecting the WCS direction again with Forward; a
// correct header leaves only float64 round-off, ~1e-9 px [cp], so the
// tolerance 1e-5 px is far below the 0.5 px that would still be usable.
func TestWCSMatchesProjection(t *testing.T) {
	type config struct {
		kind        camera.Kind
		w, h        int
		fov, tilt   float64
		description string
	}
	rng := rand.New(rand.NewPCG(2002, 1077))
	var configs []config
	trials := 40
	if testing.Short() {
		trials = 10
	}
	for range trials {
		configs = append(configs,
			config{kind: camera.Pinhole, w: 200 + rng.IntN(4000), h: 200 + rng.IntN(3000), fov: 5 + 140*rng.Float64()},
			config{kind: camera.Fisheye, w: 200 + rng.IntN(4000), h: 200 + rng.IntN(3000), fov: 30 + 330*rng.Float64(), tilt: 120*rng.Float64() - 60},
		)
		h := 100 + rng.IntN(2000)
		configs = append(configs, config{kind: camera.Equirect, w: 2 * h, h: h})
	}
	// Fixed cases: north up on the equator (native and celestial poles
	// coincide for CAR), looking at either celestial pole, rolled.
	type axis struct {
		fwd, up r3.Vec
		roll    float64
	}
	axes := []axis{
		{r3.Vec{X: 1}, r3.Vec{Z: 1}, 0},
		{r3.Vec{X: -1, Y: 1}, r3.Vec{Z: -1}, 0},
		{r3.Vec{Z: 1}, r3.Vec{X: 1}, 0},
		{r3.Vec{Z: -1}, r3.Vec{Y: 1}, 33},
		{r3.Vec{Y: 1}, r3.Vec{Z: 1}, 90},
		{r3.Vec{X: 1, Z: 1}, r3.Vec{Y: 1}, 0},
		{r3.Vec{X: -1, Y: 1, Z: 1e-7}, r3.Vec{Z: 1}, 90},
	}
	for _, k := range []camera.Kind{camera.Pinhole, camera.Fisheye, camera.Equirect} {
		for i := range axes {
			c := config{kind: k, w: 1024, h: 512, fov: 90, description: fmt.Sprint(i)}
			if k == camera.Fisheye {
				c.tilt = 10 * float64(i)
			}
			configs = append(configs, c)
		}
	}
	worst := map[camera.Kind]float64{}
	// TAN and ARC leave only float64 round-off, ~1e-11 px [cp]. CAR loses
	// more where the native pole is near the celestial equator: Paper II
	// eq. (9) then takes acos of a number within rounding of 1, which
	// costs √ε ≈ 1.5e-8 rad in δp in any reader [cp: acos conditioning];
	// 1e-4 px covers that for images up to a few thousand pixels wide.
	tolPx := map[camera.Kind]float64{camera.Pinhole: 1e-8, camera.Fisheye: 1e-8, camera.Equirect: 1e-4}
	for ci, c := range configs {
		var o camera.Orientation
		var err error
		if c.description != "" {
			a := axes[c.description[0]-'0']
			o, err = camera.LookAt(a.fwd, a.up, a.roll)
			if err != nil {
				t.Fatal(err)
			}
		} else {
			o, err = camera.LookAt(randUnit(rng), randUnit(rng), 360*rng.Float64()-180)
			if err != nil {
				continue // forward parallel to up
			}
		}
		p := camera.Projection{Kind: c.kind, Width: c.w, Height: c.h, FOV: c.fov, Tilt: c.tilt, Orient: o}
		if err := p.Validate(); err != nil {
			t.Fatalf("config %d %+v: %v", ci, p, err)
		}
		cards, err := WCSCards(p)
		if err != nil {
			t.Fatalf("config %d %v: %v", ci, c.kind, err)
		}
		ev, err := newWCSEval(headerOf(t, cards))
		if err != nil {
			t.Fatalf("config %d %v: evaluating WCS: %v\n%v", ci, c.kind, err, cards)
		}
		n := 0
		axis := p.CentreOrientation().Forward
		for tries := 0; n < 100 && tries < 20000; tries++ {
			d := randUnit(rng)
			if tries%2 == 1 { // near the image centre, for narrow fields
				spread := math.Tan(math.Min(80, p.FieldOfView()*0.6) * d2r)
				d = r3.Unit(r3.Add(axis, r3.Scale(spread*rng.Float64(), randUnit(rng))))
			}
			x, y, ok := p.Forward(d)
			if !ok || x < 0 || y < 0 || x > float64(c.w) || y > float64(c.h) {
				continue
			}
			if c.kind == camera.Fisheye && math.Hypot(x-float64(c.w)/2, y-float64(c.h)/2) > float64(min(c.w, c.h))/2 {
				continue // outside the fisheye circle
			}
			n++
			v := ev.world(x+0.5, float64(c.h)-y+0.5)
			x2, y2, ok := p.Forward(v)
			if !ok {
				t.Fatalf("config %d %v: WCS direction %v of pixel (%g,%g) is not projectable", ci, c.kind, v, x, y)
			}
			dx := x2 - x
			if c.kind == camera.Equirect { // the seam at ±180°
				dx = math.Remainder(dx, float64(c.w))
			}
			errPx := math.Hypot(dx, y2-y)
			if errPx > worst[c.kind] {
				worst[c.kind] = errPx
			}
			if errPx > tolPx[c.kind] {
				ang := math.Atan2(r3.Norm(r3.Cross(d, v)), r3.Dot(d, v)) / d2r
				t.Fatalf("config %d %v %d×%d fov %g tilt %g: pixel (%.6f, %.6f) → WCS → (%.6f, %.6f): %.3g px, %.3g deg off\nheader:\n%v",
					ci, c.kind, c.w, c.h, c.fov, c.tilt, x, y, x2, y2, errPx, ang, cardLines(cards))
			}
		}
		if n < 10 {
			t.Fatalf("config %d %v: only %d directions landed in the image", ci, c.kind, n)
		}
	}
	for k, v := range worst {
		t.Logf("%v: worst WCS round-trip error %.2g px", k, v)
	}
}

func cardLines(c []Card) string {
	var sb strings.Builder
	for _, x := range c {
		fmt.Fprintf(&sb, "  %-8s = %v\n", x.Key, x.Value)
	}
	return sb.String()
}

// TestWCSConventions checks the orientation keywords of an unrolled camera
// looking at RA 0, Dec 0 with north up against the usual sky-image
// convention (east to the left, north up: CDELT1 < 0 < CDELT2 with PC = 1)
// [pub: Calabretta & Greisen 2002 §5 figures; Greisen & Calabretta 2002].
func TestWCSConventions(t *testing.T) {
	o, err := camera.LookAt(r3.Vec{X: 1}, r3.Vec{Z: 1}, 0)
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		kind   camera.Kind
		w, h   int
		fov    float64
		ctype1 string
		cdelt  float64 // |CDELT| in degrees per pixel
	}{
		// TAN: scale (180/π)/f, f = (W/2)/tan(FOV/2) = 500/tan 45° = 500 px [pub Paper II eq. 54].
		{camera.Pinhole, 1000, 600, 90, "RA---TAN", 180 / math.Pi / 500},
		// ARC: FOV over the circle diameter min(W, H): 180°/600 px [contract].
		{camera.Fisheye, 1000, 600, 180, "RA---ARC", 0.3},
		// CAR: 360° over W [contract].
		{camera.Equirect, 1000, 500, 0, "RA---CAR", 0.36},
	} {
		p := camera.Projection{Kind: tc.kind, Width: tc.w, Height: tc.h, FOV: tc.fov, Orient: o}
		cards, err := WCSCards(p)
		if err != nil {
			t.Fatal(err)
		}
		h := headerOf(t, cards)
		want := map[string]float64{
			"CRPIX1": float64(tc.w)/2 + 0.5, "CRPIX2": float64(tc.h)/2 + 0.5,
			"CRVAL1": 0, "CRVAL2": 0, "CDELT1": -tc.cdelt, "CDELT2": tc.cdelt,
		}
		if tc.kind != camera.Equirect {
			want["PC1_1"], want["PC1_2"], want["PC2_1"], want["PC2_2"], want["LONPOLE"] = 1, 0, 0, 1, 180
		} else {
			want["LATPOLE"] = 90
		}
		for k, v := range want {
			have, err := h.Float(k)
			if err != nil || math.Abs(have-v) > 1e-12*math.Max(1, math.Abs(v)) {
				t.Errorf("%v %s: have %v (%v), want %v", tc.kind, k, have, err, v)
			}
		}
		for k, v := range map[string]string{"CTYPE1": tc.ctype1, "CTYPE2": "DEC--" + tc.ctype1[5:], "RADESYS": "ICRS", "CUNIT1": "deg"} {
			if have, _ := h.String(k); have != v {
				t.Errorf("%v %s: have %q, want %q", tc.kind, k, have, v)
			}
		}
	}
	if _, err := WCSCards(camera.Projection{Kind: camera.Cube, Width: 600, Height: 100, Orient: o}); !errors.Is(err, ErrNoWCS) {
		t.Errorf("cube: have %v, want %v", err, ErrNoWCS)
	}
}

// The WCS of a 1000×600 pinhole frame with a 90° horizontal field, looking
// at RA 0°, Dec 0° with north up: east (+RA) to the left, so CDELT1 < 0.
func ExampleWCSCards() {
	p := camera.Projection{Kind: camera.Pinhole, Width: 1000, Height: 600, FOV: 90,
		Orient: camera.DefaultOrientation()}
	cards, err := WCSCards(p)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, c := range cards {
		switch c.Key {
		case "CTYPE1", "CTYPE2", "CRPIX1", "CRPIX2", "CRVAL1", "CRVAL2", "CDELT1", "CDELT2", "PC1_1", "PC1_2", "LONPOLE":
			fmt.Printf("%-8s %v\n", c.Key, c.Value)
		}
	}
	// Output:
	// CTYPE1   RA---TAN
	// CTYPE2   DEC--TAN
	// CRPIX1   500.5
	// CRPIX2   300.5
	// CRVAL1   0
	// CRVAL2   0
	// CDELT1   -0.11459155902616465
	// CDELT2   0.11459155902616465
	// PC1_1    1
	// PC1_2    0
	// LONPOLE  180
}
