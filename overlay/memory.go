package overlay

import (
	"math"
	"unsafe"
)

// MemoryBytes estimates, from above, what the overlays of l hold for
// a w×h frame: every lattice beacon visible, and every graticule line traced at
// MaxSegment-pixel steps along twice the frame's perimeter (a line never
// crosses the frame more often in practice). A graticule step of 1e-9° is 10¹¹
// lines; a lattice of 10⁵ per side is 10¹⁵ beacons: both are refused by
// the command's memory check with the figure instead of exhausting memory.
func (l Options) MemoryBytes(w, h int) int64 {
	var n float64
	if l.Lattice.PerSide > 0 {
		per := float64(l.Lattice.PerSide)
		n += per * per * per * float64(unsafe.Sizeof(Beacon{}))
	}
	if l.Graticule.Frame != GraticuleNone {
		step := l.Graticule.Step
		if step == 0 {
			step = DefaultGraticuleStep
		}
		lines := math.Ceil(360/step) + 2*math.Ceil(90/step)
		perLine := 4*float64(w+h)/MaxSegment + 2
		n += lines * perLine * float64(unsafe.Sizeof(Vertex{}))
	}
	if n > math.MaxInt64/2 {
		return math.MaxInt64 / 2
	}
	return int64(n)
}
