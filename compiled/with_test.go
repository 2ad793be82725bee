package compiled_test

import (
	"bytes"
	"fmt"
	"math/rand"
	"sync"
	"testing"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

func num(s string) tree.Expr { return tree.Num(decimal.RequireFromString(s)) }

// randomModel makes a random model whose figures read its inputs: cash as
// a constant, an input, or an input times a constant; plain chance nodes
// whose first branch's probability may be an input (the rest takes the
// difference); a named uncertainty whose first state's prior is an input;
// and a test of it. Invented, for property tests only.
func randomModel(rng *rand.Rand) *tree.Model {
	m := &tree.Model{Objective: tree.Objective(rng.Intn(2))}
	// Inputs: money a0..a2, probabilities p0..p1 (in [0.05, 0.45]), and one
	// computed from another.
	for i := 0; i < 3; i++ {
		m.Params = append(m.Params, tree.Input(fmt.Sprintf("a%d", i), tree.Num(decimal.New(rng.Int63n(2000)-1000, -int32(rng.Intn(2))))))
	}
	for i := 0; i < 2; i++ {
		m.Params = append(m.Params, tree.Input(fmt.Sprintf("p%d", i), tree.Num(decimal.New(5+rng.Int63n(41), -2))))
	}
	m.Params = append(m.Params, tree.Input("b", &tree.Binary{Op: '*', X: tree.Ref("a0"), Y: num("2")}))
	m.Uncertainties = []*tree.Uncertainty{tree.NewUncertainty("u", "", tree.StateP("Hi", tree.Ref("p1")), tree.RestState("Lo"))}
	m.Tests = []*tree.Test{tree.NewTest("t", "", "u", num("3"),
		tree.ReadingIf("Yes", tree.If("Hi", num("0.8")), tree.If("Lo", num("0.3"))), tree.RestReading("No"))}
	money := func() tree.Cash {
		var e tree.Expr
		switch rng.Intn(4) {
		case 0:
			return tree.NoCash
		case 1:
			e = tree.Num(decimal.New(rng.Int63n(1000)-500, -int32(rng.Intn(3))))
		case 2:
			e = tree.Ref([]string{"a0", "a1", "a2", "b"}[rng.Intn(4)])
		default:
			e = &tree.Binary{Op: '*', X: tree.Ref(fmt.Sprintf("a%d", rng.Intn(3))), Y: tree.Num(decimal.New(rng.Int63n(9)+1, -1))}
		}
		if rng.Intn(2) == 0 {
			return tree.Gain(e)
		}
		return tree.Cost(e)
	}
	var build func(depth int) *tree.Node
	build = func(depth int) *tree.Node {
		if depth > 4 || rng.Intn(5) == 0 {
			if rng.Intn(2) == 0 {
				return nil
			}
			return tree.Terminal(tree.Num(decimal.New(rng.Int63n(400)-200, 0)))
		}
		switch rng.Intn(5) {
		case 0, 1:
			n := tree.Decision(fmt.Sprintf("d%d", depth))
			for j := 0; j < 2+rng.Intn(2); j++ {
				n.Branches = append(n.Branches, tree.Choice(fmt.Sprintf("o%d", j), money(), build(depth+1)))
			}
			return n
		case 2:
			return tree.ChanceOn("u", tree.Given("Hi", money(), build(depth+1)), tree.Given("Lo", money(), build(depth+1)))
		case 3:
			if rng.Intn(2) == 0 {
				return tree.RunTest("t", tree.Given("Yes", money(), build(depth+1)), tree.Given("No", money(), build(depth+1)))
			}
		}
		var p tree.Expr = tree.Num(decimal.New(rng.Int63n(60)+10, -2))
		if rng.Intn(2) == 0 {
			p = tree.Ref(fmt.Sprintf("p%d", rng.Intn(2)))
		}
		return tree.Chance(fmt.Sprintf("c%d", depth),
			tree.Outcome("x", p, money(), build(depth+1)),
			tree.RestOutcome("y", money(), build(depth+1)))
	}
	m.Root = tree.Decision("root",
		tree.Choice("A", money(), build(1)), tree.Choice("B", money(), build(1)), tree.Choice("C", money(), nil))
	return m
}

// randomSettings picks values for some inputs; probabilities stay in
// [0.05, 0.45] so every model stays valid.
func randomSettings(rng *rand.Rand) map[string]decimal.Decimal {
	out := map[string]decimal.Decimal{}
	for _, name := range []string{"a0", "a1", "a2", "p0", "p1", "b"} {
		if rng.Intn(2) == 0 {
			continue
		}
		if name[0] == 'p' {
			out[name] = decimal.New(5+rng.Int63n(41), -2)
		} else {
			out[name] = decimal.New(rng.Int63n(4000)-2000, -int32(rng.Intn(3)))
		}
	}
	return out
}

func mustCompile(t *testing.T, m *tree.Model) *compiled.Model {
	t.Helper()
	c, ds := compiled.Compile(m)
	if ds.HasErrors() {
		t.Fatalf("compile: %v", ds)
	}
	return c
}

// edited is m with each input in set given that value in its `let` line:
// what a user editing the file would get.
func edited(m *tree.Model, set map[string]decimal.Decimal) *tree.Model {
	e := *m
	e.Params = nil
	for _, p := range m.Params {
		q := *p
		if v, ok := set[p.Name]; ok {
			q.Expr = tree.Num(v)
		}
		e.Params = append(e.Params, &q)
	}
	return &e
}

func solvedJSON(t *testing.T, sol *eval.Solution) string {
	t.Helper()
	var b bytes.Buffer
	if err := sol.WriteJSON(&b); err != nil {
		t.Fatal(err)
	}
	return b.String()
}

// TestWithMatchesCompile: for random models and random input changes, the
// compiled model after With gives exactly the same figures and value at
// every node as compiling the changed model from scratch, and a solution
// taken before the change is byte for byte unchanged after it.
func TestWithMatchesCompile(t *testing.T) {
	rng := rand.New(rand.NewSource(5))
	n := 400
	if testing.Short() {
		n = 80
	}
	for it := 0; it < n; it++ {
		m := randomModel(rng)
		c := mustCompile(t, m)
		before, _ := eval.Solve(c)
		beforeJSON := solvedJSON(t, before)
		for round := 0; round < 3; round++ {
			set := randomSettings(rng)
			var settings []compiled.Setting
			for name, v := range set {
				s, err := c.Set(name, v)
				if err != nil {
					t.Fatal(err)
				}
				settings = append(settings, s)
			}
			c2, err := c.With(settings...)
			if err != nil {
				t.Fatalf("model %d: With: %v", it, err)
			}
			fresh := mustCompile(t, edited(m, set))
			if c2.Len() != fresh.Len() {
				t.Fatalf("model %d: %d nodes vs %d", it, c2.Len(), fresh.Len())
			}
			r2, rf := c2.Rollback(), fresh.Rollback()
			for i := 0; i < c2.Len(); i++ {
				v2, _ := r2.Value(i)
				vf, _ := rf.Value(i)
				if !v2.Equal(vf) || !c2.Cash(i).Equal(fresh.Cash(i)) || !c2.Prob(i).Equal(fresh.Prob(i)) || !c2.Mass(i).Equal(fresh.Mass(i)) || r2.Best(i) != rf.Best(i) {
					t.Fatalf("model %d round %d node %d: value %s vs %s, cash %s vs %s, prob %s vs %s, best %d vs %d",
						it, round, i, v2, vf, c2.Cash(i), fresh.Cash(i), c2.Prob(i), fresh.Prob(i), r2.Best(i), rf.Best(i))
				}
			}
			for name := range set {
				a, _ := c2.InputNamed(name)
				b, _ := fresh.InputNamed(name)
				if !a.Value.Equal(b.Value) {
					t.Fatalf("model %d: input %s = %s vs %s", it, name, a.Value, b.Value)
				}
			}
			if got := solvedJSON(t, before); got != beforeJSON {
				t.Fatalf("model %d: a solution changed after With:\n%s\n---\n%s", it, beforeJSON, got)
			}
			c = c2 // the next round changes the changed model
			m = edited(m, set)
		}
	}
}

// TestWithRefusesInvalid: a setting that leaves a probability outside
// [0, 1] is an error that says where, and the model it came from is
// untouched.
func TestWithRefusesInvalid(t *testing.T) {
	m := &tree.Model{
		Params: []*tree.Param{tree.Input("p", num("0.3"))},
		Root: tree.Decision("D", tree.Choice("go", tree.NoCash, tree.Chance("C",
			tree.Outcome("x", tree.Ref("p"), tree.Gain(num("10")), nil),
			tree.RestOutcome("y", tree.NoCash, nil))), tree.Choice("stop", tree.NoCash, nil)),
	}
	c := mustCompile(t, m)
	s, _ := c.Set("p", decimal.RequireFromString("1.2"))
	if _, err := c.With(s); err == nil {
		t.Fatal("p = 1.2 accepted")
	} else if inv, ok := err.(*compiled.InvalidError); !ok || len(inv.Diagnostics) == 0 {
		t.Fatalf("error %T %v", err, err)
	}
	if in, _ := c.InputNamed("p"); in.Value.String() != "0.3" {
		t.Errorf("the original changed: p = %s", in.Value)
	}
	if _, err := c.Set("q", decimal.Zero); err == nil {
		t.Error("an unknown input accepted")
	}
}

// TestConcurrentSolves solves one compiled model with different inputs
// from several goroutines at once (run with -race).
func TestConcurrentSolves(t *testing.T) {
	rng := rand.New(rand.NewSource(11))
	m := randomModel(rng)
	c := mustCompile(t, m)
	var wg sync.WaitGroup
	results := make([]string, 16)
	for g := range results {
		wg.Go(func() {
			v := decimal.NewFromInt(int64(g * 37))
			s, _ := c.Set("a1", v)
			c2, err := c.With(s)
			if err != nil {
				t.Error(err)
				return
			}
			sol, _ := eval.Solve(c2)
			c2.RollbackFloat(make([]float64, c2.Len()), make([]int32, c2.Len()))
			results[g] = sol.Value().String()
		})
	}
	wg.Wait()
	for g, got := range results {
		s, _ := c.Set("a1", decimal.NewFromInt(int64(g*37)))
		c2, _ := c.With(s)
		sol, _ := eval.Solve(c2)
		if got != sol.Value().String() {
			t.Errorf("goroutine %d: %s, alone %s", g, got, sol.Value())
		}
	}
}

// A program compiles a model once and re-solves it with an input changed.
func ExampleModel_With() {
	m := &tree.Model{
		Params: []*tree.Param{tree.Input("fee", num("40")).Within(num("20"), num("90"))},
		Root: tree.Decision("Supply",
			tree.Choice("Own fleet", tree.Cost(num("55")), nil),
			tree.Choice("Carrier", tree.Cost(tree.Ref("fee")), nil)),
	}
	c, _ := compiled.Compile(m)
	for _, fee := range []string{"40", "60"} {
		s, _ := c.Set("fee", decimal.RequireFromString(fee))
		c2, _ := c.With(s)
		r := c2.Rollback()
		best := r.Best(0)
		v, _ := r.Value(0)
		fmt.Printf("fee %s: %s, net %s\n", fee, c2.Node(0).Branches[best].Label, v)
	}
	// Output:
	// fee 40: Carrier, net -40
	// fee 60: Own fleet, net -55
}

// TestWithExactAgain: an input whose expression divides inexactly (1/3)
// makes the model not exact; setting it to a figure makes it exact again,
// as editing its `let` line would.
func TestWithExactAgain(t *testing.T) {
	m := &tree.Model{
		Params: []*tree.Param{tree.Input("share", &tree.Binary{Op: '/', X: num("1"), Y: num("3")})},
		Root:   tree.Decision("D", tree.Choice("a", tree.Gain(tree.Ref("share")), nil), tree.Choice("b", tree.NoCash, nil)),
	}
	c := mustCompile(t, m)
	if c.Exact() {
		t.Fatal("1/3 reported exact")
	}
	s, _ := c.Set("share", decimal.RequireFromString("0.25"))
	c2, err := c.With(s)
	if err != nil {
		t.Fatal(err)
	}
	if !c2.Exact() || c.Exact() {
		t.Errorf("after setting share: exact %v (the original %v)", c2.Exact(), c.Exact())
	}
}
