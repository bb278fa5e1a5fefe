package job

import (
	"fmt"
	"strconv"

	"github.com/skyframe/skyframe/sky"
)

// DepthWarning returns the completeness warning of a flight ("" when
// none is due) for the worst
// of the frames whose catalogue falls short (short, in rendering order,
// with their reports), naming it and how many fall short.
func DepthWarning(short []int, reps map[int]sky.Report) string {
	if len(short) == 0 {
		return ""
	}
	list := make([]sky.Report, len(short))
	for k, i := range short {
		list[k] = reps[i]
	}
	worst, k := sky.Worst(list)
	if k < 0 {
		return ""
	}
	what := fmt.Sprintf("frame %d, the worst of %d frames that fall short (%s),", short[k], len(short), frameSpan(short))
	if len(short) == 1 {
		what = fmt.Sprintf("frame %d", short[k])
	}
	return worst.Warning("flight", what)
}

// frameSpan describes a sorted list of frame numbers by its first and last.
func frameSpan(frames []int) string {
	if len(frames) == 1 {
		return strconv.Itoa(frames[0])
	}
	return fmt.Sprintf("frames %d–%d", frames[0], frames[len(frames)-1])
}
