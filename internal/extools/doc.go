// Package extools finds independent reference programs (Debian packages)
// that tests use to check the files skyframe writes: OpenEXR's own tools,
// OpenImageIO, astropy, Pillow. Where a tool is absent a test skips with a
// message naming the package to install, except under CI (CI=true), where
// it fails: CI installs them (.ci/run).
package extools
