package render

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"

	"github.com/skyframe/skyframe/internal/keep"
	"github.com/skyframe/skyframe/internal/tempfile"
)

// ErrNotRegular is returned (wrapped, naming the path) when a write would
// replace something that is not a regular file: a device such as
// /dev/null, a FIFO, a socket or a directory. Renaming over those would
// destroy them (as root, the system's /dev/null).
var ErrNotRegular = errors.New("exists and is not a regular file")

// CheckReplaceable reports whether path may be written by WriteFileAtomic:
// nil when it does not exist or is a regular file (or a symbolic link to
// one, which the write replaces by a file); an error wrapping
// ErrNotRegular, naming what path is, otherwise.
func CheckReplaceable(path string) error {
	fi, err := os.Lstat(path)
	if errors.Is(err, fs.ErrNotExist) {
		return nil
	}
	if err != nil {
		return fmt.Errorf("render: %s: %w", path, err)
	}
	if fi.Mode()&fs.ModeSymlink != 0 {
		target, err := os.Stat(path)
		if errors.Is(err, fs.ErrNotExist) {
			return nil // a dangling link is replaced by the new file
		}
		if err != nil {
			return fmt.Errorf("render: %s: %w", path, err)
		}
		fi = target
	}
	if fi.Mode().IsRegular() {
		return nil
	}
	return fmt.Errorf("render: %s %w (it is a %s); name a file", path, ErrNotRegular, kindOf(fi.Mode()))
}

func kindOf(m fs.FileMode) string {
	switch {
	case m.IsDir():
		return "directory"
	case m&fs.ModeNamedPipe != 0:
		return "FIFO"
	case m&fs.ModeSocket != 0:
		return "socket"
	case m&fs.ModeCharDevice != 0:
		return "character device"
	case m&fs.ModeDevice != 0:
		return "device"
	}
	return "special file"
}

// TempPrefix returns the prefix of the temporary files written for path
// (".<base>.tmp-"), so that a caller can recognise ones left behind by a
// killed process.
func TempPrefix(path string) string { return "." + filepath.Base(path) + ".tmp-" }

// createTemp creates a new temporary file for path in its directory, with
// mode 0666 less the umask (see internal/tempfile).
func createTemp(path string) (*os.File, error) {
	dir, base := filepath.Split(path)
	if base == "" {
		return nil, fmt.Errorf("render: writing %q: path names a directory", path)
	}
	f, err := tempfile.Create(dir, TempPrefix(path), "")
	if err != nil {
		return nil, fmt.Errorf("render: writing %s: %w", path, err)
	}
	return f, nil
}

// pending is one file of a FileSet: written, synced and closed, not yet
// renamed into place.
type pending struct{ path, tmp string }

// FileSet writes several files all or nothing: Add writes each to its own
// temporary file beside its path (fsynced and closed), Commit renames them
// all into place once every one was written, and Abort (safe to defer; a
// no-op after Commit) removes the temporary files. A failure while adding
// leaves every path as it was. The zero value is ready to use.
type FileSet struct {
	files []pending
	done  bool
}

// fileBufs keeps the files' 1 MiB write buffers (a flight writes two or
// more files a frame; allocating each anew was 2 MiB of garbage a frame).
var fileBufs = keep.List[*bufio.Writer]{Max: 4}

// Add writes path's new content to a temporary file through write (a
// buffered writer). It refuses a path that exists and is not a regular
// file (ErrNotRegular) and a path already in the set. The new file keeps
// the permission bits of the regular file it replaces; a new file gets
// 0666 reduced by the process umask.
func (s *FileSet) Add(path string, write func(io.Writer) error) (err error) {
	if write == nil {
		return fmt.Errorf("render: writing %s: nil write function", path)
	}
	for _, p := range s.files {
		if filepath.Clean(p.path) == filepath.Clean(path) {
			return fmt.Errorf("render: writing %s twice in one set", path)
		}
	}
	if err := CheckReplaceable(path); err != nil {
		return err
	}
	f, err := createTemp(path)
	if err != nil {
		return err
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

	bw, ok := fileBufs.Get()
	if !ok {
		bw = bufio.NewWriterSize(f, 1<<20)
	}
	bw.Reset(f)
	err = write(bw)
	if err == nil {
		err = bw.Flush()
	}
	bw.Reset(nil)
	fileBufs.Put(bw)
	if err != nil {
		return fmt.Errorf("render: writing %s: %w", path, err)
	}
	if fi, err := os.Stat(path); err == nil && fi.Mode().IsRegular() {
		if err := f.Chmod(fi.Mode().Perm()); err != nil {
			return fmt.Errorf("render: writing %s: %w", path, err)
		}
	}
	if err := f.Sync(); err != nil {
		return fmt.Errorf("render: syncing %s: %w", path, err)
	}
	closed = true
	if err := f.Close(); err != nil {
		return fmt.Errorf("render: closing %s: %w", path, err)
	}
	s.files = append(s.files, pending{path: path, tmp: tmp})
	return nil
}

// Commit renames every written file into place, in the order added. A
// rename can fail only for reasons outside the program (the directory
// removed meanwhile, for instance); the files not yet renamed are then
// removed and the error names the path.
func (s *FileSet) Commit() error {
	if s.done {
		return errors.New("render: file set committed twice")
	}
	for i, p := range s.files {
		if err := CheckReplaceable(p.path); err != nil {
			s.files = s.files[i:]
			s.Abort()
			return err
		}
		if err := os.Rename(p.tmp, p.path); err != nil {
			var le *os.LinkError
			if errors.As(err, &le) {
				err = le.Err
			}
			s.files = s.files[i:]
			s.Abort()
			return fmt.Errorf("render: replacing %s: %w", p.path, err)
		}
	}
	s.done = true
	return nil
}

// Abort removes the temporary files not yet committed.
func (s *FileSet) Abort() {
	if s.done {
		return
	}
	for _, p := range s.files {
		_ = os.Remove(p.tmp) // best effort
	}
	s.files = nil
	s.done = true
}

// WriteFileAtomic writes a file so that path either keeps its old content
// or holds the complete new content, never a partial file.
//
// It creates a temporary file ".<base>.tmp-*" in the directory of path (so
// the final rename stays within one file system), calls write with a
// buffered writer on it, flushes, fsyncs and closes it, checking every
// error, and then renames it over path. On any failure, including an error
// returned by write, the temporary file is removed and the error, naming
// path, is returned. It refuses to replace anything that is not a regular
// file (ErrNotRegular). The new file keeps the permission bits of the file
// it replaces, or gets 0666 reduced by the umask when path is new. It is a
// FileSet of one file.
func WriteFileAtomic(path string, write func(io.Writer) error) error {
	var s FileSet
	defer s.Abort()
	if err := s.Add(path, write); err != nil {
		return err
	}
	return s.Commit()
}
