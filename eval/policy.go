package eval

import (
	"github.com/forkcast/forkcast/internal/bulk"
	"github.com/forkcast/forkcast/tree"
)

// Reached is a decision the optimal policy reaches, as PolicyDecisions
// gives it.
type Reached struct {
	*Solved
	// Above is the nearest chance outcome on the path from the root to the
	// decision, nil when the path has none; it links to the ones above.
	Above *Condition
}

// Condition is a chance node on a path and the branch the path takes from
// it.
type Condition struct {
	Chance *Solved
	Via    int
	Up     *Condition // the next chance outcome above; nil at the top
}

// PolicyDecisions returns the decisions the optimal policy reaches (those
// Reachable marks), in model order, each with the chance outcomes on the
// path to it. It walks only the part of the tree the policy reaches: on a
// large tree that costs a small share of a walk over Nodes, whose table
// it does not need. The Solved values it returns are its own: equal to
// those of Nodes in every method, but not the same pointers.
func (sol *Solution) PolicyDecisions() []Reached {
	c := sol.Compiled
	n := c.Len()
	// Subtree sizes give each node's pre-order index without the table.
	// Children come after their parent in the compiled layout.
	size := bulk.Make[int32](n)
	for i := n - 1; i >= 0; i-- {
		size[i]++
		if i > 0 {
			size[c.Parent(i)] += size[i]
		}
	}
	type item struct {
		i, self, parent int32
		above           *Condition
	}
	solved := func(it item) *Solved {
		return &Solved{Node: c.Node(int(it.i)), sol: sol, i: it.i, self: it.self, parent: it.parent, size: size[it.i]}
	}
	var out []Reached
	stack := []item{{i: 0, self: 0, parent: -1}}
	for len(stack) > 0 {
		it := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		from, to := c.Kids(int(it.i))
		if from == to {
			continue
		}
		s := sol.Root
		if it.i != 0 {
			s = solved(it)
		}
		// The pre-order index of each child: after the node, and after
		// the subtrees of the siblings before it.
		selfs := make([]int32, to-from)
		next := it.self + 1
		for k := from; k < to; k++ {
			selfs[k-from] = next
			next += size[k]
		}
		switch s.Node.Kind {
		case tree.KindDecision:
			out = append(out, Reached{Solved: s, Above: it.above})
			j := s.Chosen()
			stack = append(stack, item{i: int32(from + j), self: selfs[j], parent: it.self, above: it.above})
		default:
			for k := to - 1; k >= from; k-- {
				above := it.above
				if s.Node.Kind == tree.KindChance {
					above = &Condition{Chance: s, Via: k - from, Up: it.above}
				}
				stack = append(stack, item{i: int32(k), self: selfs[k-from], parent: it.self, above: above})
			}
		}
	}
	return out
}
