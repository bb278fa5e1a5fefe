package render

import (
	"errors"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// dirNames lists a directory, failing the test on error.
func dirNames(t *testing.T, dir string) []string {
	t.Helper()
	ents, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, e := range ents {
		names = append(names, e.Name())
	}
	return names
}

func TestWriteFileAtomicSuccess(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "frame.png")
	for _, content := range []string{"first version", "second, longer version", "3rd"} {
		err := WriteFileAtomic(path, func(w io.Writer) error {
			_, err := io.WriteString(w, content)
			return err
		})
		if err != nil {
			t.Fatal(err)
		}
		have, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		if string(have) != content {
			t.Errorf("content: have %q, want %q", have, content)
		}
		if names := dirNames(t, dir); len(names) != 1 || names[0] != "frame.png" {
			t.Errorf("directory holds %q, want only frame.png", names)
		}
	}
	fi, err := os.Stat(path)
	if err != nil {
		t.Fatal(err)
	}
	if perm := fi.Mode().Perm(); perm != 0o644 {
		t.Errorf("mode of new file: have %o, want 644", perm)
	}
	// The mode of a replaced file is kept.
	if err := os.Chmod(path, 0o600); err != nil {
		t.Fatal(err)
	}
	if err := WriteFileAtomic(path, func(w io.Writer) error { return nil }); err != nil {
		t.Fatal(err)
	}
	if fi, err := os.Stat(path); err != nil || fi.Mode().Perm() != 0o600 || fi.Size() != 0 {
		t.Errorf("replaced file: have %v %v, want mode 600 size 0", fi.Mode(), err)
	}
}

func TestWriteFileAtomicFailureMidway(t *testing.T) {
	errBoom := errors.New("boom")
	failing := func(w io.Writer) error {
		// More than the 1 MiB buffer, so part of it reaches the temp file.
		if _, err := w.Write(make([]byte, 3<<20)); err != nil {
			return err
		}
		return errBoom
	}
	t.Run("new file", func(t *testing.T) {
		dir := t.TempDir()
		path := filepath.Join(dir, "out.fits")
		err := WriteFileAtomic(path, failing)
		if !errors.Is(err, errBoom) || !strings.Contains(err.Error(), path) {
			t.Fatalf("error: have %v, want %v naming %s", err, errBoom, path)
		}
		if names := dirNames(t, dir); len(names) != 0 {
			t.Errorf("left behind %q, want an empty directory", names)
		}
	})
	t.Run("existing file", func(t *testing.T) {
		dir := t.TempDir()
		path := filepath.Join(dir, "out.fits")
		if err := os.WriteFile(path, []byte("old"), 0o644); err != nil {
			t.Fatal(err)
		}
		if err := WriteFileAtomic(path, failing); !errors.Is(err, errBoom) {
			t.Fatalf("error: have %v, want %v", err, errBoom)
		}
		if have, _ := os.ReadFile(path); string(have) != "old" {
			t.Errorf("old file content: have %q, want %q", have, "old")
		}
		if names := dirNames(t, dir); len(names) != 1 {
			t.Errorf("directory holds %q, want only out.fits", names)
		}
	})
}

func TestWriteFileAtomicBadPath(t *testing.T) {
	dir := t.TempDir()
	ok := func(w io.Writer) error { _, err := io.WriteString(w, "x"); return err }
	missing := filepath.Join(dir, "no", "such", "dir", "f.png")
	if err := WriteFileAtomic(missing, ok); err == nil || !strings.Contains(err.Error(), missing) {
		t.Errorf("missing directory: have %v, want an error naming %s", err, missing)
	}
	// A directory in the way: the rename fails and the temp file goes.
	sub := filepath.Join(dir, "taken")
	if err := os.Mkdir(sub, 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(filepath.Join(sub, "keep"), nil, 0o644); err != nil {
		t.Fatal(err)
	}
	if err := WriteFileAtomic(sub, ok); err == nil || !strings.Contains(err.Error(), sub) {
		t.Errorf("directory target: have %v, want an error naming %s", err, sub)
	}
	if names := dirNames(t, dir); len(names) != 1 || names[0] != "taken" {
		t.Errorf("directory holds %q, want only taken", names)
	}
	if err := WriteFileAtomic(dir+string(filepath.Separator), ok); err == nil {
		t.Error("path ending in a separator: no error")
	}
	if err := WriteFileAtomic(filepath.Join(dir, "f"), nil); err == nil {
		t.Error("nil write function: no error")
	}
	if os.Geteuid() != 0 { // root may write anywhere
		ro := filepath.Join(dir, "ro")
		if err := os.Mkdir(ro, 0o555); err != nil {
			t.Fatal(err)
		}
		p := filepath.Join(ro, "f.png")
		if err := WriteFileAtomic(p, ok); err == nil || !strings.Contains(err.Error(), p) {
			t.Errorf("read-only directory: have %v, want an error naming %s", err, p)
		}
	}
}
