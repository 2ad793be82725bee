package eval

import (
	"fmt"
	"math/big"
	"math/rand"
	"slices"
	"testing"

	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// pl is a random piecewise-linear tree in one cash input x: an option is a
// line a + b·x, or a chance node whose outcomes each lead to a line or to
// an inner decision among lines. The value of an inner decision is the
// upper envelope of its lines (convex, kinks where two lines cross), so an
// option's value is piecewise linear with kinks that move the inner
// choices: the case where a cost changes decisions below the one watched.
type plLine struct{ a, b int64 }

type plOutcome struct {
	p     int64 // in hundredths; the last outcome takes the rest
	lines []plLine
}

type plOption struct {
	line     *plLine
	outcomes []plOutcome
}

// value is the option's value at x on math/big.Rat, in the objective's
// terms (under min the figures are costs and the inner decisions take the
// smallest); good turns it into goodness (negated under min).
func (o plOption) value(x *big.Rat, obj tree.Objective) *big.Rat {
	line := func(l plLine) *big.Rat {
		return new(big.Rat).Add(big.NewRat(l.a, 1), new(big.Rat).Mul(big.NewRat(l.b, 1), x))
	}
	if o.line != nil {
		return line(*o.line)
	}
	sum, rest := new(big.Rat), int64(100)
	for j, oc := range o.outcomes {
		p := oc.p
		if j == len(o.outcomes)-1 {
			p = rest
		}
		rest -= p
		var v *big.Rat
		for _, l := range oc.lines {
			w := line(l)
			if v == nil || (obj == tree.Max && w.Cmp(v) > 0) || (obj == tree.Min && w.Cmp(v) < 0) {
				v = w
			}
		}
		sum.Add(sum, new(big.Rat).Mul(big.NewRat(p, 100), v))
	}
	return sum
}

// TestBreakevenInnerDecisionFlips: breakeven on a cash input that flips
// decisions inside the options (random, invented trees). The expected
// switches come from math/big.Rat: between consecutive kinks of the inner
// envelopes every option's value is linear, so the best option can change
// only at a kink or where two options' lines cross inside such a piece;
// the best option is taken at the midpoint between consecutive candidates
// (and at the ends of the range, where a tie goes to the first option in
// model order) and each change is a switch, which must be found exactly,
// with the options on each side. The seed's trees include switches that sit
// exactly where an option bends (an inner decision changes at the same
// point), which no straight bracket contains.
func TestBreakevenInnerDecisionFlips(t *testing.T) {
	r := rand.New(rand.NewSource(8))
	lo, hi := big.NewRat(-10, 1), big.NewRat(10, 1)
	trees := 200
	if testing.Short() {
		trees = 60
	}
	for it := 0; it < trees; it++ {
		obj := tree.Objective(r.Intn(2))
		randLine := func() plLine { return plLine{int64(r.Intn(41) - 20), int64(r.Intn(11) - 5)} }
		opts := make([]plOption, 2+r.Intn(3))
		for i := range opts {
			if r.Intn(3) == 0 {
				l := randLine()
				opts[i].line = &l
				continue
			}
			n := 2 + r.Intn(2)
			left := int64(100)
			for j := 0; j < n; j++ {
				oc := plOutcome{}
				if j < n-1 {
					oc.p = 10 * int64(1+r.Intn(int(left/10)-(n-1-j)))
					left -= oc.p
				}
				for range 1 + r.Intn(3) {
					oc.lines = append(oc.lines, randLine())
				}
				opts[i].outcomes = append(opts[i].outcomes, oc)
			}
		}
		m := plModel(opts, obj)
		be := breakeven(t, m, "x", "", "", "")

		// Candidates: the range's ends, every crossing of two lines of one
		// inner decision, then every crossing of two options' pieces.
		var kinks []*big.Rat
		cross := func(a1, b1, a2, b2 *big.Rat) {
			if db := new(big.Rat).Sub(b1, b2); db.Sign() != 0 {
				x := new(big.Rat).Quo(new(big.Rat).Sub(a2, a1), db)
				if x.Cmp(lo) > 0 && x.Cmp(hi) < 0 {
					kinks = append(kinks, x)
				}
			}
		}
		for _, o := range opts {
			for _, oc := range o.outcomes {
				for p := range oc.lines {
					for q := p + 1; q < len(oc.lines); q++ {
						l1, l2 := oc.lines[p], oc.lines[q]
						cross(big.NewRat(l1.a, 1), big.NewRat(l1.b, 1), big.NewRat(l2.a, 1), big.NewRat(l2.b, 1))
					}
				}
			}
		}
		pieces := sortedRats(append(kinks, lo, hi))
		for s := 0; s+1 < len(pieces); s++ {
			x0, x1 := pieces[s], pieces[s+1]
			// Each option is a line on [x0, x1]: its slope and intercept.
			piece := func(o plOption) (a, b *big.Rat) {
				v0, v1 := o.value(x0, obj), o.value(x1, obj)
				b = new(big.Rat).Quo(new(big.Rat).Sub(v1, v0), new(big.Rat).Sub(x1, x0))
				return new(big.Rat).Sub(v0, new(big.Rat).Mul(b, x0)), b
			}
			for i := range opts {
				ai, bi := piece(opts[i])
				for j := i + 1; j < len(opts); j++ {
					aj, bj := piece(opts[j])
					if db := new(big.Rat).Sub(bi, bj); db.Sign() != 0 {
						x := new(big.Rat).Quo(new(big.Rat).Sub(aj, ai), db)
						if x.Cmp(x0) > 0 && x.Cmp(x1) < 0 {
							kinks = append(kinks, x)
						}
					}
				}
			}
		}
		cands := sortedRats(append(kinks, lo, hi))
		best := func(x *big.Rat) int {
			c, cv := 0, opts[0].value(x, obj)
			for i := 1; i < len(opts); i++ {
				v := opts[i].value(x, obj)
				if (obj == tree.Max && v.Cmp(cv) > 0) || (obj == tree.Min && v.Cmp(cv) < 0) {
					c, cv = i, v
				}
			}
			return c
		}
		type sw struct {
			x            *big.Rat
			below, above int
		}
		var want []sw
		prev := best(lo)
		for s := 0; s+1 < len(cands); s++ {
			mid := new(big.Rat).Mul(new(big.Rat).Add(cands[s], cands[s+1]), big.NewRat(1, 2))
			if b := best(mid); b != prev {
				want = append(want, sw{cands[s], prev, b})
				prev = b
			}
		}
		if b := best(hi); b != prev {
			want = append(want, sw{hi, prev, b})
		}

		if len(be.Switches) != len(want) {
			t.Errorf("tree %d (%v, %+v): %d switches %v, want %d", it, obj, opts, len(be.Switches), be.Switches, len(want))
			continue
		}
		for i, w := range want {
			got := be.Switches[i]
			what := fmt.Sprintf("tree %d switch %d", it, i)
			if !got.Exact || got.Fraction == nil || got.Fraction.Cmp(w.x) != 0 {
				t.Errorf("%s: at %s (exact %v, %v), want exactly %s", what, got.At, got.Exact, got.Fraction, w.x.RatString())
			}
			near(t, what, got.At, w.x)
			if got.Below != w.below || got.Above != w.above {
				t.Errorf("%s: %d → %d, want %d → %d", what, got.Below, got.Above, w.below, w.above)
			}
		}
	}
}

func sortedRats(xs []*big.Rat) []*big.Rat {
	xs = slices.Clone(xs)
	slices.SortFunc(xs, func(a, b *big.Rat) int { return a.Cmp(b) })
	return slices.CompactFunc(xs, func(a, b *big.Rat) bool { return a.Cmp(b) == 0 })
}

// plModel writes opts as a model: a decision among the options, cash in
// the input x (gains under max, costs under min).
func plModel(opts []plOption, obj tree.Objective) *tree.Model {
	cash := func(l plLine) (gain, cost tree.Expr) {
		e := &tree.Binary{Op: '+', X: tree.Num(decimal.NewFromInt(l.a)), Y: &tree.Binary{Op: '*', X: tree.Num(decimal.NewFromInt(l.b)), Y: tree.Ref("x")}}
		if obj == tree.Min {
			return nil, e
		}
		return e, nil
	}
	pick := tree.Decision("Pick")
	for i, o := range opts {
		b := &tree.Branch{Label: fmt.Sprintf("O%d", i)}
		if o.line != nil {
			b.Gain, b.Cost = cash(*o.line)
			pick.Branches = append(pick.Branches, b)
			continue
		}
		ch := tree.Chance(fmt.Sprintf("C%d", i))
		for j, oc := range o.outcomes {
			inner := tree.Decision(fmt.Sprintf("D%d.%d", i, j))
			for q, l := range oc.lines {
				lb := &tree.Branch{Label: fmt.Sprintf("L%d", q)}
				lb.Gain, lb.Cost = cash(l)
				inner.Branches = append(inner.Branches, lb)
			}
			label := fmt.Sprintf("S%d", j)
			if j == len(o.outcomes)-1 {
				ch.Branches = append(ch.Branches, tree.RestOutcome(label, tree.NoCash, inner))
			} else {
				ch.Branches = append(ch.Branches, tree.Outcome(label, tree.Num(decimal.New(oc.p, -2)), tree.NoCash, inner))
			}
		}
		b.Node = ch
		pick.Branches = append(pick.Branches, b)
	}
	return &tree.Model{Objective: obj, Root: pick,
		Params: []*tree.Param{{Name: "x", Expr: tree.Num(decimal.Zero), Low: tree.Num(decimal.NewFromInt(-10)), High: tree.Num(decimal.NewFromInt(10))}}}
}
