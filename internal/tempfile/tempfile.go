package tempfile

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"strconv"
	"sync/atomic"
)

var seq atomic.Uint64

// Create creates a new file named prefix + "<pid>-<n>" + suffix in dir,
// opened for reading and writing with mode 0666 less the umask, and fails
// rather than reuse an existing name.
func Create(dir, prefix, suffix string) (*os.File, error) {
	if dir == "" {
		dir = "."
	}
	pid := strconv.Itoa(os.Getpid())
	for range 10000 {
		name := filepath.Join(dir, prefix+pid+"-"+strconv.FormatUint(seq.Add(1), 10)+suffix)
		f, err := os.OpenFile(name, os.O_RDWR|os.O_CREATE|os.O_EXCL, 0o666)
		if errors.Is(err, fs.ErrExist) {
			continue
		}
		return f, err
	}
	return nil, fmt.Errorf("no free temporary file name in %s", dir)
}
