package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"time"
)

// errTooLarge reports a small input (a plan, a sidecar) beyond its limit.
var errTooLarge = errors.New("larger than the limit")

// readSmallFile reads a file that must be small (a plan, a sidecar)
// through a reader limited to limit bytes, so a device such as /dev/zero or
// an endless pipe is refused at the limit instead of filling memory (the
// size from stat is 0 for those); a directory is refused, and the read
// stops when ctx is done, including an open of a FIFO without a writer.
func readSmallFile(ctx context.Context, path string, limit int64) ([]byte, error) {
	if fi, err := os.Stat(path); err == nil && fi.IsDir() {
		return nil, fmt.Errorf("%s is a directory", path)
	}
	type result struct {
		data []byte
		err  error
	}
	ch := make(chan result, 1)
	var f *os.File
	opened := make(chan *os.File, 1)
	go func() {
		g, err := os.Open(path)
		if err != nil {
			ch <- result{nil, err}
			return
		}
		opened <- g
		data, err := io.ReadAll(io.LimitReader(g, limit+1))
		g.Close()
		ch <- result{data, err}
	}()
	select {
	case r := <-ch:
		if r.err != nil {
			return nil, r.err
		}
		if int64(len(r.data)) > limit {
			return nil, fmt.Errorf("%s: %w (at most %d bytes)", path, errTooLarge, limit)
		}
		return r.data, nil
	case <-ctx.Done():
		select {
		case f = <-opened:
			_ = f.SetReadDeadline(time.Unix(1, 0)) // wakes a read blocked on a pipe
		default:
		}
		return nil, fmt.Errorf("reading %s: %w", path, context.Cause(ctx))
	}
}

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
