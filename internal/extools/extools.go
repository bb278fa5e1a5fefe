package extools

import (
	"os"
	"os/exec"
	"strings"
	"testing"
)

// missing skips t, or fails it when CI=true.
func missing(t testing.TB, what, pkg string) {
	t.Helper()
	if os.Getenv("CI") == "true" {
		t.Fatalf("%s not found; CI must install Debian package %s (apt-get install -y --no-install-recommends %s)", what, pkg, pkg)
	}
	t.Skipf("%s not found; install Debian package %s to run this check", what, pkg)
}

// Command returns the path of the program name from Debian package pkg, or
// skips (fails under CI) when it is not on PATH.
func Command(t testing.TB, name, pkg string) string {
	t.Helper()
	p, err := exec.LookPath(name)
	if err != nil {
		missing(t, name, pkg)
	}
	return p
}

// Python returns a Python 3 interpreter that can import every module in
// modules, trying the system interpreter (/usr/bin/python3, where Debian's
// python3-* packages install) before the one on PATH, or skips (fails under
// CI) naming pkg.
func Python(t testing.TB, pkg string, modules ...string) string {
	t.Helper()
	cands := []string{"/usr/bin/python3"}
	if p, err := exec.LookPath("python3"); err == nil {
		cands = append(cands, p)
	}
	src := "import " + strings.Join(modules, ", ")
	for _, py := range cands {
		if err := exec.Command(py, "-c", src).Run(); err == nil {
			return py
		}
	}
	missing(t, "python3 with "+strings.Join(modules, ", "), pkg)
	return ""
}
