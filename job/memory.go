package job

import (
	"slices"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/frame"
	"github.com/skyframe/skyframe/render"
)

// PreparedBytesPerStar is what render.Prepare keeps per star for a
// flight beside the catalogue's columns: the rest values ln V₀ and ln T₀
// and the unit direction, five float64.
const PreparedBytesPerStar = 40

// MemoryNeed estimates, from above, the peak memory of the whole run: the
// catalogue loaded once with its prepared rest values, and the largest
// frame's working set, since a flight renders one frame at a time and
// reuses nothing that grows with the frame count. Per frame it counts,
// like a still (render.EstimateMemory), the linear buffer (with the
// Doppler channel when the OpenEXR file keeps it), the 8- or 16-bit image
// and the PNG encoder, and the renderer's working set; then what only a
// flight holds: the accumulator of the sub-frames a shutter angle above 0
// averages (one more buffer beside the sub-frame being rendered), the
// unresolved layer kept for the next frame (render.MemoLimit), the
// OpenEXR file's contributions kept apart (one buffer each: stars and
// every linear layer), and the other encoded outputs (FITS: the float32
// data; OpenEXR: its channels as float32 and their encoding; the overlay
// layer: its image and PNG). Overlays (grid, lattice) are the caller's to
// add (Overlays). Call it after CheckCamera (and Preview) with the layers
// set.
func (j *Job) MemoryNeed() render.MemoryNeed {
	fr := j.Frame
	px := int64(fr.Width) * int64(fr.Height)
	o := j.Plan.Output
	doppler := o.EXR && (j.EXR.Layers == nil || slices.Contains(j.EXR.Layers, frame.EXRDoppler))
	opt := render.Options{Projection: camera.Projection{Kind: fr.Kind, Width: fr.Width, Height: fr.Height}, Doppler: doppler}
	stars := 0
	if j.Stars != nil {
		stars = j.Stars.Len()
	}
	m := render.EstimateMemory(opt, fr.Depth, stars, false, 0)
	m.Catalogue += int64(stars) * PreparedBytesPerStar
	const rgb = 12 // float32 RGB bytes per pixel
	if fr.Shutter > 0 {
		m.Buffer += px * rgb
	}
	if j.Layers.Unresolved != nil {
		m.Buffer += render.MemoLimit(fr.Width, fr.Height) // the layer kept for the next frame
	}
	if o.FITS {
		m.Files += px*rgb + 2880
	}
	if o.EXR {
		layers := int64(1) // the stars
		if j.Layers.CMB {
			layers++
		}
		if j.Layers.Unresolved != nil {
			layers++
		}
		m.Buffer += layers * px * rgb
		// Every channel (RGB per contribution, Doppler, overlay RGBA) as
		// float32, once as the image and once encoded.
		channels := 3*layers + 1 + 4
		m.Files += 2 * channels * 4 * px
	}
	if o.OverlayLayer {
		m.Files += 2 * 4 * px
	}
	return m
}

// HeldLayerBytes is what RunOptions.HeldLayer adds to the need
// (MemoryNeed): the unresolved layer's values and its tone-mapped image
// (render.PendingBytesPerPixel); 0 when the frames
// cannot use it (no unresolved layer or no memo, the CMB, FITS, OpenEXR or
// 16-bit PNG files: render.Layers.AddLinearPending).
func (j *Job) HeldLayerBytes() int64 {
	if !j.heldLayerUsable() {
		return 0
	}
	return render.PendingBytesPerPixel * int64(j.Frame.Width) * int64(j.Frame.Height)
}

// heldLayerUsable reports whether the job's frames can leave their
// unresolved layer to the tone map (RunOptions.HeldLayer).
func (j *Job) heldLayerUsable() bool {
	return j.Layers.Unresolved != nil && j.Layers.DiffuseOptions.Memo != nil && !j.Layers.CMB && j.eightBitOnly()
}

// eightBitOnly reports whether the job's frames are written only as 8-bit
// sRGB: no FITS, no OpenEXR, no 16-bit PNG.
func (j *Job) eightBitOnly() bool {
	o := j.Plan.Output
	return !o.FITS && !o.EXR && j.Frame.Depth != 16
}

// OverlapBytes is what RunOptions.Overlap adds to need (MemoryNeed): a
// second frame's image, PNG encoder and other files, held while the next
// frame is drawn.
func OverlapBytes(need render.MemoryNeed) int64 {
	return need.Image + need.Encode + need.Files
}
