// Package sharedcat locates the real catalogues that sit beside the project
// (../shared/catalogs/ from the repository root) for tests. They are never
// copied into the repository; tests that need them skip when they are absent.
package sharedcat

import (
	"os"
	"path/filepath"
	"testing"
)

// BSC5 returns the path of shared/catalogs/bsc5.dat, found by walking up from
// the test's working directory (its package directory), or skips the test
// with a message saying the Bright Star Catalogue is absent.
func BSC5(t testing.TB) string {
	t.Helper()
	dir, err := os.Getwd()
	if err != nil {
		t.Skipf("shared/catalogs/bsc5.dat: %v; skipping the real-catalogue check", err)
	}
	for {
		p := filepath.Join(dir, "shared", "catalogs", "bsc5.dat")
		if _, err := os.Stat(p); err == nil {
			return p
		}
		parent := filepath.Dir(dir)
		if parent == dir {
			t.Skip("shared/catalogs/bsc5.dat not found in any parent directory; skipping the real-catalogue check")
		}
		dir = parent
	}
}
