package render

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
)

// WriteFileAtomic writes a file so that path either keeps its old content
// or holds the complete new content, never a partial file.
//
// It creates a temporary file ".<base>.tmp-*" in the directory of path (so
// the final rename stays within one file system), calls write with a
// buffered writer on it, flushes, fsyncs and closes it, checking every
// error, and then renames it over path. On any failure, including an error
// returned by write, the temporary file is removed and the error, naming
// path, is returned. The new file keeps the permission bits of the file it
// replaces, or gets 0644 (not reduced by the umask) when path is new.
func WriteFileAtomic(path string, write func(io.Writer) error) (err error) {
	if write == nil {
		return fmt.Errorf("render: writing %s: nil write function", path)
	}
	dir, base := filepath.Split(path)
	if base == "" {
		return fmt.Errorf("render: writing %q: path names a directory", path)
	}
	if dir == "" {
		dir = "."
	}
	f, err := os.CreateTemp(dir, "."+base+".tmp-*")
	if err != nil {
		return fmt.Errorf("render: writing %s: %w", path, err)
	}
	tmp := f.Name()
	closed := false
	defer func() {
		if err == nil {
			return
		}
		if !closed {
			_ = f.Close() // the write error is the one to report
		}
		_ = os.Remove(tmp) // best effort: nothing better to do on failure
	}()

	bw := bufio.NewWriterSize(f, 1<<20)
	if err := write(bw); err != nil {
		return fmt.Errorf("render: writing %s: %w", path, err)
	}
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("render: writing %s: %w", path, err)
	}
	// CreateTemp uses mode 0600; keep the mode of the file being replaced,
	// else use the common 0644.
	mode := os.FileMode(0o644)
	if fi, err := os.Stat(path); err == nil && fi.Mode().IsRegular() {
		mode = fi.Mode().Perm()
	}
	if err := f.Chmod(mode); err != nil {
		return fmt.Errorf("render: writing %s: %w", path, err)
	}
	if err := f.Sync(); err != nil {
		return fmt.Errorf("render: syncing %s: %w", path, err)
	}
	closed = true
	if err := f.Close(); err != nil {
		return fmt.Errorf("render: closing %s: %w", path, err)
	}
	if err := os.Rename(tmp, path); err != nil {
		var le *os.LinkError
		if errors.As(err, &le) {
			err = le.Err
		}
		return fmt.Errorf("render: replacing %s: %w", path, err)
	}
	return nil
}
