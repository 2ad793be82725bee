package eval_test

import (
	"context"
	"fmt"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// Solve a two-option tree built in Go and read the policy off the result.
func ExampleSolve() {
	n := func(s string) tree.Expr { return tree.Num(decimal.RequireFromString(s)) }
	m := &tree.Model{Root: tree.Decision("Launch",
		tree.Choice("Launch now", tree.Cost(n("100")), tree.Chance("Demand",
			tree.Outcome("High", n("0.4"), tree.Gain(n("500")), nil),
			tree.RestOutcome("Low", tree.Gain(n("50")), nil))),
		tree.Choice("Wait", tree.Gain(n("60")), nil),
	)}
	c, ds := compiled.Compile(m)
	if ds.HasErrors() {
		fmt.Println(ds)
		return
	}
	sol, _ := eval.Solve(c)
	r := sol.Root
	margin, _, _ := r.Margin()
	fmt.Println("value:", sol.Value())
	fmt.Println("take:", r.Node.Branches[r.Chosen()].Label, "by", margin)
	// Output:
	// value: 130
	// take: Launch now by 70
}

// Re-solve one compiled model with an input changed: only the figures that
// depend on it are evaluated again, and the first solution does not change.
func ExampleFollow() {
	n := func(s string) tree.Expr { return tree.Num(decimal.RequireFromString(s)) }
	m := &tree.Model{
		Params: []*tree.Param{tree.Input("fee", n("40"))},
		Root: tree.Decision("Supply",
			tree.Choice("Own fleet", tree.Cost(n("55")), nil),
			tree.Choice("Carrier", tree.Cost(tree.Ref("fee")), nil)),
	}
	c, _ := compiled.Compile(m)
	before, _ := eval.Solve(c)
	fee, _ := c.Set("fee", decimal.NewFromInt(70))
	c2, _ := c.With(fee)
	after, _ := eval.Solve(c2)
	// The plan chosen at a fee of 40, held fixed at 70:
	fixed, _ := eval.Follow(c2, before.Rollback().Policy())
	fmt.Println("fee 40:", before.Root.Node.Branches[before.Root.Chosen()].Label, before.Value())
	fmt.Println("fee 70:", after.Root.Node.Branches[after.Root.Chosen()].Label, after.Value())
	fmt.Println("fee 70, keeping the carrier:", fixed.Value())
	// Output:
	// fee 40: Carrier -40
	// fee 70: Own fleet -55
	// fee 70, keeping the carrier: -70
}

// Vary an input over its range and find where the best option changes.
func ExampleFindBreakeven() {
	n := func(s string) tree.Expr { return tree.Num(decimal.RequireFromString(s)) }
	m := &tree.Model{
		Params: []*tree.Param{tree.Input("fee", n("40")).Within(n("20"), n("90"))},
		Root: tree.Decision("Supply",
			tree.Choice("Own fleet", tree.Cost(n("55")), nil),
			tree.Choice("Carrier", tree.Cost(tree.Ref("fee")), nil)),
	}
	c, _ := compiled.Compile(m)
	v, _ := eval.ParseVary("fee")
	be, err := eval.FindBreakeven(context.Background(), c, eval.BreakevenOptions{Vary: v})
	if err != nil {
		panic(err)
	}
	for _, sw := range be.Switches {
		fmt.Printf("at fee = %s (exact: %v): %s below, %s above\n", sw.At, sw.Exact, be.Options[sw.Below], be.Options[sw.Above])
	}
	// Output:
	// at fee = 55 (exact: true): Carrier below, Own fleet above
}

// The risk profile of each option of a decision: every payoff with its
// probability, the chance of a loss, and which option dominates which.
func ExampleRiskProfiles() {
	n := func(s string) tree.Expr { return tree.Num(decimal.RequireFromString(s)) }
	m := &tree.Model{Root: tree.Decision("Bid",
		tree.Choice("Bid high", tree.Cost(n("20")), tree.Chance("Award",
			tree.Outcome("Won", n("0.3"), tree.Gain(n("200")), nil),
			tree.RestOutcome("Lost", tree.NoCash, nil))),
		tree.Choice("Bid low", tree.Cost(n("20")), tree.Chance("Award",
			tree.Outcome("Won", n("0.6"), tree.Gain(n("90")), nil),
			tree.RestOutcome("Lost", tree.NoCash, nil))),
		tree.Choice("Bid late", tree.Cost(n("30")), tree.Chance("Award",
			tree.Outcome("Won", n("0.6"), tree.Gain(n("90")), nil),
			tree.RestOutcome("Lost", tree.NoCash, nil))),
		tree.Choice("No bid", tree.NoCash, nil),
	)}
	c, _ := compiled.Compile(m)
	sol, _ := eval.Solve(c)
	ps, err := eval.RiskProfiles(context.Background(), sol, eval.ProfileOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, p := range ps.Options {
		fmt.Printf("%s: mean %s, P(loss) %s, outcomes %v\n", p.Label, p.Mean, p.Loss, p.Outcomes)
	}
	for _, d := range ps.Dominance {
		fmt.Println(ps.Sentence(d))
	}
	// Output:
	// Bid high: mean 40, P(loss) 0.7, outcomes [{-20 0.7} {180 0.3}]
	// Bid low: mean 34, P(loss) 0.4, outcomes [{-20 0.4} {70 0.6}]
	// Bid late: mean 24, P(loss) 0.4, outcomes [{-30 0.4} {60 0.6}]
	// No bid: mean 0, P(loss) 0, outcomes [{0 1}]
	// "Bid low" is better than "Bid late" for every decision maker who prefers more to less (first-order stochastic dominance)
}

// With a risk tolerance of 50 a sure 40 beats 0 or 100 at even chances,
// whose expected value is 50: the caution costs 10 in expected value.
func ExampleSolveRiskAverse() {
	n := func(s string) tree.Expr { return tree.Num(decimal.RequireFromString(s)) }
	m := &tree.Model{Root: tree.Decision("Pick",
		tree.Choice("Gamble", tree.NoCash, tree.Chance("Coin",
			tree.Outcome("Heads", n("0.5"), tree.Gain(n("100")), nil),
			tree.RestOutcome("Tails", tree.NoCash, nil))),
		tree.Choice("Sure", tree.Gain(n("40")), nil),
	)}
	c, _ := compiled.Compile(m)
	sol, _ := eval.Solve(c)
	rs, err := eval.SolveRiskAverse(sol, decimal.NewFromInt(50))
	if err != nil {
		fmt.Println(err)
		return
	}
	for j, b := range m.Root.Branches {
		fmt.Printf("%s: EMV %s, CE %s, premium %s\n", b.Label, rs.Averse.Root.BranchValue(j), rs.BranchValue(0, j).Round(2), rs.Premium(0, j).Round(2))
	}
	fmt.Println("take:", m.Root.Branches[rs.Chosen(0)].Label, "at a cost of", rs.Cost())
	// Output:
	// Gamble: EMV 50, CE 28.31, premium 21.69
	// Sure: EMV 40, CE 40, premium 0
	// take: Sure at a cost of 10
}

// List the decisions the best policy reaches, each with the chance
// outcomes that lead to it, without walking the rest of the tree.
func ExampleSolution_PolicyDecisions() {
	n := func(s string) tree.Expr { return tree.Num(decimal.RequireFromString(s)) }
	m := &tree.Model{Root: tree.Decision("Pilot",
		tree.Choice("Run a pilot", tree.Cost(n("20")), tree.Chance("Pilot result",
			tree.Outcome("Good", n("0.6"), tree.Gain(n("0")), tree.Decision("Roll out",
				tree.Choice("Roll out", tree.Gain(n("300")), nil),
				tree.Choice("Stop", tree.Gain(n("0")), nil))),
			tree.RestOutcome("Poor", tree.Gain(n("0")), tree.Decision("Salvage",
				tree.Choice("Sell the kit", tree.Gain(n("15")), nil),
				tree.Choice("Scrap", tree.Gain(n("0")), nil))))),
		tree.Choice("Skip it", tree.Gain(n("100")), nil),
	)}
	c, ds := compiled.Compile(m)
	if ds.HasErrors() {
		fmt.Println(ds)
		return
	}
	sol, _ := eval.Solve(c)
	for _, d := range sol.PolicyDecisions() {
		fmt.Printf("%s: take %q", d.Node.Label, d.Node.Branches[d.Chosen()].Label)
		for c := d.Above; c != nil; c = c.Up {
			fmt.Printf(" (if %s = %s)", c.Chance.Node.Label, c.Chance.Node.Branches[c.Via].Label)
		}
		fmt.Println()
	}
	// Output:
	// Pilot: take "Run a pilot"
	// Roll out: take "Roll out" (if Pilot result = Good)
	// Salvage: take "Sell the kit" (if Pilot result = Poor)
}
