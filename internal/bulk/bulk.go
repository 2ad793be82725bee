// Package bulk allocates the large arrays a big model is made of so that
// writing them the first time is cheap.
//
// A model of a million nodes is a few hundred megabytes of arrays written
// once, front to back, while the model is read and compiled. On Linux the
// kernel backs fresh memory a 4 KiB page at a time, one page fault each;
// for such a model those faults cost more CPU time than reading the text.
// Marking a large array for transparent huge pages (2 MiB) before it is
// first written removes nearly all of them.
//
// The marking is off until UseHugePages turns it on, as the command-line
// tool does: a process that reads one model and exits gains, while in a
// long-running program the advice stays on heap memory after the arrays
// are freed, and the system may then keep more of it (the Go runtime
// gives no such advice itself for that reason). Elsewhere than Linux, or
// where the system has huge pages turned off, Make is a plain make.
package bulk

import (
	"sync/atomic"
	"unsafe"
)

var hugePages atomic.Bool

// UseHugePages turns the marking of large arrays for huge pages on or off
// for the whole process (see the package comment); it is off at first.
func UseHugePages(on bool) { hugePages.Store(on) }

// Threshold is the size in bytes from which Make asks for huge pages (2
// MiB, the size of one): a smaller array would mostly ask for its
// neighbours' pages, and asking costs a system call.
const Threshold = 2 << 20

// Make returns make([]T, n), with memory of Threshold bytes or more
// marked for huge pages when UseHugePages has turned that on.
func Make[T any](n int) []T {
	s := make([]T, n)
	var zero T
	if size := uintptr(n) * unsafe.Sizeof(zero); n > 0 && size >= Threshold && hugePages.Load() {
		advise(unsafe.Pointer(unsafe.SliceData(s)), size)
	}
	return s
}

// Chunk is the number of T to allocate at once for a stream of values
// whose chunk grows from small: it doubles from 8 up to a chunk of about
// 32 MiB, so a small model takes small chunks and a big one soon takes
// chunks that Make marks. Memory of a chunk that is never written costs
// nothing but address space.
func Chunk[T any](last int) int {
	var zero T
	most := max(int((32<<20)/max(unsafe.Sizeof(zero), 1)), 8)
	return min(max(2*last, 8), most)
}

// Grow is slices.Grow for a slice that grows by appending, one value at a
// time, to a large size: when s has no room for n more values it is
// copied into a new array from Make of at least twice its capacity.
func Grow[T any](s []T, n int) []T {
	if cap(s)-len(s) >= n {
		return s
	}
	t := Make[T](max(2*cap(s), len(s)+n, 8))[:len(s)]
	copy(t, s)
	return t
}

// Slab hands out values of T, one or a run at a time, from arrays
// allocated whole in chunks that grow (Chunk): a large model has a value
// of each kind on nearly every line, and one allocation for each would
// cost more time, garbage collection and memory than the values. A chunk
// lives as long as any value cut from it. The zero Slab is ready to use.
type Slab[T any] struct {
	free []T
	size int // of the last chunk
}

// New returns a pointer to a zero T.
func (s *Slab[T]) New() *T { return &s.Cut(1)[0] }

// Cut returns n zero values (nil for n = 0) with capacity n, so that an
// append to them never writes over the next ones.
func (s *Slab[T]) Cut(n int) []T {
	if n <= 0 {
		return nil
	}
	if len(s.free) < n {
		s.size = Chunk[T](s.size)
		s.free = Make[T](max(n, s.size))
	}
	out := s.free[:n:n]
	s.free = s.free[n:]
	return out
}
