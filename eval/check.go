package eval

import (
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// Range is the spread of payoffs reachable from a node: the worst and best
// cumulative payoff of any path beneath it, whatever the later decisions.
type Range struct{ Lo, Hi decimal.Decimal }

// Ranges returns, for every node in pre-order, the lowest and highest
// payoff reachable below it (the cash on the branch into it not included).
func (sol *Solution) Ranges() []Range {
	out := make([]Range, len(sol.nodes))
	for i := len(sol.nodes) - 1; i >= 0; i-- {
		s := &sol.nodes[i]
		if s.Node.Kind == tree.KindEnd {
			out[i] = Range{s.Node.Value, s.Node.Value}
			continue
		}
		set := false
		next := i + 1 // the first child; each next one follows its sibling's subtree
		for _, b := range s.Node.Branches {
			kid := next
			next += int(sol.nodes[kid].size)
			if s.Node.Kind == tree.KindChance && b.P.IsZero() {
				continue // never happens
			}
			k := out[kid]
			lo, hi := k.Lo.Add(b.C), k.Hi.Add(b.C)
			if !set || lo.LessThan(out[i].Lo) {
				out[i].Lo = lo
			}
			if !set || hi.GreaterThan(out[i].Hi) {
				out[i].Hi = hi
			}
			set = true
		}
		out[i].Lo = out[i].Lo.Add(s.Node.TestCost) // a test's cost is paid on every path
		out[i].Hi = out[i].Hi.Add(s.Node.TestCost)
	}
	return out
}

// Dominated warns about options that can never pay: a branch of a decision
// whose best possible outcome is no better than the worst possible outcome
// of another branch of the same decision (and strictly worse somewhere, so
// two identical certain options are not reported).
func Dominated(sol *Solution) tree.Diagnostics {
	rs := sol.Ranges()
	var ds tree.Diagnostics
	min := sol.Model.Objective == tree.Min
	for i := range sol.nodes {
		s := &sol.nodes[i]
		if s.Node.Kind != tree.KindDecision {
			continue
		}
		kids := s.Kids()
		br := func(j int) Range {
			r := rs[kids[j].self]
			c := s.Node.Branches[j].C
			return Range{r.Lo.Add(c), r.Hi.Add(c)}
		}
		for a := range kids {
			ra := br(a)
			for b := range kids {
				if a == b {
					continue
				}
				rb := br(b)
				// Under max, a is dominated when a's best <= b's worst; under
				// min (costs), when a's lowest cost >= b's highest.
				var dom bool
				if min {
					dom = !ra.Lo.LessThan(rb.Hi) && !(ra.Lo.Equal(rb.Hi) && ra.Hi.Equal(rb.Lo))
				} else {
					dom = !ra.Hi.GreaterThan(rb.Lo) && !(ra.Hi.Equal(rb.Lo) && ra.Lo.Equal(rb.Hi))
				}
				if dom {
					ab, bb := s.Node.Branches[a], s.Node.Branches[b]
					ds.Warn(ab.Pos, "drop it, or check its figures",
						"option %q of %q is dominated: in every outcome it does no better than %q", ab.Label, s.Node.Display(), bb.Label)
					break
				}
			}
		}
	}
	return ds
}
