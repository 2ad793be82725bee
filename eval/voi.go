package eval

import (
	"errors"
	"fmt"
	"math"
	"sort"
	"strings"

	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// Value of information.
//
// The expected value of perfect information (EVPI) about an uncertainty is
// what the tree is worth when the uncertainty is known before the first
// decision, minus what it is worth as modelled. It is found by scenario-wise
// rollback: for each state s (with its prior probability) the tree is rolled
// back with every chance node on the uncertainty taking the branch for s with
// certainty and every test of it giving reading r with probability
// P(r | s); the value with information is the prior-weighted sum of those
// rollbacks. This moves a chance node that occurs after decisions ahead of
// them and resolves an uncertainty that occurs in several places once for
// all. The tree is not copied: one rollback runs over the solved tree with
// the scenario's probabilities, and only over the nodes whose subtree holds a
// node on the uncertainty (the rest keep their solved values).
//
// The total EVPI resolves every named uncertainty jointly and every plain
// chance node (one not on a named uncertainty, each its own independent
// event). The named uncertainties are enumerated state by state; within one
// joint state the plain chance nodes are not enumerated but carried as the
// exact probability distribution of the clairvoyant value of each subtree
// (the maximum of independent values at a decision, a mixture at a chance
// node), so that many plain chance nodes cost no more than a few. When the
// work would pass the budget in VOIOptions, the total is computed over the
// named uncertainties only and says so (Scope).

// DefaultMaxScenarios caps the joint states of the named uncertainties that
// TotalEVPI enumerates.
const DefaultMaxScenarios = 100_000

// DefaultMaxWork caps the work of the total EVPI, counted in node
// evaluations plus points of the value distributions built (each costs
// about a microsecond).
const DefaultMaxWork = 5_000_000

// VOIOptions bound the work of TotalEVPI and ValueOfInformation. Zero
// fields take the defaults.
type VOIOptions struct {
	// MaxScenarios caps the joint states of the named uncertainties
	// (DefaultMaxScenarios).
	MaxScenarios int
	// MaxWork caps the total EVPI's node evaluations plus distribution
	// points (DefaultMaxWork). The EVPI of one uncertainty and the EVSI of
	// a test cost a few rollbacks each and are not capped.
	MaxWork int
}

func (o VOIOptions) limits() (scen, work int) {
	scen, work = o.MaxScenarios, o.MaxWork
	if scen <= 0 {
		scen = DefaultMaxScenarios
	}
	if work <= 0 {
		work = DefaultMaxWork
	}
	return scen, work
}

// Scope says what a total EVPI resolves.
type Scope uint8

const (
	// ScopeAll: every named uncertainty and every plain chance node.
	ScopeAll Scope = iota
	// ScopeNamed: the named uncertainties only; the plain chance nodes stay
	// as they are (the joint computation was over the work budget).
	ScopeNamed
	// ScopeOne: one named uncertainty (EVPI of that uncertainty).
	ScopeOne
)

// String names the scope: "all", "named" or "one" (as in voi --json).
func (s Scope) String() string {
	switch s {
	case ScopeNamed:
		return "named"
	case ScopeOne:
		return "one"
	}
	return "all"
}

// PerfectInfo is the expected value of perfect information about one named
// uncertainty or, for the total, about everything uncertain in the tree.
type PerfectInfo struct {
	// Uncertainty is the uncertainty resolved; nil for the total.
	Uncertainty *tree.Uncertainty
	// Scope is what was resolved.
	Scope Scope
	// Without is the tree's expected value as modelled (the root's value);
	// With is its expected value when the information comes before the
	// first decision. Both are in the objective's terms.
	Without, With decimal.Decimal
	// EVPI is the improvement With makes on Without: With − Without under
	// Max, Without − With under Min (a saving). Never negative. It is an
	// upper bound on what any information about the uncertainty is worth.
	EVPI decimal.Decimal
	// Scenarios is the number of joint states of the named uncertainties
	// rolled back (states of zero probability are skipped).
	Scenarios int
	// PlainNodes is the number of plain chance nodes resolved (the total
	// with ScopeAll; plain chance nodes with no decision above them are not
	// counted: resolving them earlier changes nothing).
	PlainNodes int
	// Exact is false when Without went through a rounded division (Bayes'
	// rule after a test): EVPI is then exact to about tree.DivisionScale
	// decimal places.
	Exact bool
	// Note explains anything the number does not say by itself (a
	// narrower scope, an uncertainty no decision depends on).
	Note string
}

// ErrTooMuchWork is returned (wrapped) when an analysis would pass its
// work budget.
var ErrTooMuchWork = errors.New("eval: the analysis is over its work budget")

// engine holds what the value-of-information rollbacks need to know about a
// solved tree, indexed by the node's position in pre-order.
type engine struct {
	sol   *Solution
	nodes []Solved
	sign  decimal.Decimal // 1 under Max, -1 under Min: values become "goodness"
	end   []int           // one past the last node of each subtree
	kids  [][]int         // the children of each node, aligned with its branches
	par   []int           // the parent (-1 at the root)
	via   []int           // the parent's branch that leads here
	under []bool          // has a decision above it
	unc   []int           // index of the uncertainty a node samples or tests; -1
	test  []*tree.Test    // the test a node runs; nil
	out   [][]int         // per branch: the state (chance) or reading (test) index
	base  []decimal.Decimal
	uncs  []*tree.Uncertainty
	// uncUnder[u]: some node on uncertainty u has a decision above it.
	uncUnder []bool
	exact    bool // no posterior in the tree was rounded
	work     int  // work done so far
	maxWork  int
}

var (
	one  = decimal.NewFromInt(1)
	zero = decimal.Zero
)

func newEngine(sol *Solution) (*engine, error) {
	if sol == nil || sol.Root == nil {
		return nil, ErrNotResolved
	}
	m := sol.Model
	n := len(sol.nodes)
	e := &engine{sol: sol, nodes: sol.nodes, sign: one, exact: true,
		end: make([]int, n), under: make([]bool, n), unc: make([]int, n),
		test: make([]*tree.Test, n), out: make([][]int, n), base: make([]decimal.Decimal, n),
		uncs: m.Uncertainties, uncUnder: make([]bool, len(m.Uncertainties))}
	if m.Objective == tree.Min {
		e.sign = one.Neg()
	}
	index := map[string]int{}
	for i, u := range m.Uncertainties {
		if _, dup := index[u.Name]; !dup {
			index[u.Name] = i
		}
	}
	e.kids, e.par, e.via = make([][]int, n), make([]int, n), make([]int, n)
	for i := range e.nodes {
		s := &e.nodes[i]
		e.end[i] = i + s.Size()
		e.base[i] = e.g(s.Value())
		e.par[i], e.via[i] = -1, s.Via()
		if p := s.Parent(); p != nil {
			e.par[i] = p.Index()
		}
		ks := make([]int, len(s.Node.Branches))
		k := i + 1
		for j := range ks {
			ks[j] = k
			k += e.nodes[k].Size()
		}
		e.kids[i] = ks
	}
	obs := make([]*tree.Observation, n)
	for i := range e.nodes {
		s := &e.nodes[i]
		nd := s.Node
		e.unc[i] = -1
		if p := e.par[i]; p >= 0 {
			e.under[i] = e.under[p] || e.nodes[p].Node.Kind == tree.KindDecision
			obs[i] = obs[p]
			if t := e.test[p]; t != nil {
				obs[i] = &tree.Observation{Test: t, Reading: e.out[p][e.via[i]], Prev: obs[i]}
			}
		}
		if nd.Kind != tree.KindChance {
			continue
		}
		var u *tree.Uncertainty
		switch {
		case nd.Uncertainty != "":
			ui, ok := index[nd.Uncertainty]
			if !ok {
				return nil, fmt.Errorf("eval: node %q samples unknown uncertainty %q (was the model resolved?)", nd.Display(), nd.Uncertainty)
			}
			e.unc[i], u = ui, e.uncs[ui]
			e.out[i] = make([]int, len(nd.Branches))
			for j, b := range nd.Branches {
				e.out[i][j] = u.StateIndex(b.Label)
			}
			if obs[i] != nil && e.exact {
				e.exact = posteriorExact(u, obs[i])
			}
		case nd.Test != "":
			t := m.TestNamed(nd.Test)
			if t == nil {
				return nil, fmt.Errorf("eval: node %q runs unknown test %q (was the model resolved?)", nd.Display(), nd.Test)
			}
			ui, ok := index[t.On]
			if !ok {
				return nil, fmt.Errorf("eval: test %q is on unknown uncertainty %q", t.Name, t.On)
			}
			e.unc[i], e.test[i], u = ui, t, e.uncs[ui]
			e.out[i] = make([]int, len(nd.Branches))
			for j, b := range nd.Branches {
				e.out[i][j] = -1
				for r, rd := range t.Readings {
					if rd.Label == b.Label {
						e.out[i][j] = r
					}
				}
			}
			if obs[i] != nil && e.exact {
				e.exact = posteriorExact(u, obs[i])
			}
		}
		if u != nil {
			for j := range nd.Branches {
				if e.out[i][j] < 0 {
					return nil, fmt.Errorf("eval: branch %q of %q is not an outcome of %q (was the model resolved?)", nd.Branches[j].Label, nd.Display(), u.Name)
				}
			}
			if e.under[i] {
				e.uncUnder[e.unc[i]] = true
			}
		}
	}
	return e, nil
}

// posteriorExact reports whether Bayes' rule after the readings in obs
// divides exactly for uncertainty u.
func posteriorExact(u *tree.Uncertainty, obs *tree.Observation) bool {
	_, _, exact := tree.Posterior(u, obs)
	return exact
}

// g turns a value in the objective's terms into goodness (higher is better).
func (e *engine) g(v decimal.Decimal) decimal.Decimal {
	if e.sign.IsNegative() {
		return v.Neg()
	}
	return v
}

// spec says which events a rollback resolves.
type spec struct {
	fixed   []bool // per uncertainty: its state is set by the scenario
	plainPI bool   // plain chance nodes below a decision are resolved too
}

// plain reports whether node i is a plain chance node the spec resolves.
func (e *engine) plain(sp *spec, i int) bool {
	return sp.plainPI && e.under[i] && e.unc[i] < 0 && e.nodes[i].Node.Kind == tree.KindChance
}

// relevant lists, in pre-order, the nodes whose subtree holds a node the
// spec resolves: the only ones a scenario changes.
func (e *engine) relevant(sp *spec) (rel []int, is []bool) {
	n := len(e.nodes)
	is = make([]bool, n)
	for i := n - 1; i >= 0; i-- {
		if u := e.unc[i]; (u >= 0 && sp.fixed[u]) || e.plain(sp, i) {
			is[i] = true
		} else {
			for _, k := range e.kids[i] {
				if is[k] {
					is[i] = true
					break
				}
			}
		}
	}
	for i := 0; i < n; i++ {
		if is[i] {
			rel = append(rel, i)
		}
	}
	return rel, is
}

// run is one set of scenario rollbacks sharing a spec.
type run struct {
	e     *engine
	sp    *spec
	rel   []int
	isRel []bool
	reach []bool
	val   []dist
	state []int // per uncertainty: the scenario's state (fixed ones only)
}

func (e *engine) newRun(sp *spec) *run {
	rel, is := e.relevant(sp)
	n := len(e.nodes)
	return &run{e: e, sp: sp, rel: rel, isRel: is, reach: make([]bool, n), val: make([]dist, n), state: make([]int, len(e.uncs))}
}

// estimate is an upper bound on the work of one scenario: the number of
// points in every relevant node's value distribution, assuming no two
// values coincide.
func (r *run) estimate() float64 {
	e := r.e
	size := make([]float64, len(e.nodes))
	total := 0.0
	for x := len(r.rel) - 1; x >= 0; x-- {
		i := r.rel[x]
		nd := e.nodes[i].Node
		ks := e.kids[i]
		sz := 1.0
		kid := func(k int) float64 {
			if r.isRel[k] {
				return size[k]
			}
			return 1
		}
		switch {
		case nd.Kind == tree.KindDecision:
			sz = 0
			for _, k := range ks {
				sz += kid(k)
			}
		case nd.Kind != tree.KindChance:
		case e.plain(r.sp, i) || (e.unc[i] >= 0 && r.sp.fixed[e.unc[i]] && e.test[i] == nil):
			sz = 0
			for _, k := range ks {
				sz += kid(k)
			}
		default:
			for _, k := range ks {
				sz = math.Min(sz*kid(k), 1e18)
			}
		}
		if !e.under[i] {
			sz = 1
		}
		size[i] = sz
		total = math.Min(total+sz+1, 1e18)
	}
	return total
}

// scenarios is the number of joint states of the fixed uncertainties.
func (r *run) scenarios() int {
	n := 1
	for u, f := range r.sp.fixed {
		if f {
			n *= len(r.e.uncs[u].States)
			if n > 1<<40 {
				return n
			}
		}
	}
	return n
}

// prob is the probability of branch j of chance node i in the scenario.
func (r *run) prob(i, j int) decimal.Decimal {
	e := r.e
	if u := e.unc[i]; u >= 0 && r.sp.fixed[u] {
		s := r.state[u]
		if t := e.test[i]; t != nil {
			return t.Readings[e.out[i][j]].L[s]
		}
		if e.out[i][j] == s {
			return one
		}
		return zero
	}
	return e.nodes[i].Node.Branches[j].P
}

// value rolls back the subtree at root in the current scenario and returns
// the expected goodness there.
func (r *run) value(root int) (decimal.Decimal, error) {
	e := r.e
	if !r.isRel[root] {
		return e.base[root], nil
	}
	lo := sort.SearchInts(r.rel, root)
	hi := sort.SearchInts(r.rel, e.end[root])
	sub := r.rel[lo:hi]
	r.reach[root] = true
	for _, i := range sub {
		s := &e.nodes[i]
		isChance := s.Node.Kind == tree.KindChance
		for j, k := range e.kids[i] {
			if r.isRel[k] {
				r.reach[k] = r.reach[i] && (!isChance || !r.prob(i, j).IsZero())
			}
		}
	}
	e.work += len(sub)
	if e.work > e.maxWork {
		return decimal.Zero, ErrTooMuchWork
	}
	for x := len(sub) - 1; x >= 0; x-- {
		i := sub[x]
		if !r.reach[i] {
			continue
		}
		d, err := r.node(i)
		if err != nil {
			return decimal.Zero, err
		}
		r.val[i] = d
	}
	return r.val[root].mean(), nil
}

// kid is the value distribution of branch j of node i, its cash included.
func (r *run) kid(i, j int) dist {
	e := r.e
	s := &e.nodes[i]
	k := e.kids[i][j]
	c := e.g(s.Node.Branches[j].C)
	if !r.isRel[k] {
		return point(e.base[k].Add(c))
	}
	return r.val[k].shift(c)
}

func (r *run) node(i int) (dist, error) {
	e := r.e
	s := &e.nodes[i]
	nd := s.Node
	var d dist
	switch nd.Kind {
	case tree.KindEnd:
		return point(e.g(nd.Value)), nil
	case tree.KindDecision:
		ks := make([]dist, len(nd.Branches))
		for j := range nd.Branches {
			ks[j] = r.kid(i, j)
		}
		d = maxIndependent(ks)
	case tree.KindChance:
		tc := e.g(nd.TestCost)
		var ws []decimal.Decimal
		var ks []dist
		spread := false
		for j := range nd.Branches {
			p := r.prob(i, j)
			if p.IsZero() {
				continue
			}
			k := r.kid(i, j)
			spread = spread || !k.isPoint()
			ws, ks = append(ws, p), append(ks, k)
		}
		u := e.unc[i]
		switch {
		case e.plain(r.sp, i) || (u >= 0 && r.sp.fixed[u] && e.test[i] == nil):
			// The outcome is known before the first decision: the value
			// is a mixture of the branches' values.
			d = mixture(ws, ks).shift(tc)
		case spread:
			// The outcome (a test's reading) is still unknown at the
			// decisions above: the value is the weighted sum of the
			// branches' independent values.
			size := 1
			for _, k := range ks {
				if size *= k.size(); size > e.maxWork-e.work {
					return d, ErrTooMuchWork
				}
			}
			d = weightedSum(ws, ks).shift(tc)
		default:
			v := tc
			for x, k := range ks {
				v = v.Add(ws[x].Mul(k.v))
			}
			d = point(v)
		}
	}
	if !e.under[i] && !d.isPoint() {
		d = point(d.mean())
	}
	e.work += d.size()
	if e.work > e.maxWork {
		return d, ErrTooMuchWork
	}
	return d, nil
}

// enumerate runs every joint state of the fixed uncertainties, each
// weighted by weight (the uncertainty's index, the state: its probability),
// and returns the weighted sum of the goodness at root and the number of
// states with non-zero weight.
func (r *run) enumerate(root int, weight func(u, s int) decimal.Decimal, maxScen int) (decimal.Decimal, int, error) {
	var fixed []int
	for u, f := range r.sp.fixed {
		if f {
			fixed = append(fixed, u)
		}
	}
	// The states with non-zero weight of each fixed uncertainty.
	states := make([][]int, len(fixed))
	count := 1
	for x, u := range fixed {
		for s := range r.e.uncs[u].States {
			if !weight(u, s).IsZero() {
				states[x] = append(states[x], s)
			}
		}
		if len(states[x]) == 0 {
			return decimal.Zero, 0, nil
		}
		if count > maxScen/len(states[x]) {
			return decimal.Zero, 0, fmt.Errorf("%w: more than %d joint states of the named uncertainties", ErrTooMuchWork, maxScen)
		}
		count *= len(states[x])
	}
	pos := make([]int, len(fixed))
	total := decimal.Zero
	n := 0
	for {
		w := one
		for x, u := range fixed {
			s := states[x][pos[x]]
			r.state[u] = s
			w = w.Mul(weight(u, s))
		}
		v, err := r.value(root)
		if err != nil {
			return decimal.Zero, n, err
		}
		total = total.Add(w.Mul(v))
		n++
		x := len(fixed) - 1
		for ; x >= 0; x-- {
			pos[x]++
			if pos[x] < len(states[x]) {
				break
			}
			pos[x] = 0
		}
		if x < 0 {
			return total, n, nil
		}
	}
}

func prior(uncs []*tree.Uncertainty) func(u, s int) decimal.Decimal {
	return func(u, s int) decimal.Decimal { return uncs[u].States[s].P }
}

// tolerance is how far below zero an EVPI that went through rounded
// posteriors may come out and still count as zero.
func tolerance(vs ...decimal.Decimal) decimal.Decimal {
	m := one
	for _, v := range vs {
		if a := v.Abs(); a.GreaterThan(m) {
			m = a
		}
	}
	return m.Mul(decimal.New(1, -(tree.DivisionScale - 5)))
}

// gain is the improvement of with over without in goodness terms, checked
// to be non-negative.
func (e *engine) gain(with, without decimal.Decimal, what string) (decimal.Decimal, error) {
	d := with.Sub(without)
	if d.IsNegative() {
		if d.Abs().GreaterThan(tolerance(with, without)) {
			return d, fmt.Errorf("eval: internal error: the value of perfect information about %s came out negative (%s)", what, e.g(d))
		}
		return decimal.Zero, nil
	}
	return d, nil
}

// EVPI is the expected value of perfect information about the named
// uncertainty: the value of the tree when its state is known before the
// first decision, minus its value as modelled, in the objective's terms
// (a saving under Min). sol must be a solution of a resolved model.
func EVPI(sol *Solution, uncertainty string) (*PerfectInfo, error) {
	e, err := newEngine(sol)
	if err != nil {
		return nil, err
	}
	e.maxWork = math.MaxInt
	return e.evpiOne(uncertainty)
}

func (e *engine) evpiOne(name string) (*PerfectInfo, error) {
	ui := -1
	for i, u := range e.uncs {
		if u.Name == name {
			ui = i
			break
		}
	}
	if ui < 0 {
		return nil, fmt.Errorf("eval: no uncertainty %q in the model", name)
	}
	u := e.uncs[ui]
	without := e.base[0]
	pi := &PerfectInfo{Uncertainty: u, Scope: ScopeOne, Without: e.sol.Root.Value(), With: e.sol.Root.Value(), EVPI: decimal.Zero, Exact: e.exact}
	if !e.uncUnder[ui] {
		pi.Note = fmt.Sprintf("no decision comes before %q is known, so knowing it earlier changes nothing", u.Display())
		return pi, nil
	}
	sp := &spec{fixed: make([]bool, len(e.uncs))}
	sp.fixed[ui] = true
	r := e.newRun(sp)
	with, n, err := r.enumerate(0, prior(e.uncs), len(u.States))
	if err != nil {
		return nil, err
	}
	d, err := e.gain(with, without, fmt.Sprintf("%q", u.Name))
	if err != nil {
		return nil, err
	}
	pi.With, pi.EVPI, pi.Scenarios = e.g(with), d, n
	return pi, nil
}

// TotalEVPI is the expected value of perfect information about everything
// uncertain in the tree: every named uncertainty jointly and every plain
// chance node (each its own independent event) known before the first
// decision. When that is over the budget in opts, it resolves the named
// uncertainties only and says so (Scope ScopeNamed and Note); when even
// that is over, it returns an error wrapping ErrTooMuchWork.
func TotalEVPI(sol *Solution, opts VOIOptions) (*PerfectInfo, error) {
	e, err := newEngine(sol)
	if err != nil {
		return nil, err
	}
	return e.total(opts)
}

func (e *engine) total(opts VOIOptions) (*PerfectInfo, error) {
	maxScen, maxWork := opts.limits()
	sp := &spec{fixed: make([]bool, len(e.uncs)), plainPI: true}
	copy(sp.fixed, e.uncUnder)
	pi := &PerfectInfo{Scope: ScopeAll, Without: e.sol.Root.Value(), Exact: e.exact}
	for i := range e.nodes {
		if e.plain(sp, i) {
			pi.PlainNodes++
		}
	}
	for {
		e.work, e.maxWork = 0, maxWork
		r := e.newRun(sp)
		if sp.plainPI && r.estimate()*float64(r.scenarios()) > float64(maxWork) {
			sp.plainPI = false
			pi.Scope, pi.PlainNodes = ScopeNamed, 0
			pi.Note = "the joint computation with every plain chance node resolved is over the work budget, so this total resolves the named uncertainties only: the plain chance nodes stay as they are"
			continue
		}
		with, n, err := r.enumerate(0, prior(e.uncs), maxScen)
		if errors.Is(err, ErrTooMuchWork) && sp.plainPI && pi.PlainNodes > 0 {
			sp.plainPI = false
			pi.Scope, pi.PlainNodes = ScopeNamed, 0
			pi.Note = "the joint computation with every plain chance node resolved is over the work budget, so this total resolves the named uncertainties only: the plain chance nodes stay as they are"
			continue
		}
		if err != nil {
			return nil, err
		}
		d, err := e.gain(with, e.base[0], "everything")
		if err != nil {
			return nil, err
		}
		pi.With, pi.EVPI, pi.Scenarios = e.g(with), d, n
		return pi, nil
	}
}

// dist is an exact discrete distribution of goodness values: a point when
// xs is nil, else support xs (ascending, distinct) with probabilities ps.
type dist struct {
	v      decimal.Decimal
	xs, ps []decimal.Decimal
}

func point(v decimal.Decimal) dist { return dist{v: v} }

func (d dist) isPoint() bool { return d.xs == nil }

func (d dist) size() int {
	if d.xs == nil {
		return 1
	}
	return len(d.xs)
}

func (d dist) mean() decimal.Decimal {
	if d.xs == nil {
		return d.v
	}
	m := decimal.Zero
	for i, x := range d.xs {
		m = m.Add(x.Mul(d.ps[i]))
	}
	return m
}

func (d dist) shift(c decimal.Decimal) dist {
	if c.IsZero() {
		return d
	}
	if d.xs == nil {
		return point(d.v.Add(c))
	}
	xs := make([]decimal.Decimal, len(d.xs))
	for i, x := range d.xs {
		xs[i] = x.Add(c)
	}
	return dist{xs: xs, ps: d.ps}
}

// at returns the i-th support point and its probability.
func (d dist) at(i int) (decimal.Decimal, decimal.Decimal) {
	if d.xs == nil {
		return d.v, one
	}
	return d.xs[i], d.ps[i]
}

// build makes a distribution from (value, probability) pairs in any order,
// merging equal values and dropping zero probabilities.
func build(xs, ps []decimal.Decimal) dist {
	idx := make([]int, len(xs))
	for i := range idx {
		idx[i] = i
	}
	sort.Slice(idx, func(a, b int) bool { return xs[idx[a]].LessThan(xs[idx[b]]) })
	var ox, op []decimal.Decimal
	for _, i := range idx {
		if ps[i].IsZero() {
			continue
		}
		if n := len(ox); n > 0 && ox[n-1].Equal(xs[i]) {
			op[n-1] = op[n-1].Add(ps[i])
			continue
		}
		ox, op = append(ox, xs[i]), append(op, ps[i])
	}
	if len(ox) == 1 {
		return point(ox[0])
	}
	if len(ox) == 0 {
		return point(decimal.Zero)
	}
	return dist{xs: ox, ps: op}
}

// mixture is the distribution of a value that is ks[i] with probability
// ws[i].
func mixture(ws []decimal.Decimal, ks []dist) dist {
	var xs, ps []decimal.Decimal
	for i, k := range ks {
		for j := 0; j < k.size(); j++ {
			x, p := k.at(j)
			xs, ps = append(xs, x), append(ps, ws[i].Mul(p))
		}
	}
	return build(xs, ps)
}

// weightedSum is the distribution of Σ ws[i]·Xi for independent Xi ~ ks[i].
func weightedSum(ws []decimal.Decimal, ks []dist) dist {
	acc := point(decimal.Zero)
	for i, k := range ks {
		var xs, ps []decimal.Decimal
		for a := 0; a < acc.size(); a++ {
			x, p := acc.at(a)
			for b := 0; b < k.size(); b++ {
				y, q := k.at(b)
				xs, ps = append(xs, x.Add(ws[i].Mul(y))), append(ps, p.Mul(q))
			}
		}
		acc = build(xs, ps)
	}
	return acc
}

// maxIndependent is the distribution of the largest of independent values:
// P(max ≤ x) = Π P(Xi ≤ x).
func maxIndependent(ks []dist) dist {
	floor := decimal.Zero // the largest point value: nothing below it matters
	hasPoint, allPoint := false, true
	for _, k := range ks {
		if k.isPoint() {
			if !hasPoint || k.v.GreaterThan(floor) {
				floor = k.v
			}
			hasPoint = true
		} else {
			allPoint = false
		}
	}
	if allPoint {
		return point(floor)
	}
	var spread []dist
	for _, k := range ks {
		if !k.isPoint() {
			if hasPoint && !k.xs[len(k.xs)-1].GreaterThan(floor) {
				continue // never above the best certain value
			}
			spread = append(spread, k)
		}
	}
	if len(spread) == 0 {
		return point(floor)
	}
	// The candidate support: every point of every spread value above the
	// floor, and the floor itself.
	var support []decimal.Decimal
	if hasPoint {
		support = append(support, floor)
	}
	for _, k := range spread {
		for _, x := range k.xs {
			if !hasPoint || x.GreaterThan(floor) {
				support = append(support, x)
			}
		}
	}
	sort.Slice(support, func(a, b int) bool { return support[a].LessThan(support[b]) })
	uniq := support[:0]
	for i, x := range support {
		if i == 0 || !x.Equal(uniq[len(uniq)-1]) {
			uniq = append(uniq, x)
		}
	}
	support = uniq
	cur := make([]int, len(spread))
	cdf := make([]decimal.Decimal, len(spread))
	for i := range cdf {
		cdf[i] = decimal.Zero
	}
	xs := make([]decimal.Decimal, 0, len(support))
	ps := make([]decimal.Decimal, 0, len(support))
	prev := decimal.Zero
	for _, x := range support {
		f := one
		for i, k := range spread {
			for cur[i] < len(k.xs) && !k.xs[cur[i]].GreaterThan(x) {
				cdf[i] = cdf[i].Add(k.ps[cur[i]])
				cur[i]++
			}
			f = f.Mul(cdf[i])
		}
		if p := f.Sub(prev); !p.IsZero() {
			xs, ps = append(xs, x), append(ps, p)
		}
		prev = f
	}
	if len(xs) == 1 {
		return point(xs[0])
	}
	return dist{xs: xs, ps: ps}
}

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
	// Exact is false when a posterior was rounded (to tree.DivisionScale
	// places).
	Exact bool
}

// BayesTable returns the table of test at the prior. m must be resolved.
func BayesTable(m *tree.Model, test string) (*Table, error) {
	t := m.TestNamed(test)
	if t == nil {
		return nil, fmt.Errorf("eval: no test %q in the model", test)
	}
	u := m.Uncertainty(t.On)
	if u == nil {
		return nil, fmt.Errorf("eval: test %q is on %q, which is not a declared uncertainty", t.Name, t.On)
	}
	ns, nr := len(u.States), len(t.Readings)
	tb := &Table{Test: t, Uncertainty: u, Prior: make([]decimal.Decimal, ns), Marginal: make([]decimal.Decimal, nr),
		Likelihood: make([][]decimal.Decimal, ns), Joint: make([][]decimal.Decimal, ns), Posterior: make([][]decimal.Decimal, ns), Exact: true}
	for r := range tb.Marginal {
		tb.Marginal[r] = decimal.Zero
	}
	for s, st := range u.States {
		tb.Prior[s] = st.P
		tb.Likelihood[s] = make([]decimal.Decimal, nr)
		tb.Joint[s] = make([]decimal.Decimal, nr)
		tb.Posterior[s] = make([]decimal.Decimal, nr)
		for r, rd := range t.Readings {
			if len(rd.L) != ns {
				return nil, fmt.Errorf("eval: test %q has no likelihoods (was the model resolved?)", t.Name)
			}
			tb.Likelihood[s][r] = rd.L[s]
			tb.Joint[s][r] = st.P.Mul(rd.L[s])
			tb.Marginal[r] = tb.Marginal[r].Add(tb.Joint[s][r])
		}
	}
	for r := range t.Readings {
		for s := range u.States {
			tb.Posterior[s][r] = decimal.Zero
			if tb.Marginal[r].IsZero() {
				continue
			}
			q := tree.Div(tb.Joint[s][r], tb.Marginal[r], true)
			tb.Posterior[s][r] = q.D
			tb.Exact = tb.Exact && q.Exact
		}
	}
	return tb, nil
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

// String is the advice as voi --json writes it: "test", "do not test"
// or "indifferent".
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
// decision whose subtree starts with the test node. All values are in the
// objective's terms; EVSI, NetGain, MostToPay and EVPI are amounts of money
// (a gain under Max, a saving under Min).
type TestSite struct {
	// Decision is the decision, Branch its branch that runs the test, Node
	// the test node under it and Alternative the best of the decision's
	// other branches.
	Decision    *Solved
	Branch      int
	Node        *Solved
	Alternative int
	// WithBeforeCost is the value of testing as if the test were free:
	// the branch's cash plus the test node's value without the test's cost.
	// WithAfterCost includes the cost. Without is the value of the
	// alternative.
	WithBeforeCost, WithAfterCost, Without decimal.Decimal
	// EVSI is the expected value of sample information: how much better
	// WithBeforeCost is than Without. It can be negative only when the
	// testing branch leads to a different decision than the alternative.
	EVSI decimal.Decimal
	// NetGain is EVSI minus the test's cost: the expected gain of testing.
	NetGain decimal.Decimal
	// MostToPay is the most the test is worth paying for: EVSI, or 0 when
	// EVSI is negative.
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
	Sites []TestSite
	// Warnings say what could not be computed and why (a test never run,
	// run where there is no alternative, a reading that cannot occur).
	Warnings []string
}

// EVSI values the named test: its table at the prior (BayesTable) and, at
// every decision with a branch whose subtree starts with the test node, the
// expected value of sample information, the expected net gain of testing,
// the most worth paying and the efficiency against the EVPI of the tested
// uncertainty.
func EVSI(sol *Solution, test string) (*TestValue, error) {
	e, err := newEngine(sol)
	if err != nil {
		return nil, err
	}
	e.maxWork = math.MaxInt
	return e.evsi(test)
}

func (e *engine) evsi(name string) (*TestValue, error) {
	m := e.sol.Model
	tb, err := BayesTable(m, name)
	if err != nil {
		return nil, err
	}
	t := tb.Test
	tv := &TestValue{Test: t, Table: tb}
	for r, p := range tb.Marginal {
		if p.IsZero() {
			tv.Warnings = append(tv.Warnings, fmt.Sprintf("reading %q of test %q has probability 0 at the prior: it can never be seen", t.Readings[r].Label, t.Name))
		}
	}
	ui := -1
	for i, u := range e.uncs {
		if u == tb.Uncertainty {
			ui = i
		}
	}
	runs := 0
	for i := range e.nodes {
		if e.test[i] != t {
			continue
		}
		runs++
		nd := e.nodes[i].Node
		p := e.par[i]
		if p < 0 || e.nodes[p].Node.Kind != tree.KindDecision {
			tv.Warnings = append(tv.Warnings, fmt.Sprintf("test %q is run at %s, which is not directly under a decision branch: with no alternative to compare, its EVSI is not computed there", t.Name, where(&e.nodes[i])))
			continue
		}
		d := &e.nodes[p]
		if len(d.Node.Branches) < 2 {
			tv.Warnings = append(tv.Warnings, fmt.Sprintf("decision %q has no branch other than the one that runs test %q: with no alternative to compare, its EVSI is not computed there", d.Node.Display(), t.Name))
			continue
		}
		b := e.via[i]
		site := TestSite{Decision: d, Branch: b, Node: &e.nodes[i], Alternative: -1, OnPolicy: d.OnPolicy()}
		site.WithAfterCost = d.Node.Branches[b].C.Add(e.nodes[i].Value())
		site.WithBeforeCost = site.WithAfterCost.Sub(nd.TestCost)
		for j := range d.Node.Branches {
			if j == b {
				continue
			}
			if v := d.BranchValue(j); site.Alternative < 0 || m.Objective.Better(v, site.Without) {
				site.Alternative, site.Without = j, v
			}
		}
		site.EVSI = e.g(site.WithBeforeCost.Sub(site.Without))
		if site.EVSI.IsNegative() && site.EVSI.Abs().LessThanOrEqual(tolerance(site.WithBeforeCost, site.Without)) && !e.exact {
			site.EVSI = decimal.Zero // rounding in Bayes' rule, not a loss
		}
		site.NetGain = site.EVSI.Sub(t.CostValue)
		site.MostToPay = site.EVSI
		if site.EVSI.IsNegative() {
			site.MostToPay = decimal.Zero
			site.Note = fmt.Sprintf("testing is worse than %q even if the test were free: the branch %q does not lead to the same choices as the alternative, so the test is worth nothing here",
				d.Node.Branches[site.Alternative].Label, d.Node.Branches[b].Label)
		}
		switch site.NetGain.Sign() {
		case 1:
			site.Advice = RunTest
		case 0:
			site.Advice = Indifferent
		}
		if ui >= 0 {
			ev, err := e.localEVPI(p, ui, site.Without)
			if err != nil {
				return nil, err
			}
			site.EVPI = ev
			if ev.IsPositive() && !site.EVSI.IsNegative() {
				site.Efficiency, site.HasEfficiency = tree.Div(site.EVSI, ev, true).D, true
			}
		}
		tv.Sites = append(tv.Sites, site)
	}
	if runs == 0 {
		tv.Warnings = append(tv.Warnings, fmt.Sprintf("test %q is declared but never run in the tree: only its table is shown", t.Name))
	}
	return tv, nil
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

// localEVPI is the value of knowing uncertainty u just before decision d
// (weighted by P(state | the path to d)) over the value without of the
// decision's alternative to testing, as a non-negative amount.
func (e *engine) localEVPI(d, u int, without decimal.Decimal) (decimal.Decimal, error) {
	w, ok := e.pathPosterior(d, u)
	if !ok {
		return decimal.Zero, nil
	}
	sp := &spec{fixed: make([]bool, len(e.uncs))}
	sp.fixed[u] = true
	r := e.newRun(sp)
	with, _, err := r.enumerate(d, func(_, s int) decimal.Decimal { return w[s] }, len(w))
	if err != nil {
		return decimal.Zero, err
	}
	return e.gain(with, e.g(without), fmt.Sprintf("%q at %q", e.uncs[u].Name, e.nodes[d].Node.Display()))
}

// pathPosterior is P(state of u | the path to node d): the prior revised by
// the readings of tests on u and fixed by chance nodes on u passed on the
// way. ok is false when the path has probability 0.
func (e *engine) pathPosterior(d, u int) ([]decimal.Decimal, bool) {
	uc := e.uncs[u]
	w := make([]decimal.Decimal, len(uc.States))
	for s, st := range uc.States {
		w[s] = st.P
	}
	for c := d; e.par[c] >= 0; c = e.par[c] {
		a := e.par[c]
		if e.unc[a] != u {
			continue
		}
		o := e.out[a][e.via[c]]
		for s := range w {
			switch {
			case e.test[a] != nil:
				w[s] = w[s].Mul(e.test[a].Readings[o].L[s])
			case s != o:
				w[s] = decimal.Zero
			}
		}
	}
	sum := decimal.Zero
	for _, x := range w {
		sum = sum.Add(x)
	}
	if sum.IsZero() {
		return nil, false
	}
	if !sum.Equal(one) {
		for s := range w {
			w[s] = tree.Div(w[s], sum, true).D
		}
	}
	return w, true
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
// EVSI for every declared test.
func ValueOfInformation(sol *Solution, opts VOIOptions) (*Information, error) {
	e, err := newEngine(sol)
	if err != nil {
		return nil, err
	}
	info := &Information{Objective: sol.Model.Objective, Value: sol.Root.Value()}
	total, err := e.total(opts)
	switch {
	case errors.Is(err, ErrTooMuchWork):
		info.TotalNote = "the total EVPI is not computed: even the named uncertainties alone are over the work budget (" +
			strings.TrimPrefix(strings.TrimPrefix(err.Error(), ErrTooMuchWork.Error()), ": ") + "); raise --max-scenarios to allow more"
	case err != nil:
		return nil, err
	default:
		info.Total = total
	}
	for _, u := range sol.Model.Uncertainties {
		e.work, e.maxWork = 0, math.MaxInt
		pi, err := e.evpiOne(u.Name)
		if err != nil {
			return nil, err
		}
		info.Uncertainties = append(info.Uncertainties, pi)
	}
	for _, t := range sol.Model.Tests {
		e.work, e.maxWork = 0, math.MaxInt
		tv, err := e.evsi(t.Name)
		if err != nil {
			return nil, err
		}
		info.Tests = append(info.Tests, tv)
	}
	return info, nil
}
