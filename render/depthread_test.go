package render

import (
	"bytes"
	"context"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"reflect"
	"testing"

	"gonum.org/v1/gonum/spatial/r3"
	"pgregory.net/rapid"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/catalog"
)

// sortedCache writes s in canonical order (catalog.SortByV) to a cache
// file and returns its path and the sorted stars.
func sortedCache(t interface{ Fatal(...any) }, dir string, s *catalog.Stars) (string, *catalog.Stars) {
	u := catalog.SortByV(s)
	var b bytes.Buffer
	if err := catalog.WriteCache(&b, u); err != nil {
		t.Fatal(err)
	}
	p := filepath.Join(dir, "sky.skyfcat")
	if err := os.WriteFile(p, b.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	return p, u
}

// mixedSky draws n stars: uniform directions, V uniform in [vmin, vmax],
// Teff log-uniform in 2 000 … 40 000 K, distances log-uniform in 6 … 2 000
// pc (one in four without one).
func mixedSky(rng *rand.Rand, n int, vmin, vmax float64) *catalog.Stars {
	s := &catalog.Stars{Epoch: 2000, Source: "mixed", Format: "test"}
	for i := 0; i < n; i++ {
		z := 2*rng.Float64() - 1
		phi := 2 * math.Pi * rng.Float64()
		st := catalog.Star{ID: int64(i + 1), RA: phi * 180 / math.Pi, Dec: math.Asin(z) * 180 / math.Pi,
			Vmag: vmin + (vmax-vmin)*rng.Float64(), BV: math.NaN(), RV: math.NaN(),
			Teff: 2000 * math.Pow(20, rng.Float64()), Dist: 6 * math.Pow(2000.0/6, rng.Float64())}
		if i%4 == 0 {
			st.Dist = math.Inf(1)
			st.Flags = catalog.FlagNoDistance
		}
		s.Append(st)
	}
	return s
}

// TestDepthBinsNeverSkipsADrawnStar is the property test of the magnitude
// index: for random catalogues, speeds, directions, projections, exposures
// and observer positions, the rows DepthBins leaves unread draw nothing
// (rendered alone: no star drawn, none culled for a disc or the observer
// inside it), and the frame from the bins it reads is the frame from the
// whole sorted cache bit for bit (pixels, Doppler channel, brightest
// stars, drawn count).
func TestDepthBinsNeverSkipsADrawnStar(t *testing.T) {
	dir := t.TempDir()
	kinds := []camera.Kind{camera.Fisheye, camera.Equirect, camera.Pinhole}
	rapid.Check(t, func(rt *rapid.T) {
		seed := rapid.Uint64().Draw(rt, "seed")
		rng := rand.New(rand.NewPCG(seed, 11))
		beta := rapid.Float64Range(0, 0.995).Draw(rt, "beta")
		exposure := rapid.Float64Range(-4, 8).Draw(rt, "exposure")
		kind := kinds[rapid.IntRange(0, len(kinds)-1).Draw(rt, "kind")]
		far := rapid.Float64Range(0, 5.9).Draw(rt, "position") // pc, inside the nearest star's 6 pc
		dir3 := r3.Unit(r3.Vec{X: rng.NormFloat64(), Y: rng.NormFloat64(), Z: rng.NormFloat64()})
		b, err := camera.NewBoost(dir3, beta)
		if err != nil {
			rt.Fatal(err)
		}
		look := r3.Unit(r3.Vec{X: rng.NormFloat64(), Y: rng.NormFloat64(), Z: rng.NormFloat64()})
		up := r3.Unit(r3.Cross(look, r3.Vec{X: 0.3, Y: 1, Z: 0.2}))
		o, err := camera.LookAt(look, up, 0)
		if err != nil {
			rt.Fatal(err)
		}
		opt := Options{Projection: camera.Projection{Kind: kind, Width: 96, Height: 64, Orient: o},
			Observer: camera.Observer{Boost: b, Position: r3.Scale(far, dir3)}, Exposure: exposure, Doppler: true, Workers: 2}
		if kind == camera.Fisheye {
			opt.Projection.Height = 96
		}
		if kind == camera.Pinhole {
			opt.Projection.FOV = 70
		}
		// Stars from far brighter to far fainter than the frame's limit.
		lim := exposure + DefaultLimitOffset
		s := mixedSky(rng, 1500, lim-12, lim+12)
		path, sorted := sortedCache(rt, dir, s)
		cr, err := catalog.OpenChunks(path, 97)
		if err != nil {
			rt.Fatal(err)
		}
		defer cr.Close()
		x := cr.Index()
		bins, err := DepthBins(opt, x)
		if err != nil {
			rt.Fatal(err)
		}
		keep := int(x.Offsets[bins])
		full, err := RenderStream(Chunks(sorted, 97), opt)
		if err != nil {
			if _, inside := err.(*InsideStarError); inside {
				rt.Skip("observer inside a star")
			}
			rt.Fatal(err)
		}
		if keep < sorted.Len() {
			tail, err := RenderStream(Chunks(sorted.Slice(keep, sorted.Len()), 97), opt)
			if err != nil {
				rt.Fatalf("the unread rows alone: %v", err)
			}
			if tail.Stats.Drawn != 0 {
				rt.Fatalf("%d of the %d unread stars (V ≥ %.2f) are drawn", tail.Stats.Drawn, sorted.Len()-keep, x.Lower(bins))
			}
		}
		part, err := RenderChunks(context.Background(), cr, opt)
		if err != nil {
			rt.Fatal(err)
		}
		if !reflect.DeepEqual(part.Pix, full.Pix) || !reflect.DeepEqual(part.Doppler, full.Doppler) {
			rt.Fatalf("pixels differ between the depth-limited (%d of %d rows) and the full read", keep, sorted.Len())
		}
		if part.Stats.Drawn != full.Stats.Drawn || part.Stats.Total != full.Stats.Total || !reflect.DeepEqual(part.Stats.Brightest, full.Stats.Brightest) {
			rt.Fatalf("stats differ: %+v vs %+v", part.Stats, full.Stats)
		}
	})
}

// TestDepthBinsReadsLess: for a still frame from the Sun at rest with the
// naked-eye preset, a catalogue reaching 8 magnitudes past the limit is
// read only to about the limit (plus the bound's margin and one bin).
func TestDepthBinsReadsLess(t *testing.T) {
	s := mixedSky(rand.New(rand.NewPCG(1, 2)), 2000, -1, 14.5)
	path, _ := sortedCache(t, t.TempDir(), s)
	cr, err := catalog.OpenChunks(path, 0)
	if err != nil {
		t.Fatal(err)
	}
	defer cr.Close()
	opt := Options{Projection: proj(t, camera.Fisheye, 128, 128), Exposure: NakedEyeExposure()}
	bins, err := DepthBins(opt, cr.Index())
	if err != nil {
		t.Fatal(err)
	}
	// At rest (D = 1) the brightening is 0: the bound is the limit.
	lim := opt.Exposure + DefaultLimitOffset
	if lo := cr.Index().Lower(bins); lo < lim || lo > lim+depthMargin+2*catalog.MagStep {
		t.Errorf("reads up to V = %.3f, want just past the limit %.3f", lo, lim)
	}
}
