package catalog

import "math"

// Concat returns a new catalogue holding a's rows, then b's (b's names
// move with their rows). An optional column (proper motions, radial
// velocities) present in only one is filled for the other's rows with 0
// (proper motion) or NaN (radial velocity). Epoch, Source and Format are
// a's. Neither input is modified.
func Concat(a, b *Stars) *Stars {
	na, nb := a.Len(), b.Len()
	n := na + nb
	s := &Stars{Epoch: a.Epoch, Source: a.Source, Format: a.Format}
	s.ID = append(append(make([]int64, 0, n), a.ID...), b.ID...)
	cat := func(x, y []float32) []float32 { return append(append(make([]float32, 0, n), x...), y...) }
	s.X, s.Y, s.Z = cat(a.X, b.X), cat(a.Y, b.Y), cat(a.Z, b.Z)
	s.Dist, s.Vmag, s.Teff, s.BV = cat(a.Dist, b.Dist), cat(a.Vmag, b.Vmag), cat(a.Teff, b.Teff), cat(a.BV, b.BV)
	s.Flags = append(append(make([]Flag, 0, n), a.Flags...), b.Flags...)
	fill := func(x []float32, m int, v float32) []float32 {
		if x != nil {
			return x
		}
		out := make([]float32, m)
		for i := range out {
			out[i] = v
		}
		return out
	}
	if a.PMRA != nil || b.PMRA != nil {
		s.PMRA = cat(fill(a.PMRA, na, 0), fill(b.PMRA, nb, 0))
		s.PMDec = cat(fill(a.PMDec, na, 0), fill(b.PMDec, nb, 0))
	}
	if a.RV != nil || b.RV != nil {
		nan := float32(math.NaN())
		s.RV = cat(fill(a.RV, na, nan), fill(b.RV, nb, nan))
	}
	if a.Names != nil || b.Names != nil {
		s.Names = make(map[int]string, len(a.Names)+len(b.Names))
		for i, nm := range a.Names {
			s.Names[i] = nm
		}
		for i, nm := range b.Names {
			s.Names[na+i] = nm
		}
	}
	return s
}
