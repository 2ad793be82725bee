package compiled

import (
	"fmt"
	"math"
	"strconv"

	"github.com/forkcast/forkcast/dist"
	"github.com/forkcast/forkcast/tree"
)

// Probabilities drawn from distributions. A probability that reads an
// input written as a distribution (`let p = pert(10%, 50%, 90%)` on a
// branch) is the distribution's mean in exact analyses, where it lies in
// [0, 1]; simulation draws it, and a draw outside [0, 1] would stop the
// simulation. The check here finds such figures when the model is
// compiled, at the `let` (or the calculation) that makes them:
//
//   - from bounded distributions (pert, triangular, uniform, discrete, a
//     register's figures) the range of the probability is known exactly
//     when each random input enters it once (interval arithmetic is then
//     exact: the figure is monotone in each input, so its extremes lie at
//     the inputs' bounds, which discrete values and the ends of a
//     continuous range reach or approach): a range reaching outside
//     [0, 1] is an error. When an input enters twice (p * (1 - p)), the
//     interval is wider than the truth and nothing is said; simulation
//     still checks every draw;
//   - an unbounded distribution (normal, lognormal) feeding a probability
//     always has draws outside [0, 1] (a lognormal's above 1): a warning
//     saying what share of its draws, when the probability is the
//     distribution itself. It stays a warning because the share can be
//     negligible (normal(50%, 5%)), and exact analyses are unaffected.

// probSlack is how far past 0 or 1 a range computed in float64 may reach
// by rounding before it is reported.
const probSlack = 1e-12

// probCheck is a probability figure that reads a random input, kept for
// checkDrawnProbs: its expression, its program and where it goes (as in
// dynFig).
type probCheck struct {
	expr    tree.Expr
	prog    *program
	kind    figKind
	i, j, k int32
}

// span is the range of a figure over the random inputs' bounds. srcs are
// the random inputs (source slots) it reads; exact is false when one is
// read twice, or an operation widened the range (a division by a range
// around 0), so that the span may be wider than the figure's true range.
type span struct {
	lo, hi  float64
	srcs    []int32
	exact   bool
	unbound []int32 // unbounded sources read
}

// noteProb records a probability figure that reads a random input.
func (k *compiler) noteProb(e tree.Expr, p *program, kind figKind, i, j, kk int32) {
	k.probChecks = append(k.probChecks, probCheck{expr: e, prog: p, kind: kind, i: i, j: j, k: kk})
}

// checkDrawnProbs reports the probabilities whose draws can leave [0, 1].
func (k *compiler) checkDrawnProbs() {
	if len(k.probChecks) == 0 {
		return
	}
	sh := k.c.sh
	srcOf := map[int32]int{}
	for i, s := range sh.sources {
		srcOf[s.slot] = i
	}
	letProg := map[int32]*program{}
	for _, d := range sh.dyn {
		if d.kind == figInput {
			letProg[d.i] = d.prog
		}
	}
	memo := map[int32]*span{}
	said := map[string]bool{}
	var slotSpan func(s int32) *span
	slotSpan = func(s int32) *span {
		if sp, ok := memo[s]; ok {
			return sp
		}
		var sp *span
		if si, ok := srcOf[s]; ok {
			if d := k.sourceDist(si); d != nil {
				lo, hi := d.Bounds()
				sp = &span{lo: lo, hi: hi, srcs: []int32{s}, exact: true}
				if math.IsInf(lo, 0) || math.IsInf(hi, 0) {
					sp.unbound = []int32{s}
				}
			}
		} else if p := letProg[s]; p != nil && k.random[s] {
			sp = p.span(slotSpan)
		} else {
			v := k.pool.Float64(k.c.in[s])
			sp = &span{lo: v, hi: v, exact: true}
		}
		memo[s] = sp
		return sp
	}
	// figProb spans by node, for the rests; drawn marks the nodes that
	// have one (a nil span is one that could not be followed).
	byNode := make([]*span, len(sh.parent))
	drawn := make([]bool, len(sh.parent))
	for _, pc := range k.probChecks {
		sp := pc.prog.span(slotSpan)
		if pc.kind == figProb && int(pc.i) < len(byNode) {
			byNode[pc.i], drawn[pc.i] = sp, true
		}
		if sp == nil || len(sp.unbound) == 0 && (!sp.exact || sp.hi <= 1+probSlack && sp.lo >= -probSlack) {
			continue // nothing to say
		}
		// Where to say it: at the distribution or the let's calculation
		// when the probability is an input as it stands, else at the
		// probability's own expression.
		at, written, name, direct := pc.expr.Pos(), pc.expr.String(), "", -1
		for s, ok := pc.prog.plainSlot(); ok; s, ok = letProg[s].plainSlot() {
			if int(s) < len(sh.params) {
				name = sh.params[s].Name
				at, written = sh.params[s].Expr.Pos(), sh.params[s].Expr.String()
			}
			if si, isSrc := srcOf[s]; isSrc {
				direct = si
				if c := sh.sources[si].call; c != nil {
					at, written = c.At, c.String()
				}
				break
			}
			if letProg[s] == nil {
				break
			}
		}
		subject := "it"
		if name != "" {
			subject = strconv.Quote(name)
		}
		use := subject + " is " + k.probUse(pc)
		var summary, hint string
		switch {
		case len(sp.unbound) > 0:
			hint = "for a probability, use a distribution bounded within 0..1, such as pert(10%, 50%, 90%)"
			share := "some"
			if direct >= 0 {
				if d := k.sourceDist(direct); d != nil {
					share = shareText(outsideShare(d))
				}
			}
			if direct >= 0 {
				summary = fmt.Sprintf("%s is unbounded: %s of its draws fall outside 0 .. 1, where simulate stops, and %s", written, share, use)
			} else {
				what := k.probUse(pc)
				if name != "" {
					what = subject + ", " + what + ","
				}
				summary = fmt.Sprintf("%s reads %s, which is unbounded: some draws take it outside 0 .. 1, where simulate stops", what, k.unboundText(sp.unbound[0], srcOf))
			}
		case sp.exact && (sp.hi > 1+probSlack || sp.lo < -probSlack):
			hint = "the distribution's range must stay within 0..1; for a probability use ranges like pert(10%, 50%, 90%)"
			reach := "up to " + percentText(sp.hi)
			if sp.hi <= 1+probSlack {
				reach = "down to " + percentText(sp.lo)
			}
			switch {
			case direct >= 0:
				summary = fmt.Sprintf("%s can draw %s, outside 0 .. 1, and %s", written, reach, use)
			case name != "":
				summary = fmt.Sprintf("%s can reach %s with the draws it reads, outside 0 .. 1, and it is %s", subject, reach, k.probUse(pc))
			default:
				summary = fmt.Sprintf("%s can reach %s with the draws it reads, outside 0 .. 1", k.probUse(pc), reach)
			}
		default:
			continue
		}
		if key := at.String() + summary; !said[key] {
			said[key] = true
			if len(sp.unbound) > 0 {
				k.ds.Warn(at, hint, "%s", summary)
			} else {
				k.ds.Add(at, hint, "%s", summary)
			}
		}
	}
	k.checkDrawnRests(byNode, drawn)
}

// checkDrawnRests reports the plain chance nodes whose `rest` can be
// drawn below 0: the other branches' probabilities, some drawn, can sum
// past 1. Judged only when that sum's range is exact (every drawn input
// enters it once, from bounded distributions).
func (k *compiler) checkDrawnRests(byNode []*span, drawn []bool) {
	sh := k.c.sh
	if sh.restAt == nil {
		return
	}
	said := map[tree.Pos]bool{}
	last := int32(-1) // the last chance node judged: siblings are numbered together
	for i, d := range drawn {
		if !d {
			continue
		}
		p := sh.parent[i]
		if p < 0 || p == last || int(p) >= len(sh.restAt) || sh.restAt[p] < 0 || sh.nodes[p] == nil {
			continue
		}
		last = p
		sum := &span{exact: true}
		for c := sh.first[p]; c < sh.first[p+1]; c++ {
			if c == sh.restAt[p] {
				continue
			}
			sp := byNode[c]
			if !drawn[c] {
				v := k.pool.Float64(k.c.prob[c])
				sp = &span{lo: v, hi: v, exact: true}
			}
			// A branch that is out of range itself is reported as such.
			if sp == nil || len(sp.unbound) > 0 || !sp.exact || !disjoint(sum.srcs, sp.srcs) || sp.hi > 1+probSlack || sp.lo < -probSlack {
				sum = nil
				break
			}
			sum = &span{lo: sum.lo + sp.lo, hi: sum.hi + sp.hi, srcs: append(append([]int32{}, sum.srcs...), sp.srcs...), exact: true}
		}
		if sum == nil || sum.hi <= 1+probSlack {
			continue
		}
		n := sh.nodes[p]
		rest := n.Branches[sh.restAt[p]-sh.first[p]]
		if said[rest.Pos] { // a subtree used twice: one message
			continue
		}
		said[rest.Pos] = true
		k.ds.Add(rest.Pos, "the drawn probabilities' ranges together must stay within 0..1: narrow them, or write one as what is left of another (1 - p)",
			"the other probabilities under %s can sum to %s with their draws, leaving %q (rest) below 0", describe(n), percentText(sum.hi), rest.Label)
	}
}

// sourceDist is the distribution of source si with its arguments
// evaluated, or nil.
func (k *compiler) sourceDist(si int) dist.Distribution {
	s := k.c.sh.sources[si]
	if s.out != nil {
		d, _, _ := s.out.dist(k.c.pool, k.c.in, k.c.inInexact, nil)
		return d
	}
	fn, ok := functions[s.call.Func]
	if !ok {
		return nil
	}
	d, _, _, err := meanOf(fn, s.prog.args(k.c.pool, k.c.in))
	if err != nil {
		return nil
	}
	return d
}

// unboundText names an unbounded source: its let, or the call as written.
func (k *compiler) unboundText(slot int32, srcOf map[int32]int) string {
	s := k.c.sh.sources[srcOf[slot]]
	var written string
	if s.call != nil {
		written = s.call.String()
	} else if s.out != nil {
		written = s.out.expr.String()
	}
	switch {
	case s.let >= 0 && written != "":
		return strconv.Quote(k.c.sh.params[s.let].Name) + " = " + written
	case s.let >= 0:
		return strconv.Quote(k.c.sh.params[s.let].Name)
	case written != "":
		return written
	}
	return "an input"
}

// probUse says which probability a check is: `the probability of "Late"
// under "Supplier"`.
func (k *compiler) probUse(pc probCheck) string {
	sh := k.c.sh
	switch pc.kind {
	case figProb:
		if int(pc.i) < len(sh.parent) {
			if p := sh.parent[pc.i]; p >= 0 && int(p) < len(sh.nodes) && sh.nodes[p] != nil {
				if j := int(pc.i - sh.first[p]); j >= 0 && j < len(sh.nodes[p].Branches) {
					return fmt.Sprintf("the probability of %q under %s", sh.nodes[p].Branches[j].Label, describe(sh.nodes[p]))
				}
			}
		}
	case figPrior:
		if int(pc.i) < len(sh.uncs) && int(pc.j) < len(sh.uncs[pc.i].States) {
			u := sh.uncs[pc.i]
			return fmt.Sprintf("the probability of %q of uncertainty %s", u.States[pc.j].Label, u.Name)
		}
	case figLikelihood:
		if int(pc.i) < len(sh.tests) && int(pc.j) < len(sh.tests[pc.i].Readings) {
			t := sh.tests[pc.i]
			return fmt.Sprintf("the probability of reading %q of test %s", t.Readings[pc.j].Label, t.Name)
		}
	}
	return "a probability"
}

// outsideShare is the probability that a draw of d falls below 0 or
// above 1. The tails of the normal and lognormal come from erfc, since
// 1 − CDF(1) loses the small ones to rounding.
func outsideShare(d dist.Distribution) float64 {
	switch d := d.(type) {
	case dist.Normal:
		m, sd := d.Mean(), d.SD()
		return math.Erfc((m-0)/(sd*math.Sqrt2))/2 + math.Erfc((1-m)/(sd*math.Sqrt2))/2
	case dist.LogNormal:
		return math.Erfc((0-d.Mu())/(d.Sigma()*math.Sqrt2)) / 2 // ln 1 = 0
	}
	out := 1 - d.CDF(1)
	if lo, _ := d.Bounds(); lo < 0 {
		out += d.CDF(0)
	}
	return out
}

// percentText writes a probability as a percentage: 1.2 is "120%".
func percentText(p float64) string {
	return strconv.FormatFloat(p*100, 'g', 6, 64) + "%"
}

// shareText writes a share of draws as a percentage, small ones in
// scientific form.
func shareText(p float64) string {
	if p >= 0.001 {
		return strconv.FormatFloat(p*100, 'g', 3, 64) + "%"
	}
	return strconv.FormatFloat(p, 'g', 2, 64)
}

// plainSlot reports whether p only reads one input slot as it stands, and
// which.
func (p *program) plainSlot() (int32, bool) {
	if p == nil || len(p.ops) != 1 || p.ops[0].code != opSlot {
		return 0, false
	}
	return p.ops[0].arg, true
}

// span is p's range when each slot s lies in slot(s) (nil: unknown). It is
// nil when p does something interval arithmetic cannot follow here (a
// quantile, a division by a range around 0).
func (p *program) span(slot func(int32) *span) *span {
	var st []*span
	for _, o := range p.ops {
		switch o.code {
		case opConst:
			v := p.fconsts[o.arg]
			st = append(st, &span{lo: v, hi: v, exact: true})
			continue
		case opSlot:
			s := slot(o.arg)
			if s == nil {
				return nil
			}
			st = append(st, s)
			continue
		case opNeg:
			x := st[len(st)-1]
			st[len(st)-1] = &span{lo: -x.hi, hi: -x.lo, srcs: x.srcs, exact: x.exact, unbound: x.unbound}
			continue
		case opAdd, opSub, opMul, opDiv:
		default:
			return nil
		}
		y, x := st[len(st)-1], st[len(st)-2]
		st = st[:len(st)-2]
		r := &span{exact: x.exact && y.exact && disjoint(x.srcs, y.srcs)}
		r.srcs = append(append([]int32{}, x.srcs...), y.srcs...)
		r.unbound = append(append([]int32{}, x.unbound...), y.unbound...)
		switch o.code {
		case opAdd:
			r.lo, r.hi = x.lo+y.lo, x.hi+y.hi
		case opSub:
			r.lo, r.hi = x.lo-y.hi, x.hi-y.lo
		case opMul:
			r.lo, r.hi = corners(x, y, func(a, b float64) float64 { return a * b })
		case opDiv:
			if y.lo <= 0 && y.hi >= 0 {
				return nil
			}
			r.lo, r.hi = corners(x, y, func(a, b float64) float64 { return a / b })
		}
		if math.IsNaN(r.lo) || math.IsNaN(r.hi) {
			return nil
		}
		st = append(st, r)
	}
	if len(st) != 1 {
		return nil
	}
	return st[0]
}

// corners is the smallest and largest of f over the ends of x and y.
func corners(x, y *span, f func(a, b float64) float64) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, a := range []float64{x.lo, x.hi} {
		for _, b := range []float64{y.lo, y.hi} {
			v := f(a, b)
			if math.IsNaN(v) { // 0 · ∞: the range is unbounded
				v = math.Inf(1)
				lo = math.Inf(-1)
			}
			lo, hi = min(lo, v), max(hi, v)
		}
	}
	return lo, hi
}

// disjoint reports whether a and b share no slot.
func disjoint(a, b []int32) bool {
	for _, x := range a {
		for _, y := range b {
			if x == y {
				return false
			}
		}
	}
	return true
}
