package keep

import (
	"sync"
	"testing"
)

// A List hands back what it was given, newest first, keeps at most Max
// (one for the zero value), and is safe to share between goroutines.
func TestList(t *testing.T) {
	var one List[int]
	one.Put(1)
	one.Put(2) // dropped: the zero value keeps one
	if v, ok := one.Get(); !ok || v != 1 {
		t.Fatalf("Get = %d, %v; want 1, true", v, ok)
	}
	if v, ok := one.Get(); ok {
		t.Fatalf("Get on an empty list = %d, true", v)
	}
	l := List[int]{Max: 3}
	for v := range 5 {
		l.Put(v)
	}
	for _, want := range []int{2, 1, 0} {
		if v, ok := l.Get(); !ok || v != want {
			t.Fatalf("Get = %d, %v; want %d, true", v, ok, want)
		}
	}
	var wg sync.WaitGroup
	for g := range 8 {
		wg.Go(func() {
			for range 1000 {
				l.Put(g)
				l.Get()
			}
		})
	}
	wg.Wait()
	if n := len(l.items); n > 3 {
		t.Errorf("%d values kept, Max 3", n)
	}
}
