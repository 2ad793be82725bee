package eval

import (
	"context"
	"errors"
	"fmt"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// Table is Bayes' rule for one test at the prior: for each state of the
// tested uncertainty its prior and, for each reading, the likelihood
// P(reading | state), the joint P(state, reading) and the posterior
// P(state | reading); for each reading its marginal P(reading). Indices are
// [state][reading], in declaration order.
type Table struct {
	Test        *tree.Test
	Uncertainty *tree.Uncertainty
	Prior       []decimal.Decimal
	Likelihood  [][]decimal.Decimal
	Joint       [][]decimal.Decimal
	Marginal    []decimal.Decimal
	// Posterior is zero in the column of a reading of probability 0.
	Posterior [][]decimal.Decimal
	// Exact is false when a posterior was rounded (to
	// compiled.DivisionScale places); priors, likelihoods, joints and
	// marginals are products and sums of the model's figures and exact.
	Exact bool
}

// BayesTable returns the table of the named test at the prior.
func BayesTable(c *compiled.Model, test string) (*Table, error) {
	t := c.Test(test)
	if t < 0 {
		return nil, fmt.Errorf("eval: no test %q in the model", test)
	}
	ui := c.TestOn(t)
	u := c.Uncertainties()[ui]
	tst := c.Tests()[t]
	ns, nr := len(u.States), len(tst.Readings)
	tb := &Table{Test: tst, Uncertainty: u, Prior: make([]decimal.Decimal, ns), Marginal: make([]decimal.Decimal, nr),
		Likelihood: make([][]decimal.Decimal, ns), Joint: make([][]decimal.Decimal, ns), Posterior: make([][]decimal.Decimal, ns), Exact: true}
	for r := range tb.Marginal {
		tb.Marginal[r] = decimal.Zero
	}
	for s := range u.States {
		tb.Prior[s] = c.Prior(ui, s)
		tb.Likelihood[s] = make([]decimal.Decimal, nr)
		tb.Joint[s] = make([]decimal.Decimal, nr)
		tb.Posterior[s] = make([]decimal.Decimal, nr)
		for r := range tst.Readings {
			tb.Likelihood[s][r] = c.Likelihood(t, r, s)
			tb.Joint[s][r] = tb.Prior[s].Mul(tb.Likelihood[s][r])
			tb.Marginal[r] = tb.Marginal[r].Add(tb.Joint[s][r])
		}
	}
	for r := range tst.Readings {
		for s := range u.States {
			tb.Posterior[s][r] = decimal.Zero
			if tb.Marginal[r].IsZero() {
				continue
			}
			q, exact := divide(tb.Joint[s][r], tb.Marginal[r])
			tb.Posterior[s][r] = q
			tb.Exact = tb.Exact && exact
		}
	}
	return tb, nil
}

// divide is x / y carried to compiled.DivisionScale places, and whether
// that is exact.
func divide(x, y decimal.Decimal) (decimal.Decimal, bool) {
	q := x.DivRound(y, compiled.DivisionScale)
	return q, q.Mul(y).Equal(x)
}

// Advice is what a test site's figures recommend.
type Advice uint8

const (
	// DoNotTest: deciding without the test is expected to be better.
	DoNotTest Advice = iota
	// RunTest: the test is expected to pay for itself.
	RunTest
	// Indifferent: the test is expected to pay exactly its cost.
	Indifferent
)

// String is the advice as it is written in JSON: "test", "do not test" or
// "indifferent".
func (a Advice) String() string {
	switch a {
	case RunTest:
		return "test"
	case Indifferent:
		return "indifferent"
	}
	return "do not test"
}

// TestSite is one place where a decision can run a test: a branch of a
// decision whose subtree starts with the test node. Values (With…,
// Without) are in the objective's terms; EVSI, NetGain, MostToPay and EVPI
// are amounts of money, a gain under max and a saving under min.
type TestSite struct {
	// Decision is the decision, Branch its branch that runs the test, Node
	// the test node under it and Alternative the best of the decision's
	// other branches.
	Decision    *Solved
	Branch      int
	Node        *Solved
	Alternative int
	// WithInfo is the value with the test's information, before any cost
	// of getting it: the test node's value as if the test were free, not
	// counting other money on the testing branch.
	WithInfo decimal.Decimal
	// OtherCash is the other money on the testing branch (a delay, a
	// set-up cost), in the objective's terms.
	OtherCash decimal.Decimal
	// WithBeforeCost is the value of the testing branch as if the test
	// itself were free (WithInfo plus OtherCash); WithAfterCost includes
	// the test's cost. Without is the value of the alternative.
	WithBeforeCost, WithAfterCost, Without decimal.Decimal
	// EVSI is the expected value of sample information: how much better
	// WithInfo is than Without — what the information alone is worth. It
	// can be negative only when the testing branch leads to a different
	// decision than the alternative.
	EVSI decimal.Decimal
	// TestCost is the test's cost.
	TestCost decimal.Decimal
	// NetGain is the expected gain of taking the testing branch over the
	// alternative: EVSI minus the test's cost and other costs on the branch.
	NetGain decimal.Decimal
	// MostToPay is the most the test itself is worth paying for, given the
	// other money on its branch: the cost at which testing breaks even, or
	// 0 when even a free test would not pay.
	MostToPay decimal.Decimal
	// EVPI is the value of perfect information about the tested
	// uncertainty at this decision against the same baseline as EVSI: the
	// value of the decision when the uncertainty is known just before it,
	// over Without. (The EVPI of the uncertainty in PerfectInfo is over the
	// tree's value, which already counts the option to test.) Efficiency
	// is EVSI / EVPI when EVPI is positive and EVSI not negative
	// (HasEfficiency).
	EVPI          decimal.Decimal
	Efficiency    decimal.Decimal
	HasEfficiency bool
	// OnPolicy reports whether the optimal policy reaches the decision.
	OnPolicy bool
	// Advice follows from NetGain.
	Advice Advice
	// Note explains a negative EVSI.
	Note string
}

// TestValue is the value of one declared test: its table at the prior and
// its worth at every place the tree can run it.
type TestValue struct {
	Test  *tree.Test
	Table *Table
	// Cost is the test's cost.
	Cost  decimal.Decimal
	Sites []TestSite
	// Warnings say what could not be computed and why (a test never run,
	// run where there is no alternative, a reading that cannot occur, the
	// work budget).
	Warnings []string
	// Skipped is set when the work budget ran out before the test's sites
	// were valued: only its table is given.
	Skipped bool
}

// EVSI values the named test: its table at the prior (BayesTable) and, at
// every decision with a branch whose subtree starts with the test node, the
// expected value of sample information, the expected net gain of testing,
// the most worth paying and the efficiency against the EVPI of the tested
// uncertainty.
func EVSI(ctx context.Context, sol *Solution, test string) (*TestValue, error) {
	v, err := newVOI(ctx, sol, DefaultMaxWork)
	if err != nil {
		return nil, err
	}
	return v.evsi(test)
}

func (v *voi) evsi(name string) (*TestValue, error) {
	c := v.c
	tb, err := BayesTable(c, name)
	if err != nil {
		return nil, err
	}
	ti := c.Test(name)
	ui := c.TestOn(ti)
	t := tb.Test
	obj := c.Objective()
	tv := &TestValue{Test: t, Table: tb, Cost: c.TestCost(ti)}
	for r, p := range tb.Marginal {
		if p.IsZero() {
			tv.Warnings = append(tv.Warnings, fmt.Sprintf("reading %q of test %q has probability 0 at the prior: it can never be seen", t.Readings[r].Label, t.Name))
		}
	}
	// Scenario models (the tested uncertainty known), made once for all
	// the sites.
	var scen []*compiled.Rollback
	var scenModels []*compiled.Model
	runs := 0
	nodes := v.sol.table()
	for x := range nodes {
		node := &nodes[x]
		k := int(node.i)
		if c.RunsTest(k) != ti {
			continue
		}
		runs++
		d := c.Parent(k)
		if d < 0 || c.Kind(d) != tree.KindDecision {
			tv.Warnings = append(tv.Warnings, fmt.Sprintf("test %q is run at %s, which is not directly under a decision branch: with no alternative to compare, its EVSI is not computed there", t.Name, where(node)))
			continue
		}
		ds := v.sol.At(d)
		if len(ds.Node.Branches) < 2 {
			tv.Warnings = append(tv.Warnings, fmt.Sprintf("decision %q has no branch other than the one that runs test %q: with no alternative to compare, its EVSI is not computed there", ds.Node.Display(), t.Name))
			continue
		}
		if scen == nil {
			for s := range c.Uncertainties()[ui].States {
				if err := v.spend(2*c.Work(), "EVSI of "+t.Name); err != nil {
					return nil, err
				}
				cs, err := v.knowing(map[int]int{ui: s})
				if err != nil {
					return nil, err
				}
				scenModels = append(scenModels, cs)
				scen = append(scen, cs.Rollback())
			}
		}
		site, err := v.site(ds, node, ui, scenModels, scen)
		if err != nil {
			return nil, err
		}
		site.TestCost = c.TestCost(ti)
		site.NetGain = gainOf(obj, site.WithAfterCost, site.Without)
		site.MostToPay = gainOf(obj, site.WithBeforeCost, site.Without)
		if !c.Exact() {
			// Rounded figures leave noise far below a cent: a difference
			// that small is no difference, not a reason to test.
			scale := site.Without.Abs()
			site.EVSI, site.NetGain, site.MostToPay, site.EVPI = noise(site.EVSI, scale), noise(site.NetGain, scale), noise(site.MostToPay, scale), noise(site.EVPI, scale)
		}
		if site.MostToPay.IsNegative() {
			site.MostToPay = decimal.Zero
		}
		if site.EVSI.IsNegative() {
			site.Note = fmt.Sprintf("testing is worse than %q even if the test were free: the branch %q does not lead to the same choices as the alternative, so the test is worth nothing here",
				ds.Node.Branches[site.Alternative].Label, ds.Node.Branches[site.Branch].Label)
		}
		switch site.NetGain.Sign() {
		case 1:
			site.Advice = RunTest
		case 0:
			site.Advice = Indifferent
		}
		if site.EVPI.IsPositive() && !site.EVSI.IsNegative() {
			site.Efficiency, _ = divide(site.EVSI, site.EVPI)
			site.HasEfficiency = true
		}
		tv.Sites = append(tv.Sites, *site)
	}
	if runs == 0 {
		tv.Warnings = append(tv.Warnings, fmt.Sprintf("test %q is declared but never run in the tree: only its table is shown", t.Name))
	}
	return tv, nil
}

// gainOf is how much better figure a is than figure b, as an amount (a gain
// under max, a saving under min).
func gainOf(obj tree.Objective, a, b decimal.Decimal) decimal.Decimal {
	return obj.Net(a).Sub(obj.Net(b))
}

// site values one place where decision ds can run the test at node k. The
// differences are taken on the kernel's exact T and divided once by the
// decision's mass, so a test worth nothing comes out exactly 0.
func (v *voi) site(ds, node *Solved, u int, scenModels []*compiled.Model, scen []*compiled.Rollback) (*TestSite, error) {
	c, r := v.c, v.r
	obj := c.Objective()
	d, k := int(ds.i), int(node.i)
	b := c.Via(k)
	site := &TestSite{Decision: ds, Branch: b, Node: node, Alternative: -1, OnPolicy: ds.OnPolicy()}
	from, to := c.Kids(d)
	for j := 0; j < to-from; j++ {
		if j != b && (site.Alternative < 0 || r.Compare(d, j, site.Alternative) > 0) {
			site.Alternative = j
		}
	}
	alt := from + site.Alternative
	mass := c.Mass(d)
	per := func(x decimal.Decimal) decimal.Decimal { q, _ := divide(x, mass); return q }
	tk, talt := r.Weighted(k), r.Weighted(alt)
	cash, tc := c.Cash(k), c.TestCostAt(k)
	after, _ := r.Total(k)
	without, _ := r.Total(alt)
	// T(k) = mass × (cash − test cost + value from k on, the cost not
	// counted there): the information alone is T(k) − mass × (cash − tc).
	info := tk.Sub(mass.Mul(cash.Sub(tc)))
	site.WithInfo = obj.Figure(per(info))
	site.OtherCash = obj.Figure(cash)
	site.WithBeforeCost = obj.Figure(per(info.Add(mass.Mul(cash))))
	site.WithAfterCost = obj.Figure(after)
	site.Without = obj.Figure(without)
	site.EVSI = per(info.Sub(talt))
	// Perfect information about u just before the decision: Σ_s P(s) ×
	// T_s(d) over the decision's mass (P(s) × mass_s(d) / mass(d) is the
	// posterior of s on the way to d).
	// Masses of different models compare in root units (RootWeight):
	// scenario T over base mass, each in its own frames.
	base := c.RootWeight(d)
	with := decimal.Zero
	for s, rs := range scen {
		p := c.Prior(u, s)
		if p.IsZero() || !reached(scenModels[s], d) {
			continue
		}
		t := rs.Weighted(d)
		if w := scenModels[s].RootWeight(d); !w.Equal(base) {
			t, _ = divide(t.Mul(w), base)
		}
		with = with.Add(p.Mul(t))
	}
	evpi, err := nonNegativeIn(c, per(with.Sub(talt)), fmt.Sprintf("%q at %q", c.Uncertainties()[u].Name, ds.Node.Display()), obj)
	if err != nil {
		return nil, err
	}
	site.EVPI = evpi
	return site, nil
}

// reached reports whether node i can be reached in cs: no branch of
// probability 0 lies on the way to it.
func reached(cs *compiled.Model, i int) bool {
	for ; i >= 0; i = cs.Parent(i) {
		if cs.Unreachable(i) {
			return false
		}
	}
	return true
}

// where describes a node by its path, for messages.
func where(s *Solved) string {
	path := s.Path()
	if len(path) == 0 {
		return "the root"
	}
	labels := make([]string, len(path))
	for i, b := range path {
		labels[i] = fmt.Sprintf("%q", b.Label)
	}
	return "the end of " + joinPath(labels)
}

func joinPath(labels []string) string {
	out := ""
	for i, l := range labels {
		if i > 0 {
			out += " → "
		}
		out += l
	}
	return out
}

// Information is the whole value-of-information analysis of a solved tree:
// the total EVPI, the EVPI of each named uncertainty and the value of each
// declared test.
type Information struct {
	Objective tree.Objective
	// Value is the tree's expected value as modelled.
	Value decimal.Decimal
	// Total is the total EVPI; nil when even the named uncertainties alone
	// are over the work budget (TotalNote says so).
	Total     *PerfectInfo
	TotalNote string
	// Uncertainties holds the EVPI of each named uncertainty, in
	// declaration order.
	Uncertainties []*PerfectInfo
	// Tests holds the value of each declared test, in declaration order.
	Tests []*TestValue
}

// ValueOfInformation runs TotalEVPI, EVPI for every named uncertainty and
// EVSI for every declared test, each within the work budget of opts. It
// stops with ctx.
func ValueOfInformation(ctx context.Context, sol *Solution, opts VOIOptions) (*Information, error) {
	_, work := opts.limits()
	v, err := newVOI(ctx, sol, work)
	if err != nil {
		return nil, err
	}
	info := &Information{Objective: v.c.Objective(), Value: sol.Root.Value()}
	total, err := v.total(opts)
	var be *BudgetError
	switch {
	case errors.As(err, &be):
		info.TotalNote = "the total EVPI is not computed: " + be.Error()
	case err != nil:
		return nil, err
	default:
		info.Total = total
	}
	// The uncertainties share one budget, and the tests another: past it,
	// the rest are listed as not computed rather than the whole analysis
	// failing.
	v.work, v.maxWork = 0, work
	for u, un := range v.c.Uncertainties() {
		pi, err := v.evpiOne(u)
		if errors.As(err, &be) {
			pi = &PerfectInfo{Uncertainty: un, Scope: ScopeOne, Skipped: true, Exact: v.c.Exact(),
				Note: "not computed: " + be.Error()}
		} else if err != nil {
			return nil, err
		}
		info.Uncertainties = append(info.Uncertainties, pi)
	}
	v.work, v.maxWork = 0, work
	for _, t := range v.c.Tests() {
		tv, err := v.evsi(t.Name)
		if errors.As(err, &be) {
			tb, _ := BayesTable(v.c, t.Name)
			tv = &TestValue{Test: t, Table: tb, Cost: v.c.TestCost(v.c.Test(t.Name)), Skipped: true,
				Warnings: []string{"the value of the test is not computed: " + be.Error()}}
		} else if err != nil {
			return nil, err
		}
		info.Tests = append(info.Tests, tv)
	}
	return info, nil
}

// noise is x, or 0 when x is smaller than the rounding of a model's figures
// could make it: 10^-20 of scale (or of 1). Each rounding is at
// DivisionScale places, but a deep tree with tests in sequence rounds at
// every frame of its own, and the errors add up along its paths; 10^-20 of
// a value is still far below any amount of money.
func noise(x, scale decimal.Decimal) decimal.Decimal {
	if scale.LessThan(one) {
		scale = one
	}
	if x.Abs().LessThanOrEqual(scale.Shift(-20)) {
		return decimal.Zero
	}
	return x
}
