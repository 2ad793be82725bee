package eval

import (
	"context"
	"math/rand"
	"testing"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// voiBenchTree is a generated tree (invented data): chance levels of four
// branches and decision levels of three alternating to the given depth,
// every other chance level on one of two named uncertainties, a test on
// the first at the root.
func voiBenchTree(depth int, withTest bool) *tree.Model {
	rng := rand.New(rand.NewSource(11))
	var build func(d int) *tree.Node
	build = func(d int) *tree.Node {
		if d == depth {
			return &tree.Node{Kind: tree.KindEnd, Payoff: tree.Num(decimal.New(rng.Int63n(100000), 0))}
		}
		if d%2 == 0 {
			if d%4 == 2 {
				u := []string{"u", "v"}[rng.Intn(2)]
				var bs []*tree.Branch
				for _, s := range []string{"s1", "s2", "s3"} {
					bs = append(bs, tree.Given(s, tree.Gain(tree.Num(decimal.New(rng.Int63n(10000), 0))), build(d+1)))
				}
				return tree.ChanceOn(u, bs...)
			}
			p1 := rng.Int63n(40) + 10
			p2 := rng.Int63n(90 - p1)
			p3 := rng.Int63n(100 - p1 - p2)
			return tree.Chance("c",
				tree.Outcome("a", tree.Num(decimal.New(p1, -2)), tree.Gain(tree.Num(decimal.New(rng.Int63n(10000), 0))), build(d+1)),
				tree.Outcome("b", tree.Num(decimal.New(p2, -2)), tree.Gain(tree.Num(decimal.New(-rng.Int63n(10000), 0))), build(d+1)),
				tree.Outcome("c", tree.Num(decimal.New(p3, -2)), tree.Gain(tree.Num(decimal.New(rng.Int63n(100000), -2))), build(d+1)),
				tree.RestOutcome("d", tree.Gain(tree.Num(decimal.New(rng.Int63n(1000), -2))), build(d+1)))
		}
		var bs []*tree.Branch
		for i := 0; i < 3; i++ {
			bs = append(bs, tree.Choice(string(rune('x'+i)), tree.Gain(tree.Num(decimal.New(rng.Int63n(5000)-2500, 0))), build(d+1)))
		}
		return tree.Decision("d", bs...)
	}
	states := func() []*tree.State {
		return []*tree.State{{Label: "s1", Prob: tree.Num(decimal.New(3, -1))}, {Label: "s2", Prob: tree.Num(decimal.New(25, -2))}, {Label: "s3"}}
	}
	m := &tree.Model{
		Uncertainties: []*tree.Uncertainty{{Name: "u", States: states()}, {Name: "v", States: states()}},
		Tests: []*tree.Test{{Name: "t", On: "u", Cost: tree.Num(decimal.New(100, 0)), Readings: []*tree.Reading{
			{Label: "hi", Given: []*tree.Likelihood{{State: "s1", Prob: tree.Num(decimal.New(8, -1))}, {State: "s2", Prob: tree.Num(decimal.New(3, -1))}, {State: "s3", Prob: tree.Num(decimal.New(1, -1))}}},
			{Label: "lo", Rest: true}}}},
	}
	m.Root = tree.Decision("root",
		tree.Choice("now", tree.Gain(tree.Num(decimal.Zero)), build(1)),
		tree.Choice("test", tree.Gain(tree.Num(decimal.Zero)), tree.RunTest("t", tree.Given("hi", tree.Gain(tree.Num(decimal.Zero)), build(1)), tree.Given("lo", tree.Gain(tree.Num(decimal.Zero)), build(1)))))
	if !withTest {
		m.Root = build(1)
	}
	return m
}

func BenchmarkValueOfInformation(b *testing.B) {
	for _, depth := range []int{5, 7, 9} {
		for _, withTest := range []bool{true, false} {
			m := voiBenchTree(depth, withTest)
			name := string(rune('0' + depth))
			if !withTest {
				name += "-notest"
			}
			c, ds := compiled.Compile(m)
			if ds.HasErrors() {
				b.Fatal(ds)
			}
			sol, err := Solve(c)
			if err != nil {
				b.Fatal(err)
			}
			b.Run(name, func(b *testing.B) {
				b.ReportMetric(float64(len(sol.Nodes())), "nodes")
				for i := 0; i < b.N; i++ {
					info, err := ValueOfInformation(context.Background(), sol, VOIOptions{})
					if err != nil {
						b.Fatal(err)
					}
					if info.Total == nil {
						b.Fatal(info.TotalNote)
					}
					if i == 0 {
						b.Logf("depth %d: total scope %v, EVPI %s, plain %d, scenarios %d", depth, info.Total.Scope, info.Total.EVPI.StringFixed(2), info.Total.PlainNodes, info.Total.Scenarios)
					}
				}
			})
			b.Run("solve"+name, func(b *testing.B) {
				for i := 0; i < b.N; i++ {
					if _, err := Solve(c); err != nil {
						b.Fatal(err)
					}
				}
			})
		}
	}
}
