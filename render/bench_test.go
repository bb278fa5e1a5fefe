package render

import (
	"io"
	"math"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/imgfile"
)

// BenchmarkTransform measures the per-star boost + photometry loop (phase 1
// of Render) over 10⁶ seeded random stars on one goroutine.
func BenchmarkTransform(b *testing.B) {
	stars := randomStars(1_000_000, -1, 12, 11)
	p, err := Prepare(stars)
	if err != nil {
		b.Fatal(err)
	}
	opt := Options{Projection: proj(b, camera.Fisheye, 4096, 4096), Observer: observer(b, r3.Unit(r3.Vec{X: 1, Y: 1}), 0.9),
		Limit: math.Inf(1), Brightest: DefaultBrightest, FWHM: DefaultFWHM}
	if err := opt.Projection.Prepare(); err != nil {
		b.Fatal(err)
	}
	psf, _ := NewPSF(DefaultFWHM)
	recs := make([]splatRec, chunkSize)
	tr := newTransformer(p, &opt, &psf, ExposureScale(0))
	n := stars.Len()
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		for lo := 0; lo < n; lo += chunkSize {
			var res chunkResult
			tr.run(lo, min(lo+chunkSize, n), recs, &res)
		}
	}
	b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds()/1e6, "Mstars/s")
}

// BenchmarkPhotometry measures the per-star transform alone, on one
// goroutine: direction and dilution from the observer, the boost, the
// table sample at T′ = D·T, V′, and the observed XYZ in lux.
func BenchmarkPhotometry(b *testing.B) {
	stars := randomStars(1_000_000, -1, 12, 11)
	p, err := Prepare(stars)
	if err != nil {
		b.Fatal(err)
	}
	opt := Options{Observer: observer(b, r3.Unit(r3.Vec{X: 1, Y: 1}), 0.9), Limit: 10}
	tr := newTransformer(p, &opt, nil, 1)
	n := stars.Len()
	var sink float64
	b.ReportAllocs()
	for b.Loop() {
		for lo := 0; lo < n; lo += blockSize {
			m := min(blockSize, n-lo)
			tr.geometry(lo, m, &tr.geom)
			tr.photometry(lo, m, &tr.geom)
			g := &tr.geom
			for j := 0; j < m; j++ {
				// Observed XYZ in lux: ln Y′ = ln W′ + LnY(T′).
				xl, yl, zl := tristimulus(g.lnW[j]+g.lnY[j], g.cx[j], g.cy[j])
				sink += g.vObs[j] + xl + yl + zl
			}
		}
	}
	b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds()/1e6, "Mstars/s")
	if math.IsNaN(sink) {
		b.Log(sink)
	}
}

func benchRender(b *testing.B, kind camera.Kind, w, h, n int) {
	if testing.Short() {
		n /= 10
	}
	stars := randomStars(n, -1, 12, 13)
	p, err := Prepare(stars)
	if err != nil {
		b.Fatal(err)
	}
	opt := Options{Projection: proj(b, kind, w, h), Observer: observer(b, r3.Unit(r3.Vec{X: 1, Y: 1}), 0.9), Exposure: 4}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := p.Render(opt); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkRenderFisheye4096(b *testing.B) { benchRender(b, camera.Fisheye, 4096, 4096, 1_000_000) }

// BenchmarkFrameFisheye4096PNG is the whole frame: render 10⁶ stars into a
// 4096² fisheye, tone-map and encode to 8-bit sRGB, and write the PNG.
func BenchmarkFrameFisheye4096PNG(b *testing.B) {
	n := 1_000_000
	if testing.Short() {
		n /= 10
	}
	p, err := Prepare(randomStars(n, -1, 12, 13))
	if err != nil {
		b.Fatal(err)
	}
	opt := Options{Projection: proj(b, camera.Fisheye, 4096, 4096), Observer: observer(b, r3.Unit(r3.Vec{X: 1, Y: 1}), 0.9), Exposure: 4}
	b.ReportAllocs()
	for b.Loop() {
		f, err := p.Render(opt)
		if err != nil {
			b.Fatal(err)
		}
		if err := imgfile.WritePNG(io.Discard, f.ToNRGBA(ToneShoulder), nil); err != nil {
			b.Fatal(err)
		}
	}
}
func BenchmarkRenderPinhole1080(b *testing.B) { benchRender(b, camera.Pinhole, 1920, 1080, 1_000_000) }
