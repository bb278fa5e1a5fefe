package render

import (
	"errors"
	"fmt"
	"image"
	"math"
	"sync/atomic"
)

// PendingLayer is an unresolved layer that a DiffuseMemo holds and that
// DiffusePending (Layers.AddLinearPending) left out of its frame for the
// tone map to add (Frame.ToNRGBAPending): a frame held on one view adds
// the same layer to every frame, and all but the pixels the stars light
// show the same 8-bit values every frame.
//
// The image ToNRGBAPending returns is byte for byte the one AddLinear
// followed by ToNRGBARows gives (TestPendingMatchesReplay): a pixel the
// stars leave black takes its value from the layer's own tone-mapped
// image (0 + v is v), and a lit pixel adds the layer's value, as the
// replay adds it (one float32 addition), and is tone-mapped. The memo keeps
// both, the image and the values (PendingBytesPerPixel), built on the first
// frame that lends the layer. The frame's buffer is left without the
// layer: AddTo adds it when the linear frame is needed (FITS, OpenEXR, a
// 16-bit image).
//
// A PendingLayer holds the memo's layer until Release; the memo draws a
// new layer into new storage meanwhile.
type PendingLayer struct {
	// ClearBuffer has ToNRGBAPending leave the frame's buffer black, each
	// value read set to 0 as it goes (the rows are then in cache), and
	// marked so, so that the next render into the frame does not clear it
	// again: for a caller that reads nothing of the buffer after the tone
	// map and renders the next frame into it (a flight). AddTo is then
	// refused.
	ClearBuffer bool

	m       *DiffuseMemo
	rec     *gridRecord
	f       *Frame
	workers int
	held    bool
	// deferred marks a layer just recorded for this frame (the memo
	// held another): the tone map adds it row by row, as the replay would,
	// without a tone-mapped image of the layer alone, which a layer that
	// may not come again would not repay.
	deferred bool
}

// PendingBytesPerPixel is what a DiffuseMemo keeps per pixel for the
// frames its layer is lent to (PendingLayer): the layer's 8-bit RGBA image
// and its float32 RGB values.
const PendingBytesPerPixel = 4 + 12

// ErrPending reports a PendingLayer used with another frame than its own
// or after Release.
var ErrPending = errors.New("render: pending layer")

// DiffusePending is AddDiffuse leaving the layer out of f when it has
// opt.Memo (and opt.Into is nil): it returns the layer, to be added by
// Frame.ToNRGBAPending or AddTo and released. A layer the memo holds is
// lent; another is recorded, not drawn, kept by the memo for the frames
// after (when small enough), and added row by row as ToNRGBAPending tone-maps them (a camera
// turning or a ship accelerating: the frame's buffer is then read and
// written once, not also by the layer's fill). Without a memo, or for a
// layer that cannot be kept, it draws the layer into f as AddDiffuse does
// and returns nil.
func DiffusePending(f *Frame, sky UnresolvedSky, opt DiffuseOptions) (*PendingLayer, error) {
	d, err := prepareDiffuse(f, sky, opt)
	if err != nil {
		return nil, err
	}
	if opt.Memo == nil {
		return nil, d.draw(d.newEval)
	}
	key, ok := memoKey(f, sky, opt)
	if !ok {
		return nil, d.draw(d.newEval)
	}
	if opt.Into == nil {
		if p := opt.Memo.lend(key, f, d.workers); p != nil {
			return p, nil
		}
		return opt.Memo.drawPending(d, key, f)
	}
	return nil, opt.Memo.draw(d, key)
}

// lend returns the memo's layer of key for frame f, counted as a replay,
// or nil when the memo holds another.
func (m *DiffuseMemo) lend(key diffuseKey, f *Frame, workers int) *PendingLayer {
	m.mu.Lock()
	defer m.mu.Unlock()
	if m.rec == nil || m.key != key {
		return nil
	}
	m.users++
	m.replays++
	m.lent++
	return &PendingLayer{m: m, rec: m.rec, f: f, workers: workers, held: true}
}

// Release gives the layer back to its memo. It may be called more than
// once; a nil PendingLayer does nothing.
func (p *PendingLayer) Release() {
	if p == nil || !p.held {
		return
	}
	p.m.mu.Lock()
	defer p.m.mu.Unlock()
	p.m.users--
	p.held = false
}

// AddTo adds the layer to f's buffer, as the replay does: f is then what
// AddDiffuse would have left. f must be the frame the layer was left out
// of; it is added at most once (the layer is then no longer pending for
// ToNRGBAPending, which tone-maps the frame as it is).
func (p *PendingLayer) AddTo(f *Frame) error {
	if err := p.check(f); err != nil {
		return err
	}
	p.m.mu.Lock() // image may be sorting the record's exact pixels
	defer p.m.mu.Unlock()
	p.rec.replay(f.Pix, p.workers)
	p.f = nil
	return nil
}

func (p *PendingLayer) check(f *Frame) error {
	switch {
	case !p.held:
		return fmt.Errorf("%w: used after Release", ErrPending)
	case p.f == nil:
		return fmt.Errorf("%w: already added, or the buffer cleared", ErrPending)
	case f != p.f || f.W != p.rec.w || len(f.Pix) != 3*f.W*f.H:
		return fmt.Errorf("%w: not this frame's", ErrPending)
	}
	return nil
}

// layerImage is a recorded layer alone, tone-mapped with tone (and masked
// when masked): the 8-bit pixels of a frame the stars leave black; and the
// layer's values as the replay adds them (0 where it adds nothing), for
// the pixels the stars light.
type layerImage struct {
	rec    *gridRecord
	tone   ToneMode
	masked bool
	pix    []byte    // 4·W·H, rows packed
	lin    []float32 // 3·W·H, interleaved RGB
}

// image returns the layer's tone-mapped image with t, from the memo or
// drawn into it (once per layer and tone mode).
func (p *PendingLayer) image(t *toner, w, h int) *layerImage {
	m := p.m
	m.mu.Lock()
	defer m.mu.Unlock()
	if li := m.img; li != nil && li.rec == p.rec && li.tone == t.m && li.masked == (t.mask != nil) {
		return li
	}
	p.rec.sortExact() // under the memo's lock, as every replay of the record
	li := &layerImage{rec: p.rec, tone: t.m, masked: t.mask != nil}
	if old := m.img; old != nil && m.users == 1 && len(old.pix) == 4*w*h {
		// Held by no other frame: its storage is lent.
		li.pix, li.lin = old.pix, old.lin
	} else {
		li.pix, li.lin = make([]byte, 4*w*h), make([]float32, 3*w*h)
	}
	const band = 16
	parallel(p.workers, (h+band-1)/band, func(k int) {
		for y := k * band; y < min(h, (k+1)*band); y++ {
			row := li.lin[3*w*y : 3*w*(y+1)]
			clear(row)
			p.rec.addRow(row, y)
			t.row(row, li.pix[4*w*y:4*w*(y+1)], y)
		}
	})
	m.img = li
	return li
}

// ToNRGBAPending is ToNRGBARows of f with the pending layer p added (nil:
// none), without adding it to f's buffer (see PendingLayer): the same
// image, the same rows handed to row.
func (f *Frame) ToNRGBAPending(dst *image.NRGBA, m ToneMode, p *PendingLayer, row func(y int, pix []byte)) (*image.NRGBA, error) {
	if p == nil {
		return f.ToNRGBARows(dst, m, row), nil
	}
	if err := p.check(f); err != nil {
		return nil, err
	}
	if p.deferred {
		return p.toneDeferred(dst, m, f, row), nil
	}
	t := newToner(m, f.circleMask())
	w, h := f.W, f.H
	li := p.image(&t, w, h)
	img := packedNRGBA(dst, w, h)
	zero := p.ClearBuffer && f.Doppler == nil
	const band = 16
	parallel(p.workers, (h+band-1)/band, func(k int) {
		for y := k * band; y < min(h, (k+1)*band); y++ {
			d := img.Pix[4*w*y : 4*w*(y+1)]
			copy(d, li.pix[4*w*y:4*w*(y+1)])
			litRow(&t, d, f.Pix[3*w*y:3*w*(y+1)], li.lin[3*w*y:3*w*(y+1)], y, zero)
			if row != nil {
				row(y, d)
			}
		}
	})
	if zero {
		f.black, p.f = true, nil
	}
	return img, nil
}

// toneDeferred is ToNRGBAPending of a deferred layer: each row of the
// buffer takes the layer's row as the replay adds it (gridRecord.addRow),
// while in cache, and is tone-mapped: the image of AddTo and ToNRGBARows.
// With ClearBuffer the buffer is left black, as by ToNRGBAClearing; else
// it is left holding the layer, which is then no longer pending.
func (p *PendingLayer) toneDeferred(dst *image.NRGBA, m ToneMode, f *Frame, row func(y int, pix []byte)) *image.NRGBA {
	zero := p.ClearBuffer && f.Doppler == nil
	img := f.Buffer.toNRGBAMasked(dst, m, p.workers, f.circleMask(), row, zero, p.rec)
	f.black = zero
	p.f = nil
	return img
}

// litRow tone-maps into d, row y of the image (holding the layer's own
// pixels), the pixels src (row y of the buffer) lights, with the layer's
// values lin added to each as the replay adds them. With zero it leaves
// src black.
func litRow(t *toner, d []byte, src, lin []float32, y int, zero bool) {
	w := len(src) / 3
	x0, x1 := 0, w
	if t.mask != nil {
		x0, x1 = t.mask.rows[y].in0, t.mask.rows[y].in1
	}
	f0, f1 := 0, w // pixels [f0, f1) lie wholly inside the circle (no rim to cover)
	if t.mask != nil {
		f0, f1 = t.mask.rows[y].full0, t.mask.rows[y].full1
	}
	if zero {
		clear(src[:3*x0]) // outside the circle: black in the image
		clear(src[3*x1:])
	}
	tab, fast, black := t.tab, t.fast, t.tab.zero
	// The lit pixels, found eight values at a time (most are 0). The
	// layer's values are read ahead along the row as the buffer is
	// scanned, which streams them in; looked up only at the lit pixels,
	// they were fetched from memory one by one, costing more than the
	// rest of the row's work.
	next := x0
	var ahead uint32
	for i := 3 * x0; i < 3*x1; i += 8 {
		e := min(i+8, 3*x1)
		if i&15 < 8 {
			ahead |= math.Float32bits(lin[e-1])
		}
		if b := src[i:e]; len(b) == 8 {
			if math.Float32bits(b[0])|math.Float32bits(b[1])|math.Float32bits(b[2])|math.Float32bits(b[3])|
				math.Float32bits(b[4])|math.Float32bits(b[5])|math.Float32bits(b[6])|math.Float32bits(b[7]) == 0 {
				continue
			}
		}
		// The pixels holding values i to e−1 not looked at yet.
		for x := max(i/3, next); x <= (e-1)/3; x++ {
			c := src[3*x : 3*x+3 : 3*x+3]
			if math.Float32bits(c[0])|math.Float32bits(c[1])|math.Float32bits(c[2]) == 0 {
				continue
			}
			v := lin[3*x : 3*x+3 : 3*x+3]
			r, g, b := c[0]+v[0], c[1]+v[1], c[2]+v[2]
			if zero {
				c[0], c[1], c[2] = 0, 0, 0
			}
			// toner.row's cases, inline.
			ur, ug, ub := math.Float32bits(r), math.Float32bits(g), math.Float32bits(b)
			var px uint32
			switch m := max(ur, ug, ub); {
			case m < black:
				px = 0
			case m < fast:
				px = uint32(tab.code8Unit(ur)) | uint32(tab.code8Unit(ug))<<8 | uint32(tab.code8Unit(ub))<<16
			default:
				px = t.slow(r, g, b)
			}
			d[4*x], d[4*x+1], d[4*x+2] = byte(px), byte(px>>8), byte(px>>16)
			if x < f0 || x >= f1 {
				t.cover(d, x, y)
			}
		}
		next = (e-1)/3 + 1
	}
	aheadSink.Store(ahead)
}

// aheadSink keeps litRow's reads ahead from being optimised away.
var aheadSink atomic.Uint32
