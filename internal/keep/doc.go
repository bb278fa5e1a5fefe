// Package keep holds values — large buffers, encoder states — for reuse by
// the next frames of a run. Unlike a sync.Pool, a List does not drop what
// it holds at garbage collections, which the large frames of a flight bring
// on every frame or two: a 4096² linear buffer (201 MB) or an 8192² 8-bit
// image (268 MB) was then allocated and faulted in anew every few frames,
// at about 12 µs per 4 KiB page.
package keep
