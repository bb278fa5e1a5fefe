package keep

import "sync"

// List keeps up to Max values (0: one), last in first out. Its zero value
// is ready to use; it is safe for concurrent use (callers that find it
// empty make new values).
type List[T any] struct {
	Max   int
	mu    sync.Mutex
	items []T
}

// Get returns a kept value and true, or the zero value and false.
func (l *List[T]) Get() (T, bool) {
	l.mu.Lock()
	defer l.mu.Unlock()
	var v T
	if len(l.items) == 0 {
		return v, false
	}
	v = l.items[len(l.items)-1]
	l.items = l.items[:len(l.items)-1]
	return v, true
}

// Put keeps v unless Max values are kept already.
func (l *List[T]) Put(v T) {
	l.mu.Lock()
	defer l.mu.Unlock()
	if len(l.items) < max(1, l.Max) {
		l.items = append(l.items, v)
	}
}
