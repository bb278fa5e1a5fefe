package render

// MemoryNeed estimates the bytes one frame needs at its peak, by part, so
// that a command can refuse a request that cannot fit before it allocates
// anything (a Go program that runs out of memory dies with a runtime dump;
// there is no error to return). Each part is an upper estimate.
type MemoryNeed struct {
	// Buffer is the linear float32 RGB buffer (12 bytes per pixel, 16 with
	// the Doppler channel).
	Buffer int64
	// Image is the 8- or 16-bit RGBA image the PNG is encoded from (4 or 8
	// bytes per pixel).
	Image int64
	// Encode is what the PNG encoder holds: compressed strips waiting for
	// their turn and per-worker rows, counted as the image size up to
	// 64 MiB (measured: 10 MB for an 8-bit 8192² frame, 17 MB at 16 bits;
	// a star field deflates to a small fraction of the image).
	Encode int64
	// Work is the renderer's per-pass working set: a splat record, its
	// tile copies and ids per star of one pass or chunk (see RenderRows,
	// ChunkRows).
	Work int64
	// Catalogue is the star columns held in memory (0 when streamed from a
	// cache file).
	Catalogue int64
	// Overlays is what the overlay layers hold (grid vertices, lattice
	// beacons), filled in by the caller that knows them.
	Overlays int64
	// Files is what the other outputs of a frame hold while they are
	// encoded (FITS, OpenEXR, an overlay layer), filled in by the caller
	// that writes them.
	Files int64
}

// CatalogueBytesPerStar is the memory of one loaded star: its columns
// (37 bytes: id, direction, distance, V, Teff, B−V, flags), proper motions
// and radial velocity (12) and a name's string header (16).
const CatalogueBytesPerStar = 65

// Total is the sum of the parts.
func (m MemoryNeed) Total() int64 {
	return m.Buffer + m.Image + m.Encode + m.Work + m.Catalogue + m.Overlays + m.Files
}

// EstimateMemory returns the memory a frame of opt written as a depth-bit
// PNG (8 or 16) needs for a catalogue of stars rows, loaded whole or
// (streamed) read from disk in chunks of ChunkRows(opt, budget).
func EstimateMemory(opt Options, depth int, stars int, streamed bool, budget int64) MemoryNeed {
	px := int64(opt.Projection.Width) * int64(opt.Projection.Height)
	var m MemoryNeed
	m.Buffer = px * streamBytesPerPixel
	if opt.Doppler {
		m.Buffer += px * streamDopplerPixel
	}
	bpp := int64(4)
	if depth == 16 {
		bpp = 8
	}
	m.Image = px * bpp
	m.Encode = min(px*bpp, 64<<20)
	rows := int64(stars)
	if streamed {
		rows = min(rows, int64(ChunkRows(opt, budget)))
		m.Work = rows * streamBytesPerRow
		return m
	}
	m.Catalogue = int64(stars) * CatalogueBytesPerStar
	k := 2
	if psf, err := NewPSF(opt.FWHM); err == nil {
		k = psf.k
	}
	rows = min(rows, int64(RenderRows(opt, DefaultMemoryBudget)))
	m.Work = rows * RenderBytesPerRow(k)
	return m
}
