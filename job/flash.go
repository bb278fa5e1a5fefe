package job

import (
	"encoding/binary"
	"fmt"
	"image"
	"runtime"
	"sync"
	"sync/atomic"

	"github.com/skyframe/skyframe/flight"
	"github.com/skyframe/skyframe/spectrum"
)

// Lum is what the flash check needs of one frame.
type Lum struct {
	Mean    float64   // whole-frame mean relative luminance
	Regions []float64 // see MeanLuminance; nil for frames recorded without it
}

// Regions is the number of windows per axis of the regional flash check.
// WCAG 2.1 (understanding document of success criterion 2.3.1) estimates a
// 10° visual field as 341 × 256 pixels of a 1024 × 768 screen, a third of
// the screen each way; windows of a third of the frame each way, at steps
// of a sixth, give 5 × 5 overlapping windows.
const Regions = 5

// srgbToLinear decodes 8-bit sRGB code values (IEC 61966-2-1).
var srgbToLinear = func() (t [256]float64) {
	for i := range t {
		t[i] = spectrum.DecodeSRGB(float64(i) / 255)
	}
	return t
}()

// lumWeighted holds each channel's share of relative luminance per 8-bit
// code: the weight (IEC 61966-2-1) times the decoded value, the products
// MeanLuminance would otherwise form per pixel.
var lumWeighted = func() (t [3][256]float64) {
	for i := range 256 {
		t[0][i] = 0.2126 * srgbToLinear[i]
		t[1][i] = 0.7152 * srgbToLinear[i]
		t[2][i] = 0.0722 * srgbToLinear[i]
	}
	return t
}()

// MeanLuminance returns the mean relative luminance of an 8-bit sRGB image
// (each pixel decoded to linear sRGB and weighted Y = 0.2126 R + 0.7152 G +
// 0.0722 B, IEC 61966-2-1; 0 black, 1 white) and that of each window of the
// regional flash check: window (a, b), a the column, is the image's
// columns [a·W/6, (a+2)·W/6) and rows [b·H/6, (b+2)·H/6), at index
// b·Regions + a. It runs on workers goroutines (0: GOMAXPROCS); the
// result does not depend on their number.
func MeanLuminance(img *image.NRGBA, workers int) Lum {
	b := img.Bounds()
	w, h := b.Dx(), b.Dy()
	a := newLumSums(w, h)
	const band = 32
	bands := (h + band - 1) / band
	var next atomic.Int64
	var wg sync.WaitGroup
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	for range min(workers, bands) {
		wg.Go(func() {
			for {
				k := int(next.Add(1)) - 1
				if k >= bands {
					return
				}
				for y := k * band; y < min(h, (k+1)*band); y++ {
					a.row(y, img.Pix[y*img.Stride:y*img.Stride+4*w])
				}
			}
		})
	}
	wg.Wait()
	return a.lum()
}

// lumCells is the number of cells per axis MeanLuminance sums over: a
// window is 2 × 2 cells.
const lumCells = Regions + 1

// lumSums gathers MeanLuminance's sums row by row: each row's sum over
// each cell's columns (row, from any goroutine, each row once), then
// the row sums added in row order (lum), so the result does not depend on
// the order or the goroutines the rows came from. The tone map feeds it
// each row as it finishes it (render.Frame.ToNRGBARows), while the row is
// in cache.
type lumSums struct {
	w, h     int
	x0s, x1s [lumCells]int
	rowSums  []float64
}

func newLumSums(w, h int) *lumSums {
	a := &lumSums{w: w, h: h, rowSums: make([]float64, h*lumCells)}
	for cx := range lumCells {
		a.x0s[cx], a.x1s[cx] = (cx*w+lumCells-1)/lumCells, ((cx+1)*w+lumCells-1)/lumCells // first x with x·6/w ≥ cx
	}
	return a
}

// row sums row y's pixels (4·w bytes, RGBA) per cell.
func (a *lumSums) row(y int, row []byte) {
	wr, wg, wb := &lumWeighted[0], &lumWeighted[1], &lumWeighted[2]
	for cx := range lumCells {
		// Four running sums, pixel by pixel in turn, so that the
		// additions do not wait on each other.
		var s0, s1, s2, s3 float64
		x, end := 4*a.x0s[cx], 4*a.x1s[cx]
		// Eight pixels a step, passed over when black (one test where
		// most of a frame of space is black), else all eight added
		// (a black pixel adds +0, which leaves a sum as it is, and
		// the branches it would take cost more); then four, then one
		// at a time.
		for ; x+32 <= end; x += 32 {
			p := row[x : x+32 : x+32]
			lo := binary.LittleEndian.Uint64(p[:8]) | binary.LittleEndian.Uint64(p[8:16])
			hi := binary.LittleEndian.Uint64(p[16:24]) | binary.LittleEndian.Uint64(p[24:32])
			if (lo|hi)&rgb2 == 0 {
				continue
			}
			s0 += wr[p[0]] + wg[p[1]] + wb[p[2]]
			s1 += wr[p[4]] + wg[p[5]] + wb[p[6]]
			s2 += wr[p[8]] + wg[p[9]] + wb[p[10]]
			s3 += wr[p[12]] + wg[p[13]] + wb[p[14]]
			s0 += wr[p[16]] + wg[p[17]] + wb[p[18]]
			s1 += wr[p[20]] + wg[p[21]] + wb[p[22]]
			s2 += wr[p[24]] + wg[p[25]] + wb[p[26]]
			s3 += wr[p[28]] + wg[p[29]] + wb[p[30]]
		}
		for ; x+16 <= end; x += 16 {
			p := row[x : x+16 : x+16]
			if (binary.LittleEndian.Uint64(p[:8])|binary.LittleEndian.Uint64(p[8:]))&rgb2 == 0 {
				// Four black pixels add 0 to each sum, which leaves it
				// as it is: most of a frame of space.
				continue
			}
			s0 += wr[p[0]] + wg[p[1]] + wb[p[2]]
			s1 += wr[p[4]] + wg[p[5]] + wb[p[6]]
			s2 += wr[p[8]] + wg[p[9]] + wb[p[10]]
			s3 += wr[p[12]] + wg[p[13]] + wb[p[14]]
		}
		for ; x < end; x += 4 {
			s0 += wr[row[x]] + wg[row[x+1]] + wb[row[x+2]]
		}
		a.rowSums[y*lumCells+cx] = (s0 + s1) + (s2 + s3)
	}
}

// rgb2 masks the colour bytes of two NRGBA pixels read as a little-endian
// word; code 0 weighs 0 in every lumWeighted table.
const rgb2 = 0x00ffffff_00ffffff

// lum adds the row sums in row order into the mean and the windows'.
func (a *lumSums) lum() Lum {
	w, h := a.w, a.h
	if w*h == 0 {
		return Lum{}
	}
	const cells = lumCells
	var cell [cells][cells]float64
	var cnt [cells][cells]int
	var sum float64
	for y := 0; y < h; y++ {
		cy := y * cells / h
		for cx := range cells {
			s := a.rowSums[y*cells+cx]
			sum += s
			cell[cy][cx] += s
			cnt[cy][cx] += a.x1s[cx] - a.x0s[cx]
		}
	}
	out := Lum{Mean: sum / float64(w*h), Regions: make([]float64, Regions*Regions)}
	for by := 0; by < Regions; by++ {
		for bx := 0; bx < Regions; bx++ {
			s := cell[by][bx] + cell[by][bx+1] + cell[by+1][bx] + cell[by+1][bx+1]
			n := cnt[by][bx] + cnt[by][bx+1] + cnt[by+1][bx] + cnt[by+1][bx+1]
			if n > 0 {
				out.Regions[by*Regions+bx] = s / float64(n)
			}
		}
	}
	return out
}

// FlashWarning runs the general flash check over frames (ascending) shown
// at fps frames per second, on the luminances found in lum (the contiguous
// block from the first frame), and returns a warning when they fail, or "":
// on the whole-frame mean, and on each window of the regional check (see
// MeanLuminance), which catches a flash confined to part of the frame that
// the whole-frame mean dilutes below threshold. A check that cannot run
// (bad fps or luminance) is reported as "flash check: …".
func FlashWarning(frames []int, lum map[int]Lum, fps float64) string {
	seq, first := contiguous(frames, lum)
	if len(seq) < 2 {
		return ""
	}
	means := make([]float64, len(seq))
	for k, l := range seq {
		means[k] = l.Mean
	}
	rep := flight.FlashCheck(means, fps)
	if rep.Err != nil {
		return fmt.Sprintf("flash check: %v", rep.Err)
	}
	where := "the whole frame"
	if rep.Pass {
		worst, at := regionCheck(seq, fps)
		if worst.Pass {
			return ""
		}
		rep = worst
		where = fmt.Sprintf("the window at column %d, row %d of a %d×%d grid of overlapping thirds of the frame (WCAG's 10° field)",
			at%Regions+1, at/Regions+1, Regions, Regions)
	}
	return fmt.Sprintf("warning: photosensitivity: frames %d-%d exceed the WCAG 2.3.1 / ITU-R BT.1702 general flash threshold in %s: %d flashes in one second from frame %d (limit %d); %d flashes in all",
		first, first+len(seq)-1, where, rep.MaxPerSecond, first+rep.WorstFrame, flight.FlashMaxPerSecond, rep.Flashes)
}

// regionCheck runs the flash check on each window's luminance and returns
// the report with the most flashes in one second, and the window's index.
// When a frame of seq lacks window luminances it returns a passing report:
// there is nothing to check.
func regionCheck(seq []Lum, fps float64) (flight.FlashReport, int) {
	best, at := flight.FlashReport{Pass: true}, -1
	for _, l := range seq {
		if l.Regions == nil {
			return best, at
		}
	}
	v := make([]float64, len(seq))
	for r := 0; r < Regions*Regions; r++ {
		for k, l := range seq {
			v[k] = l.Regions[r]
		}
		if rep := flight.FlashCheck(v, fps); rep.Err == nil && !rep.Pass && (at < 0 || rep.MaxPerSecond > best.MaxPerSecond) {
			best, at = rep, r
		}
	}
	return best, at
}

// contiguous returns the luminances of frames in order, stopping at the
// first frame without one, and the index of the first frame.
func contiguous(frames []int, lum map[int]Lum) ([]Lum, int) {
	if len(frames) == 0 {
		return nil, 0
	}
	seq := make([]Lum, 0, len(frames))
	for _, i := range frames {
		l, ok := lum[i]
		if !ok {
			break
		}
		seq = append(seq, l)
	}
	return seq, frames[0]
}
