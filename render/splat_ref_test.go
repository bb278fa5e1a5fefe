package render

import "math"

// splat deposits a point source at continuous pixel coordinates (x, y)
// (pixel (i, j) spans [i, i+1)×[j, j+1)) with linear colour rgb, spread
// by psf. Light falling outside the buffer is lost. When the buffer has a
// Doppler channel, d is merged into each touched pixel's
// luminance-weighted mean. It is the reference the tests hold the renderer's tiled splatting to
// (one star at a time, straight into the buffer); splat does not allocate.
func (b *Buffer) splat(x, y float64, rgb [3]float64, d float64, psf *PSF) {
	var wx, wy [maxTaps]float64
	if !(math.Abs(x) < 4*MaxSize && math.Abs(y) < 4*MaxSize) {
		return // also rejects NaN
	}
	x0, nx := psf.Weights(x, wx[:])
	y0, ny := psf.Weights(y, wy[:])
	lum := lumR*rgb[0] + lumG*rgb[1] + lumB*rgb[2]
	for j := 0; j < ny; j++ {
		py := y0 + j
		if py < 0 || py >= b.H {
			continue
		}
		for i := 0; i < nx; i++ {
			px := x0 + i
			if px < 0 || px >= b.W {
				continue
			}
			w := wx[i] * wy[j]
			p := py*b.W + px
			q := 3 * p
			if b.Doppler != nil {
				old := lumR*float64(b.Pix[q]) + lumG*float64(b.Pix[q+1]) + lumB*float64(b.Pix[q+2])
				add := w * lum
				if old+add > 0 {
					b.Doppler[p] = float32((old*float64(b.Doppler[p]) + add*d) / (old + add))
				}
			}
			b.Pix[q] += float32(w * rgb[0])
			b.Pix[q+1] += float32(w * rgb[1])
			b.Pix[q+2] += float32(w * rgb[2])
		}
	}
}
