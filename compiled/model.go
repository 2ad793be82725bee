// Package compiled holds a decision model compiled once into flat,
// immutable arrays, and the rollback kernel that solves it.
//
// Compile checks a tree.Model (the model as written) and lays it out: the
// nodes in breadth-first order so that every node's children are
// contiguous, every figure (cash, probability, payoff, prior, likelihood,
// test cost) evaluated exactly, and every expression that reads an input
// compiled to a small program with the list of figures each input feeds.
// A Model never changes after it is made; With returns a new one with some
// inputs changed, which re-evaluates only the figures that depend on them
// and shares everything else. A Model is safe to use from several
// goroutines at once.
//
// Money is held as net value (a gain positive, a cost negative) whatever
// the objective; tree.Objective.Figure turns it into the objective's terms
// for people.
package compiled

import (
	"github.com/forkcast/forkcast/dist"
	"github.com/forkcast/forkcast/internal/exact"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// Model is a checked model compiled to flat arrays. Nodes are numbered in
// breadth-first order: the root is 0 and the children of node i are
// Kids(i), a contiguous range of numbers after i.
type Model struct {
	src  *tree.Model
	sh   *shape
	pool *exact.Pool

	in        []exact.Num       // input values, by slot (the order of the `let`s)
	inInexact []bool            // per slot: the value went through a rounded division; nil when none did
	fixed     []bool            // per slot: given a value by With, no longer computed from its expression; nil when none was
	pinned    map[[2]int32]bool // probabilities given a value by With: {-1, node} or {uncertainty, state}
	cash      []exact.Num       // per node: net value of the branch into it
	prob      []exact.Num       // per node: probability of the branch into it, under a plain chance node
	payoff    []exact.Num       // per node: an end node's own value (net); nil when no end has one
	prior     [][]exact.Num
	lik       [][][]exact.Num // per test: [reading][state]
	tcost     []exact.Num     // per test
	rounded   bool            // while compiling: the figures checked so far went through a rounded division
	// constRounded is set when a figure that reads no input was rounded;
	// dynInexact, per dynamic figure, when its last evaluation was (nil
	// when none was); inputs have inInexact. Exact follows from them, so
	// that a change of inputs that removes the only rounded figure makes
	// the model exact again.
	constRounded bool
	dynInexact   []bool
	d            *derived
	// reuse is set on a model made by With from another whose arrays a
	// later WithInto may take over (reuse.go); nil otherwise.
	reuse *reuse
}

// shape is what every variant of a model shares: its layout and the
// programs of the figures that read inputs.
type shape struct {
	nodes  []*tree.Node // nil stands for the end a branch with nothing under it leads to
	end    *tree.Node   // what Node returns for such an end
	kind   []tree.Kind
	first  []int32 // len n+1: the children of i are first[i] .. first[i+1]-1
	parent []int32
	// Named events; nil slices when the model has none.
	unc  []int32 // per node: the uncertainty a chance node samples or a test node tests, or -1
	test []int32 // per node: the test a node runs, or -1
	out  []int32 // per node: the state or reading of the branch into it (parent on an event), or -1
	seen []bool  // per node on an event: a node on the same uncertainty lies above it
	// restAt is, per plain chance node, the child that takes the rest, or
	// -1; nil when no chance node has a rest branch.
	restAt []int32

	params []*tree.Param
	slotOf map[string]int32
	ranges []rangeProg // per slot
	uncs   []*tree.Uncertainty
	uncOf  map[string]int32
	tests  []*tree.Test
	testOf map[string]int32
	// restState is, per uncertainty, the state that takes the rest, or -1;
	// restReading per test and state the reading that does, or -1.
	restState   []int32
	restReading [][]int32

	sources []source // the distributions written in the model, each an input slot after the `let`s
	random  []bool   // per input slot: a distribution feeds it
	// corr is the target rank correlation of the correlated sources,
	// corrCols their indices in sources (none when nothing is correlated).
	corr     dist.Correlation
	corrCols []int
	// isSource marks, per input slot, the slots that distributions stand
	// in (the others after the lets are a split's, split.go).
	isSource []bool
	dyn      []dynFig  // figures that read inputs, inputs first in slot order
	readers  [][]int32 // per slot: the dyn figures that read it directly
	lin      []linFig  // per dyn figure: as a·x + b of its input, when it is that (linear.go)
}

type rangeProg struct{ low, high *program }

// source is a distribution written in the model: the call, the input slot
// that stands for it, the program of its mean, and the `let` it is the
// whole expression of (-1 when none).
type source struct {
	call *tree.Call
	out  *outside // an outside value instead of a call (outside.go)
	slot int32
	prog *program
	let  int32
}

// figKind says which array a dynamic figure lives in.
type figKind uint8

const (
	figInput figKind = iota
	figCash
	figProb
	figPayoff
	figPrior
	figLikelihood
	figTestCost
)

// dynFig is a figure whose expression reads an input: where it goes and
// the program that computes it.
type dynFig struct {
	kind    figKind
	i, j, k int32 // input slot; node; node; node; (uncertainty, state); (test, reading, state); test
	prog    *program
}

// Source is the model as written. It must not be changed while the
// compiled form is in use: labels and positions are read from it.
func (c *Model) Source() *tree.Model { return c.src }

// Objective is the model's objective.
func (c *Model) Objective() tree.Objective { return c.src.Objective }

// Len is the number of nodes.
func (c *Model) Len() int { return len(c.sh.kind) }

// Node is node i as written. An end that a branch with nothing under it
// leads to is a stand-in end node with no label.
func (c *Model) Node(i int) *tree.Node {
	if n := c.sh.nodes[i]; n != nil {
		return n
	}
	return c.sh.end
}

// Kind is the kind of node i.
func (c *Model) Kind(i int) tree.Kind { return c.sh.kind[i] }

// Kids is the range of node i's children: from, from+1, …, to-1, in the
// order of its branches.
func (c *Model) Kids(i int) (from, to int) { return int(c.sh.first[i]), int(c.sh.first[i+1]) }

// Child is the node under branch j of node i.
func (c *Model) Child(i, j int) int { return int(c.sh.first[i]) + j }

// Parent is the node above i, -1 at the root.
func (c *Model) Parent(i int) int { return int(c.sh.parent[i]) }

// Via is the index of the parent's branch that leads to i (-1 at the root).
func (c *Model) Via(i int) int {
	p := c.sh.parent[i]
	if p < 0 {
		return -1
	}
	return i - int(c.sh.first[p])
}

// Branch is the branch into node i as written (nil at the root).
func (c *Model) Branch(i int) *tree.Branch {
	p := c.sh.parent[i]
	if p < 0 {
		return nil
	}
	return c.Node(int(p)).Branches[i-int(c.sh.first[p])]
}

// Cash is the net value of the branch into node i (0 at the root).
func (c *Model) Cash(i int) decimal.Decimal { return c.pool.Dec(c.cash[i]) }

// Payoff is end node i's own value (net), 0 for other nodes.
func (c *Model) Payoff(i int) decimal.Decimal { return c.pool.Dec(c.payoffAt(i)) }

// TestCostAt is the cost of the test node i runs (0 when it runs none), as
// a positive amount.
func (c *Model) TestCostAt(i int) decimal.Decimal {
	if c.sh.test == nil || c.sh.test[i] < 0 {
		return decimal.Zero
	}
	return c.pool.Dec(c.tcost[c.sh.test[i]])
}

// Exact reports whether every figure is exact: false when a division had to
// be rounded at DivisionScale places (a fraction that is no finite decimal,
// such as 1/3). Rollback adds and compares only, so its results are then
// exact consequences of figures correct to DivisionScale decimal places.
func (c *Model) Exact() bool { return !c.figuresRounded() && c.d.exact }

// figuresRounded reports whether some figure went through a rounded
// division.
func (c *Model) figuresRounded() bool {
	if c.constRounded {
		return true
	}
	for _, r := range c.dynInexact {
		if r {
			return true
		}
	}
	for _, r := range c.inInexact {
		if r {
			return true
		}
	}
	return false
}

// noteRounded records whether the figure just evaluated was rounded: the
// last dynamic figure (dyn) or a constant one.
func (c *Model) noteRounded(rounded, dyn bool) {
	switch {
	case !dyn:
		c.constRounded = c.constRounded || rounded
	case rounded || c.dynInexact != nil:
		for len(c.dynInexact) < len(c.sh.dyn) {
			c.dynInexact = append(c.dynInexact, false)
		}
		c.dynInexact[len(c.sh.dyn)-1] = rounded
	}
}

// Uncertainty returns the index of the named uncertainty, or -1.
func (c *Model) Uncertainty(name string) int {
	if u, ok := c.sh.uncOf[name]; ok {
		return int(u)
	}
	return -1
}

// Uncertainties are the declared uncertainties, by index.
func (c *Model) Uncertainties() []*tree.Uncertainty { return c.sh.uncs }

// Tests are the declared tests, by index.
func (c *Model) Tests() []*tree.Test { return c.sh.tests }

// Test returns the index of the named test, or -1.
func (c *Model) Test(name string) int {
	if t, ok := c.sh.testOf[name]; ok {
		return int(t)
	}
	return -1
}

// TestOn is the uncertainty test t is on.
func (c *Model) TestOn(t int) int { return int(c.sh.uncOf[c.sh.tests[t].On]) }

// Prior is the prior probability of state s of uncertainty u.
func (c *Model) Prior(u, s int) decimal.Decimal { return c.pool.Dec(c.prior[u][s]) }

// Likelihood is P(reading r | state s) of test t.
func (c *Model) Likelihood(t, r, s int) decimal.Decimal { return c.pool.Dec(c.lik[t][r][s]) }

// TestCost is the cost of test t, a positive amount.
func (c *Model) TestCost(t int) decimal.Decimal { return c.pool.Dec(c.tcost[t]) }

// SamplesUncertainty is the uncertainty chance node i samples, or -1;
// RunsTest the test it runs, or -1; Outcome the state or reading the branch
// into i stands for, or -1.
func (c *Model) SamplesUncertainty(i int) int {
	if c.sh.unc == nil || c.sh.test[i] >= 0 {
		return -1
	}
	return int(c.sh.unc[i])
}

// RunsTest is the test node i runs, or -1.
func (c *Model) RunsTest(i int) int {
	if c.sh.test == nil {
		return -1
	}
	return int(c.sh.test[i])
}

// Outcome is the state (under a chance node on an uncertainty) or the
// reading (under a test node) that the branch into node i stands for, or -1.
func (c *Model) Outcome(i int) int {
	if c.sh.out == nil {
		return -1
	}
	return int(c.sh.out[i])
}

// Input is a named input (`let`) of a compiled model.
type Input struct {
	Name  string
	Param *tree.Param
	// Value is its value; Low and High its range, when it has one.
	Value     decimal.Decimal
	Low, High decimal.Decimal
	HasRange  bool
	// Exact is false when the value went through a rounded division.
	Exact bool
	// Dist is the distribution the input is written as (`let x =
	// pert(...)`), nil for a plain figure; its Value is then the mean.
	Dist dist.Distribution
	// RangeOfDist is set when the input is a distribution and its `let`
	// gives no `in LOW .. HIGH`: Low and High (and HasRange) are then the
	// distribution's own range, which sensitivity and breakeven use: LOW
	// and HIGH of pert, triangular and uniform, the smallest and largest
	// value of discrete, P10 and P90 of lognormal (as written) and normal
	// (MEAN ∓ 1.2816·SD, rounded: not exact).
	RangeOfDist bool
	// Fixed is true when With gave it a value: it no longer follows its
	// expression.
	Fixed bool
}

// Inputs lists the inputs in definition order.
func (c *Model) Inputs() []Input {
	out := make([]Input, len(c.sh.params))
	for i := range out {
		out[i] = c.input(i)
	}
	return out
}

// InputNamed returns the input with that name; ok is false when there is
// none.
func (c *Model) InputNamed(name string) (Input, bool) {
	s, ok := c.sh.slotOf[name]
	if !ok {
		return Input{}, false
	}
	return c.input(int(s)), true
}

func (c *Model) input(slot int) Input {
	p := c.sh.params[slot]
	in := Input{Name: p.Name, Param: p, Value: c.pool.Dec(c.in[slot]), Exact: c.inInexact == nil || !c.inInexact[slot],
		Fixed: c.fixed != nil && c.fixed[slot]}
	for _, src := range c.sh.sources {
		if src.let == int32(slot) && src.out != nil {
			in.Dist, _, _ = src.out.dist(c.pool, c.in, c.inInexact, nil)
		} else if src.let == int32(slot) {
			args := src.prog.args(c.pool, c.in)
			in.Dist, _, _, _ = meanOf(functions[src.call.Func], args)
			if in.Dist != nil && c.sh.ranges[slot].low == nil {
				in.Low, in.High = spreadOf(src.call.Func, args, in.Dist)
				in.HasRange, in.RangeOfDist = true, true
			}
		}
	}
	if r := c.sh.ranges[slot]; r.low != nil {
		lo, _, err1 := r.low.eval(c.pool, c.in, nil)
		hi, _, err2 := r.high.eval(c.pool, c.in, nil)
		if err1 == nil && err2 == nil {
			in.Low, in.High, in.HasRange = c.pool.Dec(lo), c.pool.Dec(hi), true
		}
	}
	return in
}

// Prob is the probability of the branch into node k: its own figure under a
// plain chance node; under a chance node on an uncertainty or a test, the
// probability the declarations give there by Bayes' rule (rounded at
// DivisionScale places when that is no finite decimal); 0 under a decision
// and 1 at the root.
func (c *Model) Prob(k int) decimal.Decimal { return c.pool.Dec(c.probOf(c.d, k)) }

// Pinned reports whether With gave the probability of the branch into
// node k a value of its own (BranchTarget): it no longer follows its
// expression, nor takes the rest.
func (c *Model) Pinned(k int) bool { return c.pinned[[2]int32{-1, int32(k)}] }

// PriorPinned reports whether With gave the prior of state s of
// uncertainty u a value of its own (StateTarget).
func (c *Model) PriorPinned(u, s int) bool { return c.pinned[[2]int32{int32(u), int32(s)}] }

// Mass is the probability of reaching node k from the root, counting chance
// outcomes only (decisions are taken as the path takes them). For a node
// that can never be reached (below a branch of probability 0) it is the
// probability of reaching it from the first such branch above it, and
// Unreachable reports true.
func (c *Model) Mass(k int) decimal.Decimal { return c.pool.Dec(c.d.mass[k]) }

// FrameStart reports whether node k's subtree is rolled back in a frame of
// its own: below a branch of probability 0, or where masses would grow too
// long (see FrameWeight). Its masses start again there.
func (c *Model) FrameStart(k int) bool { return c.d.restart != nil && c.d.restart[k] }

// FrameWeight is, for a frame start k, what a mass in its frame is worth in
// the frame above: 0 below a branch of probability 0 (Unreachable), else
// the mass k would have had there (rounded; the model is then not exact).
// It is 1 for any other node.
func (c *Model) FrameWeight(k int) decimal.Decimal {
	if !c.FrameStart(k) {
		return decimal.NewFromInt(1)
	}
	if c.d.rho == nil {
		return decimal.Zero
	}
	return c.pool.Dec(c.d.rho[k])
}

// RootWeight is what a mass in node k's frame is worth at the root: the
// product of the frame weights on the way down (1 when no frame lies
// above k; 0 when k can never be reached). Masses, and T, of nodes in
// different models compare only after this.
func (c *Model) RootWeight(k int) decimal.Decimal {
	w := decimal.NewFromInt(1)
	for ; k >= 0; k = c.Parent(k) {
		if c.FrameStart(k) {
			w = w.Mul(c.FrameWeight(k))
		}
	}
	return w
}

// Unreachable reports whether node k lies just below a branch of
// probability 0.
func (c *Model) Unreachable(k int) bool {
	return c.FrameStart(k) && (c.d.rho == nil || c.d.rho[k].IsZero())
}

// Work is what one change of inputs and one rollback of c cost, in units of
// about a microsecond: a node, plus one per 18 decimal places of its mass
// (long masses are big numbers). Analyses count their work budgets in it.
func (c *Model) Work() int {
	d := c.d
	d.workOnce.Do(func() {
		w := 0
		for _, m := range d.mass {
			w += 1 + int(c.pool.Places(m))/18
		}
		d.work = w
	})
	return d.work
}
