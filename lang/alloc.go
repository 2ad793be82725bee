package lang

import (
	"hash/maphash"

	"github.com/forkcast/forkcast/internal/bulk"
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
	nodes    bulk.Slab[tree.Node]
	branches bulk.Slab[tree.Branch]
	numbers  bulk.Slab[tree.Number]
	names    bulk.Slab[tree.Name]
	binaries bulk.Slab[tree.Binary]
	unaries  bulk.Slab[tree.Unary]
	lists    bulk.Slab[*tree.Branch] // nodes' branch lists
	strs     *stringCache
}

// branchList copies a node's branches into a list of exactly their
// number, cut from a shared chunk.
func (a *allocator) branchList(kids []*tree.Branch) []*tree.Branch {
	out := a.lists.Cut(len(kids))
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
