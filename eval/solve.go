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
}

// Solved is one node of a solved tree.
type Solved struct {
	Node *tree.Node
	// Value is the expected remaining payoff from this node on, in the
	// objective's terms; the cash on the branch into the node is not
	// included.
	Value decimal.Decimal
	// Kids are the solved children, aligned with Node.Branches.
	Kids []*Solved
	// Best holds, for a decision node, the indices of its optimal branches
	// in model order; more than one means a tie, and the first is the one
	// the policy takes.
	Best []int
	// Parent is the node above (nil at the root) and Via the index of the
	// branch of Parent that leads here.
	Parent *Solved
	Via    int
	Depth  int
	index  int            // position in pre-order
	obj    tree.Objective // the model's objective, for Margin
}

// ErrNotResolved is returned by Solve for a model with no tree.
var ErrNotResolved = errors.New("eval: the model has no tree (was it resolved?)")

// Solve rolls the tree back: an end node is worth its payoff, a chance node
// the probability-weighted sum over its branches of cash plus the value
// beneath, a decision node the best such sum (max or min by the model's
// objective). m must have been resolved without errors (tree.Model.Resolve).
//
// The arithmetic is exact: only additions and multiplications of decimals.
// Solve works without recursion, so a tree of any depth solves.
func Solve(m *tree.Model) (*Solution, error) {
	if m == nil || m.Root == nil {
		return nil, ErrNotResolved
	}
	sol := &Solution{Model: m}
	sol.flatten()
	obj := m.Objective
	// Children come after their parent in pre-order, so one backward sweep
	// sees every child before its parent.
	for i := len(sol.nodes) - 1; i >= 0; i-- {
		s := &sol.nodes[i]
		n := s.Node
		switch n.Kind {
		case tree.KindEnd:
			s.Value = n.Value
		case tree.KindChance:
			v := n.TestCost
			for j, b := range n.Branches {
				v = v.Add(b.P.Mul(b.C.Add(s.Kids[j].Value)))
			}
			s.Value = v
		case tree.KindDecision:
			best := -1
			var bv decimal.Decimal
			for j, b := range n.Branches {
				v := b.C.Add(s.Kids[j].Value)
				switch {
				case best < 0 || obj.Better(v, bv):
					best, bv = j, v
					s.Best = append(s.Best[:0], j)
				case v.Equal(bv):
					s.Best = append(s.Best, j)
				}
			}
			s.Value = bv
		}
	}
	sol.Root = &sol.nodes[0]
	return sol, nil
}

// flatten lays the tree out in pre-order in one slice, with each node's
// children in one shared backing array.
func (sol *Solution) flatten() {
	count, edges := 0, 0
	tree.Walk(sol.Model.Root, func(n *tree.Node, _ int) bool {
		count++
		edges += len(n.Branches)
		return true
	})
	sol.nodes = make([]Solved, 0, count)
	kids := make([]*Solved, edges)
	type item struct {
		n      *tree.Node
		parent *Solved
		via    int
		depth  int
	}
	stack := []item{{sol.Model.Root, nil, -1, 0}}
	for len(stack) > 0 {
		it := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		sol.nodes = append(sol.nodes, Solved{Node: it.n, Parent: it.parent, Via: it.via, Depth: it.depth, index: len(sol.nodes), obj: sol.Model.Objective})
		s := &sol.nodes[len(sol.nodes)-1]
		if it.parent != nil {
			it.parent.Kids[it.via] = s
		}
		nb := len(it.n.Branches)
		s.Kids, kids = kids[:nb:nb], kids[nb:]
		for j := nb - 1; j >= 0; j-- {
			stack = append(stack, item{it.n.Branches[j].Node, s, j, it.depth + 1})
		}
	}
}

// Nodes returns every solved node in pre-order (the root first).
func (sol *Solution) Nodes() []Solved { return sol.nodes }

// Value is the expected value of the whole tree.
func (sol *Solution) Value() decimal.Decimal { return sol.Root.Value }

// Chosen is the index of the branch the policy takes at a decision node,
// or -1 at any other node.
func (s *Solved) Chosen() int {
	if len(s.Best) == 0 {
		return -1
	}
	return s.Best[0]
}

// Tied reports whether a decision has more than one optimal branch.
func (s *Solved) Tied() bool { return len(s.Best) > 1 }

// BranchValue is the value of taking branch i: its cash plus the value of
// the node it leads to.
func (s *Solved) BranchValue(i int) decimal.Decimal {
	return s.Node.Branches[i].C.Add(s.Kids[i].Value)
}

// Margin is how much better the chosen branch of a decision is than the
// best of the others (zero for a tie), always as a non-negative amount; ok
// is false when the node is not a decision with at least two branches.
func (s *Solved) Margin() (margin decimal.Decimal, runnerUp int, ok bool) {
	if s.Node.Kind != tree.KindDecision || len(s.Kids) < 2 {
		return decimal.Zero, -1, false
	}
	c := s.Chosen()
	if s.Tied() {
		return decimal.Zero, s.Best[1], true
	}
	runnerUp = -1
	var rv decimal.Decimal
	better := func(a, b decimal.Decimal) bool { return a.GreaterThan(b) }
	min := s.obj == tree.Min
	if min {
		better = func(a, b decimal.Decimal) bool { return a.LessThan(b) }
	}
	for j := range s.Kids {
		if j == c {
			continue
		}
		v := s.BranchValue(j)
		if runnerUp < 0 || better(v, rv) {
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
	for c := s; c.Parent != nil; c = c.Parent {
		if c.Parent.Node.Kind == tree.KindDecision && c.Parent.Chosen() != c.Via {
			return false
		}
	}
	return true
}

// Path returns the branches from the root to this node.
func (s *Solved) Path() []*tree.Branch {
	var rev []*tree.Branch
	for c := s; c.Parent != nil; c = c.Parent {
		rev = append(rev, c.Parent.Node.Branches[c.Via])
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
	prob := make([]decimal.Decimal, len(sol.nodes))
	pay := make([]decimal.Decimal, len(sol.nodes))
	on := make([]bool, len(sol.nodes))
	var out []EndPoint
	for i := range sol.nodes {
		s := &sol.nodes[i]
		if s.Parent == nil {
			prob[i], pay[i], on[i] = decimal.NewFromInt(1), decimal.Zero, true
		} else {
			p := s.Parent.index
			b := s.Parent.Node.Branches[s.Via]
			prob[i] = prob[p]
			if s.Parent.Node.Kind == tree.KindChance {
				prob[i] = prob[p].Mul(b.P)
			}
			pay[i] = pay[p].Add(b.C).Add(s.Parent.Node.TestCost)
			on[i] = on[p] && (s.Parent.Node.Kind != tree.KindDecision || s.Parent.Chosen() == s.Via)
		}
		if s.Node.Kind == tree.KindEnd {
			out = append(out, EndPoint{Solved: s, Prob: prob[i], Payoff: pay[i].Add(s.Node.Value), OnPolicy: on[i]})
		}
	}
	return out
}
