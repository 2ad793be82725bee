package eval_test

import (
	"fmt"

	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// The oil-drilling prototype of Hillier & Lieberman, Introduction to
// Operations Research (thousands of dollars): drill (+700 if oil, −100 if
// dry) or sell the land for 90, prior P(oil) = 0.25, and a seismic survey
// costing 30 that reads favourable with probability 0.6 given oil and 0.2
// given dry.
func oilWithSurvey() *tree.Model {
	d := decimal.RequireFromString
	choice := func() *tree.Node {
		return tree.Decision("Drill or sell",
			tree.Choice("Drill", decimal.Zero, tree.ChanceOn("oil",
				tree.Given("Oil", d("700"), nil),
				tree.Given("Dry", d("-100"), nil))),
			tree.Choice("Sell", d("90"), nil))
	}
	return &tree.Model{
		Uncertainties: []*tree.Uncertainty{{Name: "oil", States: []*tree.State{
			{Label: "Oil", Prob: tree.Num(d("0.25"))}, {Label: "Dry"}}}},
		Tests: []*tree.Test{{Name: "seismic", On: "oil", Cost: tree.Num(d("30")), Readings: []*tree.Reading{
			{Label: "Favourable", Given: []*tree.Likelihood{{State: "Oil", Prob: tree.Num(d("0.6"))}, {State: "Dry", Prob: tree.Num(d("0.2"))}}},
			{Label: "Unfavourable", Rest: true}}}},
		Root: tree.Decision("Survey first?",
			tree.Choice("No survey", decimal.Zero, choice()),
			tree.Choice("Seismic survey", decimal.Zero, tree.RunTest("seismic",
				tree.Given("Favourable", decimal.Zero, choice()),
				tree.Given("Unfavourable", decimal.Zero, choice())))),
	}
}

func ExampleEVPI() {
	m := oilWithSurvey()
	if ds := m.Resolve(nil); ds.HasErrors() {
		panic(ds)
	}
	sol, _ := eval.Solve(m)
	pi, _ := eval.EVPI(sol, "oil")
	fmt.Println("with perfect information:", pi.With)
	fmt.Println("tree value (survey included):", sol.Value().Round(2))
	fmt.Println("EVPI over it:", pi.EVPI.Round(2))
	// Output:
	// with perfect information: 242.5
	// tree value (survey included): 123
	// EVPI over it: 119.5
}

func ExampleEVSI() {
	m := oilWithSurvey()
	if ds := m.Resolve(nil); ds.HasErrors() {
		panic(ds)
	}
	sol, _ := eval.Solve(m)
	tv, _ := eval.EVSI(sol, "seismic")
	s := tv.Sites[0]
	fmt.Println("P(favourable):", tv.Table.Marginal[0])
	fmt.Println("P(oil | favourable):", tv.Table.Posterior[0][0])
	fmt.Println("EVSI:", s.EVSI.Round(2), "net gain:", s.NetGain.Round(2), "advice:", s.Advice)
	fmt.Println("EVPI against not surveying:", s.EVPI, "efficiency:", s.Efficiency.Round(3))
	// Output:
	// P(favourable): 0.3
	// P(oil | favourable): 0.5
	// EVSI: 53 net gain: 23 advice: test
	// EVPI against not surveying: 142.5 efficiency: 0.372
}

func ExampleFindBreakeven() {
	m := oilWithSurvey()
	m.Tests, m.Root = nil, m.Root.Branches[0].Node // drill or sell, no survey
	v, _ := eval.ParseVary("oil:Oil")
	be, err := eval.FindBreakeven(m, eval.BreakevenOptions{Vary: v})
	if err != nil {
		panic(err)
	}
	for _, sw := range be.Switches {
		fmt.Printf("at P(oil) = %s (exact: %v): %s below, %s above\n", sw.At, sw.Exact, be.Options[sw.Below], be.Options[sw.Above])
	}
	fmt.Println(be.Adjust)
	// Output:
	// at P(oil) = 0.2375 (exact: true): Sell below, Drill above
	// the rest state "Dry" takes up the difference
}
