package lang

import (
	"hash/maphash"

	"github.com/forkcast/forkcast/tree"
)

// allocator makes the parts of a model in bulk: a large model has a
// branch, a node and a number or two on nearly every line, and one
// allocation for each would cost more time (and garbage collection) than
// reading the line. Parts are taken from chunks that are allocated whole,
// so a chunk lives as long as any part in it: the model keeps them all.
// Labels and names that repeat ("Buy", "High demand", an input's name)
// share one string.
type allocator struct {
	nodes    chunk[tree.Node]
	branches chunk[tree.Branch]
	numbers  chunk[tree.Number]
	names    chunk[tree.Name]
	binaries chunk[tree.Binary]
	unaries  chunk[tree.Unary]
	lists    []*tree.Branch // the rest of the chunk branch lists are cut from
	strs     *stringCache
}

// chunk hands out values of T from slices allocated whole.
type chunk[T any] struct {
	free []T
	size int // of the next slice
}

// maxChunk is the most values of one kind allocated at once; the last
// chunk's unused end is all that is wasted.
const maxChunk = 1024

// new returns a zero T from the current chunk, starting a new chunk when
// it is used up.
func (c *chunk[T]) new() *T {
	if len(c.free) == 0 {
		// Small models take small chunks; large ones reach maxChunk soon.
		c.size = min(max(2*c.size, 8), maxChunk)
		c.free = make([]T, c.size)
	}
	p := &c.free[0]
	c.free = c.free[1:]
	return p
}

// branchList copies a node's branches into a list of exactly their
// number, cut from a shared chunk.
func (a *allocator) branchList(kids []*tree.Branch) []*tree.Branch {
	n := len(kids)
	if len(a.lists) < n {
		a.lists = make([]*tree.Branch, max(n, maxChunk))
	}
	out := a.lists[:n:n]
	a.lists = a.lists[n:]
	copy(out, kids)
	return out
}

// stringCache remembers the last string made in each of its slots, chosen
// by a hash of the bytes, so that text that repeats is allocated once.
// Slots are overwritten, never added: the cache costs the same whatever
// the model.
type stringCache struct {
	seed  maphash.Seed
	slots [1024]string
}

// str returns b as a string, shared with an earlier equal one when the
// cache still has it.
func (a *allocator) str(b []byte) string {
	if a.strs == nil {
		a.strs = &stringCache{seed: maphash.MakeSeed()}
	}
	c := a.strs
	i := maphash.Bytes(c.seed, b) & (uint64(len(c.slots)) - 1)
	if s := c.slots[i]; s == string(b) {
		return s
	}
	s := string(b)
	c.slots[i] = s
	return s
}
