package tree

import (
	"fmt"
	"strings"

	"github.com/shopspring/decimal"
)

// Objective says whether the model's figures are to be maximised (net value:
// gains minus costs) or minimised (costs minus gains).
//
// Inside forkcast money is always held as net value, a gain positive and a
// cost negative, and every rollback maximises it. The objective only says
// how figures are shown and read: under Min a figure is a cost, the
// negation of a net value. Figure and Net are the one place that rule is
// written.
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

// Figure turns a net value into the objective's terms: the value itself
// under Max, the cost it stands for (its negation) under Min.
func (o Objective) Figure(net decimal.Decimal) decimal.Decimal {
	if o == Min {
		return net.Neg()
	}
	return net
}

// Net turns a figure in the objective's terms (a payoff under Max, a cost
// under Min) into net value.
func (o Objective) Net(figure decimal.Decimal) decimal.Decimal { return o.Figure(figure) }

// FigureFloat is Figure in float64 (simulation, utility).
func (o Objective) FigureFloat(net float64) float64 {
	if o == Min {
		return 0 - net // not -net: no −0 to show
	}
	return net
}

// FigureExpr is an expression of net value written in the objective's
// terms (as the JSON interchange writes figures).
func (o Objective) FigureExpr(net Expr) Expr {
	if o == Min && net != nil {
		return Negate(net)
	}
	return net
}

// CashOf is an amount written in the objective's terms put on a branch: a
// gain under Max, a cost under Min.
func (o Objective) CashOf(x Expr) Cash {
	if o == Min {
		return Cost(x)
	}
	return Gain(x)
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
	// RiskTolerance is the decision maker's risk tolerance, in the model's
	// money (`risk tolerance AMOUNT`): decisions are then taken on an
	// exponential utility's certainty equivalents. Nil decides by expected
	// value.
	RiskTolerance *Number
	// Correlations are rank correlations between inputs written as
	// distributions, imposed on their draws in simulation.
	Correlations []*Correlation
	// Registers are the model's risk registers (package register
	// quantifies them). A model may hold registers and no tree.
	Registers []*Register
}

// Correlation is `correlate A B RHO`: the rank correlation between two
// inputs written as distributions. Exact analyses use the inputs' means
// and are not affected by it; simulation pairs the draws so that their
// ranks correlate by Rho.
type Correlation struct {
	A, B       string
	Rho        Expr
	APos, BPos Pos // where each name is written
	Pos        Pos // the line's first word
}

// Correlate makes a correlation between the inputs named a and b.
func Correlate(a, b string, rho Expr) *Correlation { return &Correlation{A: a, B: b, Rho: rho} }

// Size is the number of nodes in the tree.
func (m *Model) Size() int { return Count(m.Root) }

// Param is a named input: `let name = expr in low .. high`.
type Param struct {
	Name      string
	Expr      Expr
	Low, High Expr // the range analyses sweep; both nil when none is given
	Pos       Pos
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
	// Payoff is an end node's terminal value as net value (positive is
	// good, whatever the objective); nil is 0.
	Payoff Expr
	// Split, on a chance node, makes it the three-point approximation of
	// an input written as a distribution (see Split): its branches are the
	// three points and each subtree below sees the input at its branch's
	// value.
	Split *Split
	Pos   Pos
}

// SplitRule is a three-point approximation of a distribution (Keefer &
// Bodily, 1983, "Three-point approximations for continuous random
// variables", Management Science 29(5)).
type SplitRule uint8

const (
	// SwansonMegill is the extended Swanson–Megill rule: P10, P50 and P90
	// with probabilities 0.3, 0.4 and 0.3.
	SwansonMegill SplitRule = iota + 1
	// PearsonTukey is the extended Pearson–Tukey rule: P5, P50 and P95
	// with probabilities 0.185, 0.63 and 0.185.
	PearsonTukey
)

// Points returns the rule's branch labels (the percentiles), their levels
// and their probabilities as written in a model.
func (r SplitRule) Points() (labels [3]string, levels [3]string, probs [3]string) {
	if r == PearsonTukey {
		return [3]string{"P5", "P50", "P95"}, [3]string{"0.05", "0.5", "0.95"}, [3]string{"18.5%", "63%", "18.5%"}
	}
	return [3]string{"P10", "P50", "P90"}, [3]string{"0.1", "0.5", "0.9"}, [3]string{"30%", "40%", "30%"}
}

// String is the rule's word in the language: swanson or pearson.
func (r SplitRule) String() string {
	switch r {
	case SwansonMegill:
		return "swanson"
	case PearsonTukey:
		return "pearson"
	}
	return fmt.Sprintf("SplitRule(%d)", int(r))
}

// Split is `chance NAME by swanson` (or `by pearson`): a chance node of
// three branches, one for each point of the rule, in which the input NAME
// (a `let` written as a distribution) takes the distribution's percentile
// at that point, in the subtree below the branch and in every input
// computed from it. Elsewhere in the tree the input keeps its mean.
type Split struct {
	Input    string
	Rule     SplitRule
	InputPos Pos
}

// SplitOn makes the three-point chance node on input by rule, each branch
// leading to its own copy of body (nil: the branches end). label names the
// node; "" gives it SplitLabel's.
func SplitOn(input string, rule SplitRule, label string, body *Node) *Node {
	if label == "" {
		label = SplitLabel(input, rule)
	}
	n := &Node{Kind: KindChance, Label: label, Split: &Split{Input: input, Rule: rule}}
	n.Branches = SplitBranches(rule, body)
	return n
}

// SplitLabel is the label a split has when none is written:
// "labour at P10, P50, P90".
func SplitLabel(input string, rule SplitRule) string {
	labels, _, _ := rule.Points()
	return input + " at " + strings.Join(labels[:], ", ")
}

// SplitBranches makes the three branches of a split by rule, each leading
// to its own copy of body.
func SplitBranches(rule SplitRule, body *Node) []*Branch {
	labels, _, probs := rule.Points()
	out := make([]*Branch, 3)
	for i := range out {
		next := body
		if i > 0 {
			next = Clone(body)
		}
		p := decimal.RequireFromString(strings.TrimSuffix(probs[i], "%")).Shift(-2)
		prob := WrittenDecimal(Pos{}, p, probs[i])
		out[i] = &Branch{Label: labels[i], Prob: &prob, Node: next}
	}
	return out
}

// Branch leads from a node to the next one.
type Branch struct {
	Label string
	// Prob is a chance branch's probability; nil when Rest is set or on a
	// node whose probabilities come from an uncertainty or a test.
	Prob Expr
	Rest bool
	// Gain and Cost are the money on this branch as written, each nil when
	// absent. Its net value is Gain − Cost whatever the objective.
	Gain, Cost Expr
	// Node is the node the branch leads to; nil ends the path (an end node
	// of value 0).
	Node *Node
	Pos  Pos
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

// Builders. A program that makes a model in Go uses these instead of
// filling in the structs by hand; each figure is an expression, made with
// Num for a number or Ref for an input (a `let`).

// Num wraps a decimal as an expression.
func Num(d decimal.Decimal) Expr { return NumberOf(Pos{}, d) }

// Ref refers to the input (Param) with that name.
func Ref(name string) Expr { return &Name{Name: name} }

// Cash is the money on a branch: a gain, a cost, both, or none. Net value
// is the gain minus the cost, whatever the objective.
type Cash struct{ Gain, Cost Expr }

// NoCash is a branch with no money on it.
var NoCash = Cash{}

// Gain is money received on a branch.
func Gain(x Expr) Cash { return Cash{Gain: x} }

// Cost is money paid on a branch.
func Cost(x Expr) Cash { return Cash{Cost: x} }

// And puts two amounts on one branch: Gain(a).And(Cost(b)). An amount
// given twice is added.
func (c Cash) And(d Cash) Cash {
	return Cash{Gain: plus(c.Gain, d.Gain), Cost: plus(c.Cost, d.Cost)}
}

func plus(x, y Expr) Expr {
	switch {
	case x == nil:
		return y
	case y == nil:
		return x
	}
	return &Binary{Op: '+', X: x, Y: y}
}

// Decision makes a decision node.
func Decision(label string, branches ...*Branch) *Node {
	return &Node{Kind: KindDecision, Label: label, Branches: branches}
}

// Chance makes a chance node with explicit probabilities.
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

// Terminal makes an end node with a terminal payoff (net value).
func Terminal(payoff Expr) *Node {
	return &Node{Kind: KindEnd, Payoff: payoff}
}

// Choice makes a decision branch with its cash, leading to next (nil ends
// the path).
func Choice(label string, cash Cash, next *Node) *Branch {
	return &Branch{Label: label, Gain: cash.Gain, Cost: cash.Cost, Node: next}
}

// Outcome makes a chance branch with probability p.
func Outcome(label string, p Expr, cash Cash, next *Node) *Branch {
	return &Branch{Label: label, Prob: p, Gain: cash.Gain, Cost: cash.Cost, Node: next}
}

// RestOutcome makes a chance branch that takes the probability the others
// leave.
func RestOutcome(label string, cash Cash, next *Node) *Branch {
	return &Branch{Label: label, Rest: true, Gain: cash.Gain, Cost: cash.Cost, Node: next}
}

// Given makes a branch under a ChanceOn or RunTest node: its probability
// comes from the uncertainty or the test.
func Given(label string, cash Cash, next *Node) *Branch {
	return &Branch{Label: label, Gain: cash.Gain, Cost: cash.Cost, Node: next}
}

// Input makes an input (`let name = value`).
func Input(name string, value Expr) *Param { return &Param{Name: name, Expr: value} }

// Within gives the input the range that sweeps and breakeven searches use
// (`in low .. high`), and returns it.
func (p *Param) Within(low, high Expr) *Param {
	p.Low, p.High = low, high
	return p
}

// NewUncertainty makes a named uncertainty with its states.
func NewUncertainty(name, label string, states ...*State) *Uncertainty {
	return &Uncertainty{Name: name, Label: label, States: states}
}

// StateP makes a state of an uncertainty with its prior probability.
func StateP(label string, p Expr) *State { return &State{Label: label, Prob: p} }

// RestState makes the state that takes the probability the others leave.
func RestState(label string) *State { return &State{Label: label} }

// NewTest makes an imperfect test of an uncertainty, with its cost (nil:
// free) and its readings.
func NewTest(name, label, on string, cost Expr, readings ...*Reading) *Test {
	return &Test{Name: name, Label: label, On: on, Cost: cost, Readings: readings}
}

// ReadingIf makes a reading of a test with its likelihoods, each
// P(reading | state) from If.
func ReadingIf(label string, given ...*Likelihood) *Reading {
	return &Reading{Label: label, Given: given}
}

// RestReading makes the reading that takes, for each state, the likelihood
// the others leave; given may name states where it has its own.
func RestReading(label string, given ...*Likelihood) *Reading {
	return &Reading{Label: label, Given: given, Rest: true}
}

// If is the likelihood P(reading | state) for a reading.
func If(state string, p Expr) *Likelihood { return &Likelihood{State: state, Prob: p} }

// String describes the node briefly (for debugging).
func (n *Node) String() string {
	return fmt.Sprintf("%s %q (%d branches)", n.Kind, n.Display(), len(n.Branches))
}

// DefaultNodeLimit is the largest tree a reader builds unless told
// otherwise: a model that expands past it is refused with a clear error
// rather than exhausting memory. It is set from what a node costs to read,
// compile and solve (BENCHMARKS.md): about 0.4 KB in a tree made of
// subtrees, 0.5 KB in a typical generated model, 1.2 KB when every branch
// has a calculation that reads inputs. A model at the limit so needs about
// 1 GB of memory, 2.5 GB at most, which an ordinary machine has.
const DefaultNodeLimit = 2_000_000

// QuoteList writes labels for a message: "a", "b", "c".
func QuoteList(xs []string) string {
	q := make([]string, len(xs))
	for i, x := range xs {
		q[i] = fmt.Sprintf("%q", x)
	}
	return strings.Join(q, ", ")
}
