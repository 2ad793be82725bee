package eval

import (
	"math/big"
	"math/rand"
	"strings"
	"testing"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

func d(s string) decimal.Decimal { return decimal.RequireFromString(s) }

func mustCompile(t testing.TB, m *tree.Model) *compiled.Model {
	t.Helper()
	c, ds := compiled.Compile(m)
	if ds.HasErrors() {
		t.Fatalf("compile: %v", ds)
	}
	return c
}

func mustSolve(t testing.TB, m *tree.Model) *Solution {
	t.Helper()
	sol, err := Solve(mustCompile(t, m))
	if err != nil {
		t.Fatal(err)
	}
	return sol
}

// oilDrilling is the prototype example of Hillier & Lieberman,
// Introduction to Operations Research, chapter "Decision Analysis"
// (figures in thousands of dollars): drill for oil (+700 if oil, −100 if
// dry) or sell the land (+90), prior P(oil) = 0.25.
func oilDrilling() *tree.Model {
	return &tree.Model{Title: "oil drilling", Root: tree.Decision("Drill or sell",
		tree.Choice("Drill", tree.NoCash, tree.Chance("Oil?",
			tree.Outcome("Oil", tree.Num(d("0.25")), tree.Gain(tree.Num(d("700"))), nil),
			tree.Outcome("Dry", tree.Num(d("0.75")), tree.Gain(tree.Num(d("-100"))), nil))),
		tree.Choice("Sell", tree.Gain(tree.Num(d("90"))), nil),
	)}
}

// condominium is the decision-analysis example of Anderson, Sweeney &
// Williams, An Introduction to Management Science (chapter "Decision
// Analysis"; figures recalled from memory, in $ millions): a small, medium
// or large complex, strong demand with probability 0.8.
func condominium() *tree.Model {
	demand := func(strong, weak string) *tree.Node {
		return tree.Chance("Demand",
			tree.Outcome("Strong", tree.Num(d("0.8")), tree.Gain(tree.Num(d(strong))), nil),
			tree.Outcome("Weak", tree.Num(d("0.2")), tree.Gain(tree.Num(d(weak))), nil))
	}
	return &tree.Model{Root: tree.Decision("Complex size",
		tree.Choice("Small", tree.NoCash, demand("8", "7")),
		tree.Choice("Medium", tree.NoCash, demand("14", "5")),
		tree.Choice("Large", tree.NoCash, demand("20", "-9")),
	)}
}

// condominiumWithStudy is the same example's market-research tree (recalled
// from memory): P(favourable report) = 0.77; P(strong | favourable) = 0.94,
// P(strong | unfavourable) = 0.35. The book gives EV with the study 15.93
// (15.9347 unrounded) with large after a favourable report and medium after
// an unfavourable one.
func condominiumWithStudy() *tree.Model {
	after := func(ps string) *tree.Node {
		pw := decimal.NewFromInt(1).Sub(d(ps)).String()
		demand := func(strong, weak string) *tree.Node {
			return tree.Chance("Demand",
				tree.Outcome("Strong", tree.Num(d(ps)), tree.Gain(tree.Num(d(strong))), nil),
				tree.Outcome("Weak", tree.Num(d(pw)), tree.Gain(tree.Num(d(weak))), nil))
		}
		return tree.Decision("Complex size",
			tree.Choice("Small", tree.NoCash, demand("8", "7")),
			tree.Choice("Medium", tree.NoCash, demand("14", "5")),
			tree.Choice("Large", tree.NoCash, demand("20", "-9")))
	}
	return &tree.Model{Root: tree.Chance("Research report",
		tree.Outcome("Favourable", tree.Num(d("0.77")), tree.NoCash, after("0.94")),
		tree.Outcome("Unfavourable", tree.Num(d("0.23")), tree.NoCash, after("0.35")),
	)}
}

// stockChoice is the investment example of Taha, Operations Research: An
// Introduction, chapter on decisions under risk (recalled from memory):
// $10,000 in stock A (+50% in a bull market, −20% in a bear market) or B
// (+15% / +5%), P(bull) = 0.6. EV(A) = 2,200, EV(B) = 1,100.
func stockChoice() *tree.Model {
	market := func(bull, bear string) *tree.Node {
		return tree.Chance("Market",
			tree.Outcome("Bull", tree.Num(d("0.6")), tree.Gain(tree.Num(d(bull))), nil),
			tree.Outcome("Bear", tree.Num(d("0.4")), tree.Gain(tree.Num(d(bear))), nil))
	}
	return &tree.Model{Root: tree.Decision("Invest",
		tree.Choice("Stock A", tree.NoCash, market("5000", "-2000")),
		tree.Choice("Stock B", tree.NoCash, market("1500", "500")),
	)}
}

func TestPublishedExamples(t *testing.T) {
	cases := []struct {
		name    string
		model   *tree.Model
		value   string
		best    string
		options []string // every root option's value, model order
		margin  string
	}{
		// Hillier & Lieberman: EMV(drill) = 100 beats selling (90).
		{"Hillier & Lieberman oil drilling", oilDrilling(), "100", "Drill", []string{"100", "90"}, "10"},
		// Anderson, Sweeney & Williams (recalled from memory): EV small 7.8,
		// medium 12.2, large 14.2.
		{"Anderson, Sweeney & Williams condominium", condominium(), "14.2", "Large", []string{"7.8", "12.2", "14.2"}, "2"},
		// Taha (recalled from memory): EV(A) = 2,200, EV(B) = 1,100.
		{"Taha stock choice", stockChoice(), "2200", "Stock A", []string{"2200", "1100"}, "1100"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			sol := mustSolve(t, c.model)
			if !sol.Value().Equal(d(c.value)) {
				t.Errorf("value = %s, want %s", sol.Value(), c.value)
			}
			r := sol.Root
			if got := r.Node.Branches[r.Chosen()].Label; got != c.best {
				t.Errorf("best = %q, want %q", got, c.best)
			}
			for j, want := range c.options {
				if got := r.BranchValue(j); !got.Equal(d(want)) {
					t.Errorf("option %d = %s, want %s", j, got, want)
				}
			}
			if m, _, ok := r.Margin(); !ok || !m.Equal(d(c.margin)) {
				t.Errorf("margin = %s (%v), want %s", m, ok, c.margin)
			}
		})
	}
	t.Run("Anderson, Sweeney & Williams with market research", func(t *testing.T) {
		sol := mustSolve(t, condominiumWithStudy())
		// 0.77 × (0.94×20 − 0.06×9) + 0.23 × (0.35×14 + 0.65×5) = 15.9347.
		if !sol.Value().Equal(d("15.9347")) {
			t.Errorf("value = %s, want 15.9347 (the book's 15.93)", sol.Value())
		}
		fav, unf := sol.Root.Kid(0), sol.Root.Kid(1)
		if fav.Node.Branches[fav.Chosen()].Label != "Large" || unf.Node.Branches[unf.Chosen()].Label != "Medium" {
			t.Errorf("policy: favourable → %s, unfavourable → %s; want Large, Medium",
				fav.Node.Branches[fav.Chosen()].Label, unf.Node.Branches[unf.Chosen()].Label)
		}
	})
}

func TestMinObjectiveAndTies(t *testing.T) {
	// Under min the cheaper option wins; figures are costs (common practice).
	m := &tree.Model{Objective: tree.Min, Root: tree.Decision("Repair",
		tree.Choice("Patch", tree.Cost(tree.Num(d("100"))), tree.Chance("Holds?",
			tree.Outcome("Holds", tree.Num(d("0.5")), tree.NoCash, nil),
			tree.Outcome("Fails", tree.Num(d("0.5")), tree.Cost(tree.Num(d("300"))), nil))),
		tree.Choice("Replace", tree.Cost(tree.Num(d("250"))), nil),
		tree.Choice("Replace later", tree.Cost(tree.Num(d("250"))), nil),
	)}
	sol := mustSolve(t, m)
	if !sol.Value().Equal(d("250")) {
		t.Fatalf("value = %s, want 250", sol.Value())
	}
	r := sol.Root
	if len(r.Best()) != 3 || r.Chosen() != 0 {
		t.Fatalf("best = %v, want all three tied with the first taken", r.Best())
	}
	if mg, _, _ := r.Margin(); !mg.IsZero() {
		t.Errorf("margin of a tie = %s, want 0", mg)
	}
	m.Root.Branches[2].Cost = tree.Num(d("260"))
	m.Root.Branches[0].Cost = tree.Num(d("101"))
	sol = mustSolve(t, m)
	if got := sol.Root.Node.Branches[sol.Root.Chosen()].Label; got != "Replace" {
		t.Errorf("best = %q, want Replace", got)
	}
	if mg, ru, _ := sol.Root.Margin(); !mg.Equal(d("1")) || ru != 0 {
		t.Errorf("margin = %s over %d, want 1 over Patch (251)", mg, ru)
	}
}

func TestEnds(t *testing.T) {
	sol := mustSolve(t, oilDrilling())
	ends := sol.Ends()
	want := []struct {
		prob, payoff string
		on           bool
	}{{"0.25", "700", true}, {"0.75", "-100", true}, {"1", "90", false}}
	if len(ends) != len(want) {
		t.Fatalf("%d ends, want %d", len(ends), len(want))
	}
	for i, w := range want {
		e := ends[i]
		if !e.Prob.Equal(d(w.prob)) || !e.Payoff.Equal(d(w.payoff)) || e.OnPolicy != w.on {
			t.Errorf("end %d: p=%s payoff=%s on=%v; want %s %s %v", i, e.Prob, e.Payoff, e.OnPolicy, w.prob, w.payoff, w.on)
		}
	}
}

func TestDeepChain(t *testing.T) {
	// A 100 000-level chain must solve without overflowing the stack.
	const depth = 100_000
	leaf := &tree.Node{Kind: tree.KindEnd}
	n := leaf
	for i := 0; i < depth; i++ {
		n = tree.Decision("step", tree.Choice("go", tree.Gain(tree.Num(d("1"))), n), tree.Choice("stop", tree.NoCash, nil))
	}
	sol := mustSolve(t, &tree.Model{Root: n})
	if !sol.Value().Equal(decimal.NewFromInt(depth)) {
		t.Fatalf("value = %s, want %d", sol.Value(), depth)
	}
	if got := len(sol.Ends()); got != depth+1 {
		t.Fatalf("%d ends, want %d", got, depth+1)
	}
}

func TestDominated(t *testing.T) {
	m := &tree.Model{Root: tree.Decision("Pick",
		tree.Choice("Good", tree.NoCash, tree.Chance("c",
			tree.Outcome("a", tree.Num(d("0.5")), tree.Gain(tree.Num(d("100"))), nil),
			tree.Outcome("b", tree.Num(d("0.5")), tree.Gain(tree.Num(d("60"))), nil))),
		tree.Choice("Poor", tree.Gain(tree.Num(d("50"))), nil),
		tree.Choice("Same as poor", tree.Gain(tree.Num(d("50"))), nil),
	)}
	ds := Dominated(mustSolve(t, m))
	var got []string
	for _, d := range ds {
		got = append(got, d.Summary)
	}
	want := []string{
		`option "Poor" of "Pick" is dominated: in every outcome it does no better than "Good"`,
		`option "Same as poor" of "Pick" is dominated: in every outcome it does no better than "Good"`,
	}
	if strings.Join(got, "\n") != strings.Join(want, "\n") {
		t.Errorf("got\n%s\nwant\n%s", strings.Join(got, "\n"), strings.Join(want, "\n"))
	}
}

// TestDominatedDrawn: an option whose figure is drawn from a distribution
// stands at its mean in the solved tree, so being worse there than
// another option in every outcome says nothing about its draws: no
// warning. The same option with the figure fixed at that mean is
// dominated.
func TestDominatedDrawn(t *testing.T) {
	build := func(x tree.Expr) *tree.Model {
		return &tree.Model{Params: []*tree.Param{tree.Input("x", x)}, Root: tree.Decision("Pick",
			tree.Choice("Risky", tree.Gain(tree.Ref("x")), nil),
			tree.Choice("Sure", tree.Gain(tree.Num(d("60"))), nil),
			tree.Choice("Gamble", tree.NoCash, tree.Chance("c",
				tree.Outcome("a", tree.Num(d("0.5")), tree.Gain(tree.Num(d("100"))), nil),
				tree.Outcome("b", tree.Num(d("0.5")), tree.Gain(tree.Num(d("0"))), nil))),
		)}
	}
	// pert(0, 50, 70) has mean (0 + 200 + 70)/6 = 45, below 60; it can
	// draw up to 70.
	drawn := &tree.Call{Func: "pert", Args: []tree.Expr{tree.Num(d("0")), tree.Num(d("50")), tree.Num(d("70"))}}
	if ds := Dominated(mustSolve(t, build(drawn))); len(ds) != 0 {
		t.Errorf("a drawn option is reported: %v", ds)
	}
	ds := Dominated(mustSolve(t, build(tree.Num(d("45")))))
	if len(ds) != 1 || !strings.Contains(ds[0].Summary, `option "Risky" of "Pick" is dominated`) {
		t.Errorf("the fixed option: %v, want it dominated", ds)
	}
}

// ratRollback is an independent evaluator on math/big.Rat (exact rational
// arithmetic from the standard library), written recursively and straight
// from the textbook definition of rollback, on the figures as written (in
// the objective's terms: payoffs under max, costs under min).
func ratRollback(m *tree.Model, n *tree.Node) *big.Rat {
	figure := func(net *big.Rat) *big.Rat {
		if m.Objective == tree.Min {
			return new(big.Rat).Neg(net)
		}
		return net
	}
	switch n.Kind {
	case tree.KindEnd:
		return figure(ratExpr(n.Payoff))
	case tree.KindChance:
		sum := new(big.Rat)
		for j, b := range n.Branches {
			v := new(big.Rat).Add(figure(ratCash(b)), ratNode(m, b.Node))
			sum.Add(sum, v.Mul(v, ratProb(n, j)))
		}
		return sum
	}
	var best *big.Rat
	for _, b := range n.Branches {
		v := new(big.Rat).Add(figure(ratCash(b)), ratNode(m, b.Node))
		if best == nil || (m.Objective == tree.Max && v.Cmp(best) > 0) || (m.Objective == tree.Min && v.Cmp(best) < 0) {
			best = v
		}
	}
	return best
}

func ratNode(m *tree.Model, n *tree.Node) *big.Rat {
	if n == nil {
		return new(big.Rat)
	}
	return ratRollback(m, n)
}

// ratProb is the probability of branch j of a plain chance node: its own,
// or for the rest branch 1 minus the others.
func ratProb(n *tree.Node, j int) *big.Rat {
	if !n.Branches[j].Rest {
		return ratExpr(n.Branches[j].Prob)
	}
	p := big.NewRat(1, 1)
	for k, b := range n.Branches {
		if k != j {
			p.Sub(p, ratExpr(b.Prob))
		}
	}
	return p
}

// ratCash is a branch's net value, gain − cost.
func ratCash(b *tree.Branch) *big.Rat { return new(big.Rat).Sub(ratExpr(b.Gain), ratExpr(b.Cost)) }

// ratExpr evaluates an expression of numbers on big.Rat (nil is 0).
func ratExpr(e tree.Expr) *big.Rat {
	switch e := e.(type) {
	case nil:
		return new(big.Rat)
	case *tree.Number:
		return rat(e.Value())
	case *tree.Unary:
		return new(big.Rat).Neg(ratExpr(e.X))
	case *tree.Binary:
		x, y := ratExpr(e.X), ratExpr(e.Y)
		switch e.Op {
		case '+':
			return x.Add(x, y)
		case '-':
			return x.Sub(x, y)
		case '*':
			return x.Mul(x, y)
		case '/':
			return x.Quo(x, y)
		}
	}
	panic("ratExpr: unsupported expression")
}

func rat(x decimal.Decimal) *big.Rat {
	r, ok := new(big.Rat).SetString(x.String())
	if !ok {
		panic("bad decimal " + x.String())
	}
	return r
}

// objectiveModel is a model of a random tree of about size nodes: under
// max built of gains for even i, under min built of costs for odd i
// (under min the figures are costs).
func objectiveModel(rng *rand.Rand, i, size int) *tree.Model {
	m := &tree.Model{}
	money := tree.Gain
	if i%2 == 1 {
		m.Objective, money = tree.Min, tree.Cost
	}
	m.Root = randomTree(rng, size, money)
	return m
}

// randomTree makes a random tree of about size nodes with probabilities
// in hundredths (the last sibling takes the rest) and cash with up to two
// decimals, some of it negative.
func randomTree(rng *rand.Rand, size int, money func(tree.Expr) tree.Cash) *tree.Node {
	var build func(budget, depth int) *tree.Node
	build = func(budget, depth int) *tree.Node {
		if budget <= 1 || depth > 12 || rng.Intn(6) == 0 {
			if rng.Intn(3) == 0 {
				return nil
			}
			return tree.Terminal(tree.Num(decimal.New(rng.Int63n(20001)-10000, -int32(rng.Intn(3)))))
		}
		k := 2 + rng.Intn(3)
		var branches []*tree.Branch
		chance := rng.Intn(2) == 0
		left := int64(100)
		for i := 0; i < k; i++ {
			cash := money(tree.Num(decimal.New(rng.Int63n(200001)-100000, -int32(rng.Intn(3)))))
			child := build((budget-1)/k, depth+1)
			switch {
			case !chance:
				branches = append(branches, tree.Choice("o"+string(rune('a'+i)), cash, child))
			case i == k-1:
				branches = append(branches, tree.RestOutcome("o"+string(rune('a'+i)), cash, child))
			default:
				p := rng.Int63n(left + 1)
				left -= p
				branches = append(branches, tree.Outcome("o"+string(rune('a'+i)), tree.Num(decimal.New(p, -2)), cash, child))
			}
		}
		if chance {
			return tree.Chance("c", branches...)
		}
		return tree.Decision("d", branches...)
	}
	for {
		if n := build(size, 0); n != nil && n.Kind != tree.KindEnd {
			return n
		}
	}
}

func TestRollbackMatchesBigRat(t *testing.T) {
	rng := rand.New(rand.NewSource(1))
	trees := 3000
	if testing.Short() {
		trees = 300
	}
	for i := 0; i < trees; i++ {
		m := objectiveModel(rng, i, 2+rng.Intn(200))
		sol := mustSolve(t, m)
		want := ratRollback(m, m.Root)
		if got := rat(sol.Value()); got.Cmp(want) != 0 {
			t.Fatalf("tree %d: rollback %s, big.Rat %s", i, got.RatString(), want.RatString())
		}
		// Every node's value, not just the root's.
		for j := range sol.Nodes() {
			s := &sol.Nodes()[j]
			if got := rat(s.Value()); got.Cmp(ratRollback(m, s.Node)) != 0 {
				t.Fatalf("tree %d node %d: %s vs %s", i, j, got.RatString(), ratRollback(m, s.Node).RatString())
			}
		}
	}
}
