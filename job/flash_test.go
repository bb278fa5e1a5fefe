package job

import (
	"image"
	"image/color"
	"math"
	"reflect"
	"runtime"
	"slices"
	"strings"
	"testing"

	"github.com/skyframe/skyframe/spectrum"
)

// TestMeanLuminanceRegions: a white block exactly filling the top-left
// window (a third of the frame each way) reads 1 there, ½ in the window a
// sixth to the right, 0 far away, and 1/9 over the whole frame. White is
// relative luminance 1 (IEC 61966-2-1).
func TestMeanLuminanceRegions(t *testing.T) {
	img := image.NewNRGBA(image.Rect(0, 0, 60, 36))
	for y := 0; y < 36; y++ {
		for x := 0; x < 60; x++ {
			c := color.NRGBA{0, 0, 0, 255}
			if x < 20 && y < 12 {
				c = color.NRGBA{255, 255, 255, 255}
			}
			img.SetNRGBA(x, y, c)
		}
	}
	l := MeanLuminance(img, 0)
	if len(l.Regions) != Regions*Regions {
		t.Fatalf("%d regions", len(l.Regions))
	}
	for _, c := range []struct {
		i    int
		want float64
	}{{0, 1}, {1, 0.5}, {Regions, 0.5}, {Regions + 1, 0.25}, {2, 0}, {Regions*Regions - 1, 0}} {
		if have := l.Regions[c.i]; math.Abs(have-c.want) > 1e-12 {
			t.Errorf("window %d: %v, want %v", c.i, have, c.want)
		}
	}
	if math.Abs(l.Mean-1.0/9) > 1e-12 {
		t.Errorf("mean %v, want 1/9", l.Mean)
	}
}

// TestFlashWarningRegional: a window flashing five times a second while the
// whole-frame mean moves by only 0.05 (below the 0.1 of WCAG 2.1 SC 2.3.1)
// is reported, naming the window; without window data, or with the flash
// too slow, nothing is.
func TestFlashWarningRegional(t *testing.T) {
	var frames []int
	lum := map[int]Lum{}
	mk := func(withRegions bool, period int) {
		frames = frames[:0]
		for i := 0; i < 60; i++ {
			frames = append(frames, i)
			on := (i/period)%2 == 1
			l := Lum{Mean: 0.01}
			if on {
				l.Mean = 0.06
			}
			if withRegions {
				l.Regions = make([]float64, Regions*Regions)
				if on {
					l.Regions[12] = 0.45
				}
			}
			lum[i] = l
		}
	}
	mk(true, 3) // 5 flashes per second
	w := FlashWarning(frames, lum, 30)
	if !strings.Contains(w, "column 3, row 3") || !strings.Contains(w, "photosensitivity") {
		t.Errorf("regional flash not reported: %q", w)
	}
	for _, c := range []struct {
		regions bool
		period  int
	}{{false, 3}, {true, 15}} {
		mk(c.regions, c.period)
		if w := FlashWarning(frames, lum, 30); w != "" {
			t.Errorf("regions %v, period %d: unexpected warning %q", c.regions, c.period, w)
		}
	}
}

// The parallel mean luminance is the same for any number of goroutines,
// bit for bit, and equals the plain per-pixel mean (IEC 61966-2-1 decoding
// and Y weights, as srgbToLinear) to rounding.
func TestMeanLuminanceParallel(t *testing.T) {
	const w, h = 301, 157
	img := image.NewNRGBA(image.Rect(0, 0, w, h))
	for i := range img.Pix {
		img.Pix[i] = byte(i*7919 + i/13)
		if p := i / 4; (p/3+p/11)%4 == 0 && i%4 < 3 {
			img.Pix[i] = 0 // black runs of every length and phase: skipped four at a time
		}
	}
	var plain float64
	for i := 0; i < len(img.Pix); i += 4 {
		r, g, b := spectrum.DecodeSRGB(float64(img.Pix[i])/255), spectrum.DecodeSRGB(float64(img.Pix[i+1])/255), spectrum.DecodeSRGB(float64(img.Pix[i+2])/255)
		plain += 0.2126*r + 0.7152*g + 0.0722*b
	}
	plain /= w * h
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(0))
	var ref Lum
	for k, procs := range []int{1, 2, 5} {
		runtime.GOMAXPROCS(procs)
		l := MeanLuminance(img, 0)
		if k == 0 {
			ref = l
			if math.Abs(l.Mean-plain) > 1e-12*plain {
				t.Errorf("mean %.15g, plain per-pixel mean %.15g", l.Mean, plain)
			}
			continue
		}
		if l.Mean != ref.Mean || !slices.Equal(l.Regions, ref.Regions) {
			t.Errorf("GOMAXPROCS %d: %v, with 1: %v", procs, l, ref)
		}
	}
	for _, workers := range []int{1, 3, 8} { // --workers: the same result
		if l := MeanLuminance(img, workers); l.Mean != ref.Mean || !slices.Equal(l.Regions, ref.Regions) {
			t.Errorf("workers %d: %v, with 1 CPU: %v", workers, l, ref)
		}
	}
}

// BenchmarkMeanLuminance4096 measures the flash check's luminance pass
// over a lit 4096² frame (every pixel non-black, as the unresolved light
// makes a flight frame).
func BenchmarkMeanLuminance4096(b *testing.B) {
	img := image.NewNRGBA(image.Rect(0, 0, 4096, 4096))
	for i := range img.Pix {
		img.Pix[i] = byte(1 + (i*7919+i/13)%200)
	}
	b.ReportAllocs()
	for b.Loop() {
		MeanLuminance(img, 0)
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/(4096*4096), "ns/pixel")
}

// A flight frame's luminance, summed row by row as the tone map finishes
// each row, equals MeanLuminance of its image.
func TestFrameLuminanceFused(t *testing.T) {
	j := benchLoad(t, "projection = \"fisheye\"\nsize = \"150x150\"")
	d, err := j.drawFrame(nil, 3, false)
	if err != nil {
		t.Fatal(err)
	}
	defer d.release()
	if want := MeanLuminance(d.img8, 0); !reflect.DeepEqual(d.lum, want) {
		t.Errorf("fused %v, MeanLuminance %v", d.lum, want)
	}
	if !(d.lum.Mean > 0) {
		t.Errorf("mean luminance %v: the frame should be lit", d.lum.Mean)
	}
}
