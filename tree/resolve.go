package tree

import (
	"fmt"
	"strconv"
	"strings"

	"github.com/shopspring/decimal"
)

// DefaultNodeLimit is the largest tree a reader builds unless told
// otherwise: a model that expands past it is refused with a clear error
// rather than exhausting memory.
const DefaultNodeLimit = 5_000_000

var one = decimal.NewFromInt(1)

// sumTolerance is how far a sum of probabilities that went through a
// rounded division may miss 1 and still count as 1.
var sumTolerance = decimal.New(1, -(DivisionScale - 5))

// Resolve evaluates every expression in the model, fills in the resolved
// fields (Param.Value, Branch.P and .C, Node.Value, the likelihoods of
// tests), revises the probabilities of chance nodes that follow a test by
// Bayes' rule, materialises an End node under every branch that has none,
// and checks the model. over replaces the value of named parameters (for
// sweeps and breakeven searches); it may be nil.
//
// It returns every problem found, errors and warnings, sorted by position.
// The model may be resolved again with other overrides.
func (m *Model) Resolve(over map[string]decimal.Decimal) Diagnostics {
	r := resolver{m: m, env: map[string]Value{}, used: map[string]bool{}}
	r.params(over)
	r.uncertainties()
	r.tests()
	if m.Root == nil {
		r.ds.Add(Pos{}, "add a `decision` or `chance` node", "the model has no tree")
	} else {
		r.tree()
	}
	for _, p := range m.Params {
		if !r.used[p.Name] && !r.dupParam[p] {
			r.ds.Warn(p.Pos, "remove it, or use it in a branch", "%q is defined but never used", p.Name)
		}
	}
	m.inexact = r.inexact
	return r.ds.Sort()
}

type resolver struct {
	m        *Model
	env      map[string]Value
	used     map[string]bool
	dupParam map[*Param]bool
	ds       Diagnostics
	inexact  bool // a division was rounded on the way
	// ustate holds resolved prior probabilities by uncertainty name.
	unc  map[string]*Uncertainty
	test map[string]*Test
}

func (r *resolver) lookup(name string) (Value, bool) {
	v, ok := r.env[name]
	if ok {
		r.used[name] = true
	}
	return v, ok
}

// eval evaluates e and reports a failure as a diagnostic; ok is false then.
func (r *resolver) eval(e Expr) (Value, bool) {
	v, err := Eval(e, r.lookup)
	if err == nil && !v.Exact {
		r.inexact = true
	}
	if err != nil {
		if ee, isEval := err.(*EvalError); isEval {
			// The evaluation stopped at the first problem: every name in
			// the expression counts as used, or the others would be
			// reported as unused too.
			Names(e, func(n *Name) { r.used[n.Name] = true })
			if p := r.m.Param(ee.Name); ee.Name != "" && p != nil {
				// Defined, but further down: say where, and do not also
				// call it unused.
				ee.Hint = fmt.Sprintf("%q is defined at %s, below; move that `let` above this line", ee.Name, p.Pos)
				r.used[ee.Name] = true
			}
			r.ds = append(r.ds, Diagnostic{Severity: Error, Pos: ee.Pos, Summary: ee.Msg, Hint: ee.Hint})
		} else {
			r.ds.Add(e.Pos(), "", "%v", err)
		}
		return v, false
	}
	return v, true
}

func (r *resolver) params(over map[string]decimal.Decimal) {
	r.dupParam = map[*Param]bool{}
	seen := map[string]*Param{}
	for _, p := range r.m.Params {
		if prev := seen[p.Name]; prev != nil {
			r.ds.Add(p.Pos, fmt.Sprintf("it was first defined at %s; give this one another name", prev.Pos), "%q is defined twice", p.Name)
			r.dupParam[p] = true
			continue
		}
		seen[p.Name] = p
		v, ok := r.eval(p.Expr)
		if !ok {
			v = Value{decimal.Zero, true}
		}
		if p.HasRange() {
			lo, ok1 := r.eval(p.Low)
			hi, ok2 := r.eval(p.High)
			if ok1 && ok2 {
				p.LowValue, p.HighValue = lo.D, hi.D
				if lo.D.GreaterThan(hi.D) {
					r.ds.Add(p.Low.Pos(), "write the smaller bound first", "the range of %q runs from %s down to %s", p.Name, lo.D, hi.D)
				} else if ok && (v.D.LessThan(lo.D) || v.D.GreaterThan(hi.D)) {
					r.ds.Warn(p.Expr.Pos(), "widen the range or check the value", "%q = %s lies outside its range %s .. %s", p.Name, v.D, lo.D, hi.D)
				}
			}
		}
		if o, has := over[p.Name]; has {
			v = Value{o, true}
		}
		p.Value = v.D
		r.env[p.Name] = v
	}
}

// probs resolves a set of sibling probabilities, where rest marks the one (at
// most) that takes the complement. It reports problems at the given
// positions and returns the values; ok is false if they are unusable.
func (r *resolver) probs(what string, at Pos, exprs []Expr, rest []bool, pos []Pos) ([]decimal.Decimal, bool) {
	out := make([]decimal.Decimal, len(exprs))
	sum := decimal.Zero
	exact := true
	restAt := -1
	ok := true
	for i, e := range exprs {
		if rest[i] {
			if restAt >= 0 {
				r.ds.Add(pos[i], "only one branch can take the rest; give this one a probability", "a second `rest` under %s", what)
				ok = false
			}
			restAt = i
			continue
		}
		if e == nil {
			r.ds.Add(pos[i], "write a probability such as 25% or 0.25, or `rest`", "this branch under %s has no probability", what)
			ok = false
			continue
		}
		v, good := r.eval(e)
		if !good {
			ok = false
			continue
		}
		if v.D.IsNegative() || v.D.GreaterThan(one) {
			r.ds.Add(e.Pos(), "a probability lies between 0 and 1 (0% to 100%)", "probability %s is outside [0, 1]", v.D)
			ok = false
		}
		out[i] = v.D
		sum = sum.Add(v.D)
		exact = exact && v.Exact
	}
	if !ok {
		return out, false
	}
	if restAt >= 0 {
		left := one.Sub(sum)
		if left.IsNegative() {
			r.ds.Add(pos[restAt], "lower the others so they sum to at most 1", "the other probabilities under %s already sum to %s, leaving nothing for `rest`", what, sum)
			return out, false
		}
		out[restAt] = left
		return out, true
	}
	diff := sum.Sub(one).Abs()
	if !diff.IsZero() && (exact || diff.GreaterThan(sumTolerance)) {
		r.ds.Add(at, "add a `rest` branch or fix one of them", "probabilities under %s sum to %s, not 1", what, sum)
		return out, false
	}
	return out, true
}

func (r *resolver) uncertainties() {
	r.unc = map[string]*Uncertainty{}
	for _, u := range r.m.Uncertainties {
		if prev := r.unc[u.Name]; prev != nil {
			r.ds.Add(u.Pos, fmt.Sprintf("it was first declared at %s", prev.Pos), "uncertainty %q is declared twice", u.Name)
			continue
		}
		r.unc[u.Name] = u
		what := fmt.Sprintf("uncertainty %q", u.Name)
		if len(u.States) < 2 {
			r.ds.Add(u.Pos, "list at least two states, each with its probability", "%s has %d state(s); it needs at least two", what, len(u.States))
			continue
		}
		r.dupLabels(what, len(u.States), func(i int) (string, Pos) { return u.States[i].Label, u.States[i].Pos })
		exprs, rest, pos := make([]Expr, len(u.States)), make([]bool, len(u.States)), make([]Pos, len(u.States))
		for i, s := range u.States {
			exprs[i], rest[i], pos[i] = s.Prob, s.Prob == nil, s.Pos
		}
		ps, _ := r.probs(what, u.Pos, exprs, rest, pos)
		for i, s := range u.States {
			s.P = ps[i]
		}
	}
}

func (r *resolver) tests() {
	r.test = map[string]*Test{}
	for _, t := range r.m.Tests {
		if prev := r.test[t.Name]; prev != nil {
			r.ds.Add(t.Pos, fmt.Sprintf("it was first declared at %s", prev.Pos), "test %q is declared twice", t.Name)
			continue
		}
		r.test[t.Name] = t
		t.CostValue = decimal.Zero
		if t.Cost != nil {
			if v, ok := r.eval(t.Cost); ok {
				t.CostValue = v.D
				if v.D.IsNegative() {
					r.ds.Add(t.Cost.Pos(), "write the cost as a positive amount", "test %q has a negative cost", t.Name)
				}
			}
		}
		u := r.unc[t.On]
		if u == nil {
			r.ds.Add(t.Pos, "declare it with `uncertainty "+t.On+"` above the test", "test %q is on %q, which is not a declared uncertainty", t.Name, t.On)
			continue
		}
		what := fmt.Sprintf("test %q", t.Name)
		if len(t.Readings) < 2 {
			r.ds.Add(t.Pos, "list at least two readings", "%s has %d reading(s); it needs at least two", what, len(t.Readings))
			continue
		}
		r.dupLabels(what, len(t.Readings), func(i int) (string, Pos) { return t.Readings[i].Label, t.Readings[i].Pos })
		ns := len(u.States)
		given := make([][]Expr, len(t.Readings)) // [reading][state]
		for ri, rd := range t.Readings {
			given[ri] = make([]Expr, ns)
			for _, l := range rd.Given {
				si := u.StateIndex(l.State)
				if si < 0 {
					r.ds.Add(l.Pos, "the states of "+u.Name+" are "+quoteList(stateLabels(u)), "%q is not a state of uncertainty %q", l.State, u.Name)
					continue
				}
				if given[ri][si] != nil {
					r.ds.Add(l.Pos, "give each state once", "reading %q gives the likelihood for %q twice", rd.Label, l.State)
				}
				given[ri][si] = l.Prob
			}
			rd.L = make([]decimal.Decimal, ns)
		}
		// For each state, the likelihoods over the readings are a
		// distribution: check it like the branches of a chance node.
		for si, s := range u.States {
			exprs, rest, pos := make([]Expr, len(t.Readings)), make([]bool, len(t.Readings)), make([]Pos, len(t.Readings))
			for ri, rd := range t.Readings {
				exprs[ri], rest[ri], pos[ri] = given[ri][si], rd.Rest && given[ri][si] == nil, rd.Pos
				if exprs[ri] == nil && !rest[ri] {
					exprs[ri] = &Number{At: rd.Pos, Value: decimal.Zero}
				}
			}
			ps, ok := r.probs(fmt.Sprintf("test %q given %q", t.Name, s.Label), t.Pos, exprs, rest, pos)
			if !ok {
				continue
			}
			for ri, rd := range t.Readings {
				rd.L[si] = ps[ri]
			}
		}
	}
}

func stateLabels(u *Uncertainty) []string {
	out := make([]string, len(u.States))
	for i, s := range u.States {
		out[i] = s.Label
	}
	return out
}

func readingLabels(t *Test) []string {
	out := make([]string, len(t.Readings))
	for i, rd := range t.Readings {
		out[i] = rd.Label
	}
	return out
}

func quoteList(xs []string) string {
	q := make([]string, len(xs))
	for i, x := range xs {
		q[i] = fmt.Sprintf("%q", x)
	}
	return strings.Join(q, ", ")
}

func (r *resolver) dupLabels(what string, n int, at func(int) (string, Pos)) {
	seen := make(map[string]Pos, n)
	for i := 0; i < n; i++ {
		l, p := at(i)
		if prev, dup := seen[l]; dup {
			r.ds.Add(p, fmt.Sprintf("the first is at %s; give each branch its own label", prev), "two branches under %s are both labelled %q", what, l)
			continue
		}
		seen[l] = p
	}
}

// Observation is a test reading seen on the way to a node: the context in
// which Bayes' rule revises the uncertainty the test is on.
type Observation struct {
	Test    *Test
	Reading int
	Prev    *Observation // the one seen before it, or nil
	post    map[string][]decimal.Decimal
}

// Posterior returns P(state | every reading in obs) for each state of u,
// computed in one step from the prior and the product of the likelihoods
// (the readings are taken to be independent given the state, as is usual
// for repeated tests). marginal is P(the readings); when it is 0 the prior is
// returned. exact reports whether every division came out exact (no
// rounding at DivisionScale).
func Posterior(u *Uncertainty, obs *Observation) (post []decimal.Decimal, marginal decimal.Decimal, exact bool) {
	joint, marginal := jointOf(u, obs)
	if marginal.IsZero() {
		prior := make([]decimal.Decimal, len(u.States))
		for i, s := range u.States {
			prior[i] = s.P
		}
		return prior, marginal, true
	}
	post = make([]decimal.Decimal, len(joint))
	exact = true
	for i, j := range joint {
		q := Div(j, marginal, true)
		post[i], exact = q.D, exact && q.Exact
	}
	return post, marginal, exact
}

func jointOf(u *Uncertainty, obs *Observation) ([]decimal.Decimal, decimal.Decimal) {
	joint := make([]decimal.Decimal, len(u.States))
	for i, s := range u.States {
		joint[i] = s.P
	}
	for o := obs; o != nil; o = o.Prev {
		if o.Test.On != u.Name {
			continue
		}
		rd := o.Test.Readings[o.Reading]
		for i := range joint {
			joint[i] = joint[i].Mul(rd.L[i])
		}
	}
	marginal := decimal.Zero
	for _, j := range joint {
		marginal = marginal.Add(j)
	}
	return joint, marginal
}

// knownState records that a chance node on an uncertainty was passed on the
// way down through one of its states: below it the state is known.
type knownState struct {
	u    string
	s    int
	prev *knownState
}

func (k *knownState) state(u string) int {
	for ; k != nil; k = k.prev {
		if k.u == u {
			return k.s
		}
	}
	return -1
}

// posterior is P(state | what is known at the node): certainty when a chance
// node on u was passed above it (one uncertainty is one event, however often
// it occurs), otherwise Bayes' rule on the readings seen.
func (r *resolver) posterior(u *Uncertainty, obs *Observation, known *knownState) []decimal.Decimal {
	if s := known.state(u.Name); s >= 0 {
		p := make([]decimal.Decimal, len(u.States))
		for i := range p {
			p[i] = decimal.Zero
		}
		p[s] = one
		return p
	}
	if obs == nil {
		p := make([]decimal.Decimal, len(u.States))
		for i, s := range u.States {
			p[i] = s.P
		}
		return p
	}
	if p, ok := obs.post[u.Name]; ok {
		return p
	}
	p, _, exact := Posterior(u, obs)
	if !exact {
		r.inexact = true
	}
	if obs.post == nil {
		obs.post = map[string][]decimal.Decimal{}
	}
	obs.post[u.Name] = p
	return p
}

// tree walks the tree iteratively (deep trees must not overflow the stack).
func (r *resolver) tree() {
	type item struct {
		n     *Node
		obs   *Observation
		known *knownState
	}
	stack := []item{{r.m.Root, nil, nil}}
	zeroWarned := map[*Test]bool{}
	r.m.size = 0
	for len(stack) > 0 {
		it := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		n := it.n
		r.m.size++
		what := strconv.Quote(n.Display())
		if n.Label == "" && n.Uncertainty == "" && n.Test == "" {
			what = "(unlabelled)" // a node from JSON or Go; its position says which
		}
		n.TestCost = decimal.Zero
		var childObs []*Observation  // per branch, when a test is read here
		var childKnown []*knownState // per branch, when an uncertainty is sampled here
		switch n.Kind {
		case KindEnd:
			n.Value = decimal.Zero
			if n.Payoff != nil {
				if v, ok := r.eval(n.Payoff); ok {
					n.Value = v.D
				}
			}
			if len(n.Branches) > 0 {
				r.ds.Add(n.Pos, "make it a decision or chance node", "end node %s has branches", what)
			}
		case KindDecision:
			if len(n.Branches) == 0 {
				r.ds.Add(n.Pos, "give it at least one option, indented beneath it", "decision %s has no branches", what)
			}
			for _, b := range n.Branches {
				if b.Prob != nil || b.Rest {
					r.ds.Add(b.Pos, "the decision maker picks a branch; only chance branches have probabilities", "decision branch %q has a probability", b.Label)
				}
				b.P = decimal.Zero
			}
		case KindChance:
			switch {
			case n.Uncertainty != "":
				u := r.unc[n.Uncertainty]
				if u == nil {
					r.ds.Add(n.Pos, "declare it with `uncertainty "+n.Uncertainty+"` above the tree", "unknown uncertainty %q", n.Uncertainty)
					break
				}
				post := r.posterior(u, it.obs, it.known)
				childKnown = make([]*knownState, len(n.Branches))
				r.matchLabels(n, fmt.Sprintf("uncertainty %q", u.Name), stateLabels(u), func(b *Branch, i int) {
					b.P = post[i]
					for bi := range n.Branches {
						if n.Branches[bi] == b {
							childKnown[bi] = &knownState{u: u.Name, s: i, prev: it.known}
						}
					}
				})
			case n.Test != "":
				t := r.test[n.Test]
				if t == nil {
					r.ds.Add(n.Pos, "declare it with `test "+n.Test+" on ...` above the tree", "unknown test %q", n.Test)
					break
				}
				u := r.unc[t.On]
				if u == nil || len(t.Readings) < 2 {
					break // reported with the test
				}
				if r.m.Objective == Min {
					n.TestCost = t.CostValue
				} else {
					n.TestCost = t.CostValue.Neg()
				}
				post := r.posterior(u, it.obs, it.known)
				childObs = make([]*Observation, len(n.Branches))
				r.matchLabels(n, fmt.Sprintf("test %q", t.Name), readingLabels(t), func(b *Branch, ri int) {
					p := decimal.Zero
					for si := range post {
						p = p.Add(post[si].Mul(t.Readings[ri].L[si]))
					}
					b.P = p
					for bi := range n.Branches {
						if n.Branches[bi] == b {
							childObs[bi] = &Observation{Test: t, Reading: ri, Prev: it.obs}
						}
					}
					if p.IsZero() && !zeroWarned[t] {
						zeroWarned[t] = true
						r.ds.Warn(b.Pos, "the subtree under it can never be reached; check the likelihoods", "reading %q of test %q has probability 0 here", b.Label, t.Name)
					}
				})
			default:
				if len(n.Branches) < 2 {
					r.ds.Add(n.Pos, "a chance node needs at least two outcomes; use a plain branch for a certain event", "chance node %s has %d branch(es)", what, len(n.Branches))
				}
				exprs, rest, pos := make([]Expr, len(n.Branches)), make([]bool, len(n.Branches)), make([]Pos, len(n.Branches))
				for i, b := range n.Branches {
					exprs[i], rest[i], pos[i] = b.Prob, b.Rest, b.Pos
				}
				ps, ok := make([]decimal.Decimal, len(n.Branches)), false
				if len(n.Branches) >= 2 { // with fewer, the sum is beside the point
					ps, ok = r.probs(what, n.Pos, exprs, rest, pos)
				}
				for i, b := range n.Branches {
					b.P = ps[i]
					// A zero is only news when the probabilities are sound.
					if ok && b.P.IsZero() && (b.Prob != nil || b.Rest) && len(n.Branches) >= 2 {
						r.ds.Warn(b.Pos, "remove it, or give it a probability", "branch %q has probability 0 and never happens", b.Label)
					}
				}
			}
		}
		if n.Kind != KindEnd {
			r.dupLabels(what, len(n.Branches), func(i int) (string, Pos) { return n.Branches[i].Label, n.Branches[i].Pos })
		}
		for i := len(n.Branches) - 1; i >= 0; i-- {
			b := n.Branches[i]
			b.C = decimal.Zero
			if b.Cash != nil {
				if v, ok := r.eval(b.Cash); ok {
					b.C = v.D
				}
			}
			if b.Node == nil {
				b.Node = &Node{Kind: KindEnd, Pos: b.Pos}
			}
			obs := it.obs
			if childObs != nil && childObs[i] != nil {
				obs = childObs[i]
			}
			known := it.known
			if childKnown != nil && childKnown[i] != nil {
				known = childKnown[i]
			}
			stack = append(stack, item{b.Node, obs, known})
		}
	}
}

// matchLabels checks that the branches of n are exactly the given labels,
// each once, and calls set for each matched branch with the label's index.
func (r *resolver) matchLabels(n *Node, what string, labels []string, set func(b *Branch, i int)) {
	index := make(map[string]int, len(labels))
	for i, l := range labels {
		index[l] = i
	}
	seen := make([]bool, len(labels))
	for _, b := range n.Branches {
		if b.Rest {
			r.ds.Add(b.Pos, "remove it: the probability comes from the declaration", "branch %q under %s has a probability of its own", b.Label, what)
		}
		i, ok := index[b.Label]
		if !ok {
			r.ds.Add(b.Pos, "the branches here must be "+quoteList(labels), "%q is not one of the outcomes of %s", b.Label, what)
			continue
		}
		if seen[i] {
			continue // reported as a duplicate label
		}
		seen[i] = true
		set(b, i)
		// A probability written here must be the one the declaration gives
		// (solved JSON carries them, revised by Bayes' rule, to be read
		// back); any other is a mistake, never silently replaced.
		if b.Prob != nil {
			if v, good := r.eval(b.Prob); good && !v.D.Equal(b.P) {
				r.ds.Add(b.Prob.Pos(), "remove it: the probability comes from the declaration", "branch %q under %s has probability %s of its own, but the declaration gives %s here", b.Label, what, v.D, b.P)
			}
		}
	}
	var missing []string
	for i, s := range seen {
		if !s {
			missing = append(missing, labels[i])
		}
	}
	if len(missing) > 0 {
		r.ds.Add(n.Pos, "add a branch for each, even one with nothing under it", "%s is missing %s", what, quoteList(missing))
	}
}
