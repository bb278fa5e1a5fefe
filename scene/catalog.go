package scene

import (
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"github.com/skyframe/skyframe/catalog"
	"github.com/skyframe/skyframe/render"
)

// ReadOptions builds catalogue read options from --catalog-format and
// --column values, naming the flag in an error.
func ReadOptions(format string, columns []string) (catalog.ReadOptions, error) {
	var opt catalog.ReadOptions
	if format != "" {
		f, err := catalog.ParseFormat(format)
		if err != nil {
			return opt, usagef("--catalog-format: %v", err)
		}
		opt.Format = f
	}
	cm, err := catalog.ParseColumns(columns)
	if err != nil {
		return opt, usagef("--column: %v", err)
	}
	opt.Columns = cm
	return opt, nil
}

// WriteSkipped tells, on w (stderr), how many rows of a catalogue were
// skipped and why, so that no command drops rows without a word; catalog
// inspect prints the same on stdout as part of its report.
func WriteSkipped(w io.Writer, r *catalog.Report) {
	if r == nil || r.Skipped == 0 {
		return
	}
	var parts []string
	for _, sk := range r.Skips {
		switch {
		case sk.FirstLine == 0:
			parts = append(parts, fmt.Sprintf("%d %s", sk.Count, sk.Reason))
		case sk.File != "":
			parts = append(parts, fmt.Sprintf("%d %s (first at %s:%d)", sk.Count, sk.Reason, sk.File, sk.FirstLine))
		default:
			parts = append(parts, fmt.Sprintf("%d %s (first at line %d)", sk.Count, sk.Reason, sk.FirstLine))
		}
	}
	fmt.Fprintf(w, "skyframe: %s: %d rows skipped: %s\n", r.Source, r.Skipped, strings.Join(parts, ", "))
}

// SameFile reports whether a and b name one existing file (through links
// or different spellings).
func SameFile(a, b string) bool {
	fa, err1 := os.Stat(a)
	fb, err2 := os.Stat(b)
	return err1 == nil && err2 == nil && os.SameFile(fa, fb)
}

// CheckWritable fails early, with the flag's name, when path names
// something that is not a regular file (a device such as /dev/null, a FIFO,
// a directory: never replaced) or its directory cannot take a new file.
func CheckWritable(flag, path string) error {
	if st, err := os.Stat(path); err == nil && st.IsDir() {
		return usagef("--%s %s: is a directory", flag, path)
	}
	if err := render.CheckReplaceable(path); err != nil {
		return usagef("--%s %s: exists and is not a regular file (only regular files are replaced); name a file", flag, path)
	}
	dir := filepath.Dir(path)
	st, err := os.Stat(dir)
	if err != nil {
		return usagef("--%s %s: directory %s does not exist", flag, path, dir)
	}
	if !st.IsDir() {
		return usagef("--%s %s: %s is not a directory", flag, path, dir)
	}
	f, err := os.CreateTemp(dir, ".skyframe-probe-*")
	if err != nil {
		return usagef("--%s %s: cannot write in %s: %v", flag, path, dir, err)
	}
	name := f.Name()
	f.Close()
	os.Remove(name)
	return nil
}
