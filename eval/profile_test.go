package eval

import (
	"context"
	"errors"
	"math"
	"math/big"
	"math/rand"
	"sort"
	"strings"
	"testing"

	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// ratPaths enumerates, independently of the engine, every path below node n
// on big.Rat: the decisions take their best branch by ratRollback (the
// first in model order among ties), chance branches of probability 0 are
// left out. It adds each path's payoff (in the objective's terms, counted
// from n's branch: cash is the cash on it) with its probability into out,
// keyed by the payoff's RatString.
func ratPaths(m *tree.Model, n *tree.Node, cash, prob *big.Rat, out map[string]*big.Rat) {
	figure := func(r *big.Rat) *big.Rat {
		if m.Objective == tree.Min {
			return new(big.Rat).Neg(r)
		}
		return r
	}
	if n == nil || n.Kind == tree.KindEnd {
		v := new(big.Rat).Set(cash)
		if n != nil {
			v.Add(v, figure(ratExpr(n.Payoff)))
		}
		k := v.RatString()
		if out[k] == nil {
			out[k] = new(big.Rat)
		}
		out[k].Add(out[k], prob)
		return
	}
	if n.Kind == tree.KindChance {
		for j, b := range n.Branches {
			p := ratProb(n, j)
			if p.Sign() == 0 {
				continue
			}
			ratPaths(m, b.Node, new(big.Rat).Add(cash, figure(ratCash(b))), new(big.Rat).Mul(prob, p), out)
		}
		return
	}
	best, bestV := -1, (*big.Rat)(nil)
	for j, b := range n.Branches {
		v := new(big.Rat).Add(figure(ratCash(b)), ratNode(m, b.Node))
		if best < 0 || (m.Objective == tree.Max && v.Cmp(bestV) > 0) || (m.Objective == tree.Min && v.Cmp(bestV) < 0) {
			best, bestV = j, v
		}
	}
	b := n.Branches[best]
	ratPaths(m, b.Node, new(big.Rat).Add(cash, figure(ratCash(b))), prob, out)
}

// sortedOutcomes is a distribution as sorted (value, probability) pairs.
type ratOutcome struct{ v, p *big.Rat }

func sortedOutcomes(out map[string]*big.Rat) []ratOutcome {
	var ds []ratOutcome
	for k, p := range out {
		v, _ := new(big.Rat).SetString(k)
		ds = append(ds, ratOutcome{v, p})
	}
	sort.Slice(ds, func(a, b int) bool { return ds[a].v.Cmp(ds[b].v) < 0 })
	return ds
}

// nodeAt follows branch labels from the root.
func nodeAt(m *tree.Model, path []string) *tree.Node {
	n := m.Root
	for _, l := range path {
		for _, b := range n.Branches {
			if b.Label == l {
				n = b.Node
				break
			}
		}
	}
	return n
}

// Every option's distribution on random trees against an enumeration of
// the paths on math/big.Rat (an exact reference), under both objectives:
// the payoffs and probabilities, the mean (equal to the option's expected
// value exactly), the variance, the chance of a loss and the percentiles
// (the smallest payoff whose cumulative probability reaches p, computed
// here on the rationals).
func TestProfilesMatchBigRat(t *testing.T) {
	rng := rand.New(rand.NewSource(11))
	trees := 1500
	if testing.Short() {
		trees = 200
	}
	for i := 0; i < trees; i++ {
		m := objectiveModel(rng, i, 2+rng.Intn(120))
		sol := mustSolve(t, m)
		threshold := decimal.New(rng.Int63n(2001)-1000, 0)
		ps, err := RiskProfiles(context.Background(), sol, ProfileOptions{Threshold: &threshold})
		if err != nil {
			t.Fatalf("tree %d: %v", i, err)
		}
		if !ps.Exact {
			t.Fatalf("tree %d: plain chance nodes only, yet not exact", i)
		}
		n := nodeAt(m, ps.Path)
		if ps.Decision == nil {
			if n.Kind == tree.KindDecision || len(ps.Options) != 1 {
				t.Fatalf("tree %d: no decision profiled, but the node is a %s with %d profiles", i, n.Kind, len(ps.Options))
			}
		} else if n != ps.Decision {
			t.Fatalf("tree %d: the path leads to another node than the decision profiled", i)
		}
		for j, p := range ps.Options {
			out := map[string]*big.Rat{}
			if ps.Decision == nil {
				ratPaths(m, m.Root, new(big.Rat), big.NewRat(1, 1), out)
			} else {
				b := n.Branches[j]
				fig := ratCash(b)
				if m.Objective == tree.Min {
					fig.Neg(fig)
				}
				ratPaths(m, b.Node, fig, big.NewRat(1, 1), out)
			}
			want := sortedOutcomes(out)
			if len(want) != len(p.Outcomes) {
				t.Fatalf("tree %d option %d: %d outcomes, big.Rat %d", i, j, len(p.Outcomes), len(want))
			}
			mean, sq, loss := new(big.Rat), new(big.Rat), new(big.Rat)
			thr := rat(threshold)
			for k, o := range p.Outcomes {
				if rat(o.Value).Cmp(want[k].v) != 0 || rat(o.Probability).Cmp(want[k].p) != 0 {
					t.Fatalf("tree %d option %d outcome %d: %s with %s, big.Rat %s with %s", i, j, k, o.Value, o.Probability, want[k].v.RatString(), want[k].p.RatString())
				}
				x := new(big.Rat).Mul(want[k].v, want[k].p)
				mean.Add(mean, x)
				sq.Add(sq, x.Mul(x, want[k].v))
				if (m.Objective == tree.Max && want[k].v.Cmp(thr) < 0) || (m.Objective == tree.Min && want[k].v.Cmp(thr) > 0) {
					loss.Add(loss, want[k].p)
				}
			}
			if rat(p.Mean).Cmp(mean) != 0 {
				t.Fatalf("tree %d option %d: mean %s, big.Rat %s", i, j, p.Mean, mean.RatString())
			}
			ev := sol.Value()
			if ps.Decision != nil {
				ev = sol.At(nodeNumber(sol, n)).BranchValue(j)
			}
			if !p.Mean.Equal(ev) {
				t.Fatalf("tree %d option %d: mean %s, but the expected value is %s", i, j, p.Mean, ev)
			}
			variance := new(big.Rat).Sub(sq, new(big.Rat).Mul(mean, mean))
			if rat(p.Variance).Cmp(variance) != 0 {
				t.Fatalf("tree %d option %d: variance %s, big.Rat %s", i, j, p.Variance, variance.RatString())
			}
			if sd, _ := rat(p.SD).Float64(); !close(sd*sd, ratFloat(variance), 1e-12) {
				t.Fatalf("tree %d option %d: sd %s squared is not the variance %s", i, j, p.SD, variance.RatString())
			}
			if rat(p.Loss).Cmp(loss) != 0 {
				t.Fatalf("tree %d option %d: P(loss) %s, big.Rat %s", i, j, p.Loss, loss.RatString())
			}
			for _, pc := range p.Percentiles {
				level := big.NewRat(int64(pc.P), 100)
				cum := new(big.Rat)
				var at *big.Rat
				for _, o := range want {
					cum.Add(cum, o.p)
					if cum.Cmp(level) >= 0 {
						at = o.v
						break
					}
				}
				if rat(pc.Value).Cmp(at) != 0 {
					t.Fatalf("tree %d option %d: P%d = %s, big.Rat %s", i, j, pc.P, pc.Value, at.RatString())
				}
			}
		}
	}
}

func ratFloat(r *big.Rat) float64 { f, _ := r.Float64(); return f }

func close(a, b, rel float64) bool {
	d := a - b
	if d < 0 {
		d = -d
	}
	m := max(abs(a), abs(b))
	return d <= rel*m || d < 1e-300
}

// nodeNumber is the compiled number of a node as written (the first that
// is it).
func nodeNumber(sol *Solution, n *tree.Node) int {
	for i := 0; i < sol.Compiled.Len(); i++ {
		if sol.Compiled.Node(i) == n {
			return i
		}
	}
	return -1
}

// The risk profile of the strategy with the market research study in the
// condominium example of Anderson, Sweeney & Williams, An Introduction to
// Management Science, chapter "Decision Analysis" (recalled from memory):
// large complex after a favourable report, medium after an unfavourable
// one, gives 20 with probability 0.7238, 14 with 0.0805, 5 with 0.1495
// and −9 with 0.0462 (millions).
func TestProfileCondominium(t *testing.T) {
	m := &tree.Model{Root: tree.Decision("Market research",
		tree.Choice("Study", tree.NoCash, condominiumWithStudy().Root),
		tree.Choice("No study", tree.NoCash, condominium().Root))}
	sol := mustSolve(t, m)
	ps, err := RiskProfiles(context.Background(), sol, ProfileOptions{})
	if err != nil {
		t.Fatal(err)
	}
	got := ps.Options[0]
	want := []Outcome{{d("-9"), d("0.0462")}, {d("5"), d("0.1495")}, {d("14"), d("0.0805")}, {d("20"), d("0.7238")}}
	if len(got.Outcomes) != len(want) {
		t.Fatalf("outcomes %v, want %v", got.Outcomes, want)
	}
	for k, o := range want {
		if !got.Outcomes[k].Value.Equal(o.Value) || !got.Outcomes[k].Probability.Equal(o.Probability) {
			t.Errorf("outcome %d = %v, want %v", k, got.Outcomes[k], o)
		}
	}
	// The same book's EV with the study: 15.9347 unrounded (see
	// condominiumWithStudy).
	wantDec(t, "mean with the study", got.Mean, "15.9347")
	// Without the study the large complex is taken: 20 with 0.8, −9 with
	// 0.2 (the same book's risk profile of the large complex).
	no := ps.Options[1]
	if len(no.Outcomes) != 2 || !no.Outcomes[0].Value.Equal(d("-9")) || !no.Outcomes[0].Probability.Equal(d("0.2")) {
		t.Errorf("no study: %v", no.Outcomes)
	}
	wantDec(t, "P(loss) with no study", no.Loss, "0.2")
	// P5 is the smallest payoff whose cumulative probability reaches 5%:
	// −9 holds 4.62% only, so P5 is 5 (cumulative 19.57%).
	wantDec(t, "P5 with the study", got.Percentiles[0].Value, "5")
	wantDec(t, "P50 with the study", got.Percentiles[2].Value, "20")
}

// A decision below a test reading: its options' probabilities are the
// posterior ones, and the mean is still the option's value as the
// solution gives it. Hillier & Lieberman's oil-drilling prototype with the
// seismic survey: after a favourable reading P(oil) = 0.5; after an
// unfavourable one 1/7, which is no finite decimal; the survey option as a
// whole is worth 123.
func TestProfileBelowTestReading(t *testing.T) {
	sol := mustSolve(t, oilModel("0.25", true))
	ps, err := RiskProfiles(context.Background(), sol, ProfileOptions{At: "Favourable/Drill or sell"})
	if err != nil {
		t.Fatal(err)
	}
	drill := ps.Options[0]
	if !ps.Exact || len(drill.Outcomes) != 2 || !drill.Outcomes[0].Probability.Equal(d("0.5")) {
		t.Fatalf("favourable, drill: exact %v, %v", ps.Exact, drill.Outcomes)
	}
	wantDec(t, "mean of drilling after a favourable reading", drill.Mean, "300")

	ps, err = RiskProfiles(context.Background(), sol, ProfileOptions{At: "Unfavourable/Drill or sell"})
	if err != nil {
		t.Fatal(err)
	}
	if ps.Exact {
		t.Error("P(oil | unfavourable) = 1/7 is no finite decimal, yet the profile says it is exact")
	}
	d := nodeNumber(sol, nodeAt(sol.Model, ps.Path))
	if v := sol.At(d).BranchValue(0); !ps.Options[0].Mean.Equal(v) {
		t.Errorf("drill after an unfavourable reading: mean %s, value %s", ps.Options[0].Mean, v)
	}

	ps, err = RiskProfiles(context.Background(), sol, ProfileOptions{})
	if err != nil {
		t.Fatal(err)
	}
	survey := ps.Options[1]
	// Favourable and oil: 0.25·0.6; favourable and dry: 0.75·0.2; then
	// sell for 90 after an unfavourable reading: 0.7. The survey costs 30.
	want := []Outcome{{dec("-130"), dec("0.15")}, {dec("60"), dec("0.7")}, {dec("670"), dec("0.15")}}
	for k, o := range want {
		if !survey.Outcomes[k].Value.Equal(o.Value) || !survey.Outcomes[k].Probability.Equal(o.Probability) {
			t.Errorf("survey outcome %d = %v, want %v", k, survey.Outcomes[k], o)
		}
	}
	wantDec(t, "mean with the survey", survey.Mean, "123") // Hillier & Lieberman: 123
}

func dec(s string) decimal.Decimal { return decimal.RequireFromString(s) }

// lotteryOption is an option that leads to a chance node with the given
// "value:probability" outcomes (a single "value" is a certain amount).
func lotteryOption(label string, money func(tree.Expr) tree.Cash, outcomes ...string) *tree.Branch {
	if len(outcomes) == 1 && !strings.Contains(outcomes[0], ":") {
		return tree.Choice(label, money(tree.Num(dec(outcomes[0]))), nil)
	}
	var bs []*tree.Branch
	for i, o := range outcomes {
		v, p, _ := strings.Cut(o, ":")
		bs = append(bs, tree.Outcome(string(rune('a'+i)), tree.Num(dec(p)), money(tree.Num(dec(v))), nil))
	}
	return tree.Choice(label, tree.NoCash, tree.Chance(label+" outcome", bs...))
}

// Dominance between hand-made lotteries whose answer is known from the
// definitions (first order: F_A(x) ≤ F_B(x) for every x; second order:
// ∫ F_A ≤ ∫ F_B up to every x; Hadar & Russell 1969, American Economic
// Review 59(1); Rothschild & Stiglitz 1970, Journal of Economic Theory
// 2(3), for a mean-preserving spread — recalled from memory).
func TestDominanceLotteries(t *testing.T) {
	cases := []struct {
		name string
		obj  tree.Objective
		a, b []string
		want []Dominance // Better/Worse: 0 is a, 1 is b
	}{
		// A moves B's low outcome up: F_A(x) = 0 below 10 while F_B(0) =
		// 0.5, and both reach 1 at 20. First order.
		{"first order", tree.Max, []string{"10:0.5", "20:0.5"}, []string{"0:0.5", "20:0.5"}, []Dominance{{0, 1, 1}}},
		// A is certain 5; B is 0 or 10 at even chances: the same mean,
		// more spread (a mean-preserving spread). F_B(0) = 0.5 > F_A(0) = 0
		// but F_A(5) = 1 > F_B(5) = 0.5: no first order either way.
		// ∫F_A = max(0, x − 5); ∫F_B = x/2 on [0, 10], then x − 5: at 5,
		// 0 ≤ 2.5; at 10, 5 ≤ 5; equal beyond. So A dominates B at second
		// order, and only there.
		{"second order, not first", tree.Max, []string{"5"}, []string{"0:0.5", "10:0.5"}, []Dominance{{0, 1, 2}}},
		// The spread has the higher mean (5 > 4): the certain 4 cannot
		// dominate it at second order (that needs a mean no lower), and the
		// spread's F(0) = 0.5 > 0 rules out its dominance at either order
		// (∫F up to 4: 2 > 0).
		{"neither", tree.Max, []string{"0:0.5", "10:0.5"}, []string{"4"}, nil},
		// The same lottery twice dominates neither way.
		{"identical", tree.Max, []string{"1:0.25", "3:0.75"}, []string{"3:0.75", "1:0.25"}, nil},
		// Costs: A costs 10 or 20, B costs 10 or 30, at even chances. A
		// costs no more than B in every quantile: first order.
		{"first order, costs", tree.Min, []string{"10:0.5", "20:0.5"}, []string{"10:0.5", "30:0.5"}, []Dominance{{0, 1, 1}}},
		// Costs: a certain 5 against 0 or 10: the certain cost is preferred
		// by the risk averse (the net values are −5 against 0 or −10, the
		// spread case above).
		{"second order, costs", tree.Min, []string{"5"}, []string{"0:0.5", "10:0.5"}, []Dominance{{0, 1, 2}}},
		// Three outcomes each, crossing twice: A = 0/2/4 at 1/4, 1/2, 1/4;
		// B = 1/2/3 at 1/4, 1/2, 1/4. B is A with its tails pulled in, the
		// same mean: B dominates at second order.
		{"second order, three outcomes", tree.Max, []string{"0:0.25", "2:0.5", "4:0.25"}, []string{"1:0.25", "2:0.5", "3:0.25"}, []Dominance{{1, 0, 2}}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			money := tree.Gain
			if c.obj == tree.Min {
				money = tree.Cost
			}
			m := &tree.Model{Objective: c.obj, Root: tree.Decision("Pick",
				lotteryOption("A", money, c.a...), lotteryOption("B", money, c.b...))}
			ps, err := RiskProfiles(context.Background(), mustSolve(t, m), ProfileOptions{})
			if err != nil {
				t.Fatal(err)
			}
			if len(ps.Dominance) != len(c.want) {
				t.Fatalf("dominance %v, want %v", ps.Dominance, c.want)
			}
			for k, w := range c.want {
				if ps.Dominance[k] != w {
					t.Errorf("dominance %v, want %v", ps.Dominance[k], w)
				}
			}
			for _, dm := range ps.Dominance {
				s := ps.Sentence(dm)
				if !strings.Contains(s, `"A" is better than "B"`) && !strings.Contains(s, `"B" is better than "A"`) {
					t.Errorf("sentence %q names no options", s)
				}
				if averse := strings.Contains(s, "averse to risk"); averse != (dm.Order == 2) {
					t.Errorf("order %d, sentence %q", dm.Order, s)
				}
			}
		})
	}
}

// check warns about an option dominated in distribution once, and an
// option dominated in every outcome with the range warning only.
func TestDominatedInDistribution(t *testing.T) {
	m := &tree.Model{Root: tree.Decision("Pick",
		lotteryOption("Narrow", tree.Gain, "10:0.5", "20:0.5"),
		lotteryOption("Wide", tree.Gain, "0:0.5", "20:0.5"),
		lotteryOption("Poor", tree.Gain, "-5:0.5", "-1:0.5"),
		lotteryOption("Spread", tree.Gain, "-100:0.5", "130:0.5"),
	)}
	ds := Dominated(mustSolve(t, m))
	var got []string
	for _, x := range ds {
		got = append(got, x.Summary)
	}
	want := []string{
		// Wide: 0 or 20 against Narrow's 10 or 20, ranges overlapping.
		`option "Wide" of "Pick" is dominated in distribution: "Narrow" is better`,
		// Poor: its best (−1) is below Narrow's worst (10).
		`option "Poor" of "Pick" is dominated: in every outcome it does no better than "Narrow"`,
	}
	if len(got) != len(want) {
		t.Fatalf("warnings %q, want %d", got, len(want))
	}
	for _, w := range want {
		found := false
		for _, g := range got {
			found = found || strings.HasPrefix(g, w)
		}
		if !found {
			t.Errorf("no warning starting %q in %q", w, got)
		}
	}
}

// A tree with no decision has one profile, of the whole tree; the budget
// stops a profile with a BudgetError.
func TestProfileWholeTreeAndBudget(t *testing.T) {
	m := &tree.Model{Root: tree.Chance("Weather",
		tree.Outcome("Sun", tree.Num(dec("0.3")), tree.Gain(tree.Num(dec("100"))), nil),
		tree.Outcome("Rain", tree.Num(dec("0.7")), tree.Cost(tree.Num(dec("40"))), nil))}
	sol := mustSolve(t, m)
	ps, err := RiskProfiles(context.Background(), sol, ProfileOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if ps.Decision != nil || len(ps.Options) != 1 || ps.Options[0].Branch != -1 {
		t.Fatalf("profiles of a tree with no decision: %+v", ps)
	}
	wantDec(t, "mean", ps.Options[0].Mean, "2") // 0.3·100 − 0.7·40
	wantDec(t, "P(loss)", ps.Options[0].Loss, "0.7")
	_, err = RiskProfiles(context.Background(), sol, ProfileOptions{MaxOutcomes: 1})
	var be *BudgetError
	if !errors.As(err, &be) || !strings.Contains(be.Option, "MaxOutcomes") {
		t.Fatalf("err = %v, want a BudgetError on MaxOutcomes", err)
	}
	_, err = RiskProfiles(context.Background(), sol, ProfileOptions{At: "Nowhere"})
	var re *RequestError
	if !errors.As(err, &re) {
		t.Fatalf("err = %v, want a RequestError", err)
	}
}

// Past its budget of path ends, the check for dominance in distribution
// stops with a warning that says from which decision on only the ranges
// were checked; the range warnings go on.
func TestDominatedBudget(t *testing.T) {
	m := &tree.Model{Root: tree.Decision("Pick",
		lotteryOption("Narrow", tree.Gain, "10:0.5", "20:0.5"),
		lotteryOption("Wide", tree.Gain, "0:0.5", "20:0.5"),
		lotteryOption("Poor", tree.Gain, "-5:0.5", "-1:0.5"),
	)}
	ds := dominated(mustSolve(t, m), 3)
	var got []string
	for _, x := range ds {
		got = append(got, x.Summary)
	}
	if len(got) != 2 || !strings.HasPrefix(got[0], `option "Poor" of "Pick" is dominated: in every outcome`) ||
		!strings.Contains(got[1], "checked for dominance by their ranges only") {
		t.Fatalf("warnings %q", got)
	}
}

// A chain so deep that its masses are kept short by frames of their own
// (compiled.MaxMassPlaces): the profile weighs each frame into the one
// above. Going down the chain pays 1 a level; the chance of stopping after
// exactly k levels is 0.3^k · 0.7 (0.3^n for the whole chain), a geometric
// distribution (common practice), checked on big.Rat to 40 digits; the
// mean is the option's value to the same precision, and the profile says it
// is not exact.
func TestProfileDeepChain(t *testing.T) {
	const depth = 800
	var n *tree.Node
	for i := 0; i < depth; i++ {
		n = tree.Chance("L", tree.Outcome("a", tree.Num(dec("0.3")), tree.Gain(tree.Num(dec("1"))), n), tree.RestOutcome("b", tree.NoCash, nil))
	}
	m := &tree.Model{Root: tree.Decision("Go", tree.Choice("Chain", tree.NoCash, n), tree.Choice("Stay", tree.NoCash, nil))}
	sol := mustSolve(t, m)
	ps, err := RiskProfiles(context.Background(), sol, ProfileOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if ps.Exact {
		t.Error("a profile weighed through frames says it is exact")
	}
	chain := ps.Options[0]
	if len(chain.Outcomes) != depth+1 {
		t.Fatalf("%d outcomes", len(chain.Outcomes))
	}
	tiny := big.NewRat(1, 1)
	for i := 0; i < 40; i++ {
		tiny.Mul(tiny, big.NewRat(1, 10))
	}
	p := big.NewRat(1, 1)
	for k, o := range chain.Outcomes {
		want := new(big.Rat).Mul(p, big.NewRat(7, 10))
		if k == depth {
			want = p
		}
		diff := new(big.Rat).Sub(rat(o.Probability), want)
		if diff.Abs(diff).Cmp(new(big.Rat).Mul(want, tiny)) > 0 {
			t.Fatalf("P(%d) = %s, want %s", k, o.Probability, want.FloatString(60))
		}
		p.Mul(p, big.NewRat(3, 10))
	}
	diff := new(big.Rat).Sub(rat(chain.Mean), rat(sol.Root.BranchValue(0)))
	if diff.Abs(diff).Cmp(tiny) > 0 {
		t.Errorf("mean %s, value %s", chain.Mean, sol.Root.BranchValue(0))
	}
	rs, err := SolveRiskAverse(sol, dec("2"))
	if err != nil {
		t.Fatal(err)
	}
	// The chain pays 1 a level, stopping at each with 0.7: its CE with
	// R = 2 is a fixed point x = −2 ln(0.7 + 0.3·e^−(1+x)/2), far from the
	// bottom; checked here against a direct iteration of that equation.
	x := 0.0
	for i := 0; i < 200; i++ {
		x = -2 * math.Log(0.7+0.3*math.Exp(-(1+x)/2))
	}
	if got := rs.BranchValue(0, 0).InexactFloat64(); !relClose(got, x, 1e-13) {
		t.Errorf("CE of the chain %v, fixed point %v", got, x)
	}
}

// TestProfileDrawn: a decision with a figure drawn from a distribution
// beneath it gets no dominance from its profiles, which take the figure
// at its mean (pert(0, 50, 70) has mean 45, below the sure 60, yet can
// draw 70); with the figure fixed at 45 the sure option dominates.
func TestProfileDrawn(t *testing.T) {
	build := func(x tree.Expr) *tree.Model {
		return &tree.Model{Params: []*tree.Param{tree.Input("x", x)}, Root: tree.Decision("Pick",
			tree.Choice("Risky", tree.Gain(tree.Ref("x")), nil),
			tree.Choice("Sure", tree.Gain(tree.Num(d("60"))), nil),
		)}
	}
	drawn := &tree.Call{Func: "pert", Args: []tree.Expr{tree.Num(d("0")), tree.Num(d("50")), tree.Num(d("70"))}}
	ps, err := RiskProfiles(context.Background(), mustSolve(t, build(drawn)), ProfileOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if !ps.Drawn || len(ps.Dominance) != 0 {
		t.Errorf("drawn %v, dominance %v", ps.Drawn, ps.Dominance)
	}
	ps, err = RiskProfiles(context.Background(), mustSolve(t, build(tree.Num(d("45")))), ProfileOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if ps.Drawn || len(ps.Dominance) != 1 || ps.Dominance[0].Better != 1 {
		t.Errorf("drawn %v, dominance %v", ps.Drawn, ps.Dominance)
	}
}
