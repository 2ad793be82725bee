package eval

import (
	"context"
	"errors"
	"fmt"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// Value of information.
//
// The expected value of perfect information (EVPI) about an uncertainty is
// what the tree is worth when the uncertainty is known before the first
// decision, minus what it is worth as modelled. Knowing that the
// uncertainty is in state s is the model with its prior set to certainty of
// s: every chance node on it takes s, every test of it reads r with
// probability P(r | s). So the value with information is the
// prior-weighted sum of rollbacks of such models, each made with
// compiled.Model.With and rolled back by the one kernel. This moves a chance
// node that occurs after decisions ahead of them and resolves an
// uncertainty that occurs in several places once for all.
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

// DefaultMaxWork caps the work of a value-of-information analysis, in units
// of about a microsecond: each rollback costs compiled.Model.Work units,
// each point of a value distribution built one.
const DefaultMaxWork = 5_000_000

// VOIOptions bound the work of the analyses. Zero fields take the
// defaults.
type VOIOptions struct {
	// MaxScenarios caps the joint states of the named uncertainties
	// (DefaultMaxScenarios).
	MaxScenarios int
	// MaxWork caps the work of the total EVPI, and separately that of the
	// EVPI of every named uncertainty and that of the value of every test
	// (DefaultMaxWork; see compiled.Model.Work for the unit).
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

// String names the scope: "all", "named" or "one".
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
	// max, Without − With under min (a saving). Never negative. It is an
	// upper bound on what any information about the uncertainty is worth.
	EVPI decimal.Decimal
	// Scenarios is the number of joint states of the named uncertainties
	// rolled back (states of zero probability are skipped).
	Scenarios int
	// PlainNodes is the number of plain chance nodes resolved (the total
	// with ScopeAll; plain chance nodes with no decision above them are not
	// counted: resolving them earlier changes nothing).
	PlainNodes int
	// Exact is false when a figure of the model was rounded (a division
	// such as 1/3); every rollback itself is exact.
	Exact bool
	// Note explains anything the number does not say by itself (a
	// narrower scope, an uncertainty no decision depends on, a figure not
	// computed).
	Note string
	// Skipped is set when the analysis's work budget ran out before this
	// figure: With and EVPI are then not computed (zero), and Note says so.
	Skipped bool
}

// ErrTooMuchWork is returned (wrapped) when an analysis would pass its
// work budget; the wrapping error says which budget and by how much.
var ErrTooMuchWork = errors.New("eval: the analysis is over its work budget")

// BudgetError is an analysis that stopped at its work budget: what it was
// doing and the option that raises the budget.
type BudgetError struct {
	What   string // what would pass the budget, e.g. "more than 100000 joint states of the named uncertainties"
	Option string // the field of the options that raises it, e.g. "VOIOptions.MaxScenarios"
}

func (e *BudgetError) Error() string {
	return fmt.Sprintf("the analysis is over its work budget: %s (raise %s to allow more)", e.What, e.Option)
}

// Unwrap makes errors.Is(err, ErrTooMuchWork) true.
func (e *BudgetError) Unwrap() error { return ErrTooMuchWork }

// voi holds what every value-of-information computation on one solution
// needs.
type voi struct {
	ctx   context.Context
	sol   *Solution
	c     *compiled.Model
	r     *compiled.Rollback
	under []bool // per node: a decision lies above it
	// uncUnder[u]: some node on uncertainty u has a decision above it.
	uncUnder []bool
	work     int
	maxWork  int
}

func newVOI(ctx context.Context, sol *Solution, maxWork int) (*voi, error) {
	if sol == nil {
		return nil, ErrNoModel
	}
	if ctx == nil {
		ctx = context.Background()
	}
	c := sol.Compiled
	v := &voi{ctx: ctx, sol: sol, c: c, r: sol.r, under: make([]bool, c.Len()), uncUnder: make([]bool, len(c.Uncertainties())), maxWork: maxWork}
	for i := 1; i < c.Len(); i++ {
		p := c.Parent(i)
		v.under[i] = v.under[p] || c.Kind(p) == tree.KindDecision
		if c.Kind(i) == tree.KindChance && v.under[i] {
			u := c.SamplesUncertainty(i)
			if t := c.RunsTest(i); t >= 0 {
				u = c.TestOn(t)
			}
			if u >= 0 {
				v.uncUnder[u] = true
			}
		}
	}
	return v, nil
}

// spend counts work and stops at the budget or when the context is done.
func (v *voi) spend(n int, budget string) error {
	v.work += n
	if v.work > v.maxWork {
		return &BudgetError{What: fmt.Sprintf("more than %d units of work (%s)", v.maxWork, budget), Option: "VOIOptions.MaxWork"}
	}
	return v.ctx.Err()
}

// knowing returns the model with each listed uncertainty known to be in the
// given state (its prior set to certainty of that state).
func (v *voi) knowing(states map[int]int) (*compiled.Model, error) {
	var set []compiled.Setting
	for u, s := range states {
		for k := range v.c.Uncertainties()[u].States {
			p := decimal.Zero
			if k == s {
				p = decimal.NewFromInt(1)
			}
			set = append(set, compiled.Setting{Target: v.c.StateTarget(u, k), Value: p})
		}
	}
	return v.c.With(set...)
}

// evpiOne is the EVPI of uncertainty u.
func (v *voi) evpiOne(u int) (*PerfectInfo, error) {
	un := v.c.Uncertainties()[u]
	obj := v.c.Objective()
	base, _ := v.r.Total(0)
	pi := &PerfectInfo{Uncertainty: un, Scope: ScopeOne, Without: obj.Figure(base), With: obj.Figure(base), EVPI: decimal.Zero, Exact: v.c.Exact()}
	if !v.uncUnder[u] {
		pi.Note = fmt.Sprintf("no decision comes before %q is known, so knowing it earlier changes nothing", un.Display())
		return pi, nil
	}
	with := decimal.Zero
	for s := range un.States {
		p := v.c.Prior(u, s)
		if p.IsZero() {
			continue
		}
		if err := v.spend(2*v.c.Work(), "EVPI of "+un.Name); err != nil {
			return nil, err
		}
		cs, err := v.knowing(map[int]int{u: s})
		if err != nil {
			return nil, err
		}
		val, _ := cs.Rollback().Total(0)
		with = with.Add(p.Mul(val))
		pi.Scenarios++
	}
	gain, err := nonNegativeIn(v.c, with.Sub(base), fmt.Sprintf("%q", un.Name), obj)
	if err != nil {
		return nil, err
	}
	pi.With, pi.EVPI = obj.Figure(with), gain
	return pi, nil
}

// nonNegative checks that a value of information (a net gain) is not
// negative: rollbacks are exact, so a negative one is a bug.
func nonNegative(d decimal.Decimal, what string, obj tree.Objective) (decimal.Decimal, error) {
	return nonNegativeIn(nil, d, what, obj)
}

// nonNegativeIn is nonNegative, where c's rounded figures (when c is not
// exact) may leave noise below the rounding: that is 0, not a bug.
func nonNegativeIn(c *compiled.Model, d decimal.Decimal, what string, obj tree.Objective) (decimal.Decimal, error) {
	if c != nil && !c.Exact() {
		d = noise(d, decimal.NewFromInt(1))
	}
	if d.IsNegative() {
		return d, fmt.Errorf("eval: internal error: the value of perfect information about %s came out negative (%s)", what, obj.Figure(d))
	}
	return d, nil
}

// EVPI is the expected value of perfect information about the named
// uncertainty: the value of the tree when its state is known before the
// first decision, minus its value as modelled (a saving under min).
func EVPI(ctx context.Context, sol *Solution, uncertainty string) (*PerfectInfo, error) {
	v, err := newVOI(ctx, sol, DefaultMaxWork)
	if err != nil {
		return nil, err
	}
	u := v.c.Uncertainty(uncertainty)
	if u < 0 {
		return nil, fmt.Errorf("eval: no uncertainty %q in the model", uncertainty)
	}
	return v.evpiOne(u)
}

// TotalEVPI is the expected value of perfect information about everything
// uncertain in the tree: every named uncertainty jointly and every plain
// chance node (each its own independent event) known before the first
// decision. When that is over the budget in opts, it resolves the named
// uncertainties only and says so (Scope ScopeNamed and Note); when even
// that is over, it returns a BudgetError.
func TotalEVPI(ctx context.Context, sol *Solution, opts VOIOptions) (*PerfectInfo, error) {
	_, work := opts.limits()
	v, err := newVOI(ctx, sol, work)
	if err != nil {
		return nil, err
	}
	return v.total(opts)
}

const namedOnlyNote = "the joint computation with every plain chance node resolved is over the work budget, so this total resolves the named uncertainties only: the plain chance nodes stay as they are"

func (v *voi) total(opts VOIOptions) (*PerfectInfo, error) {
	maxScen, maxWork := opts.limits()
	c := v.c
	obj := c.Objective()
	base, _ := v.r.Total(0)
	pi := &PerfectInfo{Scope: ScopeAll, Without: obj.Figure(base), Exact: c.Exact()}
	plain := make([]bool, c.Len())
	for i := range plain {
		plain[i] = v.under[i] && c.Kind(i) == tree.KindChance && c.SamplesUncertainty(i) < 0 && c.RunsTest(i) < 0
		if plain[i] {
			pi.PlainNodes++
		}
	}
	var fixed []int
	count := 1
	for u, under := range v.uncUnder {
		if !under {
			continue
		}
		n := 0
		for s := range c.Uncertainties()[u].States {
			if !c.Prior(u, s).IsZero() {
				n++
			}
		}
		if n == 0 {
			continue
		}
		if count > maxScen/n {
			return nil, &BudgetError{What: fmt.Sprintf("more than %d joint states of the named uncertainties", maxScen), Option: "VOIOptions.MaxScenarios"}
		}
		count *= n
		fixed = append(fixed, u)
	}
	resolvePlain := pi.PlainNodes > 0
	for {
		v.work, v.maxWork = 0, maxWork
		with, n, err := v.enumerate(fixed, plain, resolvePlain)
		if errors.Is(err, ErrTooMuchWork) && resolvePlain {
			resolvePlain = false
			pi.Scope, pi.PlainNodes, pi.Note = ScopeNamed, 0, namedOnlyNote
			continue
		}
		if err != nil {
			return nil, err
		}
		gain, err := nonNegativeIn(v.c, with.Sub(base), "everything", obj)
		if err != nil {
			return nil, err
		}
		pi.With, pi.EVPI, pi.Scenarios = obj.Figure(with), gain, n
		return pi, nil
	}
}

// enumerate rolls back every joint state of the fixed uncertainties and
// returns the prior-weighted sum of the root's value (net), resolving the
// plain chance nodes too when resolvePlain is set.
func (v *voi) enumerate(fixed []int, plain []bool, resolvePlain bool) (decimal.Decimal, int, error) {
	c := v.c
	states := make([][]int, len(fixed))
	for x, u := range fixed {
		for s := range c.Uncertainties()[u].States {
			if !c.Prior(u, s).IsZero() {
				states[x] = append(states[x], s)
			}
		}
	}
	pos := make([]int, len(fixed))
	total := decimal.Zero
	n := 0
	for {
		w := decimal.NewFromInt(1)
		known := map[int]int{}
		for x, u := range fixed {
			s := states[x][pos[x]]
			known[u] = s
			w = w.Mul(c.Prior(u, s))
		}
		cs, r := c, v.r // nothing fixed: the model as solved
		if len(known) > 0 {
			if err := v.spend(2*c.Work(), "the total EVPI"); err != nil {
				return decimal.Zero, n, err
			}
			var err error
			if cs, err = v.knowing(known); err != nil {
				return decimal.Zero, n, err
			}
			r = cs.Rollback()
		}
		val, _ := r.Total(0)
		if resolvePlain {
			var err error
			if val, err = v.clairvoyant(cs, r, plain); err != nil {
				return decimal.Zero, n, err
			}
		}
		total = total.Add(w.Mul(val))
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

// clairvoyant is the value at the root of cs (a model whose named
// uncertainties the scenario fixed) when every plain chance node below a
// decision is known too: the mean of the root's clairvoyant value
// distribution. Nodes with no such node (and no node on a named
// uncertainty) below them keep their rolled-back values.
func (v *voi) clairvoyant(cs *compiled.Model, r *compiled.Rollback, plain []bool) (decimal.Decimal, error) {
	n := cs.Len()
	// relevant: the subtree holds a resolved node.
	rel := make([]bool, n)
	for i := n - 1; i >= 0; i-- {
		if plain[i] || cs.SamplesUncertainty(i) >= 0 || cs.RunsTest(i) >= 0 {
			rel[i] = true
		}
		if rel[i] && i > 0 {
			rel[cs.Parent(i)] = true
		}
	}
	val := make([]dist, n)
	kid := func(k int) dist {
		if !rel[k] {
			t, _ := r.Total(k)
			return point(t)
		}
		return val[k].shift(cs.Cash(k))
	}
	for i := n - 1; i >= 0; i-- {
		if !rel[i] || cs.Unreachable(i) {
			continue
		}
		if err := v.spend(1, "the total EVPI"); err != nil {
			return decimal.Zero, err
		}
		from, to := cs.Kids(i)
		var d dist
		switch cs.Kind(i) {
		case tree.KindEnd:
			d = point(cs.Payoff(i))
		case tree.KindDecision:
			ks := make([]dist, 0, to-from)
			for k := from; k < to; k++ {
				ks = append(ks, kid(k))
			}
			d = maxIndependent(ks)
		case tree.KindChance:
			tc := cs.TestCostAt(i).Neg()
			var ws []decimal.Decimal
			var ks []dist
			spread := false
			for k := from; k < to; k++ {
				p := cs.Prob(k)
				if p.IsZero() {
					continue
				}
				kd := kid(k)
				spread = spread || !kd.isPoint()
				ws, ks = append(ws, p), append(ks, kd)
			}
			switch {
			case plain[i] || cs.SamplesUncertainty(i) >= 0:
				// The outcome is known before the first decision: the value
				// is a mixture of the branches' values.
				d = mixture(ws, ks).shift(tc)
			case spread:
				// A test's reading is still unknown at the decisions above:
				// the value is the weighted sum of the branches'
				// independent values.
				size := 1
				for _, k := range ks {
					if size *= k.size(); size > v.maxWork-v.work {
						return decimal.Zero, &BudgetError{What: fmt.Sprintf("more than %d units of work (the total EVPI)", v.maxWork), Option: "VOIOptions.MaxWork"}
					}
				}
				d = weightedSum(ws, ks).shift(tc)
			default:
				x := tc
				for j, k := range ks {
					x = x.Add(ws[j].Mul(k.v))
				}
				d = point(x)
			}
		}
		if !v.under[i] && !d.isPoint() {
			d = point(d.mean())
		}
		if err := v.spend(d.size(), "the total EVPI"); err != nil {
			return decimal.Zero, err
		}
		val[i] = d
	}
	return val[0].mean(), nil
}
