package compiled

import (
	"fmt"
	"slices"
	"sort"
	"strings"

	"github.com/forkcast/forkcast/internal/exact"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// Target is a figure an analysis may set: an input, the prior probability
// of a state of an uncertainty, or the probability of a branch of a plain
// chance node.
type Target struct {
	kind figKind // figInput, figPrior or figProb
	i, j int32   // slot; (uncertainty, state); node
}

// InputTarget is the input with that name; ok is false when there is none.
func (c *Model) InputTarget(name string) (Target, bool) {
	s, ok := c.sh.slotOf[name]
	return Target{kind: figInput, i: s}, ok
}

// StateTarget is the prior probability of state s of uncertainty u.
func (c *Model) StateTarget(u, s int) Target { return Target{kind: figPrior, i: int32(u), j: int32(s)} }

// BranchTarget is the probability of the branch into node k, which must be
// a child of a plain chance node.
func (c *Model) BranchTarget(k int) Target { return Target{kind: figProb, i: int32(k)} }

// IsInput reports whether t is an input.
func (t Target) IsInput() bool { return t.kind == figInput }

// Setting gives a target a value.
type Setting struct {
	Target Target
	Value  decimal.Decimal
}

// Set gives the input called name the value v (a convenience for With).
func (c *Model) Set(name string, v decimal.Decimal) (Setting, error) {
	t, ok := c.InputTarget(name)
	if !ok {
		return Setting{}, c.unknownInput(name)
	}
	return Setting{t, v}, nil
}

func (c *Model) unknownInput(name string) error {
	var names []string
	for _, p := range c.sh.params {
		names = append(names, p.Name)
	}
	if len(names) == 0 {
		return fmt.Errorf("no input %q: the model has no inputs (`let`)", name)
	}
	return fmt.Errorf("no input %q; the inputs are %s", name, strings.Join(names, ", "))
}

// InvalidError is a change of figures that leaves the model invalid (a
// probability outside [0, 1], probabilities that no longer sum to 1, a
// division by zero): Diagnostics say what and where.
type InvalidError struct {
	Diagnostics tree.Diagnostics
}

func (e *InvalidError) Error() string { return e.Diagnostics.Error() }

// With returns c with the settings applied: an input set to a value stops
// following its own expression and every figure computed from it follows
// the new value; a probability set directly replaces its own. Figures that
// do not depend on a setting are shared with c, which does not change. An
// error says why the settings leave the model invalid.
func (c *Model) With(settings ...Setting) (*Model, error) { return c.with(nil, settings) }

// WithInto is With reusing the arrays of dst, a model that c.With or
// c.WithInto returned and that the caller no longer needs (nor anything
// made from it, such as its rollbacks' values read later): the loop of a
// sweep, which otherwise copies the tree's money and weights for every
// point. It reuses them when both dst and this change set inputs that
// move money only; otherwise it is With. dst may be nil. The result is the
// same model With gives.
func (c *Model) WithInto(dst *Model, settings ...Setting) (*Model, error) {
	return c.with(dst, settings)
}

func (c *Model) with(dst *Model, settings []Setting) (*Model, error) {
	n := *c
	n.reuse = nil
	n.pool = c.pool.Fork()
	n.sh = c.sh
	n.in = append([]exact.Num(nil), c.in...)
	if c.inInexact != nil {
		n.inInexact = append([]bool(nil), c.inInexact...)
	}
	if c.fixed != nil {
		n.fixed = append([]bool(nil), c.fixed...)
	}
	w := &writer{c: &n, orig: c}
	for k := range c.pinned {
		w.markDirect(k[0], k[1])
	}
	var queue []int32 // slots whose readers must be evaluated
	for _, s := range settings {
		v := n.pool.Of(s.Value)
		switch s.Target.kind {
		case figInput:
			n.in[s.Target.i] = v
			if n.inInexact != nil {
				n.inInexact[s.Target.i] = false
			}
			if n.fixed == nil {
				n.fixed = make([]bool, len(n.in))
			}
			n.fixed[s.Target.i] = true
			queue = append(queue, s.Target.i)
		case figPrior:
			w.prior(s.Target.i, s.Target.j, v)
			w.markDirect(s.Target.i, s.Target.j)
		case figProb:
			w.prob(s.Target.i, v)
			w.markDirect(-1, s.Target.i)
		}
	}
	// The figures the changed inputs reach, directly or through other
	// inputs, evaluated in their order (inputs first). Each slot's readers
	// are listed in that order already, so one slot's need no sorting.
	var order []int32
	expanded := 0
	var inputsReached map[int32]bool
	for len(queue) > 0 {
		s := queue[len(queue)-1]
		queue = queue[:len(queue)-1]
		expanded++
		for _, fi := range c.sh.readers[s] {
			f := c.sh.dyn[fi]
			if f.kind == figInput {
				if n.fixed != nil && n.fixed[f.i] {
					continue // given its own value: no longer computed
				}
				if inputsReached[fi] {
					continue
				}
				if inputsReached == nil {
					inputsReached = map[int32]bool{}
				}
				inputsReached[fi] = true
				queue = append(queue, f.i)
			}
			order = append(order, fi)
		}
	}
	if expanded > 1 {
		slices.Sort(order)
	}
	order = slices.Compact(order) // a figure reading an input twice
	var ds tree.Diagnostics
	dynCopied := false
	// An input given its own value is no longer computed: its expression's
	// rounding no longer counts.
	if c.dynInexact != nil {
		for fi, f := range c.sh.dyn {
			if f.kind == figInput && n.fixed != nil && n.fixed[f.i] && c.dynInexact[fi] {
				if !dynCopied {
					n.dynInexact = ownCopy(c.dynInexact, len(c.sh.dyn))
					dynCopied = true
				}
				n.dynInexact[fi] = false
			}
		}
	}
	reusing := c.adopt(dst, w, settings, order)
	for _, fi := range order {
		f := c.sh.dyn[fi]
		if (f.kind == figProb && w.setDirectly(f.i)) || (f.kind == figPrior && w.stateSetDirectly(f.i, f.j)) {
			continue // a setting gave it its value
		}
		v, isExact, linear := c.evalLinear(fi, n.pool, n.in, n.inInexact)
		var err *EvalError
		if !linear {
			v, isExact, err = f.prog.eval(n.pool, n.in, n.inInexact)
		}
		if err != nil {
			ds = append(ds, tree.Diagnostic{Severity: tree.Error, Pos: err.Pos, Summary: err.Msg, Hint: err.Hint})
			continue
		}
		if !isExact || n.dynInexact != nil {
			if !dynCopied {
				n.dynInexact = ownCopy(c.dynInexact, len(c.sh.dyn))
				dynCopied = true
			}
			n.dynInexact[fi] = !isExact
		}
		if !isExact && f.kind == figInput {
			if n.inInexact == nil {
				n.inInexact = make([]bool, len(n.in))
			}
			n.inInexact[f.i] = true
		}
		switch f.kind {
		case figInput:
			n.in[f.i] = v
		case figCash:
			w.cash(f.i, v)
		case figProb:
			w.prob(f.i, v)
		case figPayoff:
			w.payoff(f.i, v)
		case figPrior:
			w.prior(f.i, f.j, v)
		case figLikelihood:
			w.lik(f.i, f.j, f.k, v)
		case figTestCost:
			w.testCost(f.i, v)
		}
	}
	if len(ds) == 0 {
		w.check(&ds)
	}
	if ds.HasErrors() {
		return nil, &InvalidError{Diagnostics: ds.Errors().Sort()}
	}
	n.pinned = w.direct
	if w.probsChanged {
		d, _ := n.derive(false)
		n.d = d
	} else if w.moneyChanged {
		var into []exact.Wide
		if reusing {
			into = dst.d.e
		}
		n.d = n.reweigh(c.d, w.moneyNodes, into)
	}
	n.reuse = reusable(c, w, n.d)
	return &n, nil
}

// writer applies changed figures copy-on-write and remembers what must be
// checked and derived again.
type writer struct {
	c, orig      *Model
	cashCopied   bool
	probCopied   bool
	payCopied    bool
	tcostCopied  bool
	priorCopied  map[int32]bool
	likCopied    map[[2]int32]bool
	chance       map[int32]bool // plain chance nodes whose probabilities changed
	uncs         map[int32]bool
	testStates   map[[2]int32]bool
	tests        map[int32]bool
	probsChanged bool
	moneyChanged bool
	moneyNodes   []int32 // nodes whose cash or payoff changed; nil with allMoney
	allMoney     bool
	direct       map[[2]int32]bool // probabilities given by a setting: {-1, node} or {uncertainty, state}
}

func (w *writer) markDirect(a, b int32) {
	if w.direct == nil {
		w.direct = map[[2]int32]bool{}
	}
	w.direct[[2]int32{a, b}] = true
}

func (w *writer) cash(i int32, v exact.Num) {
	if !w.cashCopied {
		w.c.cash = append([]exact.Num(nil), w.c.cash...)
		w.cashCopied = true
	}
	w.c.cash[i] = v
	w.money(i)
}

func (w *writer) payoff(i int32, v exact.Num) {
	if !w.payCopied {
		w.c.payoff = append([]exact.Num(nil), w.c.payoff...)
		w.payCopied = true
	}
	w.c.payoff[i] = v
	w.money(i)
}

func (w *writer) money(i int32) {
	w.moneyChanged = true
	if !w.allMoney {
		w.moneyNodes = append(w.moneyNodes, i)
	}
}

func (w *writer) testCost(t int32, v exact.Num) {
	if !w.tcostCopied {
		w.c.tcost = append([]exact.Num(nil), w.c.tcost...)
		w.tcostCopied = true
	}
	w.c.tcost[t] = v
	if w.tests == nil {
		w.tests = map[int32]bool{}
	}
	w.tests[t] = true
	w.moneyChanged, w.allMoney, w.moneyNodes = true, true, nil
}

func (w *writer) prob(k int32, v exact.Num) {
	if !w.probCopied {
		w.c.prob = append([]exact.Num(nil), w.c.prob...)
		w.probCopied = true
	}
	w.c.prob[k] = v
	if w.chance == nil {
		w.chance = map[int32]bool{}
	}
	w.chance[w.c.sh.parent[k]] = true
	w.probsChanged = true
}

func (w *writer) prior(u, s int32, v exact.Num) {
	if w.priorCopied == nil {
		w.priorCopied = map[int32]bool{}
		w.c.prior = append([][]exact.Num(nil), w.c.prior...)
	}
	if !w.priorCopied[u] {
		w.c.prior[u] = append([]exact.Num(nil), w.c.prior[u]...)
		w.priorCopied[u] = true
	}
	w.c.prior[u][s] = v
	if w.uncs == nil {
		w.uncs = map[int32]bool{}
	}
	w.uncs[u] = true
	w.probsChanged = true
}

func (w *writer) lik(t, r, s int32, v exact.Num) {
	if w.likCopied == nil {
		w.likCopied = map[[2]int32]bool{}
		w.c.lik = append([][][]exact.Num(nil), w.c.lik...)
	}
	key := [2]int32{t, r}
	if !w.likCopied[key] {
		if !w.likCopied[[2]int32{t, -1}] {
			w.c.lik[t] = append([][]exact.Num(nil), w.c.lik[t]...)
			w.likCopied[[2]int32{t, -1}] = true
		}
		w.c.lik[t][r] = append([]exact.Num(nil), w.c.lik[t][r]...)
		w.likCopied[key] = true
	}
	w.c.lik[t][r][s] = v
	if w.testStates == nil {
		w.testStates = map[[2]int32]bool{}
	}
	w.testStates[[2]int32{t, s}] = true
	w.probsChanged = true
}

// check checks again every group of probabilities that changed, filling in
// the rests, and the costs of tests.
func (w *writer) check(ds *tree.Diagnostics) {
	c := w.c
	pool := c.pool
	for _, i := range sortedKeys(w.chance) {
		node := c.sh.nodes[i]
		from, to := c.sh.first[i], c.sh.first[i+1]
		nb := int(to - from)
		vs, have, rest, pos, exprs := make([]exact.Num, nb), make([]bool, nb), make([]bool, nb), make([]tree.Pos, nb), make([]tree.Expr, nb)
		for j := 0; j < nb; j++ {
			k := from + int32(j)
			b := node.Branches[j]
			pos[j], exprs[j] = b.Pos, b.Prob
			if c.sh.restAt != nil && int(i) < len(c.sh.restAt) && c.sh.restAt[i] == k && !w.setDirectly(k) {
				rest[j] = true
				continue
			}
			vs[j], have[j] = c.prob[k], true
		}
		if probs(pool, ds, fmt.Sprintf("%q", node.Display()), node.Pos, vs, have, rest, pos, exprs, c.figuresRounded()) {
			for j := 0; j < nb; j++ {
				c.prob[from+int32(j)] = vs[j]
			}
		}
	}
	for _, u := range sortedKeys(w.uncs) {
		un := c.sh.uncs[u]
		ns := len(un.States)
		vs, have, rest, pos, exprs := make([]exact.Num, ns), make([]bool, ns), make([]bool, ns), make([]tree.Pos, ns), make([]tree.Expr, ns)
		for s, st := range un.States {
			pos[s], exprs[s] = st.Pos, st.Prob
			if c.sh.restState[u] == int32(s) && !w.stateSetDirectly(u, int32(s)) {
				rest[s] = true
				continue
			}
			vs[s], have[s] = c.prior[u][s], true
		}
		if probs(pool, ds, fmt.Sprintf("uncertainty %q", un.Name), un.Pos, vs, have, rest, pos, exprs, c.figuresRounded()) {
			copy(c.prior[u], vs)
		}
	}
	for _, ts := range sortedPairs(w.testStates) {
		t, s := ts[0], ts[1]
		tst := c.sh.tests[t]
		nr := len(tst.Readings)
		vs, have, rest, pos := make([]exact.Num, nr), make([]bool, nr), make([]bool, nr), make([]tree.Pos, nr)
		for r := 0; r < nr; r++ {
			pos[r] = tst.Readings[r].Pos
			if c.sh.restReading[t][s] == int32(r) {
				rest[r] = true
				continue
			}
			vs[r], have[r] = c.lik[t][r][s], true
		}
		if probs(pool, ds, fmt.Sprintf("test %q given %q", tst.Name, c.sh.uncs[c.TestOn(int(t))].States[s].Label), tst.Pos, vs, have, rest, pos, nil, c.figuresRounded()) {
			for r := 0; r < nr; r++ {
				c.lik[t][r][s] = vs[r]
			}
		}
	}
	for _, t := range sortedKeys(w.tests) {
		if pool.Sign(c.tcost[t]) < 0 {
			tst := c.sh.tests[t]
			ds.Add(tst.Cost.Pos(), "write the cost as a positive amount", "test %q has a negative cost", tst.Name)
		}
	}
}

// setDirectly reports whether the branch into k was given a value by a
// setting: then it is no longer the rest, and the settings must make its
// siblings sum to 1.
func (w *writer) setDirectly(k int32) bool { return w.direct[[2]int32{-1, k}] }

func (w *writer) stateSetDirectly(u, s int32) bool { return w.direct[[2]int32{u, s}] }

func sortedKeys(m map[int32]bool) []int32 {
	out := make([]int32, 0, len(m))
	for k := range m {
		out = append(out, k)
	}
	sort.Slice(out, func(a, b int) bool { return out[a] < out[b] })
	return out
}

func sortedPairs(m map[[2]int32]bool) [][2]int32 {
	out := make([][2]int32, 0, len(m))
	for k := range m {
		out = append(out, k)
	}
	sort.Slice(out, func(a, b int) bool {
		if out[a][0] != out[b][0] {
			return out[a][0] < out[b][0]
		}
		return out[a][1] < out[b][1]
	})
	return out
}

// reweigh derives E again after money changed and no probability did: the
// masses are shared with the model before the change.
// into, when not nil, is a copy of old.e to write E into, made for a
// model before (see WithInto).
func (c *Model) reweigh(old *derived, nodes []int32, into []exact.Wide) *derived {
	d := &derived{mass: old.mass, restart: old.restart, rho: old.rho, exact: old.exact}
	if nodes == nil || old.e == nil {
		c.weigh(d)
		return d
	}
	d.scale = old.scale
	if into != nil {
		d.e = into
	} else {
		d.e = append([]exact.Wide(nil), old.e...)
	}
	for _, i := range nodes {
		v := c.pool.Add(c.cash[i], c.own(int(i)))
		e := c.pool.Mul(d.mass[i], v)
		x, ok := c.pool.WideOf(e, d.scale)
		if !ok {
			// More places or digits than before: weigh everything again.
			d.e = nil
			c.weigh(d)
			return d
		}
		d.e[i] = x
	}
	return d
}

// ownCopy is a copy of flags of length n (flags may be shorter or nil).
func ownCopy(flags []bool, n int) []bool {
	out := make([]bool, n)
	copy(out, flags)
	return out
}
