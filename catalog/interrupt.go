package catalog

import (
	"context"
	"fmt"
	"io"
	"os"
	"time"
)

// OpenContext is Open that stops promptly when ctx is done: opening a FIFO
// that no process writes to, reading a pipe, or parsing a large file all
// give up within one read (64 KiB) of the cancellation and return an error
// wrapping ctx.Err() (never a *ParseError: the input was not at fault).
func OpenContext(ctx context.Context, path string, opt ReadOptions) (*Stars, *Report, error) {
	f, err := openInterruptible(ctx, path)
	if err != nil {
		return nil, nil, err
	}
	defer f.Close()
	// A read blocked on a pipe is woken by a deadline in the past; regular
	// files do not block and ignore it (os.ErrNoDeadline).
	stop := context.AfterFunc(ctx, func() { _ = f.SetReadDeadline(time.Unix(1, 0)) })
	defer stop()
	s, rep, err := open(f, &ctxReader{ctx: ctx, r: f}, path, opt)
	if ctx.Err() != nil {
		return nil, rep, fmt.Errorf("catalog: reading %s: %w", path, context.Cause(ctx))
	}
	return s, rep, err
}

// openInterruptible opens path for reading. Opening a FIFO blocks until a
// writer appears, so anything that is not a regular file or a directory is
// opened in a goroutine that ctx can abandon (the file is closed if the
// open completes later).
func openInterruptible(ctx context.Context, path string) (*os.File, error) {
	if err := ctx.Err(); err != nil {
		return nil, fmt.Errorf("catalog: opening %s: %w", path, context.Cause(ctx))
	}
	if fi, err := os.Stat(path); err != nil || fi.Mode().IsRegular() || fi.IsDir() {
		f, err := os.Open(path)
		if err != nil {
			return nil, fmt.Errorf("catalog: %w", err)
		}
		return f, nil
	}
	type opened struct {
		f   *os.File
		err error
	}
	ch := make(chan opened, 1)
	go func() {
		f, err := os.Open(path)
		ch <- opened{f, err}
	}()
	select {
	case o := <-ch:
		if o.err != nil {
			return nil, fmt.Errorf("catalog: %w", o.err)
		}
		return o.f, nil
	case <-ctx.Done():
		go func() {
			if o := <-ch; o.f != nil {
				o.f.Close()
			}
		}()
		return nil, fmt.Errorf("catalog: opening %s: %w", path, context.Cause(ctx))
	}
}

// ctxReader fails every read once ctx is done.
type ctxReader struct {
	ctx context.Context
	r   io.Reader
}

func (c *ctxReader) Read(p []byte) (int, error) {
	if err := c.ctx.Err(); err != nil {
		return 0, context.Cause(c.ctx)
	}
	return c.r.Read(p)
}

// ctxReaderAt fails every read once ctx is done.
type ctxReaderAt struct {
	ctx context.Context
	r   io.ReaderAt
}

func (c ctxReaderAt) ReadAt(p []byte, off int64) (int, error) {
	if err := c.ctx.Err(); err != nil {
		return 0, context.Cause(c.ctx)
	}
	return c.r.ReadAt(p, off)
}
