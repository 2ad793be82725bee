package eval

import (
	"context"
	"fmt"
	"sort"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// A lottery is the exact distribution of the payoff from one node on when
// a fixed policy is followed: every distinct net value with its mass (the
// probability of reaching the end it comes from, counted from the root, as
// compiled.Model.Mass gives it). All the options of one decision share the
// decision's mass, so their lotteries compare by masses alone, with no
// division; probabilities are masses over that common mass.
type lottery struct {
	x []decimal.Decimal // distinct net values, ascending
	m []decimal.Decimal // their masses
}

// certain reports whether the lottery has a single outcome.
func (l lottery) certain() bool { return len(l.x) == 1 }

// lotteryWalk collects lotteries on one compiled model and counts the path
// ends it visits against a budget.
type lotteryWalk struct {
	ctx    context.Context
	c      *compiled.Model
	policy func(i int) int // the branch decision i takes
	ends   int             // path ends visited so far
	max    int
	option string // the option that raises max, for the BudgetError
	steps  int
}

// lottery walks the subtree under node start (the cash on the branch into
// start and everything below it counted), taking at each decision the
// branch the policy gives and leaving out chance branches that can never
// happen (probability 0). Masses are counted in the frame of start's
// parent: where a very deep tree starts a frame of its own, the masses in
// it are weighed by compiled.Model.FrameWeight (rounded: rounded is then
// set).
func (w *lotteryWalk) lottery(start int) (lot lottery, rounded bool, err error) {
	c := w.c
	type item struct {
		i   int
		acc decimal.Decimal
		wt  *decimal.Decimal // what a mass here is worth in start's parent's frame; nil for 1
	}
	var xs, ms []decimal.Decimal
	stack := []item{{start, decimal.Zero, nil}}
	for len(stack) > 0 {
		it := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		i := it.i
		if c.FrameStart(i) {
			if c.Unreachable(i) {
				continue // below a branch of probability 0
			}
			f := c.FrameWeight(i)
			if it.wt != nil {
				f = f.Mul(*it.wt)
			}
			it.wt, rounded = &f, true
		}
		acc := it.acc.Add(c.Cash(i)).Add(c.Payoff(i)).Sub(c.TestCostAt(i))
		if w.steps++; w.steps&4095 == 0 && w.ctx != nil {
			if err := w.ctx.Err(); err != nil {
				return lottery{}, false, err
			}
		}
		from, to := c.Kids(i)
		switch {
		case from == to:
			if w.ends++; w.ends > w.max {
				return lottery{}, false, &BudgetError{What: fmt.Sprintf("more than %d path ends", w.max), Option: w.option}
			}
			m := c.Mass(i)
			if it.wt != nil {
				m = m.Mul(*it.wt)
			}
			xs, ms = append(xs, acc), append(ms, m)
		case c.Kind(i) == tree.KindDecision:
			stack = append(stack, item{from + w.policy(i), acc, it.wt})
		default:
			for k := to - 1; k >= from; k-- {
				stack = append(stack, item{k, acc, it.wt})
			}
		}
	}
	return merge(xs, ms), rounded, nil
}

// merge sorts (value, mass) pairs by value and adds up the masses of equal
// values.
func merge(xs, ms []decimal.Decimal) lottery {
	idx := make([]int, len(xs))
	for i := range idx {
		idx[i] = i
	}
	sort.SliceStable(idx, func(a, b int) bool { return xs[idx[a]].LessThan(xs[idx[b]]) })
	var l lottery
	for _, i := range idx {
		if n := len(l.x); n > 0 && l.x[n-1].Equal(xs[i]) {
			l.m[n-1] = l.m[n-1].Add(ms[i])
			continue
		}
		l.x, l.m = append(l.x, xs[i]), append(l.m, ms[i])
	}
	return l
}

// dominance returns the lowest order at which a stochastically dominates
// b (1 or 2), or 0 when it does neither; the two lotteries must have the
// same total mass. Values are net (more is better).
//
// First order: the cumulative distribution of a is never above b's, so a
// has at least b's chance of exceeding any figure. Second order: the
// integral of a's cumulative distribution from the left is never above
// b's. Both cumulative distributions are step functions that change only
// at the values of the two lotteries, and their integrals are piecewise
// linear with corners only there, so checking at those values is exact;
// beyond the largest both integrals rise at the same slope (the total
// mass), so nothing changes after it. Identical lotteries dominate neither
// way.
func dominance(a, b lottery) int {
	first, second := true, true
	same := true
	var fa, fb, ga, gb decimal.Decimal // cumulative masses and their integrals
	var prev decimal.Decimal
	i, j := 0, 0
	for k := 0; i < len(a.x) || j < len(b.x); k++ {
		var x decimal.Decimal
		switch {
		case j == len(b.x) || i < len(a.x) && a.x[i].LessThan(b.x[j]):
			x = a.x[i]
		default:
			x = b.x[j]
		}
		if k > 0 {
			// The integrals up to x: the cumulative masses held since prev.
			dx := x.Sub(prev)
			ga, gb = ga.Add(fa.Mul(dx)), gb.Add(fb.Mul(dx))
			if ga.GreaterThan(gb) {
				second = false
			}
		}
		var ma, mb decimal.Decimal
		if i < len(a.x) && a.x[i].Equal(x) {
			ma = a.m[i]
			i++
		}
		if j < len(b.x) && b.x[j].Equal(x) {
			mb = b.m[j]
			j++
		}
		if !ma.Equal(mb) {
			same = false
		}
		fa, fb = fa.Add(ma), fb.Add(mb)
		if fa.GreaterThan(fb) {
			first = false
		}
		if !first && !second {
			return 0
		}
		prev = x
	}
	switch {
	case same:
		return 0
	case first:
		return 1
	case second:
		return 2
	}
	return 0
}
