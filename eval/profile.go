package eval

import (
	"context"
	"fmt"
	"math/big"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// Risk profiles.
//
// An expected value is a long-run average; the decision happens once. A
// risk profile is the whole distribution of what can happen: for each
// option of a decision, every payoff it can end with when the option is
// taken and the policy is followed afterwards, with its probability. The
// payoffs are counted from the decision on (the option's own cash and
// everything after it), so each profile's mean is exactly the option's
// expected value as the solution gives it. The distribution is read off the
// compiled tree path by path: a path's payoff is the sum of the cash on its
// branches, the test costs on the way and the end's own value, and its
// probability is the end's mass over the decision's mass. Sums and
// products of decimals are exact; a probability is rounded only where that
// division is no finite decimal (a decision below a test reading), and the
// result says so.

// DefaultMaxOutcomes caps the path ends one profile analysis visits.
const DefaultMaxOutcomes = 1_000_000

// ProfilePercents are the percentiles a risk profile reports, in percent.
func ProfilePercents() []int { return []int{5, 10, 50, 90, 95} }

// ProfileOptions say which decision to profile and how.
type ProfileOptions struct {
	// At is the decision to profile, as BreakevenOptions.At: its label, or
	// BRANCH/DECISION; "" is the root or, when the root is not a decision,
	// the first decision on the optimal path. A tree with no decision gets
	// one profile of the whole tree.
	At string
	// Threshold is the payoff below which an outcome counts as a loss (a
	// cost above which, under objective min), in the objective's terms;
	// nil is 0.
	Threshold *decimal.Decimal
	// Policy is the branch each decision takes after the watched one,
	// indexed by compiled node number as compiled.Rollback.Policy gives it;
	// nil follows the solution's optimal policy.
	Policy []int32
	// MaxOutcomes caps the path ends visited (DefaultMaxOutcomes when 0).
	MaxOutcomes int
}

// Profiles are the risk profiles of the options of one decision.
type Profiles struct {
	// Objective says what the figures are: payoffs under max, costs under
	// min.
	Objective tree.Objective
	// Decision is the decision profiled and Path the branch labels from
	// the root to it; Decision is nil when the tree has no decision and
	// Options holds the one profile of the whole tree.
	Decision *tree.Node
	Path     []string
	// Node is the decision's number in the compiled model (-1 when there
	// is none).
	Node int
	// Options are the profiles, one per branch of the decision, in model
	// order.
	Options []Profile
	// Threshold is the loss threshold used, in the objective's terms.
	Threshold decimal.Decimal
	// Dominance lists every pair of options in which one stochastically
	// dominates the other, with the lowest order that holds, ordered by
	// the better option and then the worse.
	Dominance []Dominance
	// Drawn is set when a figure under the decision is drawn from a
	// distribution (or a register's figure): the profiles take it at its
	// mean, so no dominance is judged (Dominance is empty).
	Drawn bool
	// Exact is false when some probability is a division rounded at
	// compiled.DivisionScale places (a decision below a test reading), or
	// the model has rounded figures (compiled.Model.Exact); the figures are
	// then exact to that precision.
	Exact bool
	// Notes explain choices made along the way.
	Notes []string
}

// Profile is the distribution of one option's payoff.
type Profile struct {
	// Label is the option's label ("" for the whole tree); Branch its index
	// among the decision's branches (-1 for the whole tree).
	Label  string
	Branch int
	// Taken is true for the option the policy takes.
	Taken bool
	// Outcomes are the distinct payoffs in the objective's terms,
	// ascending, each with its probability.
	Outcomes []Outcome
	// Mean is the expected payoff: exactly the option's expected value.
	Mean decimal.Decimal
	// Variance is exact when Exact says so; SD is its square root, to 34
	// significant digits unless SDExact.
	Variance, SD decimal.Decimal
	SDExact      bool
	// Min and Max are the smallest and largest payoffs.
	Min, Max decimal.Decimal
	// Loss is the probability of a loss: of a payoff below the threshold
	// (a cost above it, under objective min).
	Loss decimal.Decimal
	// Percentiles hold, for each of ProfilePercents, the smallest payoff
	// whose cumulative probability reaches it.
	Percentiles []Percentile

	lot lottery // net values with their masses, for dominance
}

// Outcome is one payoff and its probability.
type Outcome struct{ Value, Probability decimal.Decimal }

// Percentile is the smallest payoff whose cumulative probability reaches
// P percent.
type Percentile struct {
	P     int
	Value decimal.Decimal
}

// Dominance says that one option stochastically dominates another.
type Dominance struct {
	// Better and Worse are indices into Profiles.Options.
	Better, Worse int
	// Order is 1 (first-order dominance: Better has at least Worse's
	// chance of beating any figure) or 2 (second-order: every decision
	// maker who prefers more to less and is averse to risk prefers
	// Better), the lowest that holds.
	Order int
}

// Sentence says what a dominance means, in plain words.
func (ps *Profiles) Sentence(d Dominance) string {
	more := prefers(ps.Objective)
	b, w := ps.Options[d.Better].Label, ps.Options[d.Worse].Label
	if d.Order == 1 {
		return fmt.Sprintf("%q is better than %q for every decision maker who %s (first-order stochastic dominance)", b, w, more)
	}
	return fmt.Sprintf("%q is better than %q for every decision maker who %s and is averse to risk (second-order stochastic dominance)", b, w, more)
}

// prefers says what every decision maker prefers, in the objective's
// terms.
func prefers(obj tree.Objective) string {
	if obj == tree.Min {
		return "prefers a lower cost to a higher one"
	}
	return "prefers more to less"
}

// RiskProfiles computes the risk profile of every option of a decision of
// sol, and the stochastic dominance between them. It stops with ctx, and
// with a *BudgetError past opts.MaxOutcomes path ends.
func RiskProfiles(ctx context.Context, sol *Solution, opts ProfileOptions) (*Profiles, error) {
	if sol == nil {
		return nil, ErrNoModel
	}
	c := sol.Compiled
	if opts.Policy != nil && len(opts.Policy) != c.Len() {
		return nil, fmt.Errorf("eval: a policy for %d nodes given for a model of %d", len(opts.Policy), c.Len())
	}
	d, notes, err := WatchedDecision(sol, opts.At)
	if err != nil {
		return nil, err
	}
	obj := c.Objective()
	ps := &Profiles{Objective: obj, Exact: c.Exact(), Notes: notes, Node: -1}
	if opts.Threshold != nil {
		ps.Threshold = *opts.Threshold
	}
	w := &lotteryWalk{ctx: ctx, c: c, max: opts.MaxOutcomes, option: "ProfileOptions.MaxOutcomes"}
	if w.max <= 0 {
		w.max = DefaultMaxOutcomes
	}
	w.policy = func(i int) int { return sol.r.Best(i) }
	if opts.Policy != nil {
		w.policy = func(i int) int {
			from, to := c.Kids(i)
			if b := int(opts.Policy[i]); b >= 0 && b < to-from {
				return b
			}
			return sol.r.Best(i)
		}
	}
	if d == nil {
		l, rounded, err := w.lottery(0)
		if err != nil {
			return nil, err
		}
		ps.Exact = ps.Exact && !rounded
		ps.Options = []Profile{ps.profile(c, "", -1, l, c.Mass(0))}
		ps.Notes = append(ps.Notes, "the tree has no decision: one profile of the whole tree")
		return ps, nil
	}
	ps.Decision = d.Node
	for _, b := range d.Path() {
		ps.Path = append(ps.Path, b.Label)
	}
	dn := d.Number()
	ps.Node = dn
	mass := c.Mass(dn)
	taken := w.policy(dn)
	for j, b := range d.Node.Branches {
		l, rounded, err := w.lottery(c.Child(dn, j))
		if err != nil {
			return nil, err
		}
		ps.Exact = ps.Exact && !rounded
		p := ps.profile(c, b.Label, j, l, mass)
		p.Taken = j == taken
		ps.Options = append(ps.Options, p)
	}
	if drawnBelow(c)[dn] {
		// The outcomes are those of the means: which option is better
		// in every outcome is for the draws to show (simulate).
		ps.Drawn = true
		return ps, nil
	}
	for a := range ps.Options {
		for b := range ps.Options {
			if a != b {
				if o := dominance(ps.Options[a].lot, ps.Options[b].lot); o > 0 {
					ps.Dominance = append(ps.Dominance, Dominance{Better: a, Worse: b, Order: o})
				}
			}
		}
	}
	return ps, nil
}

// profile summarises one lottery whose masses are counted from the root;
// mass is the mass of the node it is profiled from.
func (ps *Profiles) profile(c *compiled.Model, label string, branch int, l lottery, mass decimal.Decimal) Profile {
	obj := ps.Objective
	p := Profile{Label: label, Branch: branch, lot: l}
	n := len(l.x)
	// The outcomes in the objective's terms, ascending: under min the
	// costs, so the net values in reverse.
	fig := make([]decimal.Decimal, n)
	fm := make([]decimal.Decimal, n)
	for k := range l.x {
		src := k
		if obj == tree.Min {
			src = n - 1 - k
		}
		fig[k], fm[k] = obj.Figure(l.x[src]), l.m[src]
	}
	whole := mass.Equal(one)
	div := func(x decimal.Decimal) decimal.Decimal {
		if whole || x.IsZero() {
			return x
		}
		q := x.DivRound(mass, compiled.DivisionScale)
		if !q.Mul(mass).Equal(x) {
			ps.Exact = false
		}
		return q
	}
	p.Outcomes = make([]Outcome, n)
	var s1, s2, loss decimal.Decimal
	lossAt := ps.Threshold
	for k := range fig {
		p.Outcomes[k] = Outcome{Value: fig[k], Probability: div(fm[k])}
		s1 = s1.Add(fig[k].Mul(fm[k]))
		s2 = s2.Add(fig[k].Mul(fig[k]).Mul(fm[k]))
		if obj == tree.Min && fig[k].GreaterThan(lossAt) || obj == tree.Max && fig[k].LessThan(lossAt) {
			loss = loss.Add(fm[k])
		}
	}
	p.Min, p.Max = fig[0], fig[n-1]
	p.Mean = div(s1)
	p.Loss = div(loss)
	// Variance = (M·Σ m x² − (Σ m x)²) / M², with M the mass: one division.
	num := mass.Mul(s2).Sub(s1.Mul(s1))
	if whole {
		p.Variance = num
	} else {
		m2 := mass.Mul(mass)
		p.Variance = num.DivRound(m2, compiled.DivisionScale)
		if !p.Variance.Mul(m2).Equal(num) {
			ps.Exact = false
		}
	}
	p.SD, p.SDExact = sqrtDecimal(p.Variance)
	// Percentiles on the exact cumulative masses: the smallest payoff whose
	// cumulative mass reaches P% of the whole.
	for _, pc := range ProfilePercents() {
		want := mass.Mul(decimal.New(int64(pc), -2))
		cum := decimal.Zero
		v := fig[n-1]
		for k := range fig {
			cum = cum.Add(fm[k])
			if !cum.LessThan(want) {
				v = fig[k]
				break
			}
		}
		p.Percentiles = append(p.Percentiles, Percentile{P: pc, Value: v})
	}
	return p
}

// sqrtDecimal is the square root of v ≥ 0 to 34 significant digits, and
// whether that is exact.
func sqrtDecimal(v decimal.Decimal) (decimal.Decimal, bool) {
	if v.Sign() <= 0 {
		return decimal.Zero, v.IsZero()
	}
	f := new(big.Float).SetPrec(512).SetRat(v.Rat())
	f.Sqrt(f)
	s, err := decimal.NewFromString(f.Text('g', 34))
	if err != nil {
		return decimal.Zero, false // not reached: Text writes a number
	}
	return s, s.Mul(s).Equal(v)
}
