package report

import (
	"io"
	"strconv"
	"strings"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/render"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// SolveOptions say what the solve report shows.
type SolveOptions struct {
	// OmitTree leaves the indented tree out of the text (for big models):
	// the report is then the expected value and the recommended policy.
	OmitTree bool
	// Risk, when set, reports the tree solved on certainty equivalents
	// (eval.SolveRiskAverse of the Solution): the risk-averse policy, with
	// every option's expected value, certainty equivalent and risk
	// premium; the JSON is Risk.WriteJSON's.
	Risk *eval.RiskSolution
}

// SolveReport is the report of a solved tree: its expected value, the
// recommended policy decision by decision with every option's value and
// the margin of the best over the runner-up, and the tree as indented
// text. Its JSON is the solved interchange format (eval.Solution.WriteJSON:
// the model with "value" on every node and "best" on every decision).
type SolveReport struct {
	Solution *eval.Solution
	Options  SolveOptions
}

// Solve is the report of sol.
func Solve(sol *eval.Solution, opts SolveOptions) *SolveReport {
	return &SolveReport{Solution: sol, Options: opts}
}

// WriteJSON writes the solved tree in the interchange format.
func (r *SolveReport) WriteJSON(w io.Writer) error {
	if r.Options.Risk != nil {
		return r.Options.Risk.WriteJSON(w)
	}
	return r.Solution.WriteJSON(w)
}

// MarshalJSON is WriteJSON's document, compact.
func (r *SolveReport) MarshalJSON() ([]byte, error) { return marshalJSON(r.WriteJSON) }

// WriteText writes the expected value, the recommended policy and, unless
// Options.OmitTree, the tree.
func (r *SolveReport) WriteText(w io.Writer) error {
	t := newTextOut(w)
	if r.Options.Risk != nil {
		r.writeRiskText(t)
		return t.Flush()
	}
	sol := r.Solution
	m := sol.Model
	p := printer{t: t, m: m, cur: m.Currency}
	if m.Title != "" {
		t.ln(m.Title)
	}
	t.f("objective:       %s\n", objectiveText(m))
	word := "expected value:"
	if m.Objective == tree.Min {
		word = "expected cost: "
	}
	t.f("%s  %s\n", word, p.money(sol.Value()))
	if !sol.Exact() {
		t.f("note:            a fraction was rounded at %d decimal places;\n"+
			"                 the figures are exact to that precision\n", compiled.DivisionScale)
	}
	writeMeans(t, sol.Compiled)
	t.ln()
	t.ln("Recommended policy")
	p.policy(sol)
	if !r.Options.OmitTree {
		t.ln()
		t.f("%s", treeKey(figuresFor(m)))
		p.tree(sol)
	}
	return t.Flush()
}

// printer formats money and probabilities for one model.
type printer struct {
	t   textOut
	m   *tree.Model
	cur string
}

func (p printer) money(d decimal.Decimal) string { return render.Money(d, p.cur) }

// cash shows a branch's cash flow as people write it: gain or cost.
func (p printer) cash(c decimal.Decimal) string {
	return render.CashWith(c, p.m.Objective, func(a decimal.Decimal) string { return render.Amount(a, p.cur) })
}

// policy lists the decisions the optimal policy reaches, in model order,
// each with the path that leads to it, every option's value and the
// margin.
func (p printer) policy(sol *eval.Solution) {
	w := p.t
	n := 0
	for _, d := range sol.PolicyDecisions() {
		s := d.Solved
		n++
		w.f("  %d. %s", n, quoted(s.Node.Display()))
		if cond := conditionsAbove(d.Above); cond != "" {
			w.f("  (if %s)", cond)
		}
		w.ln()
		width := 0
		for _, b := range s.Node.Branches {
			width = max(width, len([]rune(b.Label)))
		}
		for j, b := range s.Node.Branches {
			mark := " "
			if j == s.Chosen() {
				mark = "*"
			} else if s.IsBest(j) {
				mark = "="
			}
			w.f("     %s %-*s  %s\n", mark, width, b.Label, p.money(s.BranchValue(j)))
		}
		c := s.Node.Branches[s.Chosen()].Label
		if margin, ru, ok := s.Margin(); ok {
			if s.Tied() {
				w.f("     take %s: tied with %s; the first in the model is taken\n", quoted(c), quotedList(s, s.Best()[1:]))
			} else {
				w.f("     take %s: better by %s than %s\n", quoted(c), p.money(margin), quoted(s.Node.Branches[ru].Label))
			}
		} else {
			w.f("     take %s (the only option)\n", quoted(c))
		}
	}
	if n == 0 {
		w.ln("  (the tree has no decision: nothing to choose)")
	}
}

func quotedList(s *eval.Solved, idx []int) string {
	q := make([]string, len(idx))
	for i, j := range idx {
		q[i] = quoted(s.Node.Branches[j].Label)
	}
	return strings.Join(q, ", ")
}

// figures names the figures of the text tree, in the objective's words,
// so that none is read for another (the same words as the drawing's).
type figures struct {
	fromHere, option, total string
}

func figuresFor(m *tree.Model) figures {
	if m.Objective == tree.Min {
		return figures{"expected cost from here", "option expected cost", "path total cost"}
	}
	return figures{"EV from here", "option EV", "path total"}
}

// treeKey is the heading of the text tree: what each figure counts.
func treeKey(f figures) string {
	rows := [][2]string{
		{f.fromHere, "what follows a node, not the cash on the branch into it"},
		{f.option, "an option of a decision, its own cash included"},
		{f.total, "all the cash from the root to an end, beside the path's probability"},
	}
	width := 0
	for _, r := range rows {
		width = max(width, len(r[0]))
	}
	var b strings.Builder
	b.WriteString("Tree\n")
	for _, r := range rows {
		b.WriteString("  " + r[0] + strings.Repeat(" ", width-len(r[0])) + "   " + r[1] + "\n")
	}
	b.WriteString("\n")
	return b.String()
}

// tree prints the tree as indented text, iteratively (deep trees): each
// node with its value from there on, each option of a decision with its
// value, each end with its path total and path probability.
func (p printer) tree(sol *eval.Solution) {
	w := p.t
	f := figuresFor(p.m)
	ends := sol.Ends()
	endOf := make([]int32, len(sol.Nodes())) // pre-order index → 1 + index in ends
	for k := range ends {
		endOf[ends[k].Index()] = int32(k + 1)
	}
	w.f("%s  %s %s%s\n", describe(sol.Root.Node), f.fromHere, p.money(sol.Root.Value()), choiceNote(sol.Root))
	type item struct {
		s     *eval.Solved
		depth int
	}
	var stack []item
	push := func(s *eval.Solved, depth int) {
		kids := s.Kids()
		for j := len(kids) - 1; j >= 0; j-- {
			stack = append(stack, item{kids[j], depth})
		}
	}
	push(sol.Root, 1)
	for len(stack) > 0 {
		it := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		prefix := treeIndent(it.depth)
		s := it.s
		parent := s.Parent()
		b := parent.Node.Branches[s.Via()]
		mark := ""
		if parent.Node.Kind == tree.KindDecision {
			switch {
			case parent.Chosen() == s.Via():
				mark = "* "
			case parent.IsBest(s.Via()):
				mark = "= " // tied with the chosen one
			default:
				mark = "x "
			}
		}
		var parts []string
		parts = append(parts, mark+quoted(b.Label))
		if parent.Node.Kind == tree.KindChance {
			parts = append(parts, render.Percent(parent.Prob(s.Via()), 2))
		}
		if cs := p.cash(parent.Cash(s.Via())); cs != "" {
			parts = append(parts, cs)
		}
		if parent.Node.Kind == tree.KindDecision {
			parts = append(parts, f.option+" "+p.money(parent.BranchValue(s.Via())))
		}
		if e := endOf[s.Index()]; e > 0 {
			end := ends[e-1]
			parts = append(parts, f.total+" "+p.money(end.Payoff), "path probability "+render.Percent(end.Prob, 2))
			w.f("%s%s\n", prefix, strings.Join(parts, "  "))
			continue
		}
		w.f("%s%s\n", prefix, strings.Join(parts, "  "))
		w.f("%s  %s  %s %s%s\n", prefix, describe(s.Node), f.fromHere, p.money(s.Value()), choiceNote(s))
		push(s, it.depth+1)
	}
}

// maxTreeIndent is the deepest level the text tree indents; deeper lines
// say their level instead, so a very deep tree prints in linear space.
const maxTreeIndent = 20

// treeIndent is the prefix of a branch line at depth d (the root's
// branches are at depth 1).
func treeIndent(d int) string {
	if d <= maxTreeIndent {
		return "  " + strings.Repeat("    ", d-1)
	}
	return "  " + strings.Repeat("    ", maxTreeIndent-1) + "[level " + strconv.Itoa(d) + "] "
}

// choiceNote adds what a decision takes, or a test's cost.
func choiceNote(s *eval.Solved) string {
	switch {
	case s.Node.Kind == tree.KindDecision && s.Chosen() >= 0:
		return "  take " + quoted(s.Node.Branches[s.Chosen()].Label)
	case !s.TestCost().IsZero():
		return "  (includes the test's cost)"
	}
	return ""
}

// describe is a short phrase for a node.
func describe(n *tree.Node) string {
	switch {
	case n.Test != "" && n.Label == "":
		return "test " + n.Test
	case n.Uncertainty != "" && n.Label == "":
		return "chance " + n.Uncertainty
	case n.Kind == tree.KindEnd:
		return "end"
	}
	return n.Kind.String() + " " + quoted(n.Label)
}
