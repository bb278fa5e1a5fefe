package render

import (
	"image"
	"math"
)

// CircleCoverage is the share of pixel (i, j) kept by the mask of an image
// circle of centre (cx, cy) and radius r, pixels: 1 when the pixel's
// centre is at least one pixel inside the rim, 0 when it is on or outside
// the rim, linear in between (an anti-aliased edge that lies wholly inside
// the circle, so no pixel whose centre is outside keeps any light).
func CircleCoverage(cx, cy, r float64, i, j int) float64 {
	dx, dy := float64(i)+0.5-cx, float64(j)+0.5-cy
	return math.Max(0, math.Min(1, r-math.Hypot(dx, dy)))
}

// circleSpans calls fn for every row j of a w×h image with the span
// [in0, in1) of pixels whose coverage by the circle (CircleCoverage) is
// above 0, and within it the span [full0, full1) where it is 1 (empty spans
// have equal ends); pixels outside [in0, in1) have coverage 0.
func circleSpans(w, h int, cx, cy, r float64, fn func(j, in0, in1, full0, full1 int)) {
	span := func(dy, rr float64) (int, int) {
		q := rr*rr - dy*dy
		if !(rr > 0 && q > 0) {
			return 0, 0
		}
		half := math.Sqrt(q)
		// Pixel centres i + 0.5 with |i + 0.5 − cx| < half, widened by one
		// pixel each way and settled by CircleCoverage at the ends.
		lo := max(0, int(math.Floor(cx-half-0.5)))
		hi := min(w, int(math.Ceil(cx+half-0.5))+1)
		return lo, max(lo, hi)
	}
	for j := 0; j < h; j++ {
		dy := float64(j) + 0.5 - cy
		in0, in1 := span(dy, r)
		for in0 < in1 && CircleCoverage(cx, cy, r, in0, j) == 0 {
			in0++
		}
		for in1 > in0 && CircleCoverage(cx, cy, r, in1-1, j) == 0 {
			in1--
		}
		f0, f1 := span(dy, r-1)
		f0, f1 = max(f0, in0), min(f1, in1)
		for f0 < f1 && CircleCoverage(cx, cy, r, f0, j) < 1 {
			f0++
		}
		for f1 > f0 && CircleCoverage(cx, cy, r, f1-1, j) < 1 {
			f1--
		}
		if f0 >= f1 {
			f0, f1 = in1, in1
		}
		fn(j, in0, in1, f0, f1)
	}
}

// maskRows calls zero(j, i0, i1) for each run of pixels of row j with
// coverage 0 and apply(i, j, c) for each pixel with coverage c strictly
// between 0 and 1 (the rim); pixels well inside are left alone.
func maskRows(w, h int, cx, cy, r float64, zero func(j, i0, i1 int), apply func(i, j int, c float64)) {
	circleSpans(w, h, cx, cy, r, func(j, in0, in1, f0, f1 int) {
		zero(j, 0, in0)
		zero(j, in1, w)
		for i := in0; i < f0; i++ {
			apply(i, j, CircleCoverage(cx, cy, r, i, j))
		}
		for i := max(f1, f0); i < in1; i++ {
			apply(i, j, CircleCoverage(cx, cy, r, i, j))
		}
	})
}

// ToNRGBA is Buffer.ToNRGBA with, for a Fisheye frame, everything outside
// the image circle black (the domemaster convention: nothing is projected
// there) and the rim anti-aliased (CircleCoverage). The linear buffer, and
// so the FITS data, is not masked. The tone map runs on the frame's
// Options.Workers goroutines.
func (f *Frame) ToNRGBA(m ToneMode) *image.NRGBA { return f.ToNRGBAInto(nil, m) }

// ToNRGBAInto is ToNRGBA writing into dst when it fits (see
// Buffer.ToNRGBAInto).
func (f *Frame) ToNRGBAInto(dst *image.NRGBA, m ToneMode) *image.NRGBA {
	return f.ToNRGBARows(dst, m, nil)
}

// ToNRGBARows is ToNRGBAInto calling row(y, pix) with each row of the image
// (pix its 4·W bytes, to be read only) as soon as the row is final, while
// it is still in cache: once per row, from the tone map's goroutines, in
// no set order. A nil row is not called.
func (f *Frame) ToNRGBARows(dst *image.NRGBA, m ToneMode, row func(y int, pix []byte)) *image.NRGBA {
	return f.Buffer.toNRGBAMasked(dst, m, f.Options.Workers, f.circleMask(), row, false, nil)
}

// ToNRGBAClearing is ToNRGBARows leaving f's buffer black: each row of
// values is zeroed as soon as it is toned, while it is in cache, so that
// the next render into f need not clear the buffer in a pass of its own
// (as PendingLayer.ClearBuffer does for a held layer). For a frame nothing
// reads after the tone map (no FITS, OpenEXR or 16-bit image). A frame
// with a Doppler channel is toned as by ToNRGBARows: the next render
// clears it whole anyway.
func (f *Frame) ToNRGBAClearing(dst *image.NRGBA, m ToneMode, row func(y int, pix []byte)) *image.NRGBA {
	zero := f.Doppler == nil
	img := f.Buffer.toNRGBAMasked(dst, m, f.Options.Workers, f.circleMask(), row, zero, nil)
	f.black = zero
	return img
}

// circleMask returns a fisheye frame's image circle mask, else nil.
func (f *Frame) circleMask() *circleMask {
	if cx, cy, r, ok := f.Options.Projection.ImageCircle(); ok {
		return newCircleMask(f.W, f.H, cx, cy, r)
	}
	return nil
}

// ToNRGBA64 is ToNRGBA with 16 bits per channel.
func (f *Frame) ToNRGBA64(m ToneMode) *image.NRGBA64 { return f.ToNRGBA64Into(nil, m) }

// ToNRGBA64Into is ToNRGBA64 writing into dst when it fits (see
// Buffer.ToNRGBAInto).
func (f *Frame) ToNRGBA64Into(dst *image.NRGBA64, m ToneMode) *image.NRGBA64 {
	img := f.Buffer.toNRGBA64Into(dst, m, f.Options.Workers)
	if cx, cy, r, ok := f.Options.Projection.ImageCircle(); ok {
		maskRows(img.Rect.Dx(), img.Rect.Dy(), cx, cy, r, func(j, i0, i1 int) {
			row := img.Pix[j*img.Stride : j*img.Stride+8*img.Rect.Dx()]
			for i := i0; i < i1; i++ {
				clear(row[8*i : 8*i+6])
			}
		}, func(i, j int, c float64) {
			p := img.Pix[j*img.Stride+8*i : j*img.Stride+8*i+6 : j*img.Stride+8*i+6]
			for k := 0; k < 6; k += 2 {
				v := uint16(float64(uint16(p[k])<<8|uint16(p[k+1]))*c + 0.5)
				p[k], p[k+1] = byte(v>>8), byte(v)
			}
		})
	}
	return img
}
