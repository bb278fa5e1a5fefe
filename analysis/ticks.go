package analysis

import (
	"math"
	"strconv"

	"gonum.org/v1/plot"
)

// niceStep returns 1, 2 or 5 × 10^k closest above span/target.
func niceStep(span float64, target int) float64 {
	raw := span / float64(target)
	if !(raw > 0) || math.IsInf(raw, 0) {
		return 1
	}
	p := math.Pow(10, math.Floor(math.Log10(raw)))
	for _, m := range []float64{1, 2, 5, 10} {
		if m*p >= raw {
			return m * p
		}
	}
	return 10 * p
}

// linearTicks labels about five round values (1, 2, 5 × 10^k steps) with
// unlabelled minor ticks halfway.
func linearTicks() plot.Ticker {
	return plot.TickerFunc(func(min, max float64) []plot.Tick {
		step := niceStep(max-min, 6)
		prec := max0(-int(math.Floor(math.Log10(step))))
		var ts []plot.Tick
		half := step / 2
		for k := math.Ceil(min / half); k*half <= max+1e-9*step; k++ {
			v := k * half
			if math.Abs(v) < 1e-12*step {
				v = 0
			}
			t := plot.Tick{Value: v}
			if int64(k)%2 == 0 {
				t.Label = strconv.FormatFloat(v, 'f', prec, 64)
			}
			ts = append(ts, t)
		}
		return ts
	})
}

func max0(v int) int {
	if v < 0 {
		return 0
	}
	return v
}

// logTicks is the ticker of an axis that carries log10 of the values: it
// labels powers of ten (every few when the range spans many
// decades), 1e-12 style beyond 1e-4 .. 1e5, with unlabelled minor ticks at
// 2..9 × 10^k for ranges up to six decades; ranges under two decades also
// label 2 and 5 × 10^k, ranges under one decade every m × 10^k.
func logTicks() plot.Ticker {
	return plot.TickerFunc(func(lmin, lmax float64) []plot.Tick {
		if !(lmax > lmin) {
			return nil
		}
		min, max := math.Pow(10, lmin), math.Pow(10, lmax)
		k0, k1 := int(math.Floor(math.Log10(min))), int(math.Ceil(math.Log10(max)))
		nd := k1 - k0
		stride := max0((nd + 6) / 7) // ≤ 7 labels
		if stride < 1 {
			stride = 1
		}
		var ts []plot.Tick
		in := func(v float64) bool { return v >= min*(1-1e-9) && v <= max*(1+1e-9) }
		for k := k0; k <= k1; k++ {
			p := math.Pow10(k)
			if in(p) {
				t := plot.Tick{Value: float64(k)}
				if ((k%stride)+stride)%stride == 0 {
					t.Label = powLabel(k)
				}
				ts = append(ts, t)
			}
			if nd > 6 {
				continue
			}
			for m := 2; m <= 9; m++ {
				v := float64(m) * p
				if !in(v) {
					continue
				}
				t := plot.Tick{Value: math.Log10(v)}
				if span := math.Log10(max / min); span < 1 || (span < 2 && (m == 2 || m == 5)) {
					t.Label = strconv.FormatFloat(v, 'g', 3, 64)
				}
				ts = append(ts, t)
			}
		}
		return ts
	})
}

func powLabel(k int) string {
	if k >= -4 && k <= 5 {
		return strconv.FormatFloat(math.Pow10(k), 'f', max0(-k), 64)
	}
	return "1e" + strconv.Itoa(k)
}
