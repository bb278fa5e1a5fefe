package render

import (
	"testing"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
)

// Benchmarks of the star path's per-star loops after the transform
// (BenchmarkTransform), on one goroutine, for the scale sky's 10⁶ stars
// (scaleSky) in the 4096² fisheye of BenchmarkScaleFisheye4096: binning
// the splat records into tiles and adding the tiles into the frame.
// Metrics: ns per drawn star (rec).

// starBenchSetup transforms the stars once and returns the records, the
// chunk results and what the later phases need.
func starBenchSetup(b *testing.B) ([]splatRec, []chunkResult, *grid, *PSF, *Buffer, int) {
	b.Helper()
	n := 1_000_000
	stars := scaleSky(n)
	opt := Options{Projection: proj(b, camera.Fisheye, 4096, 4096), Observer: observer(b, r3.Unit(r3.Vec{X: 1, Y: 1}), 0.5), Exposure: 6}
	opt, psf, _, err := resolveOptions(opt)
	if err != nil {
		b.Fatal(err)
	}
	p := &Prepared{}
	if err := prepareInto(p, stars, 1, true); err != nil {
		b.Fatal(err)
	}
	recs := make([]splatRec, n)
	chunks := make([]chunkResult, (n+chunkSize-1)/chunkSize)
	drawn := 0
	for c := range chunks {
		lo := c * chunkSize
		hi := min(lo+chunkSize, n)
		t := newTransformer(p, &opt, &psf, ExposureScale(opt.Exposure))
		t.run(lo, hi, recs[lo:hi], &chunks[c])
		drawn += chunks[c].n
	}
	buf, err := NewBuffer(4096, 4096, false)
	if err != nil {
		b.Fatal(err)
	}
	g := newGrid(buf.W, buf.H, psf.Radius(), opt.Projection.Kind)
	return recs, chunks, g, &psf, buf, drawn
}

// BenchmarkStarBin bins 10⁶ stars' records into tiles (grid.binAll).
func BenchmarkStarBin(b *testing.B) {
	recs, chunks, g, _, _, drawn := starBenchSetup(b)
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		g.binAll(recs, chunks, 1)
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(drawn), "ns/rec")
}

// BenchmarkStarAddTiles adds 10⁶ stars' binned records into the frame
// (addTiles); the frame is not cleared between iterations.
func BenchmarkStarAddTiles(b *testing.B) {
	recs, chunks, g, psf, buf, drawn := starBenchSetup(b)
	g.binAll(recs, chunks, 1)
	addTiles(buf, g, psf, 1)
	b.ReportAllocs()
	b.ResetTimer()
	for b.Loop() {
		addTiles(buf, g, psf, 1)
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(drawn), "ns/rec")
}
