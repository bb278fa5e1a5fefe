package sharedcat

import "testing"

// BSC5 returns the path of shared/catalogs/bsc5.dat (the Yale Bright Star
// Catalogue), found by walking up from the test's working directory (its
// package directory). When it is absent the test fails under CI=true (the
// shared data must be there) and is skipped with a message otherwise.
func BSC5(t testing.TB) string {
	t.Helper()
	return find(t, "bsc5.dat", "the Bright Star Catalogue")
}
