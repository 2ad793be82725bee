// Package eval solves compiled decision models and analyses the solution:
// the optimal policy, the paths to every end node, value of information,
// breakeven and the other analyses, each a value a program can walk.
//
// Nothing in the package prints.
package eval

import (
	"errors"
	"io"
	"sync"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/interchange"
	"github.com/forkcast/forkcast/internal/bulk"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// Solution is a rolled-back model: the expected value of every node and the
// best branches of every decision. It owns its numbers: a Solution never
// changes, whatever is done to the model afterwards.
type Solution struct {
	// Model is the model as written; Compiled its compiled form.
	Model    *tree.Model
	Compiled *compiled.Model
	Root     *Solved
	r        *compiled.Rollback
	// nodes is every node in pre-order and pre maps compiled node numbers
	// to pre-order indices. Both are allocated with the solution but
	// filled only when first needed (table): a report of the policy alone
	// never needs them, and on a large tree they are a tenth of its
	// memory. Root, nodes[0], is filled from the start.
	fill  sync.Once
	nodes []Solved
	pre   []int32
}

// Solved is one node of a solved tree. Its figures are methods, made into
// decimals when asked for.
type Solved struct {
	Node *tree.Node
	sol  *Solution
	// i is the node's number in the compiled model; self its pre-order
	// index, parent the parent's (-1 at the root), size the nodes in its
	// subtree.
	i, self, parent, size int32
}

// ErrNoModel is returned by Solve for a nil model.
var ErrNoModel = errors.New("eval: no model to solve (compile one with compiled.Compile or lang.Load)")

// ErrNoTree is returned by Solve for a model that holds risk registers
// and no tree: there is nothing to roll back (package register analyses
// the registers).
var ErrNoTree = errors.New("the model has no tree, only a risk register: analyse it with `forkcast register`, or add a decision that uses the register's figures")

// Solve rolls c back: every decision takes its best branch (max net value:
// the highest value under objective max, the lowest cost under min); ties
// go to the first in model order. The arithmetic is exact.
func Solve(c *compiled.Model) (*Solution, error) {
	if c == nil {
		return nil, ErrNoModel
	}
	if !c.HasTree() {
		return nil, ErrNoTree
	}
	return newSolution(c, c.Rollback()), nil
}

// Follow rolls c back with every decision taking the branch policy gives it
// (as Rollback.Policy returns), for the value of a fixed plan.
func Follow(c *compiled.Model, policy []int32) (*Solution, error) {
	if c == nil {
		return nil, ErrNoModel
	}
	if !c.HasTree() {
		return nil, ErrNoTree
	}
	return newSolution(c, c.Follow(policy)), nil
}

func newSolution(c *compiled.Model, r *compiled.Rollback) *Solution {
	sol := &Solution{Model: c.Source(), Compiled: c, r: r}
	n := c.Len()
	// Memory that is allocated but not yet written costs nothing.
	sol.nodes = bulk.Make[Solved](n)
	sol.pre = bulk.Make[int32](n)
	sol.nodes[0] = Solved{Node: c.Node(0), sol: sol, i: 0, self: 0, parent: -1, size: int32(n)}
	sol.Root = &sol.nodes[0]
	return sol
}

// table returns every node in pre-order, filling the table on first use.
func (sol *Solution) table() []Solved {
	sol.fill.Do(sol.fillTable)
	return sol.nodes
}

// fillTable writes the pre-order table below the root (the root's entry is
// written when the solution is made, and may be read meanwhile).
func (sol *Solution) fillTable() {
	c := sol.Compiled
	n := c.Len()
	// Pre-order: a node, then each child's subtree in branch order.
	type item struct{ i, parent int32 }
	var stack []item
	push := func(i, self int32) {
		from, to := c.Kids(int(i))
		for k := to - 1; k >= from; k-- {
			stack = append(stack, item{int32(k), self})
		}
	}
	push(0, 0)
	self := int32(1)
	for len(stack) > 0 {
		it := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		sol.nodes[self] = Solved{Node: c.Node(int(it.i)), sol: sol, i: it.i, self: self, parent: it.parent, size: 1}
		sol.pre[it.i] = self
		push(it.i, self)
		self++
	}
	for j := n - 1; j > 0; j-- {
		if p := sol.nodes[j].parent; p > 0 {
			sol.nodes[p].size += sol.nodes[j].size
		}
	}
}

// Rollback is the compiled model's rollback the solution reads.
func (sol *Solution) Rollback() *compiled.Rollback { return sol.r }

// Nodes returns every solved node in pre-order (the root first, then each
// subtree in model order).
func (sol *Solution) Nodes() []Solved { return sol.table() }

// At is the solved node with compiled number i.
func (sol *Solution) At(i int) *Solved {
	if i == 0 {
		return sol.Root
	}
	return &sol.table()[sol.pre[i]]
}

// Value is the expected value of the whole tree, in the objective's terms.
func (sol *Solution) Value() decimal.Decimal { return sol.Root.Value() }

// Exact reports whether every figure of the model is exact (see
// compiled.Model.Exact).
func (sol *Solution) Exact() bool { return sol.Compiled.Exact() }

// obj is the objective.
func (sol *Solution) obj() tree.Objective { return sol.Compiled.Objective() }

// Value is the expected remaining payoff from this node on, in the
// objective's terms; the cash on the branch into the node is not included.
// Below a test reading it is a ratio of exact figures, rounded at
// compiled.DivisionScale places when that is no finite decimal.
func (s *Solved) Value() decimal.Decimal {
	v, _ := s.sol.r.Value(int(s.i))
	return s.sol.obj().Figure(v)
}

// Solution is the solved tree this node belongs to.
func (s *Solved) Solution() *Solution { return s.sol }

// Index is the node's position in Solution.Nodes.
func (s *Solved) Index() int { return int(s.self) }

// Number is the node's number in the compiled model.
func (s *Solved) Number() int { return int(s.i) }

// Kid returns the solved node under branch j.
func (s *Solved) Kid(j int) *Solved { return s.sol.At(s.sol.Compiled.Child(int(s.i), j)) }

// Kids returns the solved children, aligned with Node.Branches.
func (s *Solved) Kids() []*Solved {
	from, to := s.sol.Compiled.Kids(int(s.i))
	out := make([]*Solved, 0, to-from)
	for k := from; k < to; k++ {
		out = append(out, s.sol.At(k))
	}
	return out
}

// Parent is the node above, nil at the root.
func (s *Solved) Parent() *Solved {
	if s.parent < 0 {
		return nil
	}
	return &s.sol.table()[s.parent]
}

// Via is the index of the parent's branch that leads here (-1 at the root).
func (s *Solved) Via() int { return s.sol.Compiled.Via(int(s.i)) }

// Depth is the number of branches from the root to this node.
func (s *Solved) Depth() int {
	d := 0
	nodes := s.sol.table()
	for p := s.parent; p >= 0; p = nodes[p].parent {
		d++
	}
	return d
}

// Size is the number of nodes in this subtree, the node included.
func (s *Solved) Size() int { return int(s.size) }

// Chosen is the index of the branch the policy takes at a decision node
// (the first optimal one in model order), or -1 at any other node.
func (s *Solved) Chosen() int { return s.sol.r.Best(int(s.i)) }

// Tied reports whether a decision has more than one optimal branch.
func (s *Solved) Tied() bool { return s.Node.Kind == tree.KindDecision && s.sol.r.Tied(int(s.i)) }

// Best returns, for a decision node, the indices of its optimal branches in
// model order; more than one means a tie. It is nil at other nodes.
func (s *Solved) Best() []int { return s.sol.r.Ties(int(s.i)) }

// IsBest reports whether branch j of a decision is one of its optimal ones.
func (s *Solved) IsBest(j int) bool {
	b := s.Chosen()
	if b < 0 {
		return false
	}
	if j == b {
		return true
	}
	return s.Tied() && j > b && s.sol.r.Compare(int(s.i), j, b) == 0
}

// BranchValue is the value of taking branch j, in the objective's terms:
// its cash plus the value of the node it leads to.
func (s *Solved) BranchValue(j int) decimal.Decimal {
	v, _ := s.sol.r.Total(s.sol.Compiled.Child(int(s.i), j))
	return s.sol.obj().Figure(v)
}

// Prob is the probability of branch j of a chance node (revised by Bayes'
// rule below a test reading, rounded at compiled.DivisionScale places when
// that is no finite decimal); 0 at other nodes.
func (s *Solved) Prob(j int) decimal.Decimal {
	return s.sol.Compiled.Prob(s.sol.Compiled.Child(int(s.i), j))
}

// Cash is the money on branch j in the objective's terms (a payoff under
// max, a cost under min).
func (s *Solved) Cash(j int) decimal.Decimal {
	return s.sol.obj().Figure(s.sol.Compiled.Cash(s.sol.Compiled.Child(int(s.i), j)))
}

// TestCost is the cost of the test this node runs, in the objective's
// terms as money on a branch would be (a negative payoff under max, a cost
// under min); 0 when it runs none.
func (s *Solved) TestCost() decimal.Decimal {
	return s.sol.obj().Figure(s.sol.Compiled.TestCostAt(int(s.i)).Neg())
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
	i := int(s.i)
	runnerUp = -1
	for j := range s.Node.Branches {
		if j == c {
			continue
		}
		if runnerUp < 0 || s.sol.r.Compare(i, j, runnerUp) > 0 {
			runnerUp = j
		}
	}
	margin, _ = s.sol.r.Diff(i, c, runnerUp)
	return margin, runnerUp, true
}

// OnPolicy reports whether the optimal policy can reach this node: every
// decision above it takes the branch that leads here.
func (s *Solved) OnPolicy() bool {
	for c := s; c.parent >= 0; c = c.Parent() {
		if p := c.Parent(); p.Node.Kind == tree.KindDecision && p.Chosen() != c.Via() {
			return false
		}
	}
	return true
}

// Reachable reports, for every node in pre-order, whether the optimal policy
// can reach it, in one forward sweep.
func (sol *Solution) Reachable() []bool {
	nodes := sol.table()
	on := bulk.Make[bool](len(nodes))
	for i := range nodes {
		s := &nodes[i]
		if s.parent < 0 {
			on[i] = true
			continue
		}
		p := &nodes[s.parent]
		on[i] = on[s.parent] && (p.Node.Kind != tree.KindDecision || p.Chosen() == s.Via())
	}
	return on
}

// Path returns the branches from the root to this node.
func (s *Solved) Path() []*tree.Branch {
	var rev []*tree.Branch
	for c := s; c.parent >= 0; c = c.Parent() {
		rev = append(rev, c.Parent().Node.Branches[c.Via()])
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
	// Payoff is the cumulative payoff, in the objective's terms: the cash on
	// every branch of the path, test costs on the way, plus the end node's
	// own value.
	Payoff decimal.Decimal
	// OnPolicy is true when the optimal policy can end here.
	OnPolicy bool
}

// Ends returns every end node in model order with its path probability and
// cumulative payoff.
func (sol *Solution) Ends() []EndPoint {
	c := sol.Compiled
	on := sol.Reachable()
	nodes := sol.table()
	pay := make([]decimal.Decimal, len(nodes))
	weight := make([]decimal.Decimal, len(nodes)) // what a mass in the node's frame is worth at the root
	var out []EndPoint
	for x := range nodes {
		s := &nodes[x]
		i := int(s.i)
		own := c.Cash(i).Add(c.Payoff(i)).Sub(c.TestCostAt(i))
		weight[x] = decimal.NewFromInt(1)
		if s.parent >= 0 {
			own = own.Add(pay[s.parent])
			weight[x] = weight[s.parent]
		}
		if c.FrameStart(i) {
			weight[x] = weight[x].Mul(c.FrameWeight(i))
		}
		pay[x] = own
		if s.Node.Kind == tree.KindEnd {
			p := c.Mass(i).Mul(weight[x])
			out = append(out, EndPoint{Solved: s, Prob: p, Payoff: sol.obj().Figure(own), OnPolicy: on[x]})
		}
	}
	return out
}

// solvedView is what interchange.Write needs of a solution.
type solvedView struct{ sol *Solution }

func (v solvedView) Value(i int) decimal.Decimal { return v.sol.At(i).Value() }
func (v solvedView) Best(i int) []int            { return v.sol.At(i).Best() }

// WriteJSON writes the solved model in the interchange format
// (interchange.Write): the model as written — inputs with their ranges,
// uncertainties, tests, every figure as its number or calculation — with
// "value" on every node (an exact decimal string, in the objective's
// terms), "best" on every decision and every chance branch's probability
// (revised by Bayes' rule below a test reading), so that the output reads
// back as the same model.
func (sol *Solution) WriteJSON(w io.Writer) error {
	return interchange.Write(w, sol.Model, interchange.WriteOptions{Compiled: sol.Compiled, Solved: solvedView{sol}, Probabilities: true})
}
