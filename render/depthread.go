package render

import (
	"context"
	"fmt"
	"math"

	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/spectrum"
)

// depthMargin (mag) widens the bound of DepthBins beyond NeededDepth's: the
// renderer's photometry uses fast logarithms and a batch table look-up that
// agree with BrighteningV's to about 10⁻⁶ mag, and MaxBrightening's grid
// search finds its extreme to better than 10⁻³ mag; 0.05 covers both
// with room.
const depthMargin = 0.05

// magPerLn converts a ln flux ratio to magnitudes: 2.5/ln 10.
const magPerLn = 2.5 / math.Ln10

// DepthBins returns how many leading bins of a sorted cache's magnitude
// index x hold every star the frame opt can draw, so that reading only
// those rows (catalog.ChunkReader.LimitBins) gives the frame of the whole
// cache bit for bit. A star is drawn when its observed V′ reaches the
// limit, or when it is resolved as a disc or holds the observer (drawn, or
// refused, whatever its V′); the bound covers all three, bin by bin:
//
//   - limit: V ≤ Needed + 5 log₁₀ q_k + margin, Needed from NeededDepth
//     over the index's Teff bounds, q_k = d_k/(d_k − |P|) the largest
//     brightening by distance of the bin's stars (nearest d_k) seen from
//     the observer at P instead of the Sun (1 at the Sun);
//   - disc or inside: V ≤ (ln F_V0 − min_T ln F_V(T) − θ + 2 ln q_k)/0.921,
//     θ = min(0, ln ρ²_disc + 2 ln D_min), D_min = √((1−β)/(1+β)) the
//     smallest Doppler factor in any direction: the faintest catalogue V
//     whose dilution can reach the disc threshold;
//
// a bin whose nearest star is not farther from the Sun than the observer
// (q unbounded) is always read. Bins are read as a prefix (the bins after
// the last one needed are left out), so rows keep their numbers.
func DepthBins(opt Options, x *catalog.MagIndex) (int, error) {
	k := x.Bins()
	if math.IsInf(opt.Limit, 1) {
		return k, nil
	}
	dep, err := NeededDepth(opt, x.TMin, x.TMax)
	if err != nil {
		return k, err
	}
	// The faintest surface over the temperatures: disc and inside bounds.
	minLnV := math.Inf(1)
	for j := 0; j <= 64; j++ {
		T := x.TMin * math.Pow(x.TMax/x.TMin, float64(j)/64)
		minLnV = math.Min(minLnV, spectrum.Lookup(math.Log(T)).LnV)
	}
	beta := opt.Observer.Boost.Beta()
	lnDmin := 0.5 * math.Log((1-beta)/(1+beta))
	theta := math.Min(0, lnDiscThreshold(&opt.Projection)+2*lnDmin)
	// ln W⊙ = LnWForV(V, ln F_V(T)) ≥ θ − 2 ln q  ⇔  V ≤ (LnWForV(0, ·) − θ + 2 ln q)·2.5/ln 10.
	vDisc := (spectrum.LnWForV(0, minLnV) - theta) * magPerLn
	pos := math.Sqrt(opt.Observer.Position.X*opt.Observer.Position.X + opt.Observer.Position.Y*opt.Observer.Position.Y +
		opt.Observer.Position.Z*opt.Observer.Position.Z)
	bins := 0
	for b := 0; b < k; b++ {
		lnQ := 0.0
		if d := float64(x.MinDist[b]); pos > 0 && !math.IsInf(d, 1) {
			if d <= pos {
				bins = b + 1
				continue
			}
			lnQ = math.Log(d / (d - pos))
		}
		v := math.Max(dep.Needed, vDisc) + 2*lnQ*magPerLn + depthMargin
		if x.Lower(b) <= v {
			bins = b + 1
		}
	}
	return max(bins, 1), nil
}

// RenderChunks renders the cache cr reads (see RenderStream), stopping
// with context.Cause(ctx) between chunks once ctx is done. From a sorted
// cache it reads only the bins DepthBins needs: the frame (pixels, Doppler
// channel, Brightest, Drawn) is the one the whole cache gives, bit for
// bit; the rows left unread are counted in Stats.Total and Stats.Culled.
// A cache in file order is read in full.
func RenderChunks(ctx context.Context, cr *catalog.ChunkReader, opt Options) (*Frame, error) {
	if x := cr.Index(); x != nil {
		bins, err := DepthBins(opt, x)
		if err != nil {
			return nil, err
		}
		if err := cr.LimitBins(bins); err != nil {
			return nil, fmt.Errorf("render: %w", err)
		}
	}
	f, err := RenderStream(func() (*catalog.Stars, error) {
		if err := ctx.Err(); err != nil {
			return nil, context.Cause(ctx)
		}
		return cr.Next()
	}, opt)
	if err != nil {
		return nil, err
	}
	unread := cr.Len() - cr.Rows()
	f.Stats.Total += unread
	f.Stats.Culled += unread
	return f, nil
}
