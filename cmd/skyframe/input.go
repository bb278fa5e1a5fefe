package main

import (
	"context"
	"io"
)

// ctxWriter fails every write once ctx is done, so that encoding a large
// frame stops at the next write (at most one PNG strip or buffer) and the
// atomic writer removes its temporary file.
type ctxWriter struct {
	ctx context.Context
	w   io.Writer
}

func (c ctxWriter) Write(p []byte) (int, error) {
	if err := c.ctx.Err(); err != nil {
		return 0, context.Cause(c.ctx)
	}
	return c.w.Write(p)
}
