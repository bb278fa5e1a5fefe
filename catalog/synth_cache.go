package catalog

import (
	"maps"
	"math"
	"slices"
	"sync"
)

// SkyCache draws the synthetic sky cell by cell on demand and keeps what it
// drew, so that the skies a sequence of frames asks for (a flight's, each
// as deep as its frame needs) draw every cell once, to the deepest limit
// asked of it. Sky(opt) is exactly Synthetic(opt) — the same rows in the
// same order with the same values — whatever was asked before, since every
// (cell, magnitude slice) is drawn from its own random stream and a
// shallower sky keeps a prefix of each slice's draws (see Synthetic). Safe
// for concurrent use.
type SkyCache struct {
	opt SynthOptions // seed, nearby stars and dust; MagLimit and CellLimit unused
	mu  sync.Mutex
	lim []float64 // per cell: the limit its blocks were drawn to (−Inf: not drawn)
	blk [][]synthBlock
	// n is the number of sampled stars held.
	n int
}

// NewSkyCache returns an empty cache of the sky opt selects (its Seed,
// NoNearby and NoExtinction; MagLimit and CellLimit are given to Sky).
func NewSkyCache(opt SynthOptions) *SkyCache {
	opt.MagLimit, opt.CellLimit = 0, nil
	c := &SkyCache{opt: opt, lim: make([]float64, synthCells), blk: make([][]synthBlock, synthCells)}
	for i := range c.lim {
		c.lim[i] = math.Inf(-1)
	}
	return c
}

// Held returns the number of sampled stars the cache holds.
func (c *SkyCache) Held() int {
	c.mu.Lock()
	defer c.mu.Unlock()
	return c.n
}

// Sky returns Synthetic(opt) with opt's MagLimit and CellLimit and the
// cache's seed, nearby stars and dust, drawing only the cells not yet drawn
// as deep as asked.
func (c *SkyCache) Sky(magLimit float64, cellLimit func(SynthCell) float64) *Stars {
	return c.SkyAfter(nil, nil, 0, magLimit, cellLimit)
}

// SkyAfter returns base's rows (none when base is nil) followed by those
// of Sky(magLimit, cellLimit) from row skip on: what Concat(base,
// Sky(magLimit, cellLimit).Slice(skip, …)) holds, copied once. A frame of
// the built-in sky drawn deeper than it, rebuilt whenever the frame's
// cells change (most frames of a turning camera), costs one copy instead of
// two, the sky's rows copying nothing before skip. dst, when not nil, lends
// the storage of its core columns, which it then shares with the result:
// a catalogue no longer in use, whose memory, unlike new memory, is
// already mapped and in cache.
func (c *SkyCache) SkyAfter(dst, base *Stars, skip int, magLimit float64, cellLimit func(SynthCell) float64) *Stars {
	opt := c.opt
	opt.MagLimit, opt.CellLimit = magLimit, cellLimit
	c.mu.Lock()
	defer c.mu.Unlock()
	limits, nSlices := c.draw(opt)
	var nearby []Star
	if !opt.NoNearby {
		for k := range nearbyStars {
			nearby = append(nearby, nearbyStars[k].star(k))
		}
	}
	n := len(nearby)
	for cell := range c.blk {
		for sl := 0; sl < min(nSlices, len(c.blk[cell])); sl++ {
			n += c.blk[cell][sl].count(limits[cell])
		}
	}
	nb := 0
	if base != nil {
		nb = base.Len()
	}
	s := &Stars{Epoch: 2000, Source: SyntheticSource, Format: SyntheticFormat}
	if dst != nil {
		s.ID, s.X, s.Y, s.Z, s.Dist = dst.ID[:0], dst.X[:0], dst.Y[:0], dst.Z[:0], dst.Dist[:0]
		s.Vmag, s.Teff, s.BV, s.Flags = dst.Vmag[:0], dst.Teff[:0], dst.BV[:0], dst.Flags[:0]
	}
	if base != nil {
		s.Epoch, s.Source, s.Format = base.Epoch, base.Source, base.Format
	}
	s.grow(nb + max(0, n-skip))
	if base != nil {
		s.appendStars(base)
		s.PMRA, s.PMDec, s.RV = slices.Clone(base.PMRA), slices.Clone(base.PMDec), slices.Clone(base.RV)
		if base.Names != nil {
			s.Names = maps.Clone(base.Names)
		}
	}
	for k := range nearby {
		if skip > 0 {
			skip--
			continue
		}
		s.Append(nearby[k])
	}
	for sl := 0; sl < nSlices; sl++ {
		for cell := range c.blk {
			if sl < len(c.blk[cell]) {
				skip = c.blk[cell][sl].appendTo(s, limits[cell], skip)
			}
		}
	}
	s.padOptional()
	return s
}

// draw draws, on up to 8 goroutines, the cells that opt asks deeper than
// they were drawn, and returns each cell's limit and the number of
// magnitude slices the deepest reaches. c.mu is held.
func (c *SkyCache) draw(opt SynthOptions) (limits []float64, nSlices int) {
	g := newSynthGen(opt)
	g.keepV = true
	limits = make([]float64, synthCells)
	var todo []int
	for cell := range limits {
		lim := g.vlim
		if opt.CellLimit != nil {
			if l := opt.CellLimit(synthCellCap(cell)); l < lim {
				lim = l
			}
		}
		limits[cell] = lim
		nSlices = max(nSlices, synthSliceOf(lim)+1)
		if c.lim[cell] < lim {
			todo = append(todo, cell)
		}
	}
	if len(todo) == 0 {
		return limits, nSlices
	}
	g.drawCells(todo, limits, c.blk)
	c.n = 0
	for _, cell := range todo {
		c.lim[cell] = limits[cell]
	}
	for cell := range c.blk {
		for _, b := range c.blk[cell] {
			c.n += b.s.Len()
		}
	}
	return limits, nSlices
}

// count returns the number of the block's stars with V ≤ lim (the exact
// float64 V each was drawn with, as Synthetic compares it).
func (b *synthBlock) count(lim float64) int {
	if b.vmax <= lim {
		return len(b.v)
	}
	n := 0
	for _, v := range b.v {
		if v <= lim {
			n++
		}
	}
	return n
}

// appendTo appends the block's stars with V ≤ lim to s, leaving out the
// first skip of them, and returns how many of skip remain to leave out.
func (b *synthBlock) appendTo(s *Stars, lim float64, skip int) int {
	cnt := b.count(lim)
	if skip >= cnt {
		return skip - cnt
	}
	if cnt == len(b.v) {
		s.appendRows(&b.s, skip, cnt)
		return 0
	}
	for i, v := range b.v {
		if v > lim {
			continue
		}
		if skip > 0 {
			skip--
			continue
		}
		s.ID = append(s.ID, b.s.ID[i])
		s.X = append(s.X, b.s.X[i])
		s.Y = append(s.Y, b.s.Y[i])
		s.Z = append(s.Z, b.s.Z[i])
		s.Dist = append(s.Dist, b.s.Dist[i])
		s.Vmag = append(s.Vmag, b.s.Vmag[i])
		s.Teff = append(s.Teff, b.s.Teff[i])
		s.BV = append(s.BV, b.s.BV[i])
		s.Flags = append(s.Flags, b.s.Flags[i])
	}
	return 0
}

// SynthCells returns the cells of the synthetic sky's sampling grid, as
// SynthOptions.CellLimit sees them, in cell order.
func SynthCells() []SynthCell {
	return slices.Clone(synthCaps()[:])
}
