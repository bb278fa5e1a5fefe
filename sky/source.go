package sky

import (
	"fmt"
	"hash/fnv"
	"math"
	"slices"
	"sync"

	"gonum.org/v1/gonum/spatial/r3"

	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/render"
)

// Source gives each frame of a sequence (a flight, or one still) the
// catalogue it draws: the catalogue as loaded with the Sun added (Base),
// and for the built-in sky the fainter stars the frame needs after it. The
// rows of Base come first in every frame's catalogue, so a row found in
// Base (a label, a named star) is the same star in every frame.
type Source struct {
	base *catalog.Stars // the catalogue with the Sun
	dim  *catalog.Stars // base with the Sun's row dimmed: frames at the origin
	sun  int            // the Sun's row in base; −1 when the catalogue had it
	// builtIn: the built-in sky, drawn deeper per frame from cache.
	builtIn bool
	cache   *catalog.SkyCache
	nBuilt  int           // rows of catalog.BuiltIn(), a prefix of every deeper sky
	depth   catalog.Depth // a catalogue file's depth estimate
	cells   []catalog.SynthCell

	mu   sync.Mutex
	last [2]entry // the most recent frame catalogues, newest first
	// lent are catalogues the source built, gone from last while a
	// caller still used them, newest last (at most maxLent: the storage
	// of older ones is left to the garbage collector).
	lent []entry
	// spare is a catalogue the source built that nothing uses any more:
	// the next one built takes its storage (catalog.SkyAfter).
	spare *catalog.Stars

	profiles render.DepthProfiles // the built-in sky's depth profiles, recent tables reused
}

// entry is one frame catalogue and its prepared form.
type entry struct {
	key   uint64
	stars *catalog.Stars
	prep  *render.Prepared
	once  bool // prep is render.PrepareOnce's
	built bool // stars was built for the frame (its storage may be reused)
	users int  // Stars calls not yet Released
}

// maxLent bounds Source.lent.
const maxLent = 4

// NewSource returns the source of the catalogue s; builtIn says s is the
// built-in sky (catalog.BuiltIn()), which is then drawn as deep as each
// frame needs. s is not modified.
func NewSource(s *catalog.Stars, builtIn bool) *Source {
	src := &Source{builtIn: builtIn, sun: -1}
	src.base = s
	if !catalog.HasSun(s) {
		src.base = catalog.WithSun(s, [3]float64{1, 0, 0})
		src.sun = s.Len()
		src.dim = src.base.Slice(0, src.base.Len())
		src.dim.Vmag = append([]float32(nil), src.base.Vmag...)
		src.dim.Vmag[src.sun] = dimV
	} else {
		src.dim = src.base
	}
	if builtIn {
		src.cache = catalog.NewSkyCache(catalog.SynthOptions{})
		src.nBuilt = s.Len()
		src.cells = catalog.SynthCells()
	} else {
		src.depth = catalog.EstimateDepth(s)
	}
	return src
}

// dimV is the V the Sun's row takes in frames at the origin: the faintest
// a catalogue holds, so the renderer culls it (an observer at the origin
// sees the catalogue's own sky, without the Sun; catalog.SunShown). The row
// stays so that rows keep their numbers.
const dimV = 40

// Base returns the rows every frame's catalogue starts with: the
// catalogue with the Sun appended (unless it had it).
func (src *Source) Base() *catalog.Stars { return src.base }

// BuiltIn reports whether the source is the built-in sky.
func (src *Source) BuiltIn() bool { return src.builtIn }

// Frame is one frame's share of the sky.
type Frame struct {
	// Report is the completeness of the frame's catalogue, for the frame's
	// own instant.
	Report Report
	// Depth is the V where the drawn stars stop: for the built-in sky the
	// depth drawn, where its unresolved layer starts; for a catalogue file
	// its estimated depth.
	Depth float64
	src   *Source
	limit map[catalog.SynthCell]float64 // built-in sky: per-cell depth
	key   uint64
	// instants is the number of instants the frame draws its catalogue
	// at (more than one: an open shutter).
	instants int
}

// Frame settles the catalogue of a frame whose instants (the frame's own
// first, then any others its exposure integrates) have the options given.
// For the built-in sky maxV (NaN: auto) is the depth to draw; auto draws
// every star the image can show at any instant (VisibleLimit), between
// MinDepth and AutoMaxDepth, in the cells whose Doppler factors reach the
// frame at some instant (the others keep MinDepth: no star of theirs can be
// seen). Frames with the same depth and cells share one catalogue.
func (src *Source) Frame(instants []render.Options, maxV float64) (*Frame, error) {
	if len(instants) == 0 {
		return nil, fmt.Errorf("sky: a frame without an instant")
	}
	if !src.builtIn {
		rep, err := forDepth(src.depth, instants[0])
		if err != nil {
			return nil, err
		}
		return &Frame{Report: rep, Depth: rep.Have, src: src, instants: len(instants)}, nil
	}
	tmin, tmax := BuiltInTemps()
	profs := make([]*render.DepthProfile, len(instants))
	var rep Report
	vis := math.Inf(-1)
	for k, opt := range instants {
		p, err := src.profiles.New(opt, tmin, tmax)
		if err != nil {
			return nil, err
		}
		profs[k] = p
		// The bound for the stars the image can show: the same largest
		// brightening (it does not depend on the limit) from the
		// just-visible level, as render.NeededDepth gives it.
		visNeed := VisibleLimit(opt) - p.Depth.DeltaV
		if k == 0 {
			rep = Report{Needed: p.Depth, Visible: visNeed, BuiltIn: true}
		}
		vis = math.Max(vis, visNeed)
	}
	vres := maxV
	if math.IsNaN(vres) {
		vres = math.Max(MinDepth, math.Min(AutoMaxDepth, math.Ceil(vis*10)/10))
	}
	rep.Have, rep.Deep = vres, vres > MinDepth
	f := &Frame{Report: rep, Depth: vres, src: src, instants: len(instants)}
	if !rep.Deep {
		return f, nil
	}
	f.limit = make(map[catalog.SynthCell]float64, len(src.cells))
	h := fnv.New64a()
	var buf [8]byte
	put := func(v uint64) {
		for i := range buf {
			buf[i] = byte(v >> (8 * i))
		}
		h.Write(buf[:])
	}
	put(math.Float64bits(vres))
	for ci, c := range src.cells {
		deep := false
		for k, opt := range instants {
			if cellReaches(c, opt, profs[k]) {
				deep = true
				break
			}
		}
		lim := MinDepth
		if deep {
			lim = vres
			put(uint64(ci))
		}
		f.limit[c] = lim
	}
	f.key = h.Sum64()
	return f, nil
}

// cellReaches reports whether light from some direction of cell c can be
// in the frame opt: whether the cell's Doppler factors (from the angles of
// its cap to the direction of motion, widened by 0.1 %) meet the frame's
// range (prof).
func cellReaches(c catalog.SynthCell, opt render.Options, prof *render.DepthProfile) bool {
	b := opt.Observer.Boost
	if b.Beta() == 0 {
		return true
	}
	dir := b.Dir()
	beta, gamma := b.Beta(), b.Gamma()
	dop := func(th float64) float64 { return gamma * (1 + beta*math.Cos(th)) }
	alpha := math.Acos(math.Max(-1, math.Min(1, r3.Dot(r3.Vec{X: c.Dir[0], Y: c.Dir[1], Z: c.Dir[2]}, dir))))
	th0, th1 := math.Max(0, alpha-c.Radius), math.Min(math.Pi, alpha+c.Radius)
	return !math.IsInf(prof.NeededFor(dop(th1)*0.999, dop(th0)*1.001), -1)
}

// Catalogue returns the frame's catalogue for an instant whose observer
// is at pos (pc), as Stars does, without preparing it (a single frame is
// drawn straight from it).
func (f *Frame) Catalogue(pos r3.Vec) *catalog.Stars { return f.build(pos, nil) }

// build is Catalogue in dst's storage (nil: new storage; see
// catalog.SkyCache.SkyAfter).
func (f *Frame) build(pos r3.Vec, dst *catalog.Stars) *catalog.Stars {
	src := f.src
	base := src.base
	if !catalog.SunShown([3]float64{pos.X, pos.Y, pos.Z}) {
		base = src.dim
	}
	if f.limit == nil {
		return base
	}
	return src.cache.SkyAfter(dst, base, src.nBuilt, f.Depth, func(c catalog.SynthCell) float64 { return f.limit[c] })
}

// Stars returns the frame's catalogue for an instant whose observer is at
// pos (pc), and its prepared form (render.Prepare) for drawing many
// instants or frames: Base's rows (the Sun's dimmed at the origin), then,
// for the built-in sky drawn deeper, its stars fainter than the default
// sky's in catalog.Synthetic's order. The same depth and cells give the
// same catalogue and the same Prepared. A new catalogue for a frame of one
// instant is prepared as render.PrepareOnce does, since a turning camera
// changes its cells, and so its catalogue, nearly every frame; it is
// prepared in full when a frame asks for it again (a held view). A caller
// done with the catalogue says so with Release.
func (f *Frame) Stars(pos r3.Vec) (*catalog.Stars, *render.Prepared, error) {
	src := f.src
	origin := !catalog.SunShown([3]float64{pos.X, pos.Y, pos.Z})
	key := f.key<<1 | b2u(origin)
	src.mu.Lock()
	for i, e := range src.last {
		if e.stars != nil && e.key == key {
			src.last[i].users++
			src.last[0], src.last[i] = src.last[i], src.last[0]
			src.mu.Unlock()
			if !e.once {
				return e.stars, e.prep, nil
			}
			return src.prepareAgain(e)
		}
	}
	var spare *catalog.Stars
	if f.limit != nil {
		spare, src.spare = src.spare, nil
	}
	src.mu.Unlock()
	s := f.build(pos, spare)
	once := f.instants == 1
	prepare := render.Prepare
	if once {
		prepare = render.PrepareOnce
	}
	prep, err := prepare(s)
	if err != nil {
		return nil, nil, err
	}
	src.mu.Lock()
	src.retire(src.last[1])
	src.last[1] = src.last[0]
	src.last[0] = entry{key: key, stars: s, prep: prep, once: once, built: f.limit != nil, users: 1}
	src.mu.Unlock()
	return s, prep, nil
}

// Release says that a caller of Stars is done with the catalogue s that
// call returned and with its Prepared; each call is released at most once.
// Once nothing uses it, a catalogue the source built lends its storage to
// the next one it builds (about 40 bytes a star of memory already mapped,
// where new memory costs a page fault per 4 KiB). A caller that never
// releases only forgoes that.
func (src *Source) Release(s *catalog.Stars) {
	src.mu.Lock()
	defer src.mu.Unlock()
	for i := range src.last {
		if e := &src.last[i]; e.stars == s && e.users > 0 {
			e.users--
			return
		}
	}
	for i := range src.lent {
		if e := &src.lent[i]; e.stars == s {
			if e.users--; e.users == 0 {
				src.spare = s
				src.lent = slices.Delete(src.lent, i, i+1)
			}
			return
		}
	}
}

// retire handles e leaving src.last: a catalogue the source built goes to
// spare when nothing uses it, else to lent. src.mu is held.
func (src *Source) retire(e entry) {
	if !e.built {
		return
	}
	if e.users == 0 {
		src.spare = e.stars
		return
	}
	if len(src.lent) == maxLent {
		src.lent = slices.Delete(src.lent, 0, 1)
	}
	src.lent = append(src.lent, e)
}

// prepareAgain prepares in full the catalogue of e, an entry prepared for
// one instant that a frame asks for again, and keeps it for the next.
func (src *Source) prepareAgain(e entry) (*catalog.Stars, *render.Prepared, error) {
	prep, err := render.Prepare(e.stars)
	if err != nil {
		return nil, nil, err
	}
	src.mu.Lock()
	for i := range src.last {
		if src.last[i].stars == e.stars {
			src.last[i].prep, src.last[i].once = prep, false
		}
	}
	src.mu.Unlock()
	return e.stars, prep, nil
}

func b2u(b bool) uint64 {
	if b {
		return 1
	}
	return 0
}
