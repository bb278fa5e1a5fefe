package main

import (
	"bytes"
	"net/http"
	"net/http/httptest"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"testing"
)

// Regression tests for the defects of the second robustness audit, one per
// item, at the command level where the defect was seen there.

// mkfifo makes a FIFO at dir/name or skips the test.
func mkfifo(t *testing.T, dir, name string) string {
	t.Helper()
	p := filepath.Join(dir, name)
	if err := syscall.Mkfifo(p, 0o644); err != nil {
		t.Skipf("cannot make a FIFO here: %v", err)
	}
	return p
}

// mknull makes a character device like /dev/null (1,3; Linux's
// devices.txt) at dir/name, or skips the test. The tests never name the
// system's /dev/null: code that regressed would replace it.
func mknull(t *testing.T, dir, name string) string {
	t.Helper()
	p := filepath.Join(dir, name)
	if err := syscall.Mknod(p, syscall.S_IFCHR|0o666, 1<<8|3); err != nil {
		t.Skipf("cannot make a device node here: %v", err)
	}
	return p
}

// TestStillRefusesSpecialOutputs (item 7): an output naming a device, a
// FIFO or a directory is refused with status 2 naming the flag, and left
// as it was; it used to be replaced by a regular file.
func TestStillRefusesSpecialOutputs(t *testing.T) {
	dir := t.TempDir()
	fifo := mkfifo(t, dir, "pipe")
	null := mknull(t, dir, "null")
	png := filepath.Join(dir, "x.png")
	cases := []struct {
		name string
		args []string
		flag string
	}{
		{"-o FIFO", []string{"-o", fifo, "--no-sidecar"}, "--output"},
		{"--sidecar FIFO", []string{"-o", png, "--sidecar", fifo}, "--sidecar"},
		{"--fits FIFO", []string{"-o", png, "--fits", fifo}, "--fits"},
		{"-o device", []string{"-o", null, "--no-sidecar"}, "--output"},
		{"--sidecar device", []string{"-o", png, "--sidecar", null}, "--sidecar"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			code, msg := hostileRun(t, append([]string{"still", "--size", "16x16"}, c.args...)...)
			hostileExpect(t, code, msg, []string{c.flag, "not a regular file"}, dir, "pipe", "null")
			if fi, err := os.Lstat(fifo); err != nil || fi.Mode()&os.ModeNamedPipe == 0 {
				t.Errorf("the FIFO was replaced: %v %v", fi.Mode(), err)
			}
			if fi, err := os.Lstat(null); err != nil || fi.Mode()&os.ModeCharDevice == 0 {
				t.Errorf("the device was replaced: %v %v", fi.Mode(), err)
			}
		})
	}
	t.Run("catalog pack -o FIFO", func(t *testing.T) {
		code, msg := hostileRun(t, "catalog", "pack", filepath.Join(hostileFixtures, "generic_good.csv"), "-o", fifo)
		hostileExpect(t, code, msg, []string{"--output", "not a regular file"}, dir, "pipe", "null")
	})
}

// TestStillExposureOutOfRange (item 6): --exposure 1000 used to render,
// fail in the sidecar (+Inf scale) and leave the new PNG beside the old
// sidecar. It is refused before rendering, and a previous run's files stay
// as they were.
func TestStillExposureOutOfRange(t *testing.T) {
	for _, v := range []string{"1000", "-1000", "41", "1e308"} {
		t.Run(v, func(t *testing.T) {
			dir := t.TempDir()
			png := hostileFile(t, dir, "x.png", []byte("old png"))
			side := hostileFile(t, dir, "x.json", []byte("old json"))
			code, msg := hostileRun(t, "still", "--size", "16x16", "-o", png, "--exposure", v)
			hostileExpect(t, code, msg, []string{"--exposure", "from -30 to 40"}, dir, "x.png", "x.json")
			for p, want := range map[string]string{png: "old png", side: "old json"} {
				if b, _ := os.ReadFile(p); string(b) != want {
					t.Errorf("%s: %q, want %q", p, b, want)
				}
			}
		})
	}
	// The ends of the documented range render.
	dir := t.TempDir()
	for _, v := range []string{"-30", "40"} {
		if code, msg := hostileRun(t, "still", "--size", "16x16", "-o", filepath.Join(dir, "x.png"), "--exposure", v); code != exitOK {
			t.Errorf("--exposure %s: status %d: %s", v, code, msg)
		}
	}
}

// TestStillHonoursUmask (item 11): written files get 0666 reduced by the
// umask (POSIX open(2)), as any created file does; they used to get 0644
// whatever the umask.
func TestStillHonoursUmask(t *testing.T) {
	dir := t.TempDir()
	old := syscall.Umask(0o077)
	code, msg := hostileRun(t, "still", "--size", "16x16", "-o", filepath.Join(dir, "x.png"), "--fits", filepath.Join(dir, "x.fits"))
	syscall.Umask(old)
	if code != exitOK {
		t.Fatalf("status %d: %s", code, msg)
	}
	for _, n := range []string{"x.png", "x.json", "x.fits"} {
		fi, err := os.Stat(filepath.Join(dir, n))
		if err != nil {
			t.Fatal(err)
		}
		if fi.Mode().Perm() != 0o600 {
			t.Errorf("%s: mode %03o under umask 077, want 600", n, fi.Mode().Perm())
		}
	}
}

// TestCatalogPackOntoItself (item 11): "catalog pack X -o X" is refused,
// also through another spelling of the path; the input is unchanged.
func TestCatalogPackOntoItself(t *testing.T) {
	dir := t.TempDir()
	src, err := os.ReadFile(filepath.Join(hostileFixtures, "generic_good.csv"))
	if err != nil {
		t.Fatal(err)
	}
	in := hostileFile(t, dir, "in.csv", src)
	for _, out := range []string{in, filepath.Join(dir, ".", "in.csv")} {
		code, msg := hostileRun(t, "catalog", "pack", in, "-o", out)
		hostileExpect(t, code, msg, []string{"--output", "input file"}, dir, "in.csv")
		if b, _ := os.ReadFile(in); string(b) != string(src) {
			t.Error("the input was changed")
		}
	}
}

// TestMemoryRefusedUpFront (item 4): requests that cannot fit in --memory
// are refused with status 2, the figure and the flag to change, before
// anything of that size is allocated; they used to end in a Go runtime
// crash (status 2 and a goroutine dump). Each runs as a real process under
// a 4 GiB address-space limit (ulimit -v, POSIX), so that a regression
// crashes the child, not the test.
func TestMemoryRefusedUpFront(t *testing.T) {
	exe, err := os.Executable()
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name string
		args []string
		want []string
	}{
		{"32768² frame", []string{"--size", "32768x32768"}, []string{"--memory 1.0 GiB", "GB", "frame buffer 13 GB", "--size"}},
		{"10¹⁵ beacons", []string{"--lattice", "100000", "--lattice-confirm"}, []string{"--memory", "overlays", "--lattice"}},
		{"grid step 1e-9°", []string{"--grid", "radec", "--grid-step", "1e-9"}, []string{"--memory", "overlays", "--grid-step"}},
		{"4096² in 100 MiB", []string{"--size", "4096x4096", "--memory", "100MiB"}, []string{"--memory 100 MiB", "frame buffer 201 MB"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			args := append([]string{"still", "-o", filepath.Join(dir, "x.png")}, c.args...)
			p := exec.Command("sh", append([]string{"-c", `ulimit -v 4194304; exec "$0" "$@"`, exe}, args...)...)
			p.Env = append(os.Environ(), envExecMain+"=1")
			var stderr bytes.Buffer
			p.Stderr = &stderr
			err := p.Run()
			code := 0
			if ee, ok := err.(*exec.ExitError); ok {
				code = ee.ExitCode()
			} else if err != nil {
				t.Fatal(err)
			}
			msg := stderr.String()
			if strings.Contains(msg, "goroutine ") || strings.Contains(msg, "fatal error") {
				t.Fatalf("runtime crash:\n%.600s", msg)
			}
			hostileExpect(t, code, msg, c.want, dir)
		})
	}
}

// TestSmallInputsAreBounded (item 4): a plan is read through a reader
// limited to flight.MaxPlanBytes, so /dev/zero (whose stat size is 0) and
// an endless pipe are refused at the limit instead of filling memory.
func TestSmallInputsAreBounded(t *testing.T) {
	dir := t.TempDir()
	code, msg := hostileRun(t, "flight", "/dev/zero", "--out", filepath.Join(dir, "out"))
	hostileExpect(t, code, msg, []string{"/dev/zero", "larger than the limit"}, dir)

	fifo := mkfifo(t, dir, "plan")
	go func() {
		f, err := os.OpenFile(fifo, os.O_WRONLY, 0)
		if err != nil {
			return
		}
		defer f.Close()
		line := []byte("# a comment line, again and again, never ending\n")
		for {
			if _, err := f.Write(line); err != nil {
				return
			}
		}
	}()
	code, msg = hostileRun(t, "flight", fifo, "--out", filepath.Join(dir, "out"))
	hostileExpect(t, code, msg, []string{fifo, "larger than the limit"}, dir, "plan")
}

// TestCatalogFetchRefusesUnverifiable (item 10): "catalog fetch" from a
// server that sends a body without Content-Length or chunking (its end is
// the connection closing, RFC 9112 §6.3) refuses it with status 1 and a
// message saying why, leaving no file; --size makes the same body
// verifiable, and the SHA-256 is printed for pinning.
func TestCatalogFetchRefusesUnverifiable(t *testing.T) {
	raw, err := os.ReadFile(filepath.Join(hostileFixtures, "bsc5_good.dat"))
	if err != nil {
		t.Fatal(err)
	}
	srv := httptest.NewServer(http.HandlerFunc(func(w http.ResponseWriter, r *http.Request) {
		c, bw, err := w.(http.Hijacker).Hijack()
		if err != nil {
			return
		}
		defer c.Close()
		bw.WriteString("HTTP/1.1 200 OK\r\nConnection: close\r\n\r\n")
		bw.Write(raw)
		bw.Flush()
	}))
	defer srv.Close()
	dir := t.TempDir()
	dst := filepath.Join(dir, "bsc5.dat")
	code, out, errs := runIn(t, "catalog", "fetch", "bsc5", "--url", srv.URL+"/catalog", "-o", dst)
	if code != exitFailure || !strings.Contains(errs, "cannot tell whether the download is complete") {
		t.Errorf("status %d, stderr %q", code, errs)
	}
	if ents, _ := os.ReadDir(dir); len(ents) != 0 {
		t.Errorf("left behind: %v", ents)
	}
	code, out, errs = runIn(t, "catalog", "fetch", "bsc5", "--url", srv.URL+"/catalog", "-o", dst, "--size", strconv.Itoa(len(raw)))
	if code != exitOK || strings.TrimSpace(out) != dst || !strings.Contains(errs, "sha256 ") {
		t.Errorf("with --size: status %d, stdout %q, stderr %q", code, out, errs)
	}
}
