package eval_test

import (
	"fmt"

	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// Solve a two-option tree built in Go and read the policy off the result.
func ExampleSolve() {
	d := decimal.RequireFromString
	m := &tree.Model{Root: tree.Decision("Launch",
		tree.Choice("Launch now", d("-100"), tree.Chance("Demand",
			tree.Outcome("High", d("0.4"), d("500"), nil),
			tree.RestOutcome("Low", d("50"), nil))),
		tree.Choice("Wait", d("60"), nil),
	)}
	if ds := m.Resolve(nil); ds.HasErrors() {
		fmt.Println(ds)
		return
	}
	sol, _ := eval.Solve(m)
	r := sol.Root
	margin, _, _ := r.Margin()
	fmt.Println("value:", sol.Value())
	fmt.Println("take:", r.Node.Branches[r.Chosen()].Label, "by", margin)
	// Output:
	// value: 130
	// take: Launch now by 70
}
