package render

// Scale benchmarks: how the cost of a frame grows with the number of stars
// and the image size. Run them all with
//
//	go test -run '^$' -bench 'Scale' -benchtime 3x ./render/
//
// (-short drops the 10⁷-star cases). Related benchmarks elsewhere: the
// per-star transform BenchmarkTransform and BenchmarkPhotometry (this
// package), camera.BenchmarkSeeBatch1e6 and BenchmarkApplyBatch1e6, PNG
// and FITS encoding imgfile.BenchmarkWritePNG8 and BenchmarkWriteFITS,
// catalogue loading catalog.BenchmarkCacheLoad10M and
// BenchmarkOpenCache1M.
//
// Metrics: Mstars/s is catalogue stars per second of wall time; CPU-s/op
// the process's CPU time per frame (user + system, getrusage); peak-B/star
// is the peak Go heap during one frame, above what was allocated before
// it, plus the catalogue's own columns (37 B/star), minus the frame
// buffers (reported as frame-MB: the float32 image, and for the stream
// also its float64 accumulator), per catalogue star.

import (
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"runtime"
	"runtime/metrics"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/catalog"
)

var scaleSkies sync.Map // n → *catalog.Stars

// scaleSky returns n seeded stars uniform on the sphere with a power-law
// magnitude distribution dN/dV ∝ 10^(0.4 V) on [−1.5, 16] (the slope of
// star counts at faint magnitudes is 0.3–0.6 per magnitude in log N [cp]),
// temperatures log-uniform in 2500–40 000 K, and two stars in three at a
// distance of 1–2000 pc. It is built once per n and shared.
func scaleSky(n int) *catalog.Stars {
	if s, ok := scaleSkies.Load(n); ok {
		return s.(*catalog.Stars)
	}
	rng := rand.New(rand.NewPCG(uint64(n), 0x5ca1e))
	s := &catalog.Stars{Epoch: 2000, Source: "scale", Format: "in-code",
		ID: make([]int64, n), X: make([]float32, n), Y: make([]float32, n), Z: make([]float32, n),
		Dist: make([]float32, n), Vmag: make([]float32, n), Teff: make([]float32, n), BV: make([]float32, n),
		Flags: make([]catalog.Flag, n)}
	const k = 0.4 * math.Ln10
	lo, hi := math.Exp(k*-1.5), math.Exp(k*16)
	for i := 0; i < n; i++ {
		z := 2*rng.Float64() - 1
		phi := 2 * math.Pi * rng.Float64()
		rho := math.Sqrt(1 - z*z)
		s.ID[i] = int64(i + 1)
		s.X[i], s.Y[i], s.Z[i] = float32(rho*math.Cos(phi)), float32(rho*math.Sin(phi)), float32(z)
		s.Dist[i] = float32(math.Inf(1))
		if i%3 != 0 {
			s.Dist[i] = float32(1 + 2000*rng.Float64())
		}
		s.Vmag[i] = float32(math.Log(lo+(hi-lo)*rng.Float64()) / k)
		s.Teff[i] = float32(2500 * math.Exp(math.Log(16)*rng.Float64()))
		s.BV[i] = float32(math.NaN())
	}
	scaleSkies.Store(n, s)
	return s
}

// heapObjects reads the bytes of heap objects, live or not yet swept
// (runtime/metrics, the HeapAlloc of runtime.MemStats, without stopping
// the world as ReadMemStats does).
func heapObjects(s []metrics.Sample) uint64 {
	metrics.Read(s)
	return s[0].Value.Uint64()
}

// peakHeap samples the heap every 2 ms while fn runs and returns the peak
// above the value before fn (after a GC).
func peakHeap(fn func()) uint64 {
	runtime.GC()
	s := []metrics.Sample{{Name: "/memory/classes/heap/objects:bytes"}}
	base := heapObjects(s)
	var peak atomic.Uint64
	peak.Store(base)
	done := make(chan struct{})
	var wg sync.WaitGroup
	wg.Go(func() {
		t := time.NewTicker(2 * time.Millisecond)
		defer t.Stop()
		s := []metrics.Sample{{Name: "/memory/classes/heap/objects:bytes"}}
		for {
			select {
			case <-done:
				return
			case <-t.C:
				if h := heapObjects(s); h > peak.Load() {
					peak.Store(h)
				}
			}
		}
	})
	fn()
	end := heapObjects(s)
	close(done)
	wg.Wait()
	return max(peak.Load(), end) - base
}

func scaleOptions(b testing.TB, kind camera.Kind, w, h int) Options {
	return Options{Projection: proj(b, kind, w, h), Observer: observer(b, r3.Unit(r3.Vec{X: 1, Y: 1}), 0.5), Exposure: 6}
}

var scaleSizes = []int{100_000, 1_000_000, 10_000_000}

// benchScale renders n stars with render (in memory or streamed) and
// reports throughput and memory per star.
func benchScale(b *testing.B, kind camera.Kind, w, h int, stream bool) {
	benchScaleInto(b, kind, w, h, stream, false, false)
}

// benchScaleInto is benchScale, with reuse drawing every frame into one
// Frame (RenderInto, RenderStreamInto) instead of a new one; with
// freshBuffer that Frame gets a new pixel buffer each time and keeps
// only its working memory.
func benchScaleInto(b *testing.B, kind camera.Kind, w, h int, stream, reuse, freshBuffer bool) {
	for _, n := range scaleSizes {
		b.Run(fmt.Sprintf("n=%.0e", float64(n)), func(b *testing.B) {
			if n > 1_000_000 && testing.Short() {
				b.Skip("10⁷ stars: not under -short")
			}
			stars := scaleSky(n)
			opt := scaleOptions(b, kind, w, h)
			frame := float64(w * h * 12)
			run := func() (*Frame, error) { return Render(stars, opt) }
			rows := ChunkRows(opt, 0)
			if stream {
				run = func() (*Frame, error) { return RenderStream(Chunks(stars, rows), opt) }
			}
			if reuse {
				dst := new(Frame)
				run = func() (*Frame, error) {
					if freshBuffer {
						dst.Buffer = Buffer{}
					}
					if stream {
						return dst, RenderStreamInto(dst, Chunks(stars, rows), opt)
					}
					return dst, RenderInto(dst, stars, opt)
				}
				if _, err := run(); err != nil { // the frame to reuse
					b.Fatal(err)
				}
			}
			var peak uint64
			var cpu float64
			b.ReportAllocs()
			b.ResetTimer()
			for i := 0; i < b.N; i++ {
				var err error
				var f *Frame
				c0 := cpuSeconds()
				p := peakHeap(func() { f, err = run() })
				cpu += cpuSeconds() - c0
				if err != nil {
					b.Fatal(err)
				}
				if f.Stats.Drawn == 0 {
					b.Fatal("no star drawn")
				}
				peak = max(peak, p)
			}
			b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds()/1e6, "Mstars/s")
			b.ReportMetric(cpu/float64(b.N), "CPU-s/op")
			alloc := frame // allocated per frame unless reused
			if reuse && !freshBuffer {
				alloc = 0
			}
			b.ReportMetric((float64(peak)+37*float64(n)-alloc)/float64(n), "peak-B/star")
			b.ReportMetric(frame/1e6, "frame-MB")
		})
	}
}

// BenchmarkScaleFisheye4096 is a full 4096² fisheye frame (transform,
// projection, splat) from 10⁵, 10⁶ and 10⁷ stars with Render.
func BenchmarkScaleFisheye4096(b *testing.B) { benchScale(b, camera.Fisheye, 4096, 4096, false) }

// BenchmarkScaleFisheye4096Reuse is BenchmarkScaleFisheye4096 drawing
// every frame into the same Frame (RenderInto): the buffer is cleared,
// not allocated, and the working memory kept.
func BenchmarkScaleFisheye4096Reuse(b *testing.B) {
	benchScaleInto(b, camera.Fisheye, 4096, 4096, false, true, false)
}

// BenchmarkScaleFisheye4096FreshBuffer is BenchmarkScaleFisheye4096Reuse
// with a new pixel buffer for every frame (its first touch included) and
// the working memory kept: what the C reference's "fresh" mode does.
func BenchmarkScaleFisheye4096FreshBuffer(b *testing.B) {
	benchScaleInto(b, camera.Fisheye, 4096, 4096, false, true, true)
}

// BenchmarkScalePinhole1080 is the same for a 1920×1080 pinhole (60° wide).
func BenchmarkScalePinhole1080(b *testing.B) { benchScale(b, camera.Pinhole, 1920, 1080, false) }

// BenchmarkScaleStreamFisheye4096 renders the 4096² fisheye with
// RenderStream over in-memory chunks sized by ChunkRows for the default
// 1 GiB budget.
func BenchmarkScaleStreamFisheye4096(b *testing.B) { benchScale(b, camera.Fisheye, 4096, 4096, true) }

// BenchmarkScaleStreamPinhole1080 is the streamed 1920×1080 pinhole.
func BenchmarkScaleStreamPinhole1080(b *testing.B) { benchScale(b, camera.Pinhole, 1920, 1080, true) }

// BenchmarkScaleStreamFile1e7 renders 10⁷ stars from a cache file on disk
// with RenderCacheFile, the larger-than-memory path: the catalogue is never
// resident, so peak-B/star here excludes it (the 37 B/star term is not
// added).
func BenchmarkScaleStreamFile1e7(b *testing.B) {
	if testing.Short() {
		b.Skip("10⁷ stars: not under -short")
	}
	n := 10_000_000
	path := filepath.Join(b.TempDir(), "sky.skyc")
	fh, err := os.Create(path)
	if err != nil {
		b.Fatal(err)
	}
	if err := catalog.WriteCache(fh, scaleSky(n)); err != nil {
		b.Fatal(err)
	}
	if err := fh.Close(); err != nil {
		b.Fatal(err)
	}
	opt := scaleOptions(b, camera.Fisheye, 4096, 4096)
	frame := float64(4096 * 4096 * 12)
	var peak uint64
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		var err error
		peak = max(peak, peakHeap(func() { _, err = RenderCacheFile(path, opt, 0) }))
		if err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds()/1e6, "Mstars/s")
	b.ReportMetric((float64(peak)-frame)/float64(n), "peak-B/star")
	b.ReportMetric(frame/1e6, "frame-MB")
}

// BenchmarkScaleSynthetic11 renders the realistic synthetic sky to V = 11
// (about 816 000 stars) into the 4096² fisheye.
func BenchmarkScaleSynthetic11(b *testing.B) {
	stars := catalog.Synthetic(catalog.SynthOptions{MagLimit: 11})
	opt := scaleOptions(b, camera.Fisheye, 4096, 4096)
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := Render(stars, opt); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(stars.Len())*float64(b.N)/b.Elapsed().Seconds()/1e6, "Mstars/s")
}

var sumSink float32

// BenchmarkScaleSumColumns1e7 is the memory-bandwidth floor: one pass
// summing the seven float32 columns the renderer reads (X, Y, Z, Dist,
// Vmag, Teff, and BV for completeness) of 10⁷ stars, 280 MB, split over
// GOMAXPROCS goroutines. Each goroutine keeps eight independent sums so
// that the pass waits on memory, not on the latency of a chain of float
// additions (with one sum it measured the add latency: 41 ms instead of
// 15-22 ms). A frame cannot be faster than this.
func BenchmarkScaleSumColumns1e7(b *testing.B) {
	n := 10_000_000
	if testing.Short() {
		n = 1_000_000
	}
	s := scaleSky(n)
	cols := [][]float32{s.X, s.Y, s.Z, s.Dist, s.Vmag, s.Teff, s.BV}
	workers := runtime.GOMAXPROCS(0)
	part := make([]float32, workers)
	b.SetBytes(int64(4 * len(cols) * n))
	b.ReportAllocs()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		var wg sync.WaitGroup
		for w := 0; w < workers; w++ {
			wg.Go(func() {
				lo, hi := w*n/workers, (w+1)*n/workers
				var a [8]float32
				for _, c := range cols {
					c = c[lo:hi]
					k := 0
					for ; k+8 <= len(c); k += 8 {
						v := c[k : k+8 : k+8]
						a[0] += v[0]
						a[1] += v[1]
						a[2] += v[2]
						a[3] += v[3]
						a[4] += v[4]
						a[5] += v[5]
						a[6] += v[6]
						a[7] += v[7]
					}
					for ; k < len(c); k++ {
						a[0] += c[k]
					}
				}
				part[w] = a[0] + a[1] + a[2] + a[3] + a[4] + a[5] + a[6] + a[7]
			})
		}
		wg.Wait()
		for _, p := range part {
			sumSink += p
		}
	}
	b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds()/1e6, "Mstars/s")
}
