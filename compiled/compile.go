package compiled

import (
	"fmt"
	"strconv"

	"github.com/forkcast/forkcast/internal/bulk"
	"github.com/forkcast/forkcast/internal/exact"
	"github.com/forkcast/forkcast/tree"
)

// Compile checks m and compiles it. It returns every problem found, errors
// and warnings, sorted by position; the Model is nil when there are errors.
// m is read, never changed.
func Compile(m *tree.Model) (*Model, tree.Diagnostics) { return compile(m, Options{}) }

func compile(m *tree.Model, opts Options) (*Model, tree.Diagnostics) {
	k := &compiler{m: m, pool: &exact.Pool{}, used: map[string]bool{}, opts: opts}
	c := &Model{src: m, pool: k.pool, sh: &shape{end: &tree.Node{Kind: tree.KindEnd}}}
	k.c = c
	k.params()
	k.correlations()
	if r := m.RiskTolerance; r != nil && r.Value().Sign() <= 0 {
		k.ds.Add(r.At, "it is the amount of money at which a 50-50 gamble of winning it or losing half of it is just acceptable, e.g. `risk tolerance 250_000`",
			"a risk tolerance is a positive amount of money, not %s", r.Value())
	}
	k.uncertainties()
	k.tests()
	switch {
	case m.Root == nil && len(m.Registers) == 0:
		k.ds.Add(tree.Pos{}, "add a `decision` or `chance` node", "the model has no tree")
	case m.Root == nil:
		// Registers alone: inputs and no tree (HasTree is false).
	default:
		k.tree()
		k.env = nil
	}
	k.usedElsewhere()
	k.checkDrawnProbs()
	k.c.sh.random = k.random
	for _, p := range m.Params {
		switch {
		case k.used[p.Name] || k.dupParam[p]:
		case k.correlated[p.Name]:
			k.ds.Warn(p.Pos, "it is named only in `correlate` lines: it is drawn, but its draws feed no figure; use it in a branch, or remove it and its correlate lines",
				"%q is defined but never used", p.Name)
		default:
			k.ds.Warn(p.Pos, "remove it, or use it in a branch", "%q is defined but never used", p.Name)
		}
	}
	if k.ds.HasErrors() {
		return nil, k.ds.Sort()
	}
	k.feeds()
	k.linearFigures()
	d, ds := c.derive(true)
	k.ds = append(k.ds, ds...)
	if k.ds.HasErrors() {
		return nil, k.ds.Sort()
	}
	c.d = d
	return c, k.ds.Sort()
}

type compiler struct {
	m        *tree.Model
	c        *Model
	pool     *exact.Pool
	used     map[string]bool
	dupParam map[*tree.Param]bool
	ds       tree.Diagnostics
	visible  int32       // slots below this are in scope for the expression being compiled
	work     group       // reused while checking sibling probabilities
	random   []bool      // per input slot: a distribution feeds it
	current  *tree.Param // the input being compiled, if any
	// correlated holds the inputs named in `correlate` lines, which do
	// not count as uses.
	correlated map[string]bool
	// probChecks are the probabilities that read random inputs
	// (drawnprob.go).
	probChecks []probCheck
	opts       Options
	// calls gives each distribution written in a `let` its slot, so that
	// a let compiled again below a split (split.go, while relet is set)
	// reads the same random input. Elsewhere every distribution in the
	// expanded tree is a random input of its own, as in a model read
	// from JSON, where copies share nothing.
	calls map[*tree.Call]int32
	relet bool
	// env maps input slots to the slots that stand for them below the
	// branch of a split being compiled (split.go); envOf is each node's,
	// nil until the first split (nodes above and beside it have none).
	env   map[int32]int32
	envOf []map[int32]int32
	progs progSlab // where the programs of figures that read inputs are kept
	// netSub and netNeg are netExpr's scratch.
	netSub tree.Binary
	netNeg tree.Unary
	// scratchProg is where a figure is compiled, to be evaluated and,
	// when it reads an input, packed into progs.
	scratchProg program
}

// look resolves a name to its input slot.
func (k *compiler) look(n *tree.Name) (int32, *EvalError) {
	s, ok := k.c.sh.slotOf[n.Name]
	if ok && s < k.visible {
		k.used[n.Name] = true
		if o, over := k.env[s]; over {
			return o, nil // below a split: the input at the branch's value
		}
		return s, nil
	}
	if p := k.m.Param(n.Name); p != nil {
		// Defined, but further down: say where, and do not also call it
		// unused.
		k.used[n.Name] = true
		return 0, &EvalError{Pos: n.At, Msg: fmt.Sprintf("unknown name %q", n.Name), Name: n.Name,
			Hint: fmt.Sprintf("%q is defined at %s, below; move that `let` above this line", n.Name, p.Pos)}
	}
	return 0, &EvalError{Pos: n.At, Msg: fmt.Sprintf("unknown name %q", n.Name), Name: n.Name,
		Hint: "define it with `let " + n.Name + " = ...` above this line"}
}

// numOf is a literal's value, made without a decimal when it fits in
// machine words.
func numOf(pool *exact.Pool, n *tree.Number) exact.Num {
	if c, e, ok := n.Small(); ok {
		return exact.Small(c, e)
	}
	return pool.Of(n.Value())
}

// figure compiles and evaluates e; a figure that reads inputs is recorded
// so that it is evaluated again when they change. ok is false when e cannot
// be evaluated (reported).
func (k *compiler) figure(e tree.Expr, kind figKind, i, j, kk int32) (exact.Num, bool) {
	if num, ok := e.(*tree.Number); ok {
		return numOf(k.pool, num), true // the common case: a number as written
	}
	p, err := k.program(e)
	if err != nil {
		// Every name in the expression counts as used, or the others
		// would be reported as unused too.
		tree.Names(e, func(n *tree.Name) { k.used[n.Name] = true })
		k.diag(err)
		return exact.Zero, false
	}
	v, isExact, err := p.eval(k.pool, k.c.in, k.c.inInexact)
	if err != nil {
		k.diag(err)
		return exact.Zero, false
	}
	if !isExact {
		k.c.rounded = true
		if kind == figInput {
			k.inexactSlot(i)
		}
	}
	if kind == figInput && k.readsRandom(p) {
		k.random[i] = true
	}
	if !p.isConst() {
		packed := k.progs.pack(p)
		k.c.sh.dyn = append(k.c.sh.dyn, dynFig{kind: kind, i: i, j: j, k: kk, prog: packed})
		if (kind == figProb || kind == figPrior || kind == figLikelihood) && k.readsRandom(packed) {
			k.noteProb(e, packed, kind, i, j, kk)
		}
	}
	if kind != figInput { // an input's rounding is tracked per input (inInexact)
		k.c.noteRounded(!isExact, !p.isConst())
	}
	return v, true
}

// inexactSlot marks input slot i as having gone through a rounded division.
func (k *compiler) inexactSlot(i int32) {
	for len(k.c.inInexact) < len(k.c.in) {
		k.c.inInexact = append(k.c.inInexact, false)
	}
	k.c.inInexact[i] = true
}

// readsRandom reports whether p reads a slot that a distribution feeds.
func (k *compiler) readsRandom(p *program) bool {
	for _, s := range p.slots {
		if k.random[s] {
			return true
		}
	}
	return false
}

// source gives a distribution written in an expression an input slot of
// its own: a random input, worth its mean in every exact analysis and
// drawn by simulation. Its arguments may read inputs, but not random ones
// and not other distributions.
func (k *compiler) source(call *tree.Call) (int32, *EvalError) {
	if s, ok := k.calls[call]; ok && k.relet {
		return s, nil
	}
	var nested *tree.Call
	for _, a := range call.Args {
		walkExpr(a, func(e tree.Expr) {
			if c, ok := e.(*tree.Call); ok && nested == nil {
				nested = c
			}
		})
	}
	if nested != nil {
		return 0, &EvalError{Pos: nested.At, Msg: fmt.Sprintf("a distribution inside %s(...)", call.Func),
			Hint: "a distribution's arguments are figures (numbers, inputs, calculations); define the inner one with its own `let`"}
	}
	p, err := compileExpr(k.pool, call, k.look, nil)
	if err != nil {
		return 0, err
	}
	for _, s := range p.slots {
		if k.random[s] {
			return 0, &EvalError{Pos: call.At, Msg: fmt.Sprintf("the arguments of %s(...) read %q, which is random", call.Func, k.m.Params[s].Name),
				Hint: "give a distribution fixed figures or inputs that are not themselves drawn from a distribution"}
		}
	}
	slot := int32(len(k.c.in))
	v, isExact, err := p.eval(k.pool, k.c.in, k.c.inInexact)
	if err != nil {
		return 0, err
	}
	k.c.in = append(k.c.in, v)
	if k.c.inInexact != nil {
		k.c.inInexact = append(k.c.inInexact, false) // one entry per slot, once there are any
	}
	k.random = append(k.random, true)
	if !isExact {
		k.c.rounded = true
		k.inexactSlot(slot)
	}
	let := int32(-1)
	if k.current != nil && k.current.Expr == tree.Expr(call) {
		let = k.visible
	}
	k.c.sh.sources = append(k.c.sh.sources, source{call: call, slot: slot, prog: p, let: let})
	if k.calls == nil {
		k.calls = map[*tree.Call]int32{}
	}
	k.calls[call] = slot
	if !p.isConst() {
		k.c.sh.dyn = append(k.c.sh.dyn, dynFig{kind: figInput, i: slot, prog: p})
	}
	return slot, nil
}

// walkExpr calls f for e and every expression inside it.
func walkExpr(e tree.Expr, f func(tree.Expr)) {
	if e == nil {
		return
	}
	f(e)
	switch e := e.(type) {
	case *tree.Unary:
		walkExpr(e.X, f)
	case *tree.Binary:
		walkExpr(e.X, f)
		walkExpr(e.Y, f)
	case *tree.Call:
		for _, a := range e.Args {
			walkExpr(a, f)
		}
	}
}

func (k *compiler) diag(err *EvalError) {
	k.ds = append(k.ds, tree.Diagnostic{Severity: tree.Error, Pos: err.Pos, Summary: err.Msg, Hint: err.Hint})
}

func (k *compiler) params() {
	sh := k.c.sh
	k.dupParam = map[*tree.Param]bool{}
	sh.slotOf = make(map[string]int32, len(k.m.Params))
	sh.params = k.m.Params
	sh.ranges = make([]rangeProg, len(k.m.Params))
	k.c.in = make([]exact.Num, len(k.m.Params))
	k.random = make([]bool, len(k.m.Params))
	seen := map[string]*tree.Param{}
	for slot, p := range k.m.Params {
		k.visible = int32(slot)
		k.current = p
		if prev := seen[p.Name]; prev != nil {
			k.ds.Add(p.Pos, fmt.Sprintf("it was first defined at %s; give this one another name", prev.Pos), "%q is defined twice", p.Name)
			k.dupParam[p] = true
			continue
		}
		seen[p.Name] = p
		v, ok := k.figure(p.Expr, figInput, int32(slot), 0, 0)
		if p.HasRange() {
			lo, ok1 := k.rangeEnd(p.Low)
			hi, ok2 := k.rangeEnd(p.High)
			if ok1 != nil && ok2 != nil {
				sh.ranges[slot] = rangeProg{ok1, ok2}
				if k.pool.Cmp(lo, hi) > 0 {
					k.ds.Add(p.Low.Pos(), "write the smaller bound first", "the range of %q runs from %s down to %s", p.Name, k.pool.Dec(lo), k.pool.Dec(hi))
				} else if ok && (k.pool.Cmp(v, lo) < 0 || k.pool.Cmp(v, hi) > 0) {
					k.ds.Warn(p.Expr.Pos(), "widen the range or check the value", "%q = %s lies outside its range %s .. %s", p.Name, k.pool.Dec(v), k.pool.Dec(lo), k.pool.Dec(hi))
				}
			}
		}
		k.c.in[slot] = v
		sh.slotOf[p.Name] = int32(slot)
	}
	k.visible = int32(len(k.m.Params))
	k.current = nil
}

// rangeEnd compiles one end of an input's range (it may read earlier
// inputs, but is not a figure of the tree).
func (k *compiler) rangeEnd(e tree.Expr) (exact.Num, *program) {
	p, err := compileExpr(k.pool, e, k.look, func(c *tree.Call) (int32, *EvalError) {
		return 0, &EvalError{Pos: c.At, Msg: "a distribution in a range", Hint: "a range is two figures: LOW .. HIGH"}
	})
	if err != nil {
		tree.Names(e, func(n *tree.Name) { k.used[n.Name] = true })
		k.diag(err)
		return exact.Zero, nil
	}
	v, _, err := p.eval(k.pool, k.c.in, nil)
	if err != nil {
		k.diag(err)
		return exact.Zero, nil
	}
	return v, p
}

// probs checks a set of sibling probabilities (already evaluated in vs,
// with ok false where one could not be), where rest marks the one (at most)
// that takes the complement, and fills it in. It reports problems at the
// given positions; good is false if the set is unusable.
func probs(pool *exact.Pool, ds *tree.Diagnostics, what string, at tree.Pos, vs []exact.Num, have []bool, rest []bool, pos []tree.Pos, exprs []tree.Expr, inexact bool) (good bool) {
	return probsLazy(pool, ds, func() string { return what }, at, vs, have, rest, pos, exprs, inexact)
}

// probsLazy is probs with the description made only when a message needs it.
func probsLazy(pool *exact.Pool, ds *tree.Diagnostics, what func() string, at tree.Pos, vs []exact.Num, have []bool, rest []bool, pos []tree.Pos, exprs []tree.Expr, inexact bool) (good bool) {
	sum := exact.Zero
	restAt := -1
	good = true
	for i := range vs {
		if rest[i] {
			if restAt >= 0 {
				ds.Add(pos[i], "only one branch can take the rest; give this one a probability", "a second `rest` under %s", what())
				good = false
			}
			restAt = i
			continue
		}
		if !have[i] {
			good = false
			continue
		}
		if pool.Sign(vs[i]) < 0 || pool.Cmp(vs[i], exact.One) > 0 {
			p := pos[i]
			if exprs != nil && exprs[i] != nil {
				p = exprs[i].Pos()
			}
			ds.Add(p, "a probability lies between 0 and 1 (0% to 100%)", "probability %s is outside [0, 1]", pool.Dec(vs[i]))
			good = false
		}
		sum = pool.Add(sum, vs[i])
	}
	if !good {
		return false
	}
	if restAt >= 0 {
		left := pool.Sub(exact.One, sum)
		if pool.Sign(left) < 0 {
			ds.Add(pos[restAt], "lower the others so they sum to at most 1", "the other probabilities under %s already sum to %s, leaving nothing for `rest`", what(), pool.Dec(sum))
			return false
		}
		vs[restAt] = left
		return true
	}
	diff := pool.Sub(sum, exact.One)
	if !diff.IsZero() && (!inexact || pool.Cmp(absNum(pool, diff), sumTolerance) > 0) {
		ds.Add(at, "add a `rest` branch or fix one of them", "probabilities under %s sum to %s, not 1", what(), pool.Dec(sum))
		return false
	}
	return true
}

// sumTolerance is how far a sum of probabilities that went through a
// rounded division may miss 1 and still count as 1.
var sumTolerance = exact.Small(1, -(DivisionScale - 5))

func absNum(pool *exact.Pool, x exact.Num) exact.Num {
	if pool.Sign(x) < 0 {
		return pool.Neg(x)
	}
	return x
}

func (k *compiler) uncertainties() {
	sh := k.c.sh
	sh.uncOf = map[string]int32{}
	for _, u := range k.m.Uncertainties {
		if prev, dup := sh.uncOf[u.Name]; dup {
			k.ds.Add(u.Pos, fmt.Sprintf("it was first declared at %s", sh.uncs[prev].Pos), "uncertainty %q is declared twice", u.Name)
			continue
		}
		ui := int32(len(sh.uncs))
		sh.uncOf[u.Name] = ui
		sh.uncs = append(sh.uncs, u)
		sh.restState = append(sh.restState, -1)
		what := fmt.Sprintf("uncertainty %q", u.Name)
		ns := len(u.States)
		ps := make([]exact.Num, ns)
		k.c.prior = append(k.c.prior, ps)
		if ns < 2 {
			k.ds.Add(u.Pos, "list at least two states, each with its probability", "%s has %d state(s); it needs at least two", what, ns)
			continue
		}
		k.dupLabels(func() string { return what }, ns, func(i int) (string, tree.Pos) { return u.States[i].Label, u.States[i].Pos })
		have, rest, pos, exprs := make([]bool, ns), make([]bool, ns), make([]tree.Pos, ns), make([]tree.Expr, ns)
		before := k.c.rounded
		k.c.rounded = false
		for i, s := range u.States {
			rest[i], pos[i], exprs[i] = s.Prob == nil, s.Pos, s.Prob
			if s.Prob == nil {
				sh.restState[ui] = int32(i)
				continue
			}
			ps[i], have[i] = k.figure(s.Prob, figPrior, ui, int32(i), 0)
		}
		probs(k.pool, &k.ds, what, u.Pos, ps, have, rest, pos, exprs, k.c.rounded)
		k.c.rounded = k.c.rounded || before
	}
}

func (k *compiler) tests() {
	sh := k.c.sh
	sh.testOf = map[string]int32{}
	for _, t := range k.m.Tests {
		if prev, dup := sh.testOf[t.Name]; dup {
			k.ds.Add(t.Pos, fmt.Sprintf("it was first declared at %s", sh.tests[prev].Pos), "test %q is declared twice", t.Name)
			continue
		}
		ti := int32(len(sh.tests))
		sh.testOf[t.Name] = ti
		sh.tests = append(sh.tests, t)
		cost := exact.Zero
		if t.Cost != nil {
			if v, ok := k.figure(t.Cost, figTestCost, ti, 0, 0); ok {
				cost = v
				if k.pool.Sign(v) < 0 {
					k.ds.Add(t.Cost.Pos(), "write the cost as a positive amount", "test %q has a negative cost", t.Name)
				}
			}
		}
		k.c.tcost = append(k.c.tcost, cost)
		k.c.lik = append(k.c.lik, nil)
		sh.restReading = append(sh.restReading, nil)
		ui, ok := sh.uncOf[t.On]
		if !ok {
			k.ds.Add(t.Pos, "declare it with `uncertainty "+t.On+"` above the test", "test %q is on %q, which is not a declared uncertainty", t.Name, t.On)
			continue
		}
		u := sh.uncs[ui]
		what := fmt.Sprintf("test %q", t.Name)
		if len(t.Readings) < 2 {
			k.ds.Add(t.Pos, "list at least two readings", "%s has %d reading(s); it needs at least two", what, len(t.Readings))
			continue
		}
		k.dupLabels(func() string { return what }, len(t.Readings), func(i int) (string, tree.Pos) { return t.Readings[i].Label, t.Readings[i].Pos })
		ns, nr := len(u.States), len(t.Readings)
		given := make([][]tree.Expr, nr) // [reading][state]
		for ri, rd := range t.Readings {
			given[ri] = make([]tree.Expr, ns)
			for _, l := range rd.Given {
				si := u.StateIndex(l.State)
				if si < 0 {
					k.ds.Add(l.Pos, "the states of "+u.Name+" are "+tree.QuoteList(stateLabels(u)), "%q is not a state of uncertainty %q", l.State, u.Name)
					continue
				}
				if given[ri][si] != nil {
					k.ds.Add(l.Pos, "give each state once", "reading %q gives the likelihood for %q twice", rd.Label, l.State)
				}
				given[ri][si] = l.Prob
			}
		}
		lik := make([][]exact.Num, nr)
		for ri := range lik {
			lik[ri] = make([]exact.Num, ns)
		}
		k.c.lik[ti] = lik
		restReading := make([]int32, ns)
		sh.restReading[ti] = restReading
		// For each state, the likelihoods over the readings are a
		// distribution: check it like the branches of a chance node.
		for si, s := range u.States {
			restReading[si] = -1
			vs, have, rest, pos := make([]exact.Num, nr), make([]bool, nr), make([]bool, nr), make([]tree.Pos, nr)
			before := k.c.rounded
			k.c.rounded = false
			for ri, rd := range t.Readings {
				pos[ri] = rd.Pos
				switch {
				case given[ri][si] != nil:
					vs[ri], have[ri] = k.figure(given[ri][si], figLikelihood, ti, int32(ri), int32(si))
				case rd.Rest:
					rest[ri] = true
					restReading[si] = int32(ri)
				default:
					have[ri] = true // 0
				}
			}
			ok := probs(k.pool, &k.ds, fmt.Sprintf("test %q given %q", t.Name, s.Label), t.Pos, vs, have, rest, pos, nil, k.c.rounded)
			k.c.rounded = k.c.rounded || before
			if !ok {
				continue
			}
			for ri := range t.Readings {
				lik[ri][si] = vs[ri]
			}
		}
	}
}

func stateLabels(u *tree.Uncertainty) []string {
	out := make([]string, len(u.States))
	for i, s := range u.States {
		out[i] = s.Label
	}
	return out
}

func readingLabels(t *tree.Test) []string {
	out := make([]string, len(t.Readings))
	for i, rd := range t.Readings {
		out[i] = rd.Label
	}
	return out
}

func (k *compiler) dupLabels(what func() string, n int, at func(int) (string, tree.Pos)) {
	if n <= 8 {
		// Few labels: compare pairs, with no map to make.
		for i := 1; i < n; i++ {
			l, p := at(i)
			for j := 0; j < i; j++ {
				if m, q := at(j); m == l {
					k.ds.Add(p, fmt.Sprintf("the first is at %s; give each branch its own label", q), "two branches under %s are both labelled %q", what(), l)
					break
				}
			}
		}
		return
	}
	seen := make(map[string]tree.Pos, n)
	for i := 0; i < n; i++ {
		l, p := at(i)
		if prev, dup := seen[l]; dup {
			k.ds.Add(p, fmt.Sprintf("the first is at %s; give each branch its own label", prev), "two branches under %s are both labelled %q", what(), l)
			continue
		}
		seen[l] = p
	}
}

// netExpr is a branch's net value as one expression: gain − cost. The
// expression it makes is the compiler's scratch, good until the next call:
// a program keeps only the divisions and calls inside an expression, never
// its top, so nothing keeps it (a model with a cost on most branches made
// one for each).
func (k *compiler) netExpr(b *tree.Branch) tree.Expr {
	switch {
	case b.Gain == nil && b.Cost == nil:
		return nil
	case b.Cost == nil:
		return b.Gain
	case b.Gain == nil:
		k.netNeg = tree.Unary{At: b.Cost.Pos(), Op: '-', X: b.Cost}
		return &k.netNeg
	}
	k.netSub = tree.Binary{At: b.Gain.Pos(), Op: '-', X: b.Gain, Y: b.Cost}
	return &k.netSub
}

// cash evaluates the net value of the branch into node i.
func (k *compiler) cash(b *tree.Branch, i int32) {
	g, gok := b.Gain.(*tree.Number)
	c, cok := b.Cost.(*tree.Number)
	switch {
	case b.Gain == nil && b.Cost == nil:
	case gok && b.Cost == nil:
		k.c.cash[i] = numOf(k.pool, g)
	case cok && b.Gain == nil:
		k.c.cash[i] = k.pool.Neg(numOf(k.pool, c))
	default:
		k.c.cash[i], _ = k.figure(k.netExpr(b), figCash, i, 0, 0)
	}
}

// describe names a node for messages: its label quoted, or "(unlabelled)"
// for a node from JSON or Go (its position says which).
func describe(n *tree.Node) string {
	if n.Label == "" && n.Uncertainty == "" && n.Test == "" {
		return "(unlabelled)"
	}
	return strconv.Quote(n.Display())
}

// calculation is 1 when e is a calculation (not a number as written, nor
// nothing), 0 otherwise.
func calculation(e tree.Expr) int {
	if _, ok := e.(*tree.Number); ok || e == nil {
		return 0
	}
	return 1
}

// tree lays the nodes out breadth-first and checks them.
func (k *compiler) tree() {
	sh := k.c.sh
	named := len(k.m.Uncertainties) > 0 || len(k.m.Tests) > 0
	// Count first, so every array is made once at its size; the figures
	// that are calculations may read inputs, and the list of those that
	// do gets room for them all at once.
	size, calcs := 1, 0
	tree.Walk(k.m.Root, func(n *tree.Node, _ int) bool {
		size += len(n.Branches)
		calcs += calculation(n.Payoff)
		for _, b := range n.Branches {
			calcs += calculation(b.Prob)
			calcs += min(calculation(b.Gain)+calculation(b.Cost), 1) // one net figure
		}
		return true
	})
	sh.dyn = bulk.Grow(sh.dyn, calcs)
	sh.nodes = bulk.Make[*tree.Node](size)[:0]
	sh.kind = bulk.Make[tree.Kind](size)[:0]
	sh.parent = bulk.Make[int32](size)[:0]
	sh.first = bulk.Make[int32](size + 1)[:0]
	k.c.cash = bulk.Make[exact.Num](size)[:0]
	k.c.prob = bulk.Make[exact.Num](size)[:0]
	if named {
		sh.unc = bulk.Make[int32](size)[:0]
		sh.test = bulk.Make[int32](size)[:0]
		sh.out = bulk.Make[int32](size)[:0]
	}
	push := func(n *tree.Node, parent int32) {
		sh.nodes = append(sh.nodes, n)
		kind := tree.KindEnd
		if n != nil {
			kind = n.Kind
		}
		sh.kind = append(sh.kind, kind)
		sh.parent = append(sh.parent, parent)
		k.c.cash = append(k.c.cash, exact.Zero)
		k.c.prob = append(k.c.prob, exact.Zero)
		if k.c.payoff != nil {
			k.c.payoff = append(k.c.payoff, exact.Zero)
		}
		if k.envOf != nil { // nil until a split is met (split.go)
			k.envOf = append(k.envOf, k.envOf[parent])
		}
		if named {
			sh.unc = append(sh.unc, -1)
			sh.test = append(sh.test, -1)
			sh.out = append(sh.out, -1)
		}
	}
	push(k.m.Root, -1)
	for i := 0; i < len(sh.nodes); i++ {
		sh.first = append(sh.first, int32(len(sh.nodes)))
		n := sh.nodes[i]
		if n == nil {
			continue
		}
		ii := int32(i)
		what := func() string { return describe(n) }
		from := int32(len(sh.nodes))
		for _, b := range n.Branches {
			push(b.Node, ii)
		}
		k.env = nil
		if k.envOf != nil {
			k.env = k.envOf[i]
		}
		if n.Split != nil {
			k.split(n, from)
		}
		switch n.Kind {
		case tree.KindEnd:
			if n.Payoff != nil {
				if k.c.payoff == nil { // most models have none: no array then
					k.c.payoff = make([]exact.Num, len(sh.nodes), cap(sh.nodes))
				}
				k.c.payoff[i], _ = k.figure(n.Payoff, figPayoff, ii, 0, 0)
			}
			if len(n.Branches) > 0 {
				k.ds.Add(n.Pos, "make it a decision or chance node", "end node %s has branches", what())
			}
		case tree.KindDecision:
			if len(n.Branches) == 0 {
				k.ds.Add(n.Pos, "give it at least one option, indented beneath it", "decision %s has no branches", what())
			}
			for _, b := range n.Branches {
				if b.Prob != nil || b.Rest {
					k.ds.Add(b.Pos, "the decision maker picks a branch; only chance branches have probabilities", "decision branch %q has a probability", b.Label)
				}
			}
		case tree.KindChance:
			switch {
			case n.Uncertainty != "":
				ui, ok := sh.uncOf[n.Uncertainty]
				if !ok {
					k.ds.Add(n.Pos, "declare it with `uncertainty "+n.Uncertainty+"` above the tree", "unknown uncertainty %q", n.Uncertainty)
					break
				}
				u := sh.uncs[ui]
				sh.unc[i] = ui
				k.matchLabels(n, fmt.Sprintf("uncertainty %q", u.Name), stateLabels(u), func(bi, s int) { sh.out[from+int32(bi)] = int32(s) })
			case n.Test != "":
				ti, ok := sh.testOf[n.Test]
				if !ok {
					k.ds.Add(n.Pos, "declare it with `test "+n.Test+" on ...` above the tree", "unknown test %q", n.Test)
					break
				}
				t := sh.tests[ti]
				ui, ok := sh.uncOf[t.On]
				if !ok || len(t.Readings) < 2 {
					break // reported with the test
				}
				sh.unc[i], sh.test[i] = ui, ti
				k.matchLabels(n, fmt.Sprintf("test %q", t.Name), readingLabels(t), func(bi, r int) { sh.out[from+int32(bi)] = int32(r) })
			default:
				k.plainChance(n, ii, from, what)
			}
		}
		if n.Kind != tree.KindEnd {
			k.dupLabels(what, len(n.Branches), func(j int) (string, tree.Pos) { return n.Branches[j].Label, n.Branches[j].Pos })
		}
		for j, b := range n.Branches {
			k.cash(b, from+int32(j))
		}
	}
	sh.first = append(sh.first, int32(len(sh.nodes)))
	if named {
		k.seenAbove()
	}
}

// seenAbove marks every node on an uncertainty that has another node on the
// same uncertainty above it, in one depth-first walk that counts, per
// uncertainty, the nodes on it on the current path.
func (k *compiler) seenAbove() {
	sh := k.c.sh
	sh.seen = make([]bool, len(sh.kind))
	count := make([]int32, len(sh.uncs))
	type item struct {
		i     int32
		leave bool
	}
	stack := []item{{0, false}}
	for len(stack) > 0 {
		it := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		u := sh.unc[it.i]
		if it.leave {
			count[u]--
			continue
		}
		if u >= 0 {
			sh.seen[it.i] = count[u] > 0
			count[u]++
			stack = append(stack, item{it.i, true})
		}
		for c := sh.first[it.i+1] - 1; c >= sh.first[it.i]; c-- {
			stack = append(stack, item{c, false})
		}
	}
}

// plainChance checks and evaluates the probabilities of a chance node that
// is on no named event.
func (k *compiler) plainChance(n *tree.Node, i, from int32, what func() string) {
	nb := len(n.Branches)
	if nb < 2 {
		k.ds.Add(n.Pos, "a chance node needs at least two outcomes; use a plain branch for a certain event", "chance node %s has %d branch(es)", what(), nb)
	}
	g := k.scratch(nb)
	before := k.c.rounded
	k.c.rounded = false
	for j, b := range n.Branches {
		g.rest[j], g.pos[j], g.exprs[j] = b.Rest, b.Pos, b.Prob
		switch {
		case b.Rest:
			k.setRest(i, from+int32(j))
		case b.Prob == nil:
			k.ds.Add(b.Pos, "write a probability such as 25% or 0.25, or `rest`", "this branch under %s has no probability", what())
		default:
			g.vs[j], g.have[j] = k.figure(b.Prob, figProb, from+int32(j), 0, 0)
		}
	}
	ok := false
	if nb >= 2 { // with fewer, the sum is beside the point
		ok = probsLazy(k.pool, &k.ds, what, n.Pos, g.vs, g.have, g.rest, g.pos, g.exprs, k.c.rounded)
	}
	k.c.rounded = k.c.rounded || before
	for j, b := range n.Branches {
		k.c.prob[from+int32(j)] = g.vs[j]
		// A zero is only news when the probabilities are sound.
		if ok && g.vs[j].IsZero() && (b.Prob != nil || b.Rest) && nb >= 2 {
			k.ds.Warn(b.Pos, "remove it, or give it a probability", "branch %q has probability 0 and never happens", b.Label)
		}
	}
}

// group is work space for checking one set of sibling probabilities.
type group struct {
	vs    []exact.Num
	have  []bool
	rest  []bool
	pos   []tree.Pos
	exprs []tree.Expr
}

// scratch returns the compiler's work space cleared for n siblings.
func (k *compiler) scratch(n int) *group {
	g := &k.work
	if cap(g.vs) < n {
		*g = group{make([]exact.Num, n), make([]bool, n), make([]bool, n), make([]tree.Pos, n), make([]tree.Expr, n)}
	}
	g.vs, g.have, g.rest, g.pos, g.exprs = g.vs[:n], g.have[:n], g.rest[:n], g.pos[:n], g.exprs[:n]
	for j := 0; j < n; j++ {
		g.vs[j], g.have[j], g.rest[j], g.pos[j], g.exprs[j] = exact.Zero, false, false, tree.Pos{}, nil
	}
	return g
}

// setRest records that child c of plain chance node i takes the rest.
func (k *compiler) setRest(i, c int32) {
	sh := k.c.sh
	if sh.restAt == nil {
		sh.restAt = bulk.Make[int32](cap(sh.kind))
		for j := range sh.restAt {
			sh.restAt[j] = -1
		}
	}
	sh.restAt[i] = c
}

// matchLabels checks that the branches of n are exactly the given labels,
// each once, and calls set for each matched branch with the label's index.
func (k *compiler) matchLabels(n *tree.Node, what string, labels []string, set func(branch, i int)) {
	index := make(map[string]int, len(labels))
	for i, l := range labels {
		index[l] = i
	}
	seen := make([]bool, len(labels))
	for bi, b := range n.Branches {
		if b.Rest {
			k.ds.Add(b.Pos, "remove it: the probability comes from the declaration", "branch %q under %s has a probability of its own", b.Label, what)
		}
		i, ok := index[b.Label]
		if !ok {
			k.ds.Add(b.Pos, "the branches here must be "+tree.QuoteList(labels), "%q is not one of the outcomes of %s", b.Label, what)
			continue
		}
		if seen[i] {
			continue // reported as a duplicate label
		}
		seen[i] = true
		set(bi, i)
	}
	var missing []string
	for i, s := range seen {
		if !s {
			missing = append(missing, labels[i])
		}
	}
	if len(missing) > 0 {
		k.ds.Add(n.Pos, "add a branch for each, even one with nothing under it", "%s is missing %s", what, tree.QuoteList(missing))
	}
}

// feeds records, for every input, the dynamic figures that read it
// directly. The figures a change reaches through other inputs are found
// when it is made (affected), so a long chain of inputs costs nothing here.
func (k *compiler) feeds() {
	sh := k.c.sh
	sh.readers = make([][]int32, len(k.c.in))
	sh.isSource = make([]bool, len(k.c.in))
	for _, s := range sh.sources {
		sh.isSource[s.slot] = true
	}
	// Counted first, so that each list is allocated once at its size (a
	// large model has hundreds of thousands of figures reading one input).
	count := make([]int, len(k.c.in))
	for _, f := range sh.dyn {
		for _, r := range f.prog.slots {
			count[r]++
		}
	}
	for r, n := range count {
		if n > 0 {
			sh.readers[r] = bulk.Make[int32](n)[:0]
		}
	}
	for fi, f := range sh.dyn {
		for _, r := range f.prog.slots {
			sh.readers[r] = append(sh.readers[r], int32(fi))
		}
	}
}
