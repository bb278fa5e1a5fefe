package render

import (
	"reflect"
	"sync"

	"github.com/skyframe/skyframe/camera"
	"github.com/skyframe/skyframe/spectrum"
)

// MemoBytesPerPixel caps what a DiffuseMemo keeps, per pixel of a large
// frame: a third of its float32 RGB buffer. The built-in sky's layer needs
// 0.6 to 3.6 bytes per pixel in a 2048² to 4096² fisheye at rest to
// 0.99 c.
const MemoBytesPerPixel = 4

// A smaller frame's layer needs more per pixel — 4.5 to 8 bytes at 1024²,
// 11 to 13 at 512² and below, where the sky's structure is finer than the
// pixels and most of them are evaluated exactly (16 bytes each) — so a
// frame may keep memoSmallPerPixel bytes per pixel up to MemoSmallBytes in
// all: every layer of a frame up to 2048² is kept. Drawing it anew costs a
// 512² fisheye held on one view 0.36 CPU-s a frame, more than a 4096² one
// replaying it.
const (
	memoSmallPerPixel = 16
	MemoSmallBytes    = 64 << 20
)

// MemoLimit returns the most a DiffuseMemo keeps for a w×h frame, bytes:
// MemoBytesPerPixel per pixel, or memoSmallPerPixel up to MemoSmallBytes
// when that is more. A layer whose record would be larger is drawn and not
// kept.
func MemoLimit(w, h int) int64 {
	if memoTestLimit > 0 {
		return memoTestLimit
	}
	px := int64(w) * int64(h)
	return max(MemoBytesPerPixel*px, min(memoSmallPerPixel*px, MemoSmallBytes))
}

// memoTestLimit replaces MemoLimit's value in tests (0: not).
var memoTestLimit int64

// DiffuseMemo keeps the last unresolved layer AddDiffuse drew with it
// (DiffuseOptions.Memo), so that a later frame whose layer has the same
// inputs replays it instead of evaluating the sky again. The inputs are
// the sky map (the same UnresolvedSky value: a map is immutable once
// built), the observer's boost, the projection (kind, size, field, tilt
// and attitude), the frame's photometric scale, its white point and the
// sampling options: all that the layer depends on (the observer's
// position is not among them: the unresolved stars are far away). That
// is a camera fixed on the ship at constant velocity and exposure — a
// cruise held on one view — where every frame has the same layer.
//
// The replay adds to each pixel the very value drawing it added (each
// pixel of the layer is one addition), so frames are bit-identical with and
// without the memo, for any worker count. The memo keeps the adaptive
// grid's interpolated cells and its exactly evaluated pixels, not the
// pixels themselves: about 1.5 bytes per pixel for the built-in sky in a
// 4096² fisheye, at most MemoLimit. A sky whose dynamic type is not
// comparable (UniformSky) and an Exact layer are never kept.
//
// The zero value is an empty memo. It is safe for concurrent use; it keeps
// one layer.
type DiffuseMemo struct {
	mu      sync.Mutex
	key     diffuseKey
	rec     *gridRecord
	replays int
	lent    int         // replays lent as PendingLayers
	users   int         // PendingLayers lent and not released
	img     *layerImage // the last layer's tone-mapped image (PendingLayer)
}

// diffuseKey is everything an unresolved layer depends on.
type diffuseKey struct {
	sky       UnresolvedSky
	boost     camera.Boost
	kind      camera.Kind
	w, h      int
	fov, tilt float64
	orient    camera.Orientation
	scale     float64
	color     spectrum.ColorOptions
	fp, mlnD  float64
	ms        int
	tol       float64
	codes     float64
	beyond    bool
}

// Replays returns how many layers the memo has replayed.
func (m *DiffuseMemo) Replays() int {
	m.mu.Lock()
	defer m.mu.Unlock()
	return m.replays
}

// Lent returns how many of the replays were lent as PendingLayers.
func (m *DiffuseMemo) Lent() int {
	m.mu.Lock()
	defer m.mu.Unlock()
	return m.lent
}

// newRecord returns the storage for a new layer (m.mu held): the record
// kept before, unless a PendingLayer holds it, which is then no longer
// the memo's; and the tone-mapped image built from it, if any, no longer
// its image (the storage stays for the next one).
func (m *DiffuseMemo) newRecord() *gridRecord {
	rec := m.rec
	if rec == nil || m.users > 0 {
		rec = new(gridRecord)
	}
	if m.img != nil && m.img.rec == rec {
		m.img.rec = nil
	}
	m.rec = nil
	return rec
}

// memoKey returns the key of f's layer of sky with opt, and whether it can
// be kept.
func memoKey(f *Frame, sky UnresolvedSky, opt DiffuseOptions) (diffuseKey, bool) {
	if opt.Exact || !reflect.ValueOf(sky).Comparable() {
		return diffuseKey{}, false
	}
	p := f.Options.Projection
	return diffuseKey{sky: sky, boost: f.Options.Observer.Boost, kind: p.Kind, w: p.Width, h: p.Height,
		fov: p.FOV, tilt: p.Tilt, orient: p.Orient, scale: f.extended(), color: f.Options.Color,
		fp: opt.Footprint, mlnD: opt.MaxLnD, ms: opt.MaxSamples, tol: opt.Tolerance, codes: opt.Codes, beyond: opt.BeyondRim}, true
}

// drawPending records the layer d, not drawn into d.dst, and kept when it
// is small enough, and returns it deferred to f's tone map (PendingLayer),
// its exact pixels sorted for the rows (under the lock every sort of a
// record takes, so the tone map reads it without).
// The memo must not hold key's layer (lend).
func (m *DiffuseMemo) drawPending(d *diffuseDraw, key diffuseKey, f *Frame) (*PendingLayer, error) {
	m.mu.Lock()
	defer m.mu.Unlock()
	rec := m.newRecord()
	if err := d.grid().add(nil, d.newEval, rec); err != nil {
		return nil, err
	}
	rec.sortExact()
	if rec.bytes() <= MemoLimit(d.dst.W, d.dst.H) {
		m.key, m.rec = key, rec
	}
	m.users++
	return &PendingLayer{m: m, rec: rec, f: f, workers: d.workers, held: true, deferred: true}, nil
}

// draw adds the layer d to d.dst: replayed when the memo holds key's
// layer, else drawn, and kept when it is small enough.
func (m *DiffuseMemo) draw(d *diffuseDraw, key diffuseKey) error {
	m.mu.Lock()
	defer m.mu.Unlock()
	if m.rec != nil && m.key == key { // the key holds the size: d.dst is that size (prepareDiffuse)
		m.rec.replay(d.dst.Pix, d.workers)
		m.replays++
		return nil
	}
	// The record kept before lends its storage to the new one, unless a
	// PendingLayer holds it.
	rec := m.newRecord()
	if err := d.drawRecord(d.newEval, rec); err != nil {
		return err
	}
	if rec.bytes() <= MemoLimit(d.dst.W, d.dst.H) {
		m.key, m.rec = key, rec
	}
	return nil
}
