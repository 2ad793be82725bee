package eval

import (
	"context"
	"errors"
	"fmt"
	"math/big"
	"math/rand"
	"strings"
	"testing"

	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// oilInputs is the oil-drilling prototype of Hillier & Lieberman,
// Introduction to Operations Research, chapter "Decision Analysis"
// (thousands of dollars: drill +700 if oil, −100 if dry, that is revenue
// 800 less the drilling cost 100; sell +90; prior P(oil) 0.25, as the
// book's example gives them), with the three money figures as inputs over ranges of our
// own choosing (the book gives none): the payoff with oil 500 .. 900, the
// cost of a dry hole 80 .. 150, the sale price 60 .. 120.
func oilInputs() *tree.Model {
	n := func(s string) tree.Expr { return tree.Num(d(s)) }
	return &tree.Model{Title: "oil drilling",
		Params: []*tree.Param{
			tree.Input("p_oil", n("0.25")),
			tree.Input("oil_gain", n("700")).Within(n("500"), n("900")),
			tree.Input("dry_cost", n("100")).Within(n("80"), n("150")),
			tree.Input("sale", n("90")).Within(n("60"), n("120")),
		},
		Uncertainties: []*tree.Uncertainty{tree.NewUncertainty("oil", "Oil in the ground",
			tree.StateP("Oil", tree.Ref("p_oil")), &tree.State{Label: "Dry"})},
		Root: tree.Decision("Drill or sell",
			tree.Choice("Drill", tree.NoCash, tree.ChanceOn("oil",
				tree.Given("Oil", tree.Gain(tree.Ref("oil_gain")), nil),
				tree.Given("Dry", tree.Cost(tree.Ref("dry_cost")), nil))),
			tree.Choice("Sell", tree.Gain(tree.Ref("sale")), nil)),
	}
}

func analyse(t *testing.T, m *tree.Model, opts SensitivityOptions) *Sensitivity {
	t.Helper()
	s, err := AnalyseSensitivity(context.Background(), mustCompile(t, m), opts)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func vr(t *testing.T, spec, lo, hi string) VaryRange {
	t.Helper()
	v, err := ParseVary(spec)
	if err != nil {
		t.Fatal(err)
	}
	r := VaryRange{Vary: v}
	if lo != "" {
		l, h := d(lo), d(hi)
		r.Low, r.High = &l, &h
	}
	return r
}

func TestSensitivityOilDrilling(t *testing.T) {
	for _, spec := range []string{"oil:Oil", "p_oil"} {
		s := analyse(t, oilInputs(), SensitivityOptions{Vary: []VaryRange{vr(t, spec, "0.15", "0.35")}})
		// Hillier & Lieberman: EMV(drill) = 0.25·700 − 0.75·100 = 100 is
		// the best at the prior of 0.25.
		wantDec(t, spec+": base", s.Base, "100")
		if len(s.Inputs) != 4 {
			t.Fatalf("%s: %d inputs varied, want 4: %+v", spec, len(s.Inputs), s.Inputs)
		}
		// Swings (worked by hand below): P(oil) 90, oil_gain 60, dry_cost
		// 25, sale 20.
		order := []string{spec, "oil_gain", "dry_cost", "sale"}
		for i, in := range s.Inputs {
			if in.Vary.String() != order[i] {
				t.Errorf("%s: input %d is %s, want %s", spec, i, in.Vary, order[i])
			}
		}
		p := s.Inputs[0]
		// Hillier & Lieberman: drill is worth 800p − 100 against 90 for
		// selling. At p = 0.15 drilling is worth 20, so sell (90); at
		// p = 0.35 it is worth 180. The base policy (drill) is worth 20
		// and 180. They break even at p = 0.2375.
		wantDec(t, spec+": value at 0.15", p.ValueLow, "90")
		wantDec(t, spec+": value at 0.35", p.ValueHigh, "180")
		wantDec(t, spec+": swing", p.Swing, "90")
		wantDec(t, spec+": drill held at 0.15", p.FixedLow, "20")
		wantDec(t, spec+": drill held at 0.35", p.FixedHigh, "180")
		wantDec(t, spec+": base input", p.Base, "0.25")
		if len(p.Switches) != 1 {
			t.Fatalf("%s: %d switches", spec, len(p.Switches))
		}
		sw := p.Switches[0]
		wantDec(t, spec+": switch", sw.At, "0.2375")
		if !sw.Exact || s.Options[sw.Below] != "Sell" || s.Options[sw.Above] != "Drill" || s.Options[p.BestLow] != "Sell" || s.Options[p.BestHigh] != "Drill" {
			t.Errorf("%s: switch %+v, best %d → %d", spec, sw, p.BestLow, p.BestHigh)
		}
	}
	s := analyse(t, oilInputs(), SensitivityOptions{Vary: []VaryRange{vr(t, "oil:Oil", "0.15", "0.35")}})
	by := map[string]InputSensitivity{}
	for _, in := range s.Inputs {
		by[in.Vary.String()] = in
	}
	type want struct{ low, high, fixLow, fixHigh, swing, sw string }
	for name, w := range map[string]want{
		// Drill is worth 0.25g − 75 with g the payoff with oil: 50 at
		// g = 500, below the sale's 90; 150 at g = 900. Even at
		// 0.25g − 75 = 90, g = 660.
		"oil_gain": {"90", "150", "50", "150", "60", "660"},
		// Drill is worth 175 − 0.75c with c the cost of a dry hole: 115 at
		// c = 80, 62.5 at c = 150, below the sale's 90. Even at
		// 175 − 0.75c = 90, c = 340/3, no finite decimal.
		"dry_cost": {"115", "90", "115", "62.5", "25", "340/3"},
		// Selling is worth the price s against 100 for drilling: drill at
		// s = 60 (100), sell at 120. Even at s = 100.
		"sale": {"100", "120", "100", "100", "20", "100"},
	} {
		in := by[name]
		wantDec(t, name+" low", in.ValueLow, w.low)
		wantDec(t, name+" high", in.ValueHigh, w.high)
		wantDec(t, name+" fixed low", in.FixedLow, w.fixLow)
		wantDec(t, name+" fixed high", in.FixedHigh, w.fixHigh)
		wantDec(t, name+" swing", in.Swing, w.swing)
		if len(in.Switches) != 1 {
			t.Errorf("%s: %d switches", name, len(in.Switches))
			continue
		}
		want, _ := new(big.Rat).SetString(w.sw)
		if sw := in.Switches[0]; !sw.Exact || sw.Fraction.Cmp(want) != 0 {
			t.Errorf("%s: switch %s (fraction %v, exact %v), want %s", name, sw.At, sw.Fraction, sw.Exact, w.sw)
		}
	}
}

// A tree with no decision: the value is the root's expected value and
// there are no switches. Worked by hand: 0.4·x + 0.6·50 with x in
// 100 .. 200 is 70 .. 110.
func TestSensitivityChanceOnly(t *testing.T) {
	n := func(s string) tree.Expr { return tree.Num(d(s)) }
	m := &tree.Model{
		Params: []*tree.Param{tree.Input("x", n("150")).Within(n("100"), n("200"))},
		Root: tree.Chance("Weather",
			tree.Outcome("Sun", n("0.4"), tree.Gain(tree.Ref("x")), nil),
			tree.RestOutcome("Rain", tree.Gain(n("50")), nil)),
	}
	s := analyse(t, m, SensitivityOptions{})
	wantDec(t, "base", s.Base, "90")
	in := s.Inputs[0]
	wantDec(t, "low", in.ValueLow, "70")
	wantDec(t, "high", in.ValueHigh, "110")
	wantDec(t, "swing", in.Swing, "40")
	if s.Decision != nil || len(in.Switches) != 0 || in.BestLow != -1 {
		t.Errorf("decision %v, switches %v, best %d", s.Decision, in.Switches, in.BestLow)
	}
	// --at on a tree with no decision is a request error.
	_, err := AnalyseSensitivity(context.Background(), mustCompile(t, m), SensitivityOptions{At: "Pick"})
	var re *RequestError
	if !errors.As(err, &re) {
		t.Errorf("at a decision that is not there: %v", err)
	}
}

func TestSensitivityPercent(t *testing.T) {
	// ±20% of each money input of the oil model with no ranges: by hand,
	// oil_gain 560 .. 840 gives drill 65 (sell 90) .. 135; dry_cost
	// 80 .. 120 gives 115 .. 85 (sell 90); sale 72 .. 108 gives
	// 100 .. 108; p_oil 0.2 .. 0.3 gives 60 (sell 90) .. 140.
	m := oilInputs()
	for _, p := range m.Params {
		p.Low, p.High = nil, nil
	}
	pct := d("0.2")
	s := analyse(t, m, SensitivityOptions{Pct: &pct})
	want := map[string][2]string{"oil_gain": {"90", "135"}, "dry_cost": {"115", "90"}, "sale": {"100", "108"}, "p_oil": {"90", "140"}}
	for _, in := range s.Inputs {
		w := want[in.Vary.Name]
		wantDec(t, in.Vary.Name+" low", in.ValueLow, w[0])
		wantDec(t, in.Vary.Name+" high", in.ValueHigh, w[1])
		if in.From != RangePercent {
			t.Errorf("%s: range from %v", in.Vary.Name, in.From)
		}
	}
	if len(s.Inputs) != 4 {
		t.Errorf("%d inputs", len(s.Inputs))
	}
	// Without a percentage, inputs with no range are left out with a note.
	s = analyse(t, oilInputs(), SensitivityOptions{})
	if len(s.Inputs) != 3 || len(s.Notes) == 0 || !strings.Contains(strings.Join(s.Notes, " "), "p_oil") {
		t.Errorf("%d inputs, notes %q", len(s.Inputs), s.Notes)
	}
}

// ratEnv evaluates an expression on big.Rat with the inputs' values in
// env (nil is 0): math/big's exact rationals as the reference.
func ratEnv(e tree.Expr, env map[string]*big.Rat) *big.Rat {
	switch e := e.(type) {
	case nil:
		return new(big.Rat)
	case *tree.Number:
		return rat(e.Value())
	case *tree.Name:
		return new(big.Rat).Set(env[e.Name])
	case *tree.Unary:
		return new(big.Rat).Neg(ratEnv(e.X, env))
	case *tree.Binary:
		x, y := ratEnv(e.X, env), ratEnv(e.Y, env)
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
	panic("ratEnv: unsupported expression")
}

// ratTree rolls a tree of plain chance nodes back on big.Rat, in the
// objective's terms, straight from the definition: a chance node is the
// probability-weighted sum of its branches (cash plus what follows), a
// decision the best of them (the first in model order on a tie), or the
// one policy names when policy is not nil. best records every decision's
// choice.
type ratTree struct {
	m      *tree.Model
	env    map[string]*big.Rat
	policy map[*tree.Node]int
	best   map[*tree.Node]int
}

func (r *ratTree) fig(net *big.Rat) *big.Rat {
	if r.m.Objective == tree.Min {
		return net.Neg(net)
	}
	return net
}

func (r *ratTree) branch(b *tree.Branch) *big.Rat {
	v := r.fig(new(big.Rat).Sub(ratEnv(b.Gain, r.env), ratEnv(b.Cost, r.env)))
	return v.Add(v, r.value(b.Node))
}

func (r *ratTree) value(n *tree.Node) *big.Rat {
	if n == nil {
		return new(big.Rat)
	}
	switch n.Kind {
	case tree.KindEnd:
		return r.fig(ratEnv(n.Payoff, r.env))
	case tree.KindChance:
		sum, rest := new(big.Rat), big.NewRat(1, 1)
		for _, b := range n.Branches {
			if !b.Rest {
				rest.Sub(rest, ratEnv(b.Prob, r.env))
			}
		}
		for _, b := range n.Branches {
			p := rest
			if !b.Rest {
				p = ratEnv(b.Prob, r.env)
			}
			sum.Add(sum, new(big.Rat).Mul(p, r.branch(b)))
		}
		return sum
	}
	vals := make([]*big.Rat, len(n.Branches))
	pick := 0
	for j, b := range n.Branches {
		vals[j] = r.branch(b)
		better := (r.m.Objective == tree.Max && vals[j].Cmp(vals[pick]) > 0) || (r.m.Objective == tree.Min && vals[j].Cmp(vals[pick]) < 0)
		if better {
			pick = j
		}
	}
	if r.best != nil {
		r.best[n] = pick
	}
	if r.policy != nil {
		pick = r.policy[n]
	}
	return vals[pick]
}

// options are the values of the root decision's branches.
func (r *ratTree) options() []*big.Rat {
	var out []*big.Rat
	for _, b := range r.m.Root.Branches {
		out = append(out, r.branch(b))
	}
	return out
}

// randomInputModel is a random tree whose root is a decision, with four
// money inputs x0 … x3 (integers, each with a range around it) that some
// cash figures read as a + b·x, and one probability input q (0.1 .. 0.3
// around 0.2) that some chance nodes give their first branch, the last
// taking the rest. Under min the figures are costs.
func randomInputModel(rng *rand.Rand, size int) *tree.Model {
	n := func(v int64, exp int32) tree.Expr { return tree.Num(decimal.New(v, exp)) }
	m := &tree.Model{}
	if rng.Intn(2) == 1 {
		m.Objective = tree.Min
	}
	for k := 0; k < 4; k++ {
		v := rng.Int63n(200) - 100
		lo, hi := v-1-rng.Int63n(60), v+1+rng.Int63n(60)
		m.Params = append(m.Params, tree.Input(fmt.Sprintf("x%d", k), n(v, 0)).Within(n(lo, 0), n(hi, 0)))
	}
	m.Params = append(m.Params, tree.Input("q", n(2, -1)).Within(n(1, -1), n(3, -1)))
	money := func() tree.Cash {
		var e tree.Expr = n(rng.Int63n(20001)-10000, -int32(rng.Intn(3)))
		if rng.Intn(3) == 0 {
			e = &tree.Binary{Op: '+', X: e, Y: &tree.Binary{Op: '*', X: n(rng.Int63n(21)-10, 0), Y: tree.Ref(fmt.Sprintf("x%d", rng.Intn(4)))}}
		}
		if m.Objective == tree.Min {
			return tree.Cost(e)
		}
		return tree.Gain(e)
	}
	var build func(budget, depth int, decision bool) *tree.Node
	build = func(budget, depth int, decision bool) *tree.Node {
		if !decision && (budget <= 1 || depth > 6 || rng.Intn(5) == 0) {
			if rng.Intn(3) == 0 {
				return nil
			}
			return tree.Terminal(n(rng.Int63n(2001)-1000, 0))
		}
		k := 2 + rng.Intn(3)
		chance := !decision && rng.Intn(2) == 0
		useQ := chance && depth == 1 && rng.Intn(3) != 0 // at most once on a path: the values stay linear in q
		left := int64(70)                                // hundredths the fixed probabilities may take
		var bs []*tree.Branch
		for i := 0; i < k; i++ {
			label := fmt.Sprintf("o%d", i)
			child := build((budget-1)/k, depth+1, false)
			switch {
			case !chance:
				bs = append(bs, tree.Choice(label, money(), child))
			case i == k-1:
				bs = append(bs, tree.RestOutcome(label, money(), child))
			case i == 0 && useQ:
				bs = append(bs, tree.Outcome(label, tree.Ref("q"), money(), child))
			default:
				p := rng.Int63n(left/2 + 1)
				left -= p
				bs = append(bs, tree.Outcome(label, n(p, -2), money(), child))
			}
		}
		if chance {
			return tree.Chance("c", bs...)
		}
		return tree.Decision("d", bs...)
	}
	m.Root = build(size, 0, true)
	return m
}

// Every bar's ends against a fresh solve on math/big.Rat of the model with
// the input set, the base policy held fixed likewise, the swing order,
// and every exact switch a tie of the two options that are best there.
func TestSensitivityRandomTrees(t *testing.T) {
	rng := rand.New(rand.NewSource(10))
	trees := 120
	if testing.Short() {
		trees = 30
	}
	for it := 0; it < trees; it++ {
		m := randomInputModel(rng, 10+rng.Intn(120))
		s := analyse(t, m, SensitivityOptions{Points: 4})
		env := map[string]*big.Rat{}
		for _, p := range m.Params {
			env[p.Name] = ratEnv(p.Expr, env)
		}
		base := &ratTree{m: m, env: env, best: map[*tree.Node]int{}}
		if got, want := rat(s.Base), base.value(m.Root); got.Cmp(want) != 0 {
			t.Fatalf("tree %d: base %s, big.Rat %s", it, got.RatString(), want.RatString())
		}
		policy := base.best
		if len(s.Inputs) != len(m.Params) {
			t.Fatalf("tree %d: %d inputs varied, want %d", it, len(s.Inputs), len(m.Params))
		}
		at := func(name string, x *big.Rat) map[string]*big.Rat {
			e := map[string]*big.Rat{}
			for k, v := range env {
				e[k] = v
			}
			e[name] = x
			return e
		}
		for i, in := range s.Inputs {
			name := in.Vary.Name
			if i > 0 && in.Swing.GreaterThan(s.Inputs[i-1].Swing) {
				t.Errorf("tree %d: %s (swing %s) after %s (swing %s)", it, name, in.Swing, s.Inputs[i-1].Vary, s.Inputs[i-1].Swing)
			}
			if !in.Swing.Equal(in.ValueHigh.Sub(in.ValueLow).Abs()) {
				t.Errorf("tree %d %s: swing %s, ends %s and %s", it, name, in.Swing, in.ValueLow, in.ValueHigh)
			}
			for _, end := range []struct {
				x            decimal.Decimal
				value, fixed decimal.Decimal
				best         int
			}{{in.Low, in.ValueLow, in.FixedLow, in.BestLow}, {in.High, in.ValueHigh, in.FixedHigh, in.BestHigh}} {
				fresh := &ratTree{m: m, env: at(name, rat(end.x)), best: map[*tree.Node]int{}}
				if got, want := rat(end.value), fresh.value(m.Root); got.Cmp(want) != 0 {
					t.Errorf("tree %d %s = %s: value %s, big.Rat %s", it, name, end.x, got.RatString(), want.RatString())
				}
				if end.best != fresh.best[m.Root] {
					t.Errorf("tree %d %s = %s: best %d, big.Rat %d", it, name, end.x, end.best, fresh.best[m.Root])
				}
				held := &ratTree{m: m, env: at(name, rat(end.x)), policy: policy}
				if got, want := rat(end.fixed), held.value(m.Root); got.Cmp(want) != 0 {
					t.Errorf("tree %d %s = %s: base policy %s, big.Rat %s", it, name, end.x, got.RatString(), want.RatString())
				}
			}
			for _, sw := range in.Switches {
				if !sw.Exact {
					t.Errorf("tree %d %s: switch at %s not exact (the values are linear in every input)", it, name, sw.At)
					continue
				}
				opts := (&ratTree{m: m, env: at(name, sw.Fraction)}).options()
				if opts[sw.Below].Cmp(opts[sw.Above]) != 0 {
					t.Errorf("tree %d %s: at the switch %s the options are worth %s and %s", it, name, sw.Fraction, opts[sw.Below], opts[sw.Above])
				}
				for j, o := range opts {
					c := o.Cmp(opts[sw.Below])
					if (m.Objective == tree.Max && c > 0) || (m.Objective == tree.Min && c < 0) {
						t.Errorf("tree %d %s: at the switch %s option %d beats both", it, name, sw.Fraction, j)
					}
				}
			}
			// No switch missed: at points spread over the range the best
			// option on big.Rat is the one the segment there names.
			for k := 1; k < 40; k++ {
				x := new(big.Rat).Add(rat(in.Low), new(big.Rat).Mul(new(big.Rat).Sub(rat(in.High), rat(in.Low)), big.NewRat(int64(k), 40)))
				seg := -1
				for _, sg := range in.Segments {
					if rat(sg.From).Cmp(x) < 0 && x.Cmp(rat(sg.To)) < 0 {
						seg = sg.Best
					}
				}
				if seg < 0 {
					continue // on a switch
				}
				fresh := &ratTree{m: m, env: at(name, x), best: map[*tree.Node]int{}}
				opts := fresh.options()
				if fresh.value(m.Root); opts[seg].Cmp(opts[fresh.best[m.Root]]) != 0 {
					t.Errorf("tree %d %s = %s: the segments say option %d, big.Rat %d is better", it, name, x.FloatString(6), seg, fresh.best[m.Root])
				}
			}
			for _, p := range in.Curve {
				fresh := &ratTree{m: m, env: at(name, rat(p.X))}
				if got, want := rat(p.Value), fresh.value(m.Root); got.Cmp(want) != 0 {
					t.Errorf("tree %d %s = %s: curve %s, big.Rat %s", it, name, p.X, got.RatString(), want.RatString())
				}
			}
		}
	}
}
