package tree

import (
	"fmt"

	"github.com/shopspring/decimal"
)

// Objective says whether the model's figures are to be maximised (net value:
// gains minus costs) or minimised (costs minus gains).
type Objective uint8

const (
	// Max maximises expected net value.
	Max Objective = iota
	// Min minimises expected net cost.
	Min
)

func (o Objective) String() string {
	if o == Min {
		return "min"
	}
	return "max"
}

// ParseObjective reads "max" or "min".
func ParseObjective(s string) (Objective, bool) {
	switch s {
	case "max", "":
		return Max, true
	case "min":
		return Min, true
	}
	return Max, false
}

// Better reports whether a is strictly better than b under the objective.
func (o Objective) Better(a, b decimal.Decimal) bool {
	if o == Min {
		return a.LessThan(b)
	}
	return a.GreaterThan(b)
}

// Kind is the kind of a node.
type Kind uint8

const (
	// KindEnd closes a path; its Value is the terminal payoff (usually 0: the
	// money sits on the branches).
	KindEnd Kind = iota
	// KindDecision: the decision maker picks one branch.
	KindDecision
	// KindChance: nature picks a branch with its probability.
	KindChance
)

func (k Kind) String() string {
	switch k {
	case KindDecision:
		return "decision"
	case KindChance:
		return "chance"
	}
	return "end"
}

// Model is a whole decision model.
type Model struct {
	Title     string
	Currency  string // ISO 4217 code or any short word; may be empty
	Objective Objective
	// Params are the named inputs (`let`), in definition order.
	Params []*Param
	// Uncertainties are named events a chance node can refer to, so that
	// two chance nodes on one uncertainty are known to be one event.
	Uncertainties []*Uncertainty
	// Tests are imperfect tests on an uncertainty.
	Tests []*Test
	Root  *Node

	size    int  // nodes counted by the last Resolve
	inexact bool // the last Resolve rounded a division
}

// Exact reports whether every figure the last Resolve produced is exact.
// It is false when a division had to be rounded at DivisionScale places: a
// fraction that is no finite decimal (1/3), or a posterior probability from
// Bayes' rule. Rollback only adds and multiplies, so its results are then
// exact consequences of figures that are themselves correct to DivisionScale
// decimal places.
func (m *Model) Exact() bool { return !m.inexact }

// Size is the number of nodes in the tree, as counted by the last Resolve
// (or counted now if the model was never resolved).
func (m *Model) Size() int {
	if m.size > 0 {
		return m.size
	}
	return Count(m.Root)
}

// Param is a named input: `let name = expr in low .. high`.
type Param struct {
	Name      string
	Expr      Expr
	Low, High Expr // the range analyses sweep; both nil when none is given
	Pos       Pos
	// Value, LowValue and HighValue are set by Resolve.
	Value, LowValue, HighValue decimal.Decimal
}

// HasRange reports whether the parameter was given a range.
func (p *Param) HasRange() bool { return p.Low != nil && p.High != nil }

// Uncertainty is a named event with its states and their prior
// probabilities.
type Uncertainty struct {
	Name   string
	Label  string // shown to people; Name when empty
	States []*State
	Pos    Pos
}

// Display is the label people see.
func (u *Uncertainty) Display() string {
	if u.Label != "" {
		return u.Label
	}
	return u.Name
}

// StateIndex returns the index of the state with that label, or -1.
func (u *Uncertainty) StateIndex(label string) int {
	for i, s := range u.States {
		if s.Label == label {
			return i
		}
	}
	return -1
}

// State is one possible state of an uncertainty.
type State struct {
	Label string
	Prob  Expr // nil: the rest
	Pos   Pos
	P     decimal.Decimal // set by Resolve
}

// Test is an imperfect test on an uncertainty: running it costs Cost and
// gives one of its readings, with likelihood P(reading | state).
type Test struct {
	Name     string
	Label    string
	On       string // the uncertainty it tests
	Cost     Expr   // in money, positive; nil: free
	Readings []*Reading
	Pos      Pos
	// CostValue is set by Resolve.
	CostValue decimal.Decimal
}

// Display is the label people see.
func (t *Test) Display() string {
	if t.Label != "" {
		return t.Label
	}
	return t.Name
}

// Reading is one possible result of a test.
type Reading struct {
	Label string
	// Given holds P(this reading | state); a state left out takes the rest
	// of that state's likelihood when Rest is set, and 0 otherwise.
	Given []*Likelihood
	Rest  bool
	Pos   Pos
	// L[i] is P(reading | state i), set by Resolve, aligned with the
	// uncertainty's states.
	L []decimal.Decimal
}

// Likelihood is P(reading | State).
type Likelihood struct {
	State string
	Prob  Expr
	Pos   Pos
}

// Node is a decision, chance or end node.
type Node struct {
	Kind  Kind
	Label string
	// Uncertainty names the uncertainty a chance node samples: its branches
	// are that uncertainty's states and take their probabilities from it
	// (revised by any test read on the way).
	Uncertainty string
	// Test names the test whose reading a chance node reveals: its branches
	// are the readings, with probabilities found by Bayes' rule. Running the
	// test costs the test's cost, charged at this node.
	Test     string
	Branches []*Branch
	// Payoff is an end node's terminal value; nil is 0.
	Payoff Expr
	Pos    Pos
	// Value is an end node's resolved payoff; TestCost a test node's resolved
	// cost in the objective's terms (negative under Max). Set by Resolve.
	Value    decimal.Decimal
	TestCost decimal.Decimal
}

// Branch leads from a node to the next one.
type Branch struct {
	Label string
	// Prob is a chance branch's probability; nil when Rest is set or on a
	// node whose probabilities come from an uncertainty or a test.
	Prob Expr
	Rest bool
	// Cash is the money on this branch in the objective's terms (a payoff
	// under Max, a cost under Min); nil is 0.
	Cash Expr
	Node *Node // never nil after Resolve: a path ends at an End node
	Pos  Pos
	// P and C are the resolved probability and cash, set by Resolve.
	P, C decimal.Decimal
}

// Display is what a node is called in messages.
func (n *Node) Display() string {
	if n.Label != "" {
		return n.Label
	}
	if n.Uncertainty != "" {
		return n.Uncertainty
	}
	if n.Test != "" {
		return n.Test
	}
	return n.Kind.String() + " node"
}

// Param returns the parameter with that name, or nil.
func (m *Model) Param(name string) *Param {
	for _, p := range m.Params {
		if p.Name == name {
			return p
		}
	}
	return nil
}

// Uncertainty returns the uncertainty with that name, or nil.
func (m *Model) Uncertainty(name string) *Uncertainty {
	for _, u := range m.Uncertainties {
		if u.Name == name {
			return u
		}
	}
	return nil
}

// TestNamed returns the test with that name, or nil.
func (m *Model) TestNamed(name string) *Test {
	for _, t := range m.Tests {
		if t.Name == name {
			return t
		}
	}
	return nil
}

// Walk calls f for every node in depth-first pre-order, with its depth (the
// root is 0). It uses an explicit stack, so a deep tree does not overflow.
// If f returns false the node's children are skipped.
func Walk(root *Node, f func(n *Node, depth int) bool) {
	if root == nil {
		return
	}
	type item struct {
		n *Node
		d int
	}
	stack := []item{{root, 0}}
	for len(stack) > 0 {
		it := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		if !f(it.n, it.d) {
			continue
		}
		for i := len(it.n.Branches) - 1; i >= 0; i-- {
			if c := it.n.Branches[i].Node; c != nil {
				stack = append(stack, item{c, it.d + 1})
			}
		}
	}
}

// Count returns the number of nodes under root, root included.
func Count(root *Node) int {
	n := 0
	Walk(root, func(*Node, int) bool { n++; return true })
	return n
}

// Clone returns a deep copy of the subtree (expressions are shared: they are
// never changed in place).
func Clone(n *Node) *Node {
	if n == nil {
		return nil
	}
	out := &Node{}
	type pair struct{ src, dst *Node }
	stack := []pair{{n, out}}
	for len(stack) > 0 {
		p := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		*p.dst = *p.src
		p.dst.Branches = make([]*Branch, len(p.src.Branches))
		for i, b := range p.src.Branches {
			nb := *b
			if b.Node != nil {
				nb.Node = &Node{}
				stack = append(stack, pair{b.Node, nb.Node})
			}
			p.dst.Branches[i] = &nb
		}
	}
	return out
}

// Clone returns a copy of the model that shares nothing Resolve writes to
// (parameters, states, readings, nodes and branches are copied; expressions,
// which are never changed in place, are shared), so an analysis can resolve
// the copy again and again without touching the original.
func (m *Model) Clone() *Model {
	c := *m
	c.Params = make([]*Param, len(m.Params))
	for i, p := range m.Params {
		cp := *p
		c.Params[i] = &cp
	}
	c.Uncertainties = make([]*Uncertainty, len(m.Uncertainties))
	for i, u := range m.Uncertainties {
		cu := *u
		cu.States = make([]*State, len(u.States))
		for j, st := range u.States {
			cs := *st
			cu.States[j] = &cs
		}
		c.Uncertainties[i] = &cu
	}
	c.Tests = make([]*Test, len(m.Tests))
	for i, t := range m.Tests {
		ct := *t
		ct.Readings = make([]*Reading, len(t.Readings))
		for j, rd := range t.Readings {
			cr := *rd
			ct.Readings[j] = &cr
		}
		c.Tests[i] = &ct
	}
	c.Root = Clone(m.Root)
	return &c
}

// Decision makes a decision node (builder API).
func Decision(label string, branches ...*Branch) *Node {
	return &Node{Kind: KindDecision, Label: label, Branches: branches}
}

// Chance makes a chance node with explicit probabilities (builder API).
func Chance(label string, branches ...*Branch) *Node {
	return &Node{Kind: KindChance, Label: label, Branches: branches}
}

// ChanceOn makes a chance node on a named uncertainty: each branch is one of
// its states, in any order, and takes its probability from it.
func ChanceOn(uncertainty string, branches ...*Branch) *Node {
	return &Node{Kind: KindChance, Uncertainty: uncertainty, Branches: branches}
}

// RunTest makes a node that runs a named test: each branch is one of its
// readings and takes its probability from Bayes' rule.
func RunTest(test string, branches ...*Branch) *Node {
	return &Node{Kind: KindChance, Test: test, Branches: branches}
}

// Terminal makes an end node with a terminal payoff.
func Terminal(value decimal.Decimal) *Node {
	return &Node{Kind: KindEnd, Payoff: Num(value)}
}

// Choice makes a decision branch with cash (in the objective's terms) leading
// to next (nil ends the path).
func Choice(label string, cash decimal.Decimal, next *Node) *Branch {
	return &Branch{Label: label, Cash: Num(cash), Node: next}
}

// Outcome makes a chance branch with probability p.
func Outcome(label string, p, cash decimal.Decimal, next *Node) *Branch {
	return &Branch{Label: label, Prob: Num(p), Cash: Num(cash), Node: next}
}

// RestOutcome makes a chance branch that takes the probability the others
// leave.
func RestOutcome(label string, cash decimal.Decimal, next *Node) *Branch {
	return &Branch{Label: label, Rest: true, Cash: Num(cash), Node: next}
}

// Given makes a branch under a ChanceOn or RunTest node: its probability
// comes from the uncertainty or test.
func Given(label string, cash decimal.Decimal, next *Node) *Branch {
	return &Branch{Label: label, Cash: Num(cash), Node: next}
}

// String describes the node briefly (for debugging).
func (n *Node) String() string {
	return fmt.Sprintf("%s %q (%d branches)", n.Kind, n.Display(), len(n.Branches))
}
