package eval

import (
	"sort"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// Range is the spread of payoffs reachable from a node: the worst and best
// cumulative payoff of any path beneath it, whatever the later decisions,
// in the objective's terms (Lo is the smaller figure).
type Range struct{ Lo, Hi decimal.Decimal }

// ranges returns, for every node by compiled number, the lowest and highest
// net value reachable from it, the cash on the branch into it included.
func (sol *Solution) ranges() []Range {
	c := sol.Compiled
	n := c.Len()
	out := make([]Range, n)
	for i := n - 1; i >= 0; i-- {
		own := c.Cash(i).Add(c.Payoff(i)).Sub(c.TestCostAt(i))
		from, to := c.Kids(i)
		if from == to {
			out[i] = Range{own, own}
			continue
		}
		set := false
		var r Range
		for k := from; k < to; k++ {
			if c.Kind(i) == tree.KindChance && c.Prob(k).IsZero() {
				continue // never happens
			}
			if !set || out[k].Lo.LessThan(r.Lo) {
				r.Lo = out[k].Lo
			}
			if !set || out[k].Hi.GreaterThan(r.Hi) {
				r.Hi = out[k].Hi
			}
			set = true
		}
		out[i] = Range{r.Lo.Add(own), r.Hi.Add(own)}
	}
	return out
}

// Ranges returns, for every node in pre-order, the lowest and highest
// payoff reachable below it (the cash on the branch into it not included),
// in the objective's terms.
func (sol *Solution) Ranges() []Range {
	c := sol.Compiled
	net := sol.ranges()
	nodes := sol.table()
	out := make([]Range, len(nodes))
	for x := range nodes {
		i := int(nodes[x].i)
		cash := c.Cash(i)
		lo, hi := net[i].Lo.Sub(cash), net[i].Hi.Sub(cash)
		if sol.obj() == tree.Min {
			lo, hi = hi.Neg(), lo.Neg()
		}
		out[x] = Range{lo, hi}
	}
	return out
}

// Dominated warns about options no decision maker who prefers more to
// less would choose. An option whose best possible outcome is no better
// than the worst possible outcome of another branch of the same decision
// is dominated in every outcome. Otherwise, an option is dominated in
// distribution when another branch is better by first-order stochastic
// dominance, the optimal policy followed after the decision (see
// RiskProfiles): at least as high a chance of beating any figure, and a
// higher chance for some. A decision whose options are all certain (a
// fallback such as walking away) gets no warning: a certain worse option
// is a plain choice, not a mistake. Each option is named with the first
// option in model order that dominates it.
//
// The distributions cost a walk of each decision's subtree; past
// DefaultMaxOutcomes path ends in all, the remaining decisions are checked
// by their ranges only, and a warning says so.
func Dominated(sol *Solution) tree.Diagnostics { return dominated(sol, DefaultMaxOutcomes) }

// dominated is Dominated with maxEnds path ends for the distributions.
func dominated(sol *Solution, maxEnds int) tree.Diagnostics {
	c := sol.Compiled
	rs := sol.ranges()
	var ds tree.Diagnostics
	w := &lotteryWalk{c: c, max: maxEnds, option: "DefaultMaxOutcomes",
		policy: func(i int) int { return sol.r.Best(i) }}
	budgetLeft := true
	drawn := drawnBelow(c)
	nodes := sol.table()
	for x := range nodes {
		s := &nodes[x]
		if s.Node.Kind != tree.KindDecision {
			continue
		}
		from, to := c.Kids(int(s.i))
		k := to - from
		if drawn[s.i] {
			// A figure under it is random and stands at its mean here:
			// its outcomes are not the ones the draws would give.
			continue
		}
		certain := true
		for j := from; j < to; j++ {
			certain = certain && rs[j].Lo.Equal(rs[j].Hi)
		}
		if certain || k < 2 {
			continue
		}
		// best[j]: the largest worst case among options 0..j, so the first
		// option whose worst case reaches a given figure is found by
		// binary search.
		best := make([]decimal.Decimal, k)
		for j := 0; j < k; j++ {
			best[j] = rs[from+j].Lo
			if j > 0 && best[j-1].GreaterThan(best[j]) {
				best[j] = best[j-1]
			}
		}
		warned := make([]bool, k)
		for a := 0; a < k; a++ {
			ra := rs[from+a]
			first := sort.Search(k, func(j int) bool { return !best[j].LessThan(ra.Hi) })
			for b := first; b < k; b++ {
				rb := rs[from+b]
				// a is dominated when its best is no better than b's
				// worst, unless both are the same certain figure.
				if b == a || rb.Lo.LessThan(ra.Hi) || (ra.Hi.Equal(rb.Lo) && ra.Lo.Equal(rb.Hi)) {
					continue
				}
				ab, bb := s.Node.Branches[a], s.Node.Branches[b]
				ds.Warn(ab.Pos, "drop it, or check its figures",
					"option %q of %q is dominated: in every outcome it does no better than %q", ab.Label, s.Node.Display(), bb.Label)
				warned[a] = true
				break
			}
		}
		if budgetLeft && !stochasticallyDominated(w, s, warned, &ds) {
			budgetLeft = false
			ds.Warn(s.Node.Pos, "check the options of the decisions after it with `forkcast profile --at DECISION`",
				"options from decision %q on were checked for dominance by their ranges only: their distributions would take more than %d path ends", s.Node.Display(), w.max)
		}
	}
	return ds
}

// stochasticallyDominated warns about each option of decision s not yet
// warned about that another option dominates by first order. It returns
// false when the walk passed its budget.
func stochasticallyDominated(w *lotteryWalk, s *Solved, warned []bool, ds *tree.Diagnostics) bool {
	c := w.c
	i := s.Number()
	lots := make([]lottery, len(warned))
	for j := range lots {
		l, _, err := w.lottery(c.Child(i, j))
		if err != nil {
			return false
		}
		lots[j] = l
	}
	more := prefers(c.Objective())
	for a := range lots {
		if warned[a] {
			continue
		}
		for b := range lots {
			if b == a || dominance(lots[b], lots[a]) != 1 {
				continue
			}
			ab, bb := s.Node.Branches[a], s.Node.Branches[b]
			ds.Warn(ab.Pos, "drop it, or check its figures (`forkcast profile` shows both distributions)",
				"option %q of %q is dominated in distribution: %q is better for every decision maker who %s (its chance of doing at least as well as any figure is never lower)", ab.Label, s.Node.Display(), bb.Label, more)
			break
		}
	}
	return true
}

// drawnBelow returns, per node, whether a node under it has a figure
// drawn from a random input (compiled.Model.DrawnNodes). Nodes are
// numbered breadth-first, so a node comes after its parent.
func drawnBelow(c *compiled.Model) []bool {
	drawn := c.DrawnNodes()
	below := make([]bool, len(drawn))
	for i := len(drawn) - 1; i > 0; i-- {
		if drawn[i] || below[i] {
			below[c.Parent(i)] = true
		}
	}
	return below
}
