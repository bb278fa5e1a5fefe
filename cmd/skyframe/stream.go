package main

import (
	"math"

	"github.com/dustin/go-humanize"
)

// parseMemory reads --memory: a size such as 512MiB, 4GiB or 2GB.
func parseMemory(s string) (int64, error) {
	v, err := humanize.ParseBytes(s)
	if err != nil || v == 0 || v > math.MaxInt64 {
		return 0, usagef("--memory %q: want a size such as 512MiB, 4GiB or 2GB", s)
	}
	return int64(v), nil
}
