package main

import (
	"bufio"
	"fmt"
	"io"
	"strconv"
	"strings"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/render"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
	"github.com/urfave/cli/v2"
)

func solveCommand() *cli.Command {
	return &cli.Command{
		Name:      "solve",
		Usage:     "roll the tree back: the best policy and its expected value",
		ArgsUsage: "FILE",
		UsageText: "forkcast solve [--json] [--no-tree] FILE\n\n" +
			"   forkcast solve examples/sourcing.fork\n" +
			"   forkcast solve example:release --json > solved.json\n" +
			"   cat model.json | forkcast solve -",
		Description: "Reads the model, rolls the tree back with exact decimal arithmetic and prints:\n" +
			"the expected value of the whole tree; the recommended policy, decision by\n" +
			"decision, with the expected value of every option and the margin of the best\n" +
			"over the runner-up; and the tree as indented text with each node's expected\n" +
			"value (* marks the option the policy takes, = one tied with it, x one it\n" +
			"rejects).\n\n" +
			"Money is rounded to the currency's minor unit for display; --json carries the\n" +
			"full exact values. An expected value is a long-run average over many such\n" +
			"decisions, not the outcome of this one: look at the spread too.",
		Flags: []cli.Flag{
			&cli.BoolFlag{Name: "json", Usage: "print the solved tree as JSON (the interchange format, every node with \"value\", every decision with \"best\")"},
			&cli.BoolFlag{Name: "no-tree", Usage: "leave out the indented tree (for big models)"},
			maxNodesFlag,
		},
		Action: func(c *cli.Context) error {
			_, sol, err := loadAndSolve(c)
			if err != nil {
				return err
			}
			if c.Bool("json") {
				return writeSolvedJSON(c.App.Writer, sol)
			}
			w := bufio.NewWriter(c.App.Writer)
			printSolution(w, sol, !c.Bool("no-tree"))
			return w.Flush()
		},
	}
}

// writeSolvedJSON writes the annotated tree as DESIGN.md specifies.
func writeSolvedJSON(w io.Writer, sol *eval.Solution) error { return sol.WriteJSON(w) }

// printer formats money and probabilities for one model.
type printer struct {
	w   io.Writer
	m   *tree.Model
	cur string
}

func (p printer) money(d decimal.Decimal) string { return render.Money(d, p.cur) }

// cash shows a branch's cash flow as people write it: gain or cost.
func (p printer) cash(c decimal.Decimal) string {
	if c.IsZero() {
		return ""
	}
	gain := c.IsPositive()
	if p.m.Objective == tree.Min {
		gain = !gain
	}
	if gain {
		return "gain " + render.Amount(c.Abs(), p.cur)
	}
	return "cost " + render.Amount(c.Abs(), p.cur)
}

func objectiveText(m *tree.Model) string {
	if m.Objective == tree.Min {
		return "minimise expected cost"
	}
	return "maximise expected net value"
}

func printSolution(w io.Writer, sol *eval.Solution, withTree bool) {
	m := sol.Model
	p := printer{w: w, m: m, cur: m.Currency}
	if m.Title != "" {
		fmt.Fprintln(w, m.Title)
	}
	fmt.Fprintf(w, "objective:       %s\n", objectiveText(m))
	word := "expected value:"
	if m.Objective == tree.Min {
		word = "expected cost: "
	}
	fmt.Fprintf(w, "%s  %s\n", word, p.money(sol.Value()))
	if !sol.Exact() {
		fmt.Fprintf(w, "note:            a fraction was rounded at %d decimal places;\n"+
			"                 the figures are exact to that precision\n", compiled.DivisionScale)
	}
	fmt.Fprintln(w)
	fmt.Fprintln(w, "Recommended policy")
	printPolicy(p, sol)
	if withTree {
		fmt.Fprintln(w)
		fmt.Fprintln(w, "Tree (expected value at each node)")
		printTree(p, sol)
	}
}

// printPolicy lists the decisions the optimal policy reaches, in model
// order, each with the path that leads to it, every option's value and the
// margin.
func printPolicy(p printer, sol *eval.Solution) {
	w := p.w
	n := 0
	reach := sol.Reachable()
	chanceAbove := nearestChance(sol)
	for i := range sol.Nodes() {
		s := &sol.Nodes()[i]
		if s.Node.Kind != tree.KindDecision || !reach[i] {
			continue
		}
		n++
		fmt.Fprintf(w, "  %d. %s", n, quoted(s.Node.Display()))
		if cond := conditions(sol, chanceAbove, s); cond != "" {
			fmt.Fprintf(w, "  (if %s)", cond)
		}
		fmt.Fprintln(w)
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
			fmt.Fprintf(w, "     %s %-*s  %s\n", mark, width, b.Label, p.money(s.BranchValue(j)))
		}
		c := s.Node.Branches[s.Chosen()].Label
		if margin, ru, ok := s.Margin(); ok {
			if s.Tied() {
				fmt.Fprintf(w, "     take %s: tied with %s; the first in the model is taken\n", quoted(c), quotedList(s, s.Best()[1:]))
			} else {
				fmt.Fprintf(w, "     take %s: better by %s than %s\n", quoted(c), p.money(margin), quoted(s.Node.Branches[ru].Label))
			}
		} else {
			fmt.Fprintf(w, "     take %s (the only option)\n", quoted(c))
		}
	}
	if n == 0 {
		fmt.Fprintln(w, "  (the tree has no decision: nothing to choose)")
	}
}

// chanceLink is, for one node, the nearest chance node above it (node -1
// when there is none) and the index of that node's branch on the way down.
type chanceLink struct{ node, via int }

// nearestChance gives every node's chanceLink in pre-order, in one forward
// sweep, so that a decision's conditions are found without walking up
// through the decisions between.
func nearestChance(sol *eval.Solution) []chanceLink {
	nodes := sol.Nodes()
	up := make([]chanceLink, len(nodes))
	for i := range nodes {
		up[i] = chanceLink{-1, -1}
		if par := nodes[i].Parent(); par != nil {
			if par.Node.Kind == tree.KindChance {
				up[i] = chanceLink{par.Index(), nodes[i].Via()}
			} else {
				up[i] = up[par.Index()]
			}
		}
	}
	return up
}

// maxConditions is how many chance outcomes a decision's "(if ...)" names,
// the nearest ones; more would make deep trees print the square of their
// depth.
const maxConditions = 4

// conditions is the chance outcomes on the way to s ("Integration = Rework").
func conditions(sol *eval.Solution, up []chanceLink, s *eval.Solved) string {
	var parts []string
	nodes := sol.Nodes()
	for l := up[s.Index()]; l.node >= 0; l = up[l.node] {
		if len(parts) == maxConditions {
			parts = append(parts, "…")
			break
		}
		ch := &nodes[l.node]
		parts = append(parts, fmt.Sprintf("%s = %s", ch.Node.Display(), quoted(ch.Node.Branches[l.via].Label)))
	}
	for i, j := 0, len(parts)-1; i < j; i, j = i+1, j-1 {
		parts[i], parts[j] = parts[j], parts[i]
	}
	return strings.Join(parts, ", ")
}

func quoted(s string) string { return strconv.Quote(s) }

func quotedList(s *eval.Solved, idx []int) string {
	q := make([]string, len(idx))
	for i, j := range idx {
		q[i] = quoted(s.Node.Branches[j].Label)
	}
	return strings.Join(q, ", ")
}

// printTree prints the tree as indented text, iteratively (deep trees).
func printTree(p printer, sol *eval.Solution) {
	w := p.w
	fmt.Fprintf(w, "%s  %s\n", describe(sol.Root.Node), p.money(sol.Root.Value())+choiceNote(sol.Root))
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
		cash := parent.Cash(s.Via())
		if cs := p.cash(cash); cs != "" {
			parts = append(parts, cs)
		}
		line := strings.Join(parts, "  ")
		if s.Node.Kind == tree.KindEnd {
			fmt.Fprintf(w, "%s%s  -> %s\n", prefix, line, p.money(s.Value().Add(cash)))
			continue
		}
		fmt.Fprintf(w, "%s%s\n", prefix, line)
		fmt.Fprintf(w, "%s  %s  %s%s\n", prefix, describe(s.Node), p.money(s.Value()), choiceNote(s))
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
	return "  " + strings.Repeat("    ", maxTreeIndent-1) + fmt.Sprintf("[level %d] ", d)
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
