// Command embed shows forkcast used as a library: a Go program builds a
// decision model without any text, solves it exactly and walks the result.
// The scenario is invented: a small print shop deciding whether to replace
// its press now, overhaul it, or run it as it is.
//
//	go run ./examples/embed
package main

import (
	"fmt"
	"os"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/render"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// n is a number as an expression.
func n(s string) tree.Expr { return tree.Num(decimal.RequireFromString(s)) }

func main() {
	breakdown := func(repair tree.Expr) *tree.Node {
		return tree.Chance("Breakdown this year",
			tree.Outcome("Breaks down", tree.Ref("p_break"), tree.Cost(repair), nil),
			tree.RestOutcome("Keeps running", tree.NoCash, nil))
	}
	m := &tree.Model{
		Title:    "Press replacement",
		Currency: "EUR",
		Params: []*tree.Param{
			tree.Input("p_break", n("0.3")).Within(n("0.1"), n("0.5")),
			tree.Input("new_press", n("42000")),
		},
		Root: tree.Decision("Press",
			tree.Choice("Replace now", tree.Cost(tree.Ref("new_press")), nil),
			tree.Choice("Overhaul", tree.Cost(n("9000")), breakdown(n("30000"))),
			tree.Choice("Run as is", tree.NoCash, breakdown(n("70000"))),
		),
	}
	c, ds := compiled.Compile(m)
	if ds.HasErrors() {
		ds.Print(os.Stderr, "", nil)
		os.Exit(1)
	}
	sol, err := eval.Solve(c)
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(1)
	}
	root := sol.Root
	fmt.Printf("%s: expected value %s\n", m.Title, render.Money(sol.Value(), m.Currency))
	for j, b := range root.Node.Branches {
		mark := " "
		if root.IsBest(j) {
			mark = "*"
		}
		fmt.Printf(" %s %-12s %s\n", mark, b.Label, render.Money(root.BranchValue(j), m.Currency))
	}
	margin, runnerUp, _ := root.Margin()
	fmt.Printf("take %q, better by %s than %q\n", root.Node.Branches[root.Chosen()].Label,
		render.Money(margin, m.Currency), root.Node.Branches[runnerUp].Label)

	// The same compiled model, re-solved with a likelier breakdown: only the
	// figures that depend on p_break are evaluated again.
	p, _ := c.Set("p_break", decimal.RequireFromString("0.45"))
	c2, err := c.With(p)
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(1)
	}
	sol2, _ := eval.Solve(c2)
	fmt.Printf("with a 45%% chance of a breakdown: take %q, expected value %s\n",
		sol2.Root.Node.Branches[sol2.Root.Chosen()].Label, render.Money(sol2.Value(), m.Currency))
}
