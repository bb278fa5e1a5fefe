// Package sharedcat locates the real catalogues that sit beside the project
// (../shared/catalogs/ from the repository root) for tests. They are never
// copied into the repository. A test that needs one fails when it is absent
// under CI (CI=true) and is skipped with a message otherwise.
package sharedcat
