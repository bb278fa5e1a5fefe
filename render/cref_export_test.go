package render

import (
	"bufio"
	"encoding/binary"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strconv"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/spectrum"
)

// Inputs of the C reference renderer in bench/cref (see its README):
// TestExportCRef writes them, and Go's own frame of the same job, when
// SKYFRAME_CREF_DIR names a directory (SKYFRAME_CREF_N sets the star
// count, default 10⁷; SKYFRAME_CREF_CACHE=FILE also writes the catalogue
// as a cache file); otherwise it skips. The job is
// BenchmarkScaleFisheye4096's: scaleSky(n) into a 4096² fisheye at 0.5 c.
//
// Files, little-endian:
//   - stars.bin: n float32 of each column in turn: X, Y, Z, Dist, V, Teff;
//   - params.bin: float64 values in the order of crefParams;
//   - table.bin: for nodes ln T = t0 + i·h, i < count (params), the float64
//     quadruple ln Y, ln V, x, y from spectrum.Lookup;
//   - go_frame.f32: the Go frame's linear RGB buffer, W·H·3 float32.
const (
	crefTableLnT0 = 6.9  // ln 992 K, below D·T of the coolest star
	crefTableLnT1 = 11.6 // ln 109 000 K, above D·T of the hottest
	crefTableStep = 1.0 / 4096
)

func TestExportCRef(t *testing.T) {
	dir := os.Getenv("SKYFRAME_CREF_DIR")
	if dir == "" {
		t.Skip("set SKYFRAME_CREF_DIR to export the C reference's inputs (bench/cref/README.md)")
	}
	n := 10_000_000
	if s := os.Getenv("SKYFRAME_CREF_N"); s != "" {
		v, err := strconv.Atoi(s)
		if err != nil || v < 1 {
			t.Fatalf("SKYFRAME_CREF_N=%q: want a positive integer", s)
		}
		n = v
	}
	stars := scaleSky(n)
	opt := scaleOptions(t, camera.Fisheye, 4096, 4096)
	ropt, psf, _, err := resolveOptions(opt)
	if err != nil {
		t.Fatal(err)
	}
	w, h := float64(opt.Projection.Width), float64(opt.Projection.Height)

	// The boost's constants and the fisheye's frame, checked against the
	// camera package on random directions so the C code's formulas are
	// the same maps.
	beta := 0.5
	bdir := r3.Unit(r3.Vec{X: 1, Y: 1})
	gamma := 1 / math.Sqrt(1-beta*beta)
	o := opt.Projection.Orient
	k := math.Min(w, h) / 2 / (math.Pi / 2)
	cx, cy := w/2, h/2
	rng := rand.New(rand.NewPCG(7, 8))
	for i := 0; i < 1000; i++ {
		u := r3.Unit(r3.Vec{X: rng.NormFloat64(), Y: rng.NormFloat64(), Z: rng.NormFloat64()})
		nb, d := opt.Observer.Boost.Apply(u)
		if want := gamma * (1 + beta*r3.Dot(u, bdir)); math.Abs(d-want) > 1e-12 {
			t.Fatalf("boost: D %v, formula %v", d, want)
		}
		a, b, c := r3.Dot(o.Forward, nb), r3.Dot(o.Right, nb), r3.Dot(o.Up, nb)
		s := math.Hypot(b, c)
		rho := k * math.Atan2(s, a) / s
		x, y, ok := opt.Projection.Forward(nb)
		if ok && (math.Abs(x-(cx+rho*b)) > 1e-9 || math.Abs(y-(cy-rho*c)) > 1e-9) {
			t.Fatalf("fisheye: (%v, %v), formula (%v, %v)", x, y, cx+rho*b, cy-rho*c)
		}
	}
	// The XYZ → linear sRGB matrix, column by column.
	var m [9]float64
	for j := 0; j < 3; j++ {
		var xyz [3]float64
		xyz[j] = 1
		r, g, b := spectrum.XYZToLinearSRGB(xyz[0], xyz[1], xyz[2], ropt.Color)
		m[0*3+j], m[1*3+j], m[2*3+j] = r, g, b
	}
	nTab := int(math.Ceil((crefTableLnT1-crefTableLnT0)/crefTableStep)) + 1
	params := []float64{
		float64(n), w, h,
		bdir.X, bdir.Y, bdir.Z, 1 - beta, beta, gamma, 1 / gamma,
		o.Forward.X, o.Forward.Y, o.Forward.Z, o.Right.X, o.Right.Y, o.Right.Z, o.Up.X, o.Up.Y, o.Up.Z,
		k, cx, cy, math.Min(w, h) / 2, psf.Radius() + 1,
		math.Log(ExposureScale(ropt.Exposure)), ropt.Limit, float64(ropt.Beaming.FluxExponent() - 4),
		math.Log(spectrum.V0FluxLambda), 0.4 * math.Ln10,
		m[0], m[1], m[2], m[3], m[4], m[5], m[6], m[7], m[8],
		psf.Sigma(), psf.Radius(),
		crefTableLnT0, crefTableStep, float64(nTab),
		spectrum.LumR, spectrum.LumG, spectrum.LumB,
	}
	write := func(name string, fn func(w *bufio.Writer) error) {
		if !filepath.IsAbs(name) {
			name = filepath.Join(dir, name)
		}
		fh, err := os.Create(name)
		if err != nil {
			t.Fatal(err)
		}
		bw := bufio.NewWriterSize(fh, 1<<20)
		if err := fn(bw); err != nil {
			t.Fatal(err)
		}
		if err := bw.Flush(); err != nil {
			t.Fatal(err)
		}
		if err := fh.Close(); err != nil {
			t.Fatal(err)
		}
	}
	write("params.bin", func(w *bufio.Writer) error { return binary.Write(w, binary.LittleEndian, params) })
	write("stars.bin", func(w *bufio.Writer) error {
		for _, col := range [][]float32{stars.X, stars.Y, stars.Z, stars.Dist, stars.Vmag, stars.Teff} {
			if err := binary.Write(w, binary.LittleEndian, col); err != nil {
				return err
			}
		}
		return nil
	})
	write("table.bin", func(w *bufio.Writer) error {
		tab := make([]float64, 0, 4*nTab)
		for i := 0; i < nTab; i++ {
			s := spectrum.Lookup(crefTableLnT0 + float64(i)*crefTableStep)
			tab = append(tab, s.LnY, s.LnV, s.X, s.Y)
		}
		return binary.Write(w, binary.LittleEndian, tab)
	})
	if path := os.Getenv("SKYFRAME_CREF_CACHE"); path != "" {
		// The same catalogue as a cache file, for timing `skyframe still`.
		write(path, func(w *bufio.Writer) error { return catalog.WriteCache(w, stars) })
	}
	f, err := Render(stars, opt)
	if err != nil {
		t.Fatal(err)
	}
	if len(f.Stats.Brightest) > 0 && f.Stats.Invalid+f.Stats.Drawn+f.Stats.Culled+f.Stats.OffFrame != n {
		t.Fatalf("stats do not add up: %+v", f.Stats)
	}
	write("go_frame.f32", func(w *bufio.Writer) error { return binary.Write(w, binary.LittleEndian, f.Pix) })
	t.Logf("%d stars: drawn %d, culled %d, off frame %d, invalid %d", n, f.Stats.Drawn, f.Stats.Culled, f.Stats.OffFrame, f.Stats.Invalid)
}
