package eval

import (
	"context"
	"fmt"
	"math/big"
	"math/rand"
	"testing"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

func wantDec(t *testing.T, what string, got decimal.Decimal, want string) {
	t.Helper()
	if !got.Equal(d(want)) {
		t.Errorf("%s = %s, want %s", what, got, want)
	}
}

// near checks got against the exact rational want: equal when want is a
// terminating decimal that fits, else within 10^-(DivisionScale-5).
func near(t *testing.T, what string, got decimal.Decimal, want *big.Rat) {
	t.Helper()
	diff := new(big.Rat).Sub(got.Rat(), want)
	tol := new(big.Rat).SetFrac(big.NewInt(1), new(big.Int).Exp(big.NewInt(10), big.NewInt(compiled.DivisionScale-5), nil))
	if diff.Abs(diff).Cmp(tol) > 0 {
		t.Errorf("%s = %s, want %s (%s)", what, got, want.FloatString(30), want)
	}
}

// oilModel is the prototype example of Hillier & Lieberman, Introduction to
// Operations Research, chapter "Decision Analysis" (thousands of dollars):
// drill (+700 if oil, −100 if dry) or sell the land (+90), prior P(oil) =
// 0.25; optionally a seismic survey costing 30 first, with P(favourable |
// oil) = 0.6 and P(favourable | dry) = 0.2.
func oilModel(pOil string, survey bool) *tree.Model {
	choice := func() *tree.Node {
		return tree.Decision("Drill or sell",
			tree.Choice("Drill", tree.NoCash, tree.ChanceOn("oil",
				tree.Given("Oil", tree.Gain(tree.Num(d("700"))), nil),
				tree.Given("Dry", tree.Gain(tree.Num(d("-100"))), nil))),
			tree.Choice("Sell", tree.Gain(tree.Num(d("90"))), nil))
	}
	m := &tree.Model{Title: "oil drilling",
		Params: []*tree.Param{{Name: "p_oil", Expr: tree.Num(d(pOil)), Low: tree.Num(d("0")), High: tree.Num(d("1"))}},
		Uncertainties: []*tree.Uncertainty{{Name: "oil", States: []*tree.State{
			{Label: "Oil", Prob: &tree.Name{Name: "p_oil"}}, {Label: "Dry"}}}},
		Tests: []*tree.Test{{Name: "seismic", Label: "Seismic survey", On: "oil", Cost: tree.Num(d("30")), Readings: []*tree.Reading{
			{Label: "Favourable", Given: []*tree.Likelihood{{State: "Oil", Prob: tree.Num(d("0.6"))}, {State: "Dry", Prob: tree.Num(d("0.2"))}}},
			{Label: "Unfavourable", Rest: true}}}},
	}
	if !survey {
		m.Tests = nil
		m.Root = choice()
		return m
	}
	m.Root = tree.Decision("Survey first?",
		tree.Choice("No survey", tree.NoCash, choice()),
		tree.Choice("Seismic survey", tree.NoCash, tree.RunTest("seismic",
			tree.Given("Favourable", tree.NoCash, choice()),
			tree.Given("Unfavourable", tree.NoCash, choice()))),
	)
	return m
}

func TestOilDrillingEVPI(t *testing.T) {
	sol := mustSolve(t, oilModel("0.25", false))
	// Hillier & Lieberman, oil-drilling prototype: EMV(drill) = 100 is
	// optimal; with perfect information 0.25·700 + 0.75·90 = 242.5, so
	// EVPI = 142.5.
	wantDec(t, "EMV", sol.Value(), "100")
	pi, err := EVPI(context.Background(), sol, "oil")
	if err != nil {
		t.Fatal(err)
	}
	wantDec(t, "EV with perfect information", pi.With, "242.5")
	wantDec(t, "EVPI(oil)", pi.EVPI, "142.5") // Hillier & Lieberman: EVPI = 142.5
	total, err := TotalEVPI(context.Background(), sol, VOIOptions{})
	if err != nil {
		t.Fatal(err)
	}
	wantDec(t, "total EVPI", total.EVPI, "142.5")
	if total.Scope != ScopeAll || !total.Exact {
		t.Errorf("total scope %v exact %v", total.Scope, total.Exact)
	}
}

func TestOilDrillingSurvey(t *testing.T) {
	sol := mustSolve(t, oilModel("0.25", true))
	tv, err := EVSI(context.Background(), sol, "seismic")
	if err != nil {
		t.Fatal(err)
	}
	tb := tv.Table
	// Hillier & Lieberman, oil-drilling prototype with the seismic survey:
	// P(favourable) = 0.3, P(oil | favourable) = 0.5, P(oil | unfavourable)
	// = 1/7.
	wantDec(t, "P(favourable)", tb.Marginal[0], "0.3")
	wantDec(t, "P(unfavourable)", tb.Marginal[1], "0.7")
	wantDec(t, "P(oil | favourable)", tb.Posterior[0][0], "0.5")
	near(t, "P(oil | unfavourable)", tb.Posterior[0][1], big.NewRat(1, 7))
	wantDec(t, "P(oil, favourable)", tb.Joint[0][0], "0.15")
	if tb.Exact {
		t.Error("a posterior of 1/7 is reported exact")
	}
	if len(tv.Sites) != 1 || len(tv.Warnings) != 0 {
		t.Fatalf("sites %d, warnings %v", len(tv.Sites), tv.Warnings)
	}
	s := tv.Sites[0]
	// Hillier & Lieberman: expected value with the survey 123 after its
	// cost; the expected value of experimentation (EVSI) 53.
	near(t, "EV with the survey, after its cost", s.WithAfterCost, big.NewRat(123, 1))
	near(t, "EV with the survey, before its cost", s.WithBeforeCost, big.NewRat(153, 1))
	wantDec(t, "EV without", s.Without, "100")
	near(t, "EVSI", s.EVSI, big.NewRat(53, 1))
	near(t, "net gain", s.NetGain, big.NewRat(23, 1))
	near(t, "most to pay", s.MostToPay, big.NewRat(53, 1))
	wantDec(t, "EVPI at the decision", s.EVPI, "142.5")
	// Efficiency = 53 / 142.5 = 106/285 (derived from the figures above).
	near(t, "efficiency", s.Efficiency, big.NewRat(106, 285))
	if s.Advice != RunTest || !s.OnPolicy {
		t.Errorf("advice %v, on policy %v", s.Advice, s.OnPolicy)
	}
	// Over the tree's value, which now counts the survey (123), perfect
	// information is worth 242.5 − 123 = 119.5 (derived from the figures
	// above): what it adds to the best plan on offer.
	pi, err := EVPI(context.Background(), sol, "oil")
	if err != nil {
		t.Fatal(err)
	}
	near(t, "EVPI(oil) with the survey in the tree", pi.EVPI, big.NewRat(1195, 10))
}

func TestCondominiumEVPI(t *testing.T) {
	// Anderson, Sweeney & Williams, An Introduction to Management Science,
	// decision-analysis chapter (figures recalled from memory, $ millions):
	// small 8/7, medium 14/5, large 20/−9, P(strong) = 0.8. EV 14.2 (large),
	// EVPI 3.2.
	demand := func(strong, weak string) *tree.Node {
		return tree.ChanceOn("demand", tree.Given("Strong", tree.Gain(tree.Num(d(strong))), nil), tree.Given("Weak", tree.Gain(tree.Num(d(weak))), nil))
	}
	m := &tree.Model{
		Uncertainties: []*tree.Uncertainty{{Name: "demand", States: []*tree.State{{Label: "Strong", Prob: tree.Num(d("0.8"))}, {Label: "Weak"}}}},
		Root: tree.Decision("Complex size",
			tree.Choice("Small", tree.NoCash, demand("8", "7")),
			tree.Choice("Medium", tree.NoCash, demand("14", "5")),
			tree.Choice("Large", tree.NoCash, demand("20", "-9"))),
	}
	sol := mustSolve(t, m)
	wantDec(t, "EV", sol.Value(), "14.2") // recalled from memory
	if sol.Root.Chosen() != 2 {
		t.Errorf("chosen %d, want Large", sol.Root.Chosen())
	}
	pi, err := EVPI(context.Background(), sol, "demand")
	if err != nil {
		t.Fatal(err)
	}
	wantDec(t, "EVPI", pi.EVPI, "3.2") // recalled from memory
	// The same tree with plain chance nodes: each is its own event, so the
	// total EVPI resolves all three jointly and is larger than 3.2:
	// E[max(S, M, L)] over independent demands (computed by hand:
	// 0.8·0.8·0.8·20 ... see below).
	plain := func(strong, weak string) *tree.Node {
		return tree.Chance("Demand", tree.Outcome("Strong", tree.Num(d("0.8")), tree.Gain(tree.Num(d(strong))), nil), tree.Outcome("Weak", tree.Num(d("0.2")), tree.Gain(tree.Num(d(weak))), nil))
	}
	m2 := &tree.Model{Root: tree.Decision("Complex size",
		tree.Choice("Small", tree.NoCash, plain("8", "7")),
		tree.Choice("Medium", tree.NoCash, plain("14", "5")),
		tree.Choice("Large", tree.NoCash, plain("20", "-9")))}
	sol2 := mustSolve(t, m2)
	total, err := TotalEVPI(context.Background(), sol2, VOIOptions{})
	if err != nil {
		t.Fatal(err)
	}
	// By hand: large strong (0.8) → 20; else (0.2) medium strong (0.8) →
	// 14; else small → 8 if strong (0.8), 7 if weak:
	// 0.8·20 + 0.2·0.8·14 + 0.2·0.2·(0.8·8 + 0.2·7) = 16 + 2.24 + 0.312.
	wantDec(t, "EV with everything known", total.With, "18.552")
	wantDec(t, "total EVPI (plain nodes)", total.EVPI, "4.352")
	if total.PlainNodes != 3 || total.Scope != ScopeAll {
		t.Errorf("plain nodes %d scope %v", total.PlainNodes, total.Scope)
	}
	// Over a tiny budget the total falls back to the named uncertainties
	// (none here: EVPI 0) and says so.
	small, err := TotalEVPI(context.Background(), sol2, VOIOptions{MaxWork: 5})
	if err != nil {
		t.Fatal(err)
	}
	if small.Scope != ScopeNamed || small.Note == "" || !small.EVPI.IsZero() {
		t.Errorf("fallback: scope %v note %q EVPI %s", small.Scope, small.Note, small.EVPI)
	}
}

// TestEVPIMin checks the objective's terms under min: the saving.
func TestEVPIMin(t *testing.T) {
	// Invented: ship (cost 400 if defective, p = 0.2) or rework (45).
	m := &tree.Model{Objective: tree.Min,
		Uncertainties: []*tree.Uncertainty{{Name: "defect", States: []*tree.State{{Label: "Defective", Prob: tree.Num(d("0.2"))}, {Label: "Sound"}}}},
		Root: tree.Decision("Release",
			tree.Choice("Ship", tree.Cost(tree.Num(decimal.Zero)), tree.ChanceOn("defect", tree.Given("Defective", tree.Cost(tree.Num(d("400"))), nil), tree.Given("Sound", tree.Cost(tree.Num(decimal.Zero)), nil))),
			tree.Choice("Rework", tree.Cost(tree.Num(d("45"))), nil))}
	sol := mustSolve(t, m)
	pi, err := EVPI(context.Background(), sol, "defect")
	if err != nil {
		t.Fatal(err)
	}
	// By hand: without 45 (rework); with: 0.2·45 + 0.8·0 = 9; saving 36.
	wantDec(t, "with", pi.With, "9")
	wantDec(t, "EVPI", pi.EVPI, "36")
}

// TestUncertaintyTwice: one uncertainty sampled before and after a decision
// is one event, resolved once for all.
func TestUncertaintyTwice(t *testing.T) {
	// Invented: a chance node on u at the root, then a decision whose
	// outcome depends on u again. Knowing u at the root already informs the
	// decision, so its EVPI is 0; a second uncertainty v only seen after
	// the decision has a positive EVPI.
	m := &tree.Model{
		Uncertainties: []*tree.Uncertainty{
			{Name: "u", States: []*tree.State{{Label: "Hi", Prob: tree.Num(d("0.5"))}, {Label: "Lo"}}},
		},
		Root: tree.ChanceOn("u",
			tree.Given("Hi", tree.NoCash, tree.Decision("Act",
				tree.Choice("Go", tree.NoCash, tree.ChanceOn("u", tree.Given("Hi", tree.Gain(tree.Num(d("10"))), nil), tree.Given("Lo", tree.Gain(tree.Num(d("-10"))), nil))),
				tree.Choice("Stop", tree.NoCash, nil))),
			tree.Given("Lo", tree.NoCash, tree.Decision("Act",
				tree.Choice("Go", tree.NoCash, tree.ChanceOn("u", tree.Given("Hi", tree.Gain(tree.Num(d("10"))), nil), tree.Given("Lo", tree.Gain(tree.Num(d("-10"))), nil))),
				tree.Choice("Stop", tree.NoCash, nil))),
		),
	}
	sol := mustSolve(t, m)
	// By hand: after "Hi" the second node is Hi for certain: Go is worth
	// 10; after "Lo", Stop (0). Value 5.
	wantDec(t, "value", sol.Value(), "5")
	pi, err := EVPI(context.Background(), sol, "u")
	if err != nil {
		t.Fatal(err)
	}
	wantDec(t, "EVPI(u)", pi.EVPI, "0")
}

func TestTestWarnings(t *testing.T) {
	m := oilModel("0.25", false)
	m.Tests = oilModel("0.25", true).Tests
	// A second test with a reading that never happens.
	m.Tests = append(m.Tests, &tree.Test{Name: "useless", On: "oil", Readings: []*tree.Reading{
		{Label: "Always", Rest: true}, {Label: "Never", Given: []*tree.Likelihood{{State: "Oil", Prob: tree.Num(decimal.Zero)}}}}})
	// Run it where there is no alternative: the root is the test.
	m.Root = tree.RunTest("useless", tree.Given("Always", tree.NoCash, m.Root), tree.Given("Never", tree.NoCash, nil))
	sol := mustSolve(t, m)
	info, err := ValueOfInformation(context.Background(), sol, VOIOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if len(info.Tests) != 2 {
		t.Fatalf("%d tests", len(info.Tests))
	}
	if w := info.Tests[0].Warnings; len(w) != 1 || len(info.Tests[0].Sites) != 0 {
		t.Errorf("seismic (never run): warnings %q", w)
	}
	if w := info.Tests[1].Warnings; len(w) != 2 || len(info.Tests[1].Sites) != 0 {
		t.Errorf("useless: warnings %q", w)
	}
	wantDec(t, "EVPI(oil) under a test at the root", info.Uncertainties[0].EVPI, "142.5")
}

// TestEVSINegative: a testing branch that leads to worse choices than the
// alternative is worth nothing, however informative.
func TestEVSINegative(t *testing.T) {
	m := oilModel("0.25", true)
	// After the survey only "Sell for 10" is on offer (invented).
	sell := func() *tree.Node {
		return tree.Decision("After", tree.Choice("Sell for 10", tree.Gain(tree.Num(d("10"))), nil))
	}
	m.Root.Branches[1].Node = tree.RunTest("seismic", tree.Given("Favourable", tree.NoCash, sell()), tree.Given("Unfavourable", tree.NoCash, sell()))
	sol := mustSolve(t, m)
	tv, err := EVSI(context.Background(), sol, "seismic")
	if err != nil {
		t.Fatal(err)
	}
	s := tv.Sites[0]
	// By hand: with 10 before cost, without 100: EVSI −90.
	wantDec(t, "EVSI", s.EVSI, "-90")
	wantDec(t, "most to pay", s.MostToPay, "0")
	if s.Note == "" || s.Advice != DoNotTest || s.HasEfficiency {
		t.Errorf("note %q advice %v", s.Note, s.Advice)
	}
}

// --- random trees against an independent math/big.Rat computation ---

// ratModel is a random tree with a named uncertainty U, an independent
// named uncertainty V, plain chance nodes and a test on U, in the usual
// structure: decide at the root to act now or to test first and then act
// with the same options.
type ratModel struct {
	m       *tree.Model
	priorU  []*big.Rat
	priorV  []*big.Rat
	like    [][]*big.Rat // [reading][state of U]
	options []ratOption
	cost    *big.Rat
	obj     tree.Objective
}

// ratOption is one action: its payoff for each state of U and V, and an
// optional plain chance node with its own payoffs added.
type ratOption struct {
	pay    [][]*big.Rat // [u][v]
	plainP []*big.Rat
	plainC []*big.Rat
}

func randRat(r *rand.Rand, lo, hi int) *big.Rat { return big.NewRat(int64(lo+r.Intn(hi-lo+1)), 1) }

// randProbs returns n probabilities in hundredths summing to 1, some zero.
func randProbs(r *rand.Rand, n int) []*big.Rat {
	left := 100
	out := make([]*big.Rat, n)
	for i := 0; i < n-1; i++ {
		k := 0
		if r.Intn(5) > 0 {
			k = r.Intn(left + 1)
		}
		out[i] = big.NewRat(int64(k), 100)
		left -= k
	}
	out[n-1] = big.NewRat(int64(left), 100)
	return out
}

func ratDec(x *big.Rat) decimal.Decimal { return decimal.NewFromBigRat(x, 10) }

func newRatModel(r *rand.Rand) *ratModel {
	rm := &ratModel{obj: tree.Objective(r.Intn(2))}
	nu, nv, nr := 2+r.Intn(2), 1+r.Intn(2), 2+r.Intn(2)
	rm.priorU, rm.priorV = randProbs(r, nu), randProbs(r, nv)
	// Likelihoods: for each state a distribution over readings.
	rm.like = make([][]*big.Rat, nr)
	for k := range rm.like {
		rm.like[k] = make([]*big.Rat, nu)
	}
	for s := 0; s < nu; s++ {
		ps := randProbs(r, nr)
		for k := range ps {
			rm.like[k][s] = ps[k]
		}
	}
	rm.cost = randRat(r, 0, 20)
	for o := 0; o < 2+r.Intn(3); o++ {
		op := ratOption{pay: make([][]*big.Rat, nu)}
		for s := range op.pay {
			op.pay[s] = make([]*big.Rat, nv)
			for v := range op.pay[s] {
				op.pay[s][v] = randRat(r, -100, 100)
			}
		}
		if r.Intn(2) == 0 {
			op.plainP = randProbs(r, 2)
			op.plainC = []*big.Rat{randRat(r, -30, 30), randRat(r, -30, 30)}
		}
		rm.options = append(rm.options, op)
	}
	rm.build()
	return rm
}

func (rm *ratModel) build() {
	// Under min the figures are costs.
	money := tree.Gain
	if rm.obj == tree.Min {
		money = tree.Cost
	}
	m := &tree.Model{Objective: rm.obj}
	u := &tree.Uncertainty{Name: "u"}
	for s, p := range rm.priorU {
		u.States = append(u.States, &tree.State{Label: fmt.Sprintf("U%d", s), Prob: tree.Num(ratDec(p))})
	}
	v := &tree.Uncertainty{Name: "v"}
	for s, p := range rm.priorV {
		v.States = append(v.States, &tree.State{Label: fmt.Sprintf("V%d", s), Prob: tree.Num(ratDec(p))})
	}
	if len(v.States) == 1 {
		v.States = append(v.States, &tree.State{Label: "V1", Prob: tree.Num(decimal.Zero)})
		rm.priorV = append(rm.priorV, new(big.Rat))
		for i := range rm.options {
			for s := range rm.options[i].pay {
				rm.options[i].pay[s] = append(rm.options[i].pay[s], big.NewRat(7, 1))
			}
		}
	}
	m.Uncertainties = []*tree.Uncertainty{u, v}
	t := &tree.Test{Name: "t", On: "u", Cost: tree.Num(ratDec(rm.cost))}
	for k, row := range rm.like {
		rd := &tree.Reading{Label: fmt.Sprintf("R%d", k)}
		for s, l := range row {
			rd.Given = append(rd.Given, &tree.Likelihood{State: u.States[s].Label, Prob: tree.Num(ratDec(l))})
		}
		t.Readings = append(t.Readings, rd)
	}
	m.Tests = []*tree.Test{t}
	act := func() *tree.Node {
		d := tree.Decision("Act")
		for i, op := range rm.options {
			var vs []*tree.Branch
			for vi := range rm.priorV {
				var us []*tree.Branch
				for s := range rm.priorU {
					var next *tree.Node
					if op.plainP != nil {
						next = tree.Chance("plain",
							tree.Outcome("a", tree.Num(ratDec(op.plainP[0])), money(tree.Num(ratDec(op.plainC[0]))), nil),
							tree.Outcome("b", tree.Num(ratDec(op.plainP[1])), money(tree.Num(ratDec(op.plainC[1]))), nil))
					}
					us = append(us, tree.Given(u.States[s].Label, money(tree.Num(ratDec(op.pay[s][vi]))), next))
				}
				vs = append(vs, tree.Given(v.States[vi].Label, money(tree.Num(decimal.Zero)), tree.ChanceOn("u", us...)))
			}
			d.Branches = append(d.Branches, tree.Choice(fmt.Sprintf("O%d", i), money(tree.Num(decimal.Zero)), tree.ChanceOn("v", vs...)))
		}
		return d
	}
	var reads []*tree.Branch
	for k := range rm.like {
		reads = append(reads, tree.Given(fmt.Sprintf("R%d", k), money(tree.Num(decimal.Zero)), act()))
	}
	m.Root = tree.Decision("Test?",
		tree.Choice("Act now", money(tree.Num(decimal.Zero)), act()),
		tree.Choice("Test first", money(tree.Num(decimal.Zero)), tree.RunTest("t", reads...)))
	rm.m = m
}

// ---- the independent computation ----

func ratBetter(obj tree.Objective, a, b *big.Rat) bool {
	if obj == tree.Min {
		return a.Cmp(b) < 0
	}
	return a.Cmp(b) > 0
}

func ratBest(obj tree.Objective, xs []*big.Rat) *big.Rat {
	b := xs[0]
	for _, x := range xs[1:] {
		if ratBetter(obj, x, b) {
			b = x
		}
	}
	return b
}

func ratMean(ps, xs []*big.Rat) *big.Rat {
	m := new(big.Rat)
	for i := range ps {
		m.Add(m, new(big.Rat).Mul(ps[i], xs[i]))
	}
	return m
}

// plainMean is the option's plain node's expected cash (0 when none).
func (op ratOption) plainMean() *big.Rat {
	if op.plainP == nil {
		return new(big.Rat)
	}
	return ratMean(op.plainP, op.plainC)
}

// optionValue is the value of an option given a belief over U (V at its
// prior).
func (rm *ratModel) optionValue(op ratOption, belief []*big.Rat) *big.Rat {
	total := new(big.Rat)
	for s, bs := range belief {
		inner := new(big.Rat)
		for v, pv := range rm.priorV {
			inner.Add(inner, new(big.Rat).Mul(pv, op.pay[s][v]))
		}
		total.Add(total, new(big.Rat).Mul(bs, inner))
	}
	return total.Add(total, op.plainMean())
}

func (rm *ratModel) actValue(belief []*big.Rat) *big.Rat {
	var vs []*big.Rat
	for _, op := range rm.options {
		vs = append(vs, rm.optionValue(op, belief))
	}
	return ratBest(rm.obj, vs)
}

// reading returns P(reading k) and the posterior over U after it.
func (rm *ratModel) reading(k int) (*big.Rat, []*big.Rat) {
	marg := new(big.Rat)
	joint := make([]*big.Rat, len(rm.priorU))
	for s, p := range rm.priorU {
		joint[s] = new(big.Rat).Mul(p, rm.like[k][s])
		marg.Add(marg, joint[s])
	}
	if marg.Sign() == 0 {
		return marg, rm.priorU
	}
	post := make([]*big.Rat, len(joint))
	for s := range joint {
		post[s] = new(big.Rat).Quo(joint[s], marg)
	}
	return marg, post
}

// withTestBeforeCost is Σ_k P(k) · best option value given posterior k.
func (rm *ratModel) withTestBeforeCost() *big.Rat {
	v := new(big.Rat)
	for k := range rm.like {
		p, post := rm.reading(k)
		if p.Sign() == 0 {
			continue
		}
		v.Add(v, new(big.Rat).Mul(p, rm.actValue(post)))
	}
	return v
}

func (rm *ratModel) sign() *big.Rat {
	if rm.obj == tree.Min {
		return big.NewRat(-1, 1)
	}
	return big.NewRat(1, 1)
}

// evpiU: U known at the root: Σ_s P(s) max(now given s, test given s).
// With U known the test only costs; the best is to act knowing s.
func (rm *ratModel) evpiU() *big.Rat {
	with := new(big.Rat)
	for s, p := range rm.priorU {
		belief := make([]*big.Rat, len(rm.priorU))
		for i := range belief {
			belief[i] = new(big.Rat)
		}
		belief[s] = big.NewRat(1, 1)
		now := rm.actValue(belief)
		// Testing with U known: pay the cost, then act knowing s.
		test := new(big.Rat).Sub(now, new(big.Rat).Mul(rm.sign(), rm.cost))
		with.Add(with, new(big.Rat).Mul(p, ratBest(rm.obj, []*big.Rat{now, test})))
	}
	return new(big.Rat).Mul(rm.sign(), new(big.Rat).Sub(with, rm.rootValue()))
}

// evpiAgainstNow is EVPI(U) against acting now without the test: the
// baseline of EVSI.
func (rm *ratModel) evpiAgainstNow() *big.Rat {
	e := rm.evpiU()
	e.Add(e, new(big.Rat).Mul(rm.sign(), new(big.Rat).Sub(rm.rootValue(), rm.actValue(rm.priorU))))
	return e
}

func (rm *ratModel) rootValue() *big.Rat {
	now := rm.actValue(rm.priorU)
	test := new(big.Rat).Sub(rm.withTestBeforeCost(), new(big.Rat).Mul(rm.sign(), rm.cost))
	return ratBest(rm.obj, []*big.Rat{now, test})
}

// evpiTotal: U, V and every plain node known at the root. The plain nodes
// of the options under "Act now" are the relevant ones (the test branch's
// copies are other events, but with everything known the test only costs,
// so they add an independent chance at a better draw only through the
// test branch — which we compute too).
func (rm *ratModel) evpiTotal() *big.Rat {
	with := new(big.Rat)
	for s, ps := range rm.priorU {
		for v, pv := range rm.priorV {
			w := new(big.Rat).Mul(ps, pv)
			if w.Sign() == 0 {
				continue
			}
			// Value of "act now" knowing s, v and its own plain nodes:
			// E over the plain outcomes of max over options.
			now := rm.maxOverPlain(s, v)
			// Testing: the reading is not known in advance; each reading's
			// copy of the options has its own plain nodes (known), so its
			// value is the same distribution; the test's value is
			// Σ_k L(k|s)·X_k − cost: its mean is E[X] − cost, but it is
			// compared with "now" draw by draw. Enumerate exactly.
			test := rm.testOverPlain(s, v)
			with.Add(with, new(big.Rat).Mul(w, rm.expectMax(now, test)))
		}
	}
	return new(big.Rat).Mul(rm.sign(), new(big.Rat).Sub(with, rm.rootValue()))
}

// ratDist is a discrete distribution as (value, probability) pairs.
type ratDist struct{ x, p []*big.Rat }

// maxOverPlain is the distribution of the best option value when s, v and
// each option's plain outcome are known.
func (rm *ratModel) maxOverPlain(s, v int) ratDist {
	// Enumerate the joint plain outcomes (each option independent).
	d := ratDist{x: []*big.Rat{nil}, p: []*big.Rat{big.NewRat(1, 1)}}
	for _, op := range rm.options {
		var nx, np []*big.Rat
		outs := []struct{ c, p *big.Rat }{{new(big.Rat), big.NewRat(1, 1)}}
		if op.plainP != nil {
			outs = []struct{ c, p *big.Rat }{{op.plainC[0], op.plainP[0]}, {op.plainC[1], op.plainP[1]}}
		}
		for i := range d.x {
			for _, o := range outs {
				val := new(big.Rat).Add(op.pay[s][v], o.c)
				best := val
				if d.x[i] != nil && !ratBetter(rm.obj, val, d.x[i]) {
					best = d.x[i]
				}
				nx, np = append(nx, best), append(np, new(big.Rat).Mul(d.p[i], o.p))
			}
		}
		d = ratDist{nx, np}
	}
	return d
}

// testOverPlain is the distribution of the testing branch's value before
// knowing the reading: Σ_k L(k|s)·X_k − cost with X_k independent copies.
func (rm *ratModel) testOverPlain(s, v int) ratDist {
	acc := ratDist{x: []*big.Rat{new(big.Rat).Neg(new(big.Rat).Mul(rm.sign(), rm.cost))}, p: []*big.Rat{big.NewRat(1, 1)}}
	for k := range rm.like {
		l := rm.like[k][s]
		if l.Sign() == 0 {
			continue
		}
		x := rm.maxOverPlain(s, v)
		var nx, np []*big.Rat
		for i := range acc.x {
			for j := range x.x {
				nx = append(nx, new(big.Rat).Add(acc.x[i], new(big.Rat).Mul(l, x.x[j])))
				np = append(np, new(big.Rat).Mul(acc.p[i], x.p[j]))
			}
		}
		acc = ratDist{nx, np}
	}
	return acc
}

// expectMax is E[best(A, B)] for independent A and B.
func (rm *ratModel) expectMax(a, b ratDist) *big.Rat {
	e := new(big.Rat)
	for i := range a.x {
		for j := range b.x {
			best := a.x[i]
			if ratBetter(rm.obj, b.x[j], best) {
				best = b.x[j]
			}
			e.Add(e, new(big.Rat).Mul(new(big.Rat).Mul(a.p[i], b.p[j]), best))
		}
	}
	return e
}

// TestRandomVOI checks posteriors, EVPI (per uncertainty and total) and
// EVSI on random trees against the independent math/big.Rat computation
// above, and that 0 ≤ EVSI ≤ EVPI(U).
func TestRandomVOI(t *testing.T) {
	n := 600
	if testing.Short() {
		n = 100
	}
	r := rand.New(rand.NewSource(20240611))
	for it := 0; it < n; it++ {
		rm := newRatModel(r)
		sol := mustSolve(t, rm.m)
		ctx := fmt.Sprintf("tree %d (%v)", it, rm.obj)
		near(t, ctx+" root value", sol.Value(), rm.rootValue())
		info, err := ValueOfInformation(context.Background(), sol, VOIOptions{})
		if err != nil {
			t.Fatalf("%s: %v", ctx, err)
		}
		pu := info.Uncertainties[0]
		near(t, ctx+" EVPI(u)", pu.EVPI, rm.evpiU())
		if info.Total == nil || info.Total.Scope != ScopeAll {
			t.Fatalf("%s: total %+v %s", ctx, info.Total, info.TotalNote)
		}
		near(t, ctx+" total EVPI", info.Total.EVPI, rm.evpiTotal())
		tv := info.Tests[0]
		for k := range rm.like {
			p, post := rm.reading(k)
			near(t, ctx+" marginal", tv.Table.Marginal[k], p)
			if !tv.Table.Marginal[k].Equal(ratDec(p)) && p.Cmp(tv.Table.Marginal[k].Rat()) != 0 {
				t.Errorf("%s: marginal %s is not exact (want %s)", ctx, tv.Table.Marginal[k], p.RatString())
			}
			if p.Sign() != 0 {
				for s := range post {
					near(t, ctx+" posterior", tv.Table.Posterior[s][k], post[s])
				}
			}
		}
		if len(tv.Sites) != 1 {
			t.Fatalf("%s: %d sites", ctx, len(tv.Sites))
		}
		s := tv.Sites[0]
		evsi := new(big.Rat).Mul(rm.sign(), new(big.Rat).Sub(rm.withTestBeforeCost(), rm.actValue(rm.priorU)))
		near(t, ctx+" EVSI", s.EVSI, evsi)
		near(t, ctx+" EVPI at the site", s.EVPI, rm.evpiAgainstNow())
		tol := d("1e-45")
		if s.EVSI.LessThan(tol.Neg()) || pu.EVPI.IsNegative() || s.EVSI.GreaterThan(s.EVPI.Add(tol)) {
			t.Errorf("%s: want 0 ≤ EVSI %s ≤ EVPI %s", ctx, s.EVSI, s.EVPI)
		}
		if info.Total.EVPI.LessThan(pu.EVPI.Sub(tol)) {
			t.Errorf("%s: total EVPI %s < EVPI(u) %s", ctx, info.Total.EVPI, pu.EVPI)
		}
	}
}

// TestSecondSurvey: a test that can be run again after its first reading;
// the second run's EVSI and EVPI are taken at the posterior after the first
// reading. The figures are derived by hand from the Hillier & Lieberman
// oil-drilling data (P(oil) = 0.25, P(favourable | oil) = 0.6,
// P(favourable | dry) = 0.2), not printed in the book.
func TestSecondSurvey(t *testing.T) {
	m := oilModel("0.25", true)
	choice := func() *tree.Node { return oilModel("0.25", false).Root }
	again := func() *tree.Node {
		d := choice()
		d.Label = "After the first survey"
		d.Branches = append(d.Branches, tree.Choice("Survey again", tree.NoCash, tree.RunTest("seismic",
			tree.Given("Favourable", tree.NoCash, choice()),
			tree.Given("Unfavourable", tree.NoCash, choice()))))
		return d
	}
	m.Root.Branches[1].Node = tree.RunTest("seismic",
		tree.Given("Favourable", tree.NoCash, again()),
		tree.Given("Unfavourable", tree.NoCash, again()))
	sol := mustSolve(t, m)
	tv, err := EVSI(context.Background(), sol, "seismic")
	if err != nil {
		t.Fatal(err)
	}
	if len(tv.Sites) != 3 {
		t.Fatalf("%d sites", len(tv.Sites))
	}
	fav, unf := tv.Sites[1], tv.Sites[2]
	// After a favourable reading P(oil) = 1/2: drilling is worth 300 either
	// way, so a second survey is worth nothing; perfect information is
	// worth ½·700 + ½·90 − 300 = 95.
	near(t, "EVSI after favourable", fav.EVSI, big.NewRat(0, 1))
	near(t, "EVPI after favourable", fav.EVPI, big.NewRat(95, 1))
	// After an unfavourable reading P(oil) = 1/7: selling (90) is best;
	// a second survey is worth (1.8/7)·(500/3) + (5.2/7)·90 − 90 = 138/7
	// and perfect information (1/7)·700 + (6/7)·90 − 90 = 610/7.
	near(t, "EVSI after unfavourable", unf.EVSI, big.NewRat(138, 7))
	near(t, "EVPI after unfavourable", unf.EVPI, big.NewRat(610, 7))
	near(t, "efficiency after unfavourable", unf.Efficiency, big.NewRat(138, 610))
	if unf.Advice != DoNotTest || fav.Advice != DoNotTest {
		t.Errorf("advice %v %v", fav.Advice, unf.Advice)
	}
	// At the root the option to survey again is never taken (its cost 30
	// exceeds 138/7), so the first survey is still worth 53 (Hillier &
	// Lieberman).
	near(t, "EVSI at the root", tv.Sites[0].EVSI, big.NewRat(53, 1))
}
