package compiled

import (
	"fmt"
	"strings"

	"github.com/forkcast/forkcast/internal/exact"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// A split (`chance NAME by swanson`, tree.Split) is a chance node of three
// branches, one for each point of a three-point rule, each with the rule's
// probability. Below branch j the input NAME stands at the distribution's
// percentile for that point, and so does every input computed from it:
// each gets a slot of its own for that branch (an environment, env), and
// the figures of the subtree below read those slots instead. The
// percentiles are computed in float64 from the distribution's quantile
// function (about 15 significant digits) and then used exactly; they are
// figures of the model like any written number. Elsewhere the input keeps
// its mean, and simulation still draws it there.

// split checks split node n (its branches are nodes from, from+1, from+2)
// and gives each branch's subtree its environment.
func (k *compiler) split(n *tree.Node, from int32) {
	sp := n.Split
	sh := k.c.sh
	labels, levels, _ := sp.Rule.Points()
	if sp.Rule != tree.SwansonMegill && sp.Rule != tree.PearsonTukey {
		k.ds.Add(n.Pos, "write `by swanson` or `by pearson`", "unknown three-point rule %d", int(sp.Rule))
		return
	}
	if len(n.Branches) != 3 || n.Branches[0].Label != labels[0] || n.Branches[1].Label != labels[1] || n.Branches[2].Label != labels[2] {
		k.ds.Add(n.Pos, "make it with tree.SplitOn, or give it the branches "+strings.Join(labels[:], ", "),
			"the three-point chance node on %q must have the branches %s", sp.Input, strings.Join(labels[:], ", "))
		return
	}
	slot, ok := sh.slotOf[sp.Input]
	if !ok || slot >= k.visible {
		hint := "name an input defined with `let " + sp.Input + " = pert(...)` or another distribution"
		if names := distInputs(k); len(names) > 0 {
			hint = "the inputs written as distributions are " + strings.Join(names, ", ")
		}
		k.ds.Add(sp.InputPos, hint, "unknown input %q", sp.Input)
		return
	}
	k.used[sp.Input] = true
	src := -1
	for i, s := range sh.sources {
		if s.let == slot {
			src = i
		}
	}
	if src >= 0 && sh.sources[src].out != nil {
		k.ds.Add(sp.InputPos, "split an input written as a distribution in the model",
			"%q is %s, which has no three points of its own", sp.Input, sh.sources[src].out.expr)
		return
	}
	if src < 0 {
		k.ds.Add(sp.InputPos, "write it as a distribution, such as `let "+sp.Input+" = pert(LOW, LIKELY, HIGH)`",
			"%q is not written as a distribution, so it has no three points", sp.Input)
		return
	}
	// The lets computed from the input, in order: they change with it.
	progs := map[int32]*program{}
	for _, f := range sh.dyn {
		if f.kind == figInput && f.i < int32(len(sh.params)) {
			progs[f.i] = f.prog
		}
	}
	changed := map[int32]bool{slot: true}
	var after []int32
	for s := slot + 1; s < int32(len(sh.params)); s++ {
		if p := progs[s]; p != nil {
			for _, r := range p.slots {
				if changed[r] {
					changed[s] = true
					after = append(after, s)
					break
				}
			}
		}
	}
	parent := k.env
	defer func() { k.env = parent }()
	for j := range 3 {
		env := make(map[int32]int32, len(parent)+1+len(after))
		for a, b := range parent {
			env[a] = b
		}
		q := sh.sources[src].prog.atLevel(k.pool, decimal.RequireFromString(levels[j]))
		v, _, err := q.eval(k.pool, k.c.in, k.c.inInexact)
		if err != nil {
			k.diag(err)
			return
		}
		qs := k.newSlot(v)
		if !q.isConst() {
			sh.dyn = append(sh.dyn, dynFig{kind: figInput, i: qs, prog: q})
		}
		env[slot] = qs
		k.env = env
		for _, s := range after {
			ns := k.newSlot(exact.Zero)
			p := sh.params[s]
			saved := k.current
			k.current, k.relet = nil, true
			v, ok := k.figure(p.Expr, figInput, ns, 0, 0)
			k.current, k.relet = saved, false
			if !ok {
				return
			}
			k.c.in[ns] = v
			env[s] = ns
		}
		if k.envOf == nil {
			k.envOf = make([]map[int32]int32, len(sh.nodes), cap(sh.nodes))
		}
		k.envOf[from+int32(j)] = env
	}
}

// newSlot adds an input slot holding v, for a split's environment.
func (k *compiler) newSlot(v exact.Num) int32 {
	slot := int32(len(k.c.in))
	k.c.in = append(k.c.in, v)
	if k.c.inInexact != nil {
		k.c.inInexact = append(k.c.inInexact, false)
	}
	k.random = append(k.random, false)
	return slot
}

// atLevel turns the program of a distribution (its arguments, then
// opCall) into the program of its quantile at level.
func (p *program) atLevel(pool *exact.Pool, level decimal.Decimal) *program {
	last := p.ops[len(p.ops)-1]
	// The quantile takes the place of the call, and its expression.
	q := &program{ops: append([]op{}, p.ops[:len(p.ops)-1]...), consts: append([]exact.Num{}, p.consts...), slots: p.slots, exprs: p.exprs}
	q.ops = append(q.ops, op{code: opConst, arg: int32(len(q.consts))}, op{code: opQuantile, arg: last.arg, at: last.at})
	q.consts = append(q.consts, pool.Of(level))
	q.fconsts = make([]float64, len(q.consts))
	for i, c := range q.consts {
		q.fconsts[i] = pool.Float64(c)
	}
	return q
}

// quantileOf is the distribution fn(args)'s quantile at level, as a
// decimal (the float64 quantile's shortest decimal form).
func quantileOf(call *tree.Call, args []decimal.Decimal, level float64) (decimal.Decimal, error) {
	d, err := functions[call.Func].make(args)
	if err != nil {
		return decimal.Zero, err
	}
	q := d.Quantile(level)
	if q != q || q > 1e300 || q < -1e300 {
		return decimal.Zero, fmt.Errorf("%s has no finite value at its %g quantile", call.Func, level)
	}
	return decimal.NewFromFloat(q), nil
}
