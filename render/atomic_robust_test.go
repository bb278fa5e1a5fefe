package render

import (
	"errors"
	"io"
	"os"
	"path/filepath"
	"syscall"
	"testing"
)

// TestWriteFileAtomicRefusesSpecialFiles: a device, a FIFO or a directory
// at the path is never replaced by a regular file (issue: -o /dev/null
// used to be renamed over). The check is on the file type (POSIX
// S_ISREG), not on the name.
func TestWriteFileAtomicRefusesSpecialFiles(t *testing.T) {
	dir := t.TempDir()
	fifo := filepath.Join(dir, "pipe")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Skipf("cannot make a FIFO here: %v", err)
	}
	sub := filepath.Join(dir, "sub")
	if err := os.Mkdir(sub, 0o755); err != nil {
		t.Fatal(err)
	}
	link := filepath.Join(dir, "link")
	if err := os.Symlink(fifo, link); err != nil {
		t.Fatal(err)
	}
	// A character device like /dev/null (1,3), made here: the test never
	// names the system's own, which a regression would replace.
	null := filepath.Join(dir, "null")
	if err := syscall.Mknod(null, syscall.S_IFCHR|0o666, 1<<8|3); err != nil {
		t.Logf("no device node (%v): testing the FIFO, directory and link only", err)
		null = fifo
	}
	for _, p := range []string{fifo, sub, link, null} {
		before, err := os.Lstat(p)
		if err != nil {
			t.Fatal(err)
		}
		err = WriteFileAtomic(p, func(w io.Writer) error { _, err := io.WriteString(w, "x"); return err })
		if !errors.Is(err, ErrNotRegular) {
			t.Errorf("%s: err %v, want ErrNotRegular", p, err)
		}
		after, err := os.Lstat(p)
		if err != nil || after.Mode() != before.Mode() {
			t.Errorf("%s: mode %v -> %v (%v)", p, before.Mode(), after.Mode(), err)
		}
	}
	if names := dirNames(t, dir); len(names) > 4 {
		t.Errorf("directory holds %q, want only pipe, sub, link and null", names)
	}
	// A symbolic link to a regular file is replaced as before.
	reg := filepath.Join(dir, "reg")
	if err := os.WriteFile(reg, []byte("old"), 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.Symlink(reg, filepath.Join(dir, "link2")); err != nil {
		t.Fatal(err)
	}
	if err := WriteFileAtomic(filepath.Join(dir, "link2"), func(w io.Writer) error { return nil }); err != nil {
		t.Errorf("link to a regular file: %v", err)
	}
}

// TestWriteFileAtomicUmask: new files get 0666 reduced by the umask, as
// POSIX open(2) gives any created file (they used to get 0644 whatever the
// umask, or 0600 from the temporary file).
func TestWriteFileAtomicUmask(t *testing.T) {
	dir := t.TempDir()
	for _, c := range []struct{ umask, want os.FileMode }{{0o077, 0o600}, {0o022, 0o644}, {0o002, 0o664}} {
		old := syscall.Umask(int(c.umask))
		p := filepath.Join(dir, "f"+c.want.String())
		err := WriteFileAtomic(p, func(w io.Writer) error { return nil })
		syscall.Umask(old)
		if err != nil {
			t.Fatal(err)
		}
		fi, err := os.Stat(p)
		if err != nil {
			t.Fatal(err)
		}
		if fi.Mode().Perm() != c.want {
			t.Errorf("umask %03o: mode %03o, want %03o", c.umask, fi.Mode().Perm(), c.want)
		}
	}
}

// TestFileSetAllOrNothing: when the second file of a set fails, the first
// is not renamed into place either and no temporary file remains.
func TestFileSetAllOrNothing(t *testing.T) {
	dir := t.TempDir()
	a, b := filepath.Join(dir, "a.png"), filepath.Join(dir, "a.json")
	for _, p := range []string{a, b} {
		if err := os.WriteFile(p, []byte("old"), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	boom := errors.New("boom")
	var s FileSet
	if err := s.Add(a, func(w io.Writer) error { _, err := io.WriteString(w, "new"); return err }); err != nil {
		t.Fatal(err)
	}
	if err := s.Add(b, func(w io.Writer) error { return boom }); !errors.Is(err, boom) {
		t.Fatalf("second add: %v", err)
	}
	s.Abort()
	for _, p := range []string{a, b} {
		if have, _ := os.ReadFile(p); string(have) != "old" {
			t.Errorf("%s: %q, want the old content", p, have)
		}
	}
	if names := dirNames(t, dir); len(names) != 2 {
		t.Errorf("directory holds %q", names)
	}
	var s2 FileSet
	defer s2.Abort()
	for _, p := range []string{a, b} {
		if err := s2.Add(p, func(w io.Writer) error { _, err := io.WriteString(w, "new"); return err }); err != nil {
			t.Fatal(err)
		}
	}
	if err := s2.Add(a, func(w io.Writer) error { return nil }); err == nil {
		t.Error("the same path twice in a set was accepted")
	}
	if err := s2.Commit(); err != nil {
		t.Fatal(err)
	}
	for _, p := range []string{a, b} {
		if have, _ := os.ReadFile(p); string(have) != "new" {
			t.Errorf("%s: %q after commit", p, have)
		}
	}
}
