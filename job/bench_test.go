package job

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"syscall"
	"testing"

	"github.com/skyframe/skyframe/flight"
	"github.com/skyframe/skyframe/sky"
)

// cpuSeconds returns the process's user + system CPU time in seconds
// (getrusage), for the benchmarks' CPU-s/op metric.
func cpuSeconds() float64 {
	var u syscall.Rusage
	if syscall.Getrusage(syscall.RUSAGE_SELF, &u) != nil {
		return 0
	}
	return float64(u.Utime.Sec+u.Stime.Sec) + 1e-6*float64(u.Utime.Usec+u.Stime.Usec)
}

// benchLoad writes a plan of the built-in sky with the given [camera]
// lines and loads it. The ship starts 1 au from the Sun (as in
// samples/plan.toml) and cruises at 0.5 c toward RA 0, Dec 0, so frames
// show the unresolved light, the Sun and aberration.
func benchLoad(b testing.TB, camera string) *Job {
	b.Helper()
	return benchLoadOutput(b, camera, "")
}

// benchLoadOutput is benchLoad with more lines for the [output] table.
func benchLoadOutput(b testing.TB, camera, output string) *Job {
	b.Helper()
	dir := b.TempDir()
	plan := filepath.Join(dir, "plan.toml")
	body := "[start]\nposition = [-4.32735407e-06, -1.92213901e-06, 1.04106624e-06]\nspeed = 0.5\nra = 0\ndec = 0\n" +
		"[[leg]]\nkind = \"cruise\"\nship_years = 1\nspeed = 0.5\nra = 0\ndec = 0\n" +
		"[show]\nfps = 30\nseconds = 2\n[camera]\n" + camera + "\n[output]\ndir = \"out\"\n" + output + "\n"
	if err := os.WriteFile(plan, []byte(body), 0o644); err != nil {
		b.Fatal(err)
	}
	j, _, err := Load(context.Background(), plan, LoadOptions{Preview: 1, Every: 1, Maps: &sky.UnresolvedMaps{}})
	if err != nil {
		b.Fatal(err)
	}
	if err := os.MkdirAll(j.OutDir, 0o755); err != nil {
		b.Fatal(err)
	}
	return j
}

// BenchmarkFlightFrameFisheye renders and writes (8-bit PNG at the default
// compression + sidecar, atomically) successive frames of a fisheye flight
// of the built-in sky with its unresolved light through Job.Run, as the
// flight command does: catalogue depth, stars, the diffuse layer, tone
// map, mean luminance, encode, files, each frame drawn while the previous
// one is written (RunOptions.Overlap; "seq": one frame at a time). With
// the camera held on the ship (1024, 4096, 8192) every frame after the
// first replays the unresolved layer (render.DiffuseMemo), left to the
// tone map (RunOptions.HeldLayer, as the flight command does when
// --memory holds HeldLayerBytes; "unheld", "seq": replayed into the
// buffer); with it panning (4096pan, 8192pan: 15°/s, the shutter closed)
// every frame draws it, and with the shutter at 180° (4096blur) draws its
// mean over the frame's instants.
func BenchmarkFlightFrameFisheye(b *testing.B) {
	const keys = "\n[[camera.look]]\nat = 0\nlook = \"0,-10\"\n[[camera.look]]\nat = 2\nlook = \"0,10\""
	const pan, blur = "\nshutter = 0" + keys, "\nshutter = 180" + keys
	for _, c := range []struct {
		name          string
		size          int
		look          string
		overlap, held bool
	}{
		{"1024", 1024, "", true, true},
		{"4096", 4096, "", true, true}, {"4096unheld", 4096, "", true, false}, {"4096seq", 4096, "", false, false},
		{"8192", 8192, "", true, true}, {"8192unheld", 8192, "", true, false}, {"8192seq", 8192, "", false, false},
		{"4096pan", 4096, pan, true, true}, {"8192pan", 8192, pan, true, true}, {"4096blur", 4096, blur, true, true},
	} {
		b.Run(c.name, func(b *testing.B) {
			if testing.Short() && c.size > 4096 {
				b.Skip("8192² frames: not with -short")
			}
			j := benchLoad(b, fmt.Sprintf("projection = \"fisheye\"\nsize = \"%dx%d\"%s", c.size, c.size, c.look))
			n := j.Plan.Frames()
			// The maps, pools and memo, and with overlap the second
			// frame's buffers, before the clock starts.
			j.Frames = []int{0, n - 1}
			o := RunOptions{Overlap: c.overlap, HeldLayer: c.held}
			if _, err := j.Run(context.Background(), o); err != nil {
				b.Fatal(err)
			}
			j.Frames = j.Frames[:0]
			for i := range b.N {
				j.Frames = append(j.Frames, 1+i%(n-1))
			}
			b.ReportAllocs()
			c0 := cpuSeconds()
			b.ResetTimer()
			res, err := j.Run(context.Background(), o)
			if err != nil {
				b.Fatal(err)
			}
			if res.Rendered != b.N {
				b.Fatalf("%d frames rendered, want %d", res.Rendered, b.N)
			}
			b.ReportMetric(float64(b.N)/b.Elapsed().Seconds(), "frames/s")
			b.ReportMetric((cpuSeconds()-c0)/float64(b.N), "CPU-s/op")
		})
	}
}

// BenchmarkFlightBlur renders the linear frame (stars and unresolved
// light) of the built-in sky in the middle of a pan (keys 0,−10 → 0,+10
// over 2 s at 30 fps: 15°/s at the centre, 7.3 px streaks in a 1920×1080
// 60° pinhole, 5.7 px in a 4096² fisheye) with the shutter closed and at
// 180°: the cost of motion blur.
func BenchmarkFlightBlur(b *testing.B) {
	for _, c := range []struct{ name, camera string }{
		{"pinhole1920x1080", "size = \"1920x1080\"\nfov = 60"},
		{"fisheye4096", "projection = \"fisheye\"\nsize = \"4096x4096\""},
	} {
		for _, shutter := range []float64{0, 180} {
			b.Run(fmt.Sprintf("%s/shutter=%g", c.name, shutter), func(b *testing.B) {
				j := benchLoad(b, fmt.Sprintf("%s\nshutter = %g\n[[camera.look]]\nat = 0\nlook = \"0,-10\"\n[[camera.look]]\nat = 2\nlook = \"0,10\"", c.camera, shutter))
				fs, err := j.Plan.FrameState(30)
				if err != nil {
					b.Fatal(err)
				}
				proj, err := j.Projection(fs)
				if err != nil {
					b.Fatal(err)
				}
				obs, err := flight.Observer(fs.State)
				if err != nil {
					b.Fatal(err)
				}
				jf, _, prep, _, err := j.frameSky(nil, 30, fs, obs, proj)
				if err != nil {
					b.Fatal(err)
				}
				b.ReportAllocs()
				var k int
				c0 := cpuSeconds()
				b.ResetTimer()
				for range b.N {
					_, _, _, ex, err := jf.RenderLinear(prep, fs, obs, proj)
					if err != nil {
						b.Fatal(err)
					}
					k = len(ex.Knots)
				}
				b.ReportMetric(float64(k), "knots")
				b.ReportMetric((cpuSeconds()-c0)/float64(b.N), "CPU-s/op")
			})
		}
	}
}
