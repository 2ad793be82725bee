// Package eval solves decision trees and analyses the solution: rollback to
// expected values with exact decimal arithmetic, the optimal policy, the
// paths to every end node, and (in later files) value of information and
// breakeven.
//
// Nothing in the package prints; every function returns values a program
// can walk.
package eval

import (
	"errors"

	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// Solution is a rolled-back tree: the expected value of every node and the
// best branches of every decision.
type Solution struct {
	Model *tree.Model
	Root  *Solved
	nodes []Solved // every node in pre-order; Root is &nodes[0]
	arena          // the values that outgrew int64
}

// Solved is one node of a solved tree. Its figures are methods: they are
// kept in a compact exact form and made into decimals when asked for, so a
// tree of millions of nodes solves without millions of allocations.
type Solved struct {
	Node *tree.Node
	sol  *Solution
	v    fix
	// parent and via: the node above (-1 at the root) and the index of its
	// branch that leads here; size counts the nodes in this subtree; best is
	// the first optimal branch of a decision and nbest how many tie with it.
	self, parent, via, size, best, nbest int32
}

// ErrNotResolved is returned by Solve for a model with no tree.
var ErrNotResolved = errors.New("eval: the model has no tree (was it resolved?)")

// Solve rolls the tree back: an end node is worth its payoff, a chance node
// the probability-weighted sum over its branches of cash plus the value
// beneath (plus a test's cost), a decision node the best such sum (max or
// min by the model's objective; ties go to the first in model order). m
// must have been resolved without errors (tree.Model.Resolve).
//
// The arithmetic is exact: only additions and multiplications of decimals.
// Solve works without recursion, so a tree of any depth solves.
func Solve(m *tree.Model) (*Solution, error) {
	if m == nil || m.Root == nil {
		return nil, ErrNotResolved
	}
	sol := &Solution{Model: m}
	sol.flatten()
	sol.rollback()
	sol.Root = &sol.nodes[0]
	return sol, nil
}

// flatten lays the tree out in pre-order in one slice.
func (sol *Solution) flatten() {
	sol.nodes = make([]Solved, 0, sol.Model.Size())
	type item struct {
		b           *tree.Branch
		parent, via int32
	}
	root := Solved{Node: sol.Model.Root, sol: sol, parent: -1, via: -1, best: -1}
	sol.nodes = append(sol.nodes, root)
	var stack []item
	push := func(n *tree.Node, self int32) {
		bs := n.Branches
		for j := len(bs) - 1; j >= 0; j-- {
			stack = append(stack, item{bs[j], self, int32(j)})
		}
	}
	push(root.Node, 0)
	for len(stack) > 0 {
		it := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		self := int32(len(sol.nodes))
		b := it.b
		sol.nodes = append(sol.nodes, Solved{Node: b.Node, sol: sol, self: self, parent: it.parent, via: it.via, best: -1})
		push(b.Node, self)
	}
}

// rollback sweeps backwards: in pre-order every child comes after its
// parent, so each node's children are done when it is reached. The first
// child of node i is i+1 and each next one follows its elder sibling's
// subtree.
func (sol *Solution) rollback() {
	max := sol.Model.Objective == tree.Max
	nodes := sol.nodes
	for i := len(nodes) - 1; i >= 0; i-- {
		s := &nodes[i]
		n := s.Node
		k := int32(i + 1)
		switch n.Kind {
		case tree.KindEnd:
			s.v = sol.fixOf(n.Value)
		case tree.KindChance:
			v := sol.fixOf(n.TestCost)
			for _, b := range n.Branches {
				kid := &nodes[k]
				v = sol.add(v, sol.mul(sol.fixOf(b.P), sol.add(sol.fixOf(b.C), kid.v)))
				k += kid.size
			}
			s.v = v
		case tree.KindDecision:
			var bv fix
			for j, b := range n.Branches {
				kid := &nodes[k]
				v := sol.add(sol.fixOf(b.C), kid.v)
				k += kid.size
				c := 0
				if s.best >= 0 {
					c = sol.cmp(v, bv)
					if !max {
						c = -c
					}
				}
				switch {
				case s.best < 0 || c > 0:
					s.best, s.nbest, bv = int32(j), 1, v
				case c == 0:
					s.nbest++
				}
			}
			s.v = bv
		}
		s.size = k - int32(i)
	}
}

// Nodes returns every solved node in pre-order (the root first, then each
// subtree in model order).
func (sol *Solution) Nodes() []Solved { return sol.nodes }

// Value is the expected value of the whole tree.
func (sol *Solution) Value() decimal.Decimal { return sol.Root.Value() }

// Value is the expected remaining payoff from this node on, in the
// objective's terms; the cash on the branch into the node is not included.
func (s *Solved) Value() decimal.Decimal { return s.sol.dec(s.v) }

// Solution is the solved tree this node belongs to.
func (s *Solved) Solution() *Solution { return s.sol }

// Index is the node's position in Solution.Nodes.
func (s *Solved) Index() int { return int(s.self) }

// Kid returns the solved node under branch j.
func (s *Solved) Kid(j int) *Solved {
	i := s.Index() + 1
	for ; j > 0; j-- {
		i += int(s.sol.nodes[i].size)
	}
	return &s.sol.nodes[i]
}

// Kids returns the solved children, aligned with Node.Branches.
func (s *Solved) Kids() []*Solved {
	out := make([]*Solved, len(s.Node.Branches))
	i := s.Index() + 1
	for j := range out {
		out[j] = &s.sol.nodes[i]
		i += int(s.sol.nodes[i].size)
	}
	return out
}

// Parent is the node above, nil at the root.
func (s *Solved) Parent() *Solved {
	if s.parent < 0 {
		return nil
	}
	return &s.sol.nodes[s.parent]
}

// Via is the index of the parent's branch that leads here (-1 at the root).
func (s *Solved) Via() int { return int(s.via) }

// Depth is the number of branches from the root to this node (counted up
// the parents: a field would cost every node of a large tree memory).
func (s *Solved) Depth() int {
	d := 0
	for p := s.parent; p >= 0; p = s.sol.nodes[p].parent {
		d++
	}
	return d
}

// Size is the number of nodes in this subtree, the node included.
func (s *Solved) Size() int { return int(s.size) }

// Chosen is the index of the branch the policy takes at a decision node
// (the first optimal one in model order), or -1 at any other node.
func (s *Solved) Chosen() int { return int(s.best) }

// Tied reports whether a decision has more than one optimal branch.
func (s *Solved) Tied() bool { return s.nbest > 1 }

// Best returns, for a decision node, the indices of its optimal branches in
// model order; more than one means a tie. It is nil at other nodes.
func (s *Solved) Best() []int {
	if s.best < 0 {
		return nil
	}
	if s.nbest == 1 {
		return []int{int(s.best)}
	}
	bv := s.BranchValue(int(s.best))
	out := make([]int, 0, s.nbest)
	for j := int(s.best); j < len(s.Node.Branches); j++ {
		if s.BranchValue(j).Equal(bv) {
			out = append(out, j)
		}
	}
	return out
}

// IsBest reports whether branch j of a decision is one of its optimal ones.
func (s *Solved) IsBest(j int) bool {
	for _, b := range s.Best() {
		if b == j {
			return true
		}
	}
	return false
}

// BranchValue is the value of taking branch i: its cash plus the value of
// the node it leads to.
func (s *Solved) BranchValue(i int) decimal.Decimal {
	return s.Node.Branches[i].C.Add(s.Kid(i).Value())
}

// Margin is how much better the chosen branch of a decision is than the
// best of the others (zero for a tie), always as a non-negative amount, and
// which branch that runner-up is; ok is false when the node is not a
// decision with at least two branches.
func (s *Solved) Margin() (margin decimal.Decimal, runnerUp int, ok bool) {
	if s.Node.Kind != tree.KindDecision || len(s.Node.Branches) < 2 {
		return decimal.Zero, -1, false
	}
	c := s.Chosen()
	if s.Tied() {
		return decimal.Zero, s.Best()[1], true
	}
	min := s.sol.Model.Objective == tree.Min
	runnerUp = -1
	var rv decimal.Decimal
	for j := range s.Node.Branches {
		if j == c {
			continue
		}
		v := s.BranchValue(j)
		if runnerUp < 0 || (!min && v.GreaterThan(rv)) || (min && v.LessThan(rv)) {
			runnerUp, rv = j, v
		}
	}
	margin = s.BranchValue(c).Sub(rv)
	if min {
		margin = margin.Neg()
	}
	return margin, runnerUp, true
}

// OnPolicy reports whether the optimal policy can reach this node: every
// decision above it takes the branch that leads here.
func (s *Solved) OnPolicy() bool {
	for c := s; c.parent >= 0; c = c.Parent() {
		if p := c.Parent(); p.Node.Kind == tree.KindDecision && p.best != c.via {
			return false
		}
	}
	return true
}

// Reachable reports, for every node in pre-order, whether the optimal policy
// can reach it: OnPolicy for the whole tree in one forward sweep (OnPolicy
// walks up to the root, so calling it on every node of a deep tree costs
// the square of its depth).
func (sol *Solution) Reachable() []bool {
	on := make([]bool, len(sol.nodes))
	for i := range sol.nodes {
		s := &sol.nodes[i]
		if s.parent < 0 {
			on[i] = true
			continue
		}
		p := &sol.nodes[s.parent]
		on[i] = on[s.parent] && (p.Node.Kind != tree.KindDecision || p.best == s.via)
	}
	return on
}

// Path returns the branches from the root to this node.
func (s *Solved) Path() []*tree.Branch {
	var rev []*tree.Branch
	for c := s; c.parent >= 0; c = c.Parent() {
		rev = append(rev, c.Parent().Node.Branches[c.via])
	}
	for i, j := 0, len(rev)-1; i < j; i, j = i+1, j-1 {
		rev[i], rev[j] = rev[j], rev[i]
	}
	return rev
}

// EndPoint is one end node with what it takes to reach it.
type EndPoint struct {
	*Solved
	// Prob is the product of the chance probabilities on the path from the
	// root (decisions count as certain): the probability of ending here if
	// every decision on the way is taken as the path takes it.
	Prob decimal.Decimal
	// Payoff is the cumulative payoff: the cash on every branch of the path,
	// test costs on the way, plus the end node's own value.
	Payoff decimal.Decimal
	// OnPolicy is true when the optimal policy can end here.
	OnPolicy bool
}

// Ends returns every end node in model order with its path probability and
// cumulative payoff, computed in one forward sweep.
func (sol *Solution) Ends() []EndPoint {
	var a arena // Ends may run alongside other readers: its own arena
	prob := make([]fix, len(sol.nodes))
	pay := make([]fix, len(sol.nodes))
	on := make([]bool, len(sol.nodes))
	var out []EndPoint
	for i := range sol.nodes {
		s := &sol.nodes[i]
		if s.parent < 0 {
			prob[i], pay[i], on[i] = fix{c: 1}, fix{}, true
		} else {
			p := s.parent
			pn := sol.nodes[p].Node
			b := pn.Branches[s.via]
			prob[i] = prob[p]
			if pn.Kind == tree.KindChance {
				prob[i] = a.mul(prob[p], a.fixOf(b.P))
			}
			pay[i] = a.add(a.add(pay[p], a.fixOf(b.C)), a.fixOf(pn.TestCost))
			on[i] = on[p] && (pn.Kind != tree.KindDecision || sol.nodes[p].best == s.via)
		}
		if s.Node.Kind == tree.KindEnd {
			out = append(out, EndPoint{Solved: s, Prob: a.dec(prob[i]), Payoff: a.dec(a.add(pay[i], a.fixOf(s.Node.Value))), OnPolicy: on[i]})
		}
	}
	return out
}
