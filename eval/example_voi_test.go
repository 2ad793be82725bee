package eval_test

import (
	"context"
	"fmt"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// oilWithSurvey is the oil-drilling prototype of Hillier & Lieberman,
// Introduction to Operations Research (thousands of dollars): drill (+700
// if oil, −100 if dry) or sell the land for 90, prior P(oil) = 0.25, and a
// seismic survey costing 30 that reads favourable with probability 0.6
// given oil and 0.2 given dry. Built with the builders for inputs,
// uncertainties and tests.
func oilWithSurvey() *tree.Model {
	n := func(s string) tree.Expr { return tree.Num(decimal.RequireFromString(s)) }
	choice := func() *tree.Node {
		return tree.Decision("Drill or sell",
			tree.Choice("Drill", tree.NoCash, tree.ChanceOn("oil",
				tree.Given("Oil", tree.Gain(n("700")), nil),
				tree.Given("Dry", tree.Cost(n("100")), nil))),
			tree.Choice("Sell", tree.Gain(n("90")), nil))
	}
	return &tree.Model{
		Params: []*tree.Param{tree.Input("p_oil", n("0.25")).Within(n("0"), n("1"))},
		Uncertainties: []*tree.Uncertainty{tree.NewUncertainty("oil", "Oil in the ground",
			tree.StateP("Oil", tree.Ref("p_oil")), tree.RestState("Dry"))},
		Tests: []*tree.Test{tree.NewTest("seismic", "Seismic survey", "oil", n("30"),
			tree.ReadingIf("Favourable", tree.If("Oil", n("0.6")), tree.If("Dry", n("0.2"))),
			tree.RestReading("Unfavourable"))},
		Root: tree.Decision("Survey first?",
			tree.Choice("No survey", tree.NoCash, choice()),
			tree.Choice("Seismic survey", tree.NoCash, tree.RunTest("seismic",
				tree.Given("Favourable", tree.NoCash, choice()),
				tree.Given("Unfavourable", tree.NoCash, choice()))),
		),
	}
}

func solveOil() *eval.Solution {
	c, ds := compiled.Compile(oilWithSurvey())
	if ds.HasErrors() {
		panic(ds)
	}
	sol, _ := eval.Solve(c)
	return sol
}

func ExampleEVPI() {
	sol := solveOil()
	pi, _ := eval.EVPI(context.Background(), sol, "oil")
	fmt.Println("with perfect information:", pi.With)
	fmt.Println("tree value (survey included):", sol.Value().Round(2))
	fmt.Println("EVPI over it:", pi.EVPI.Round(2))
	// Output:
	// with perfect information: 242.5
	// tree value (survey included): 123
	// EVPI over it: 119.5
}

func ExampleEVSI() {
	sol := solveOil()
	tv, _ := eval.EVSI(context.Background(), sol, "seismic")
	s := tv.Sites[0]
	fmt.Println("P(favourable):", tv.Table.Marginal[0])
	fmt.Println("P(oil | favourable):", tv.Table.Posterior[0][0])
	fmt.Println("EVSI:", s.EVSI, "net gain:", s.NetGain, "advice:", s.Advice)
	fmt.Println("EVPI against not surveying:", s.EVPI, "efficiency:", s.Efficiency.Round(3))
	// Output:
	// P(favourable): 0.3
	// P(oil | favourable): 0.5
	// EVSI: 53 net gain: 23 advice: test
	// EVPI against not surveying: 142.5 efficiency: 0.372
}

func ExampleBayesTable() {
	sol := solveOil()
	tb, _ := eval.BayesTable(sol.Compiled, "seismic")
	for r, rd := range tb.Test.Readings {
		fmt.Printf("P(%s) = %s, P(oil | %s) = %s\n", rd.Label, tb.Marginal[r], rd.Label, tb.Posterior[0][r].Round(4))
	}
	// Output:
	// P(Favourable) = 0.3, P(oil | Favourable) = 0.5
	// P(Unfavourable) = 0.7, P(oil | Unfavourable) = 0.1429
}
