package eval

import (
	"fmt"
	"io"
	"math"
	"strconv"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/interchange"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// Risk attitude.
//
// With a risk tolerance R (in the model's money) the decision maker's
// utility of a net payoff x is exponential, U(x) = 1 − exp(−x/R): risk
// averse, and the same towards a gamble whatever wealth it is added to.
// A lottery's certainty equivalent — the sure amount worth as much to the
// decision maker — is then CE = −R ln Σ p·exp(−x/R), and the tree is rolled
// back on certainty equivalents instead of expected values: a chance node
// is worth the CE of its branches' CEs (the same as the CE of all its paths,
// by the exponential's shape), a decision the largest CE among its options.
// Under objective min the utility is applied to the net value, the negated
// cost, so that a risk-averse decision maker fears high costs.
//
// exp and ln make the figures inexact: they are computed in float64 and
// rounded to RiskDigits significant digits. A chance node is worked out
// relative to its worst branch m, CE = m − R ln Σ p·exp(−(x−m)/R), so that
// no exponent is positive and nothing overflows however large the payoffs
// are against R; when the sum is near 1 (R large against the spread) it is
// taken as 1 + Σ p·expm1(−(x−m)/R) with log1p, which keeps the small
// difference from the expected value to full precision.

// RiskDigits is the number of significant digits certainty equivalents
// are given to.
const RiskDigits = 15

// RiskSolution is a model solved with an exponential utility: the policy
// that maximises the certainty equivalent, with the expected values of
// that policy (exact) beside the certainty equivalents (rounded).
type RiskSolution struct {
	// Tolerance is the risk tolerance R.
	Tolerance decimal.Decimal
	// EMV is the expected-value solution this was made from; Averse the
	// expected values (exact) of the risk-averse policy: every decision
	// takes the option with the largest certainty equivalent.
	EMV, Averse *Solution
	// Notes say what the figures leave out.
	Notes   []string
	ce      []float64 // per compiled node: CE of taking the branch into it, net
	layout  *ceLayout
	figures tree.Objective
}

// SolveRiskAverse rolls sol's model back on certainty equivalents with risk
// tolerance R. R must be positive; a *RequestError says so otherwise.
func SolveRiskAverse(sol *Solution, tolerance decimal.Decimal) (*RiskSolution, error) {
	if sol == nil {
		return nil, ErrNoModel
	}
	r, err := toleranceFloat(tolerance)
	if err != nil {
		return nil, err
	}
	c := sol.Compiled
	l := newCELayout(c)
	ce := make([]float64, c.Len())
	policy := make([]int32, c.Len())
	l.fold(r, ce, policy)
	averse, err := Follow(c, policy)
	if err != nil {
		return nil, err
	}
	rs := &RiskSolution{Tolerance: tolerance, EMV: sol, Averse: averse, ce: ce, layout: l, figures: c.Objective()}
	if len(c.Uncertain()) > 0 {
		rs.Notes = append(rs.Notes, "distributions written in the model (pert, triangular, …) are taken at their means here; their spread is not in the certainty equivalents")
	}
	return rs, nil
}

// toleranceFloat checks R and converts it.
func toleranceFloat(tolerance decimal.Decimal) (float64, error) {
	if tolerance.Sign() <= 0 {
		return 0, reqErr("a risk tolerance is a positive amount of money, not %s", tolerance)
	}
	r := tolerance.InexactFloat64()
	if r == 0 || math.IsInf(r, 0) {
		return 0, reqErr("a risk tolerance of %s is beyond what can be computed with: give one between 1e-300 and 1e300", tolerance)
	}
	return r, nil
}

// CE is the certainty equivalent of the whole tree in the objective's
// terms (a sure cost under min), rounded to RiskDigits significant digits.
func (rs *RiskSolution) CE() decimal.Decimal { return rs.Value(0) }

// Value is the certainty equivalent from node i on (the cash on the branch
// into i not included), in the objective's terms, rounded.
func (rs *RiskSolution) Value(i int) decimal.Decimal {
	return rs.figure(rs.ce[i] - rs.layout.cash[i])
}

// BranchValue is the certainty equivalent of taking branch j of node i
// (its cash included), in the objective's terms, rounded.
func (rs *RiskSolution) BranchValue(i, j int) decimal.Decimal {
	return rs.figure(rs.ce[rs.EMV.Compiled.Child(i, j)])
}

// Premium is the risk premium of taking branch j of decision i: its
// expected value under the risk-averse policy minus its certainty
// equivalent, as a non-negative amount (what the decision maker would give
// up to be rid of the risk), rounded.
func (rs *RiskSolution) Premium(i, j int) decimal.Decimal {
	k := rs.EMV.Compiled.Child(i, j)
	emv, _ := rs.Averse.r.Total(k)
	return premium(emv, rs.ce[k])
}

// RootPremium is the risk premium of the whole tree under the risk-averse
// policy.
func (rs *RiskSolution) RootPremium() decimal.Decimal {
	emv, _ := rs.Averse.r.Value(0)
	return premium(emv, rs.ce[0]-rs.layout.cash[0])
}

// premium is emv − ce, rounded. The certainty equivalent is known to
// RiskDigits significant digits of the larger of the two figures, so the
// difference is known to that same decimal place and no further: a
// premium of a few thousand beside payoffs of 1e12 gets three decimals,
// not fifteen digits of which half are noise.
func premium(emv decimal.Decimal, ce float64) decimal.Decimal {
	e := emv.InexactFloat64()
	d := e - ce
	p := roundSig(d)
	scale := math.Max(math.Abs(e), math.Abs(ce))
	if d == 0 || scale == 0 || math.IsInf(scale, 0) {
		return p
	}
	place := int32(math.Floor(math.Log10(scale))) - (RiskDigits - 1)
	if p.Exponent() < place {
		p = decimal.NewFromFloat(d).Round(-place)
	}
	return p
}

// Chosen is the branch decision i takes under the risk-averse policy.
func (rs *RiskSolution) Chosen(i int) int { return rs.Averse.r.Best(i) }

// Cost is what the caution costs in expected value: the expected value of
// the expected-value policy minus that of the risk-averse one (exact, never
// negative), in the same money.
func (rs *RiskSolution) Cost() decimal.Decimal {
	a, _ := rs.EMV.r.Value(0)
	b, _ := rs.Averse.r.Value(0)
	return a.Sub(b)
}

// Decisions lists the decisions the risk-averse policy or the
// expected-value policy reaches, in pre-order (as nodes of Averse), and
// for each whether the risk-averse policy reaches it.
func (rs *RiskSolution) Decisions() (ds []*Solved, averse []bool) {
	ra, ev := rs.Averse.Reachable(), rs.EMV.Reachable()
	nodes := rs.Averse.table()
	for x := range nodes {
		if s := &nodes[x]; s.Node.Kind == tree.KindDecision && (ra[x] || ev[x]) {
			ds, averse = append(ds, s), append(averse, ra[x])
		}
	}
	return ds, averse
}

// Differences lists the decisions either policy reaches where the
// risk-averse policy takes an option the expected-value policy does not
// count among its best, in pre-order (as nodes of Averse).
func (rs *RiskSolution) Differences() []*Solved {
	var out []*Solved
	all, _ := rs.Decisions()
	for _, s := range all {
		if e := rs.EMV.At(s.Number()); !e.IsBest(rs.Chosen(s.Number())) {
			out = append(out, s)
		}
	}
	return out
}

func (rs *RiskSolution) figure(net float64) decimal.Decimal {
	return roundSig(rs.figures.FigureFloat(net))
}

// roundSig is x to RiskDigits significant digits, as a decimal.
func roundSig(x float64) decimal.Decimal { return roundDigits(x, RiskDigits) }

// roundDigits is x to n significant digits, as a decimal.
func roundDigits(x float64, n int) decimal.Decimal {
	d, err := decimal.NewFromString(strconv.FormatFloat(x, 'e', n-1, 64))
	if err != nil {
		return decimal.Zero // not reached: the fold keeps every figure finite
	}
	return d
}

// ceLayout is the float64 copy of a compiled model the fold runs on.
type ceLayout struct {
	c          *compiled.Model
	cash, own  []float64 // per node: net cash on the branch into it; what it adds itself
	prob       []float64 // per node: probability of the branch into it under a chance node
	kind       []tree.Kind
	from, upTo []int32
}

func newCELayout(c *compiled.Model) *ceLayout {
	n := c.Len()
	f := c.NewFloats()
	l := &ceLayout{c: c, cash: make([]float64, n), own: make([]float64, n), prob: make([]float64, n),
		kind: make([]tree.Kind, n), from: make([]int32, n), upTo: make([]int32, n)}
	for i := 0; i < n; i++ {
		l.cash[i], l.own[i], l.prob[i] = f.Cash(i), f.Own(i), f.Prob(i)
		if c.FrameStart(i) {
			// Below a branch of probability 0, or where a very deep tree
			// starts a frame of its own: the exact figure knows which.
			l.prob[i] = c.Prob(i).InexactFloat64()
		}
		l.kind[i] = c.Kind(i)
		from, to := c.Kids(i)
		l.from[i], l.upTo[i] = int32(from), int32(to)
	}
	return l
}

// fold fills ce with every node's certainty equivalent (its cash
// included, net) for risk tolerance r, bottom-up over the breadth-first
// numbering, and policy with each decision's choice (-1 elsewhere): the
// first option with the largest certainty equivalent.
func (l *ceLayout) fold(r float64, ce []float64, policy []int32) {
	for i := len(ce) - 1; i >= 0; i-- {
		from, to := int(l.from[i]), int(l.upTo[i])
		policy[i] = -1
		below := 0.0
		switch {
		case from == to:
		case l.kind[i] == tree.KindDecision:
			b := from
			for k := from + 1; k < to; k++ {
				if ce[k] > ce[b] {
					b = k
				}
			}
			policy[i] = int32(b - from)
			below = ce[b]
		default:
			below = chanceCE(r, ce[from:to], l.prob[from:to])
		}
		ce[i] = l.cash[i] + l.own[i] + below
	}
}

// chanceCE is the certainty equivalent of outcomes xs with probabilities
// ps (those of probability 0 left out) for risk tolerance r.
func chanceCE(r float64, xs, ps []float64) float64 {
	m := math.Inf(1)
	for k, x := range xs {
		if ps[k] > 0 && x < m {
			m = x
		}
	}
	if math.IsInf(m, 1) {
		return 0 // no branch can happen: not a valid model
	}
	// Relative to the worst outcome every exponent is ≤ 0.
	var t, mean float64 // Σ p·expm1(−d/r), Σ p·d
	for k, x := range xs {
		if ps[k] > 0 {
			dx := x - m
			t += ps[k] * math.Expm1(-dx/r)
			mean += ps[k] * dx
		}
	}
	var delta float64
	if t > -0.5 {
		// The sum Σ p·exp(−d/r) = 1 + t is near 1: ln(1 + t) keeps the
		// small difference.
		delta = -r * math.Log1p(t)
	} else {
		// Far from 1, 1 + t would lose the small sum's digits: add up the
		// exponentials themselves.
		var s float64
		for k, x := range xs {
			if ps[k] > 0 {
				s += ps[k] * math.Exp(-(x-m)/r)
			}
		}
		delta = -r * math.Log(s)
	}
	// Jensen's inequality: the certainty equivalent lies between the worst
	// outcome and the expected value; rounding must not push it outside.
	delta = math.Max(0, math.Min(delta, mean))
	return m + delta
}

// RiskNote says which figures of a risk-averse solution are rounded.
func (rs *RiskSolution) RiskNote() string {
	return fmt.Sprintf("certainty_equivalent and risk_premium are rounded to %d significant digits (exponential utility, risk tolerance %s: exp and ln in float64); value and best are those of the risk-averse policy, exact", RiskDigits, rs.Tolerance)
}

// WriteJSON writes the solved tree of the risk-averse policy in the
// interchange format ("value" and "best" of that policy, exact), with the
// certainty equivalent, the risk premium, the expected-value policy's
// value and the cost of caution at the top level (see
// interchange.RiskSummary).
func (rs *RiskSolution) WriteJSON(w io.Writer) error {
	a := rs.Averse
	return interchange.Write(w, a.Model, interchange.WriteOptions{Compiled: a.Compiled, Solved: solvedView{a}, Probabilities: true,
		Risk: &interchange.RiskSummary{Tolerance: rs.Tolerance, CertaintyEquivalent: rs.CE(), RiskPremium: rs.RootPremium(),
			EVPolicyValue: rs.EMV.Value(), CostOfCaution: rs.Cost(), Note: rs.RiskNote()}})
}
