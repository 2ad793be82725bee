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

	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/render"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

func d(s string) decimal.Decimal { return decimal.RequireFromString(s) }

func main() {
	breakdown := func(repair string) *tree.Node {
		return tree.Chance("Breakdown this year",
			tree.Outcome("Breaks down", d("0.3"), d(repair).Neg(), nil),
			tree.RestOutcome("Keeps running", decimal.Zero, nil))
	}
	m := &tree.Model{
		Title:    "Press replacement",
		Currency: "EUR",
		Root: tree.Decision("Press",
			tree.Choice("Replace now", d("-42000"), nil),
			tree.Choice("Overhaul", d("-9000"), breakdown("30000")),
			tree.Choice("Run as is", decimal.Zero, breakdown("70000")),
		),
	}
	if ds := m.Resolve(nil); ds.HasErrors() {
		ds.Print(os.Stderr, "", nil)
		os.Exit(1)
	}
	sol, err := eval.Solve(m)
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
}
