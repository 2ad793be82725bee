package compiled

import (
	"fmt"
	"math"
	"sort"

	"github.com/forkcast/forkcast/dist"
	"github.com/forkcast/forkcast/internal/exact"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// Uncertain is a distribution written in the model (pert(...), normal(...),
// …): a random input. Every exact analysis uses its mean; simulation draws
// it.
type Uncertain struct {
	// Expr is the input as written: the distribution's call (Call, then
	// too), or an outside value such as a register's total (Call nil).
	// Input is the `let` whose whole expression it is ("" when it stands
	// inside a larger expression).
	Expr  tree.Expr
	Call  *tree.Call
	Input string
	// Dist is the distribution, its arguments evaluated at the model's
	// inputs.
	Dist dist.Distribution
	// Mean is the value exact analyses use; Exact is false when it had to
	// be rounded (a lognormal's mean is irrational).
	Mean  decimal.Decimal
	Exact bool
	// Fixed is true when Input was set to a value (With): the analyses
	// use that value, not the distribution's mean.
	Fixed bool
}

// Uncertain lists the distributions written in the model, in the order
// they appear (inputs first).
func (c *Model) Uncertain() []Uncertain {
	out := make([]Uncertain, len(c.sh.sources))
	for i, s := range c.sh.sources {
		var u Uncertain
		if s.out != nil {
			d, _, _ := s.out.dist(c.pool, c.in, c.inInexact, nil)
			u = Uncertain{Expr: s.out.expr, Dist: d}
			if d != nil {
				u.Mean, u.Exact = meanOfDist(d)
			}
		} else {
			args := s.prog.args(c.pool, c.in)
			d, mean, ok, _ := meanOf(functions[s.call.Func], args)
			u = Uncertain{Expr: s.call, Call: s.call, Dist: d, Mean: mean, Exact: ok}
		}
		if s.let >= 0 {
			u.Input = c.sh.params[s.let].Name
			u.Fixed = c.fixed != nil && c.fixed[s.let]
		}
		out[i] = u
	}
	return out
}

// Written is the input as written: pert(10, 12, 20), register works total.
func (u Uncertain) Written() string {
	if u.Expr == nil {
		return ""
	}
	return u.Expr.String()
}

// args evaluates the arguments of a distribution's program (everything
// before its final opCall, which leaves them on the stack); nil when they
// cannot be evaluated.
func (p *program) args(pool *exact.Pool, in []exact.Num) []decimal.Decimal {
	body := &program{ops: p.ops[:len(p.ops)-1], consts: p.consts, exprs: p.exprs}
	n := int(p.ops[len(p.ops)-1].arg)
	var buf [16]exact.Num
	st, _, err := body.run(pool, in, nil, buf[:0])
	if err != nil || len(st) < n {
		return nil
	}
	out := make([]decimal.Decimal, n)
	for i := range out {
		out[i] = pool.Dec(st[len(st)-n+i])
	}
	return out
}

// Floats is a float64 copy of a compiled model in which the random inputs
// can be given drawn values: the figures that depend on them are evaluated
// again in float64, then the masses where a probability changed, and the
// float64 twin of the rollback kernel runs. It serves simulation, where
// speed matters more than exactness. A Floats is work space for one
// goroutine; make one per worker with NewFloats.
type Floats struct {
	c       *Model
	in      []float64
	cash    []float64
	prob    []float64
	payoff  []float64
	prior   [][]float64
	lik     [][][]float64
	tcost   []float64
	mass    []float64
	restart []bool
	e, t    []float64
	best    []int32
	// order lists the figures the random inputs reach, in evaluation
	// order, each in the form Draw evaluates fastest; probs is set when
	// one of them is a probability.
	order []floatFig
	probs bool
	// own is what each node adds itself: an end's payoff, or minus the
	// cost of the test it runs.
	own []float64
	// rests lists the plain chance nodes and uncertainties whose rest
	// must be taken again after a draw.
	restNodes []int32
	restUncs  []int32
	restTests []int32
}

// NewFloats makes a float64 copy of c, its random inputs at their means.
func (c *Model) NewFloats() *Floats {
	n := c.Len()
	f := &Floats{c: c, in: make([]float64, len(c.in)), cash: make([]float64, n), prob: make([]float64, n),
		payoff: make([]float64, n), tcost: make([]float64, len(c.tcost)), e: make([]float64, n), t: make([]float64, n), best: make([]int32, n)}
	fl := c.pool.Float64
	for i, v := range c.in {
		f.in[i] = fl(v)
	}
	for i := 0; i < n; i++ {
		f.cash[i], f.prob[i], f.payoff[i] = fl(c.cash[i]), fl(c.prob[i]), fl(c.payoffAt(i))
	}
	for t, v := range c.tcost {
		f.tcost[t] = fl(v)
	}
	f.prior = make([][]float64, len(c.prior))
	for u, ps := range c.prior {
		f.prior[u] = make([]float64, len(ps))
		for s, p := range ps {
			f.prior[u][s] = fl(p)
		}
	}
	f.lik = make([][][]float64, len(c.lik))
	for t, rs := range c.lik {
		f.lik[t] = make([][]float64, len(rs))
		for r, ss := range rs {
			f.lik[t][r] = make([]float64, len(ss))
			for s, l := range ss {
				f.lik[t][r][s] = fl(l)
			}
		}
	}
	// The figures each random input reaches, directly or through inputs.
	reached := map[int32]bool{}
	var queue []int32
	for _, s := range c.sh.sources {
		queue = append(queue, s.slot)
	}
	for len(queue) > 0 {
		s := queue[len(queue)-1]
		queue = queue[:len(queue)-1]
		for _, fi := range c.sh.readers[s] {
			d := c.sh.dyn[fi]
			if reached[fi] || (d.kind == figInput && (c.fixed != nil && c.fixed[d.i] || c.isSource(d.i))) {
				continue
			}
			reached[fi] = true
			if d.kind == figInput {
				queue = append(queue, d.i)
			}
		}
	}
	var order []int32
	for fi := range reached {
		order = append(order, fi)
	}
	sort.Slice(order, func(a, b int) bool { return order[a] < order[b] })
	for _, fi := range order {
		f.order = append(f.order, newFloatFig(c.sh.dyn[fi]))
	}
	nodes, uncs, tests := map[int32]bool{}, map[int32]bool{}, map[int32]bool{}
	for _, fi := range order {
		switch d := c.sh.dyn[fi]; d.kind {
		case figProb:
			f.probs = true
			if p := c.sh.parent[d.i]; !nodes[p] {
				nodes[p] = true
				f.restNodes = append(f.restNodes, p)
			}
		case figPrior:
			f.probs = true
			if !uncs[d.i] {
				uncs[d.i] = true
				f.restUncs = append(f.restUncs, d.i)
			}
		case figLikelihood:
			f.probs = true
			if !tests[d.i] {
				tests[d.i] = true
				f.restTests = append(f.restTests, d.i)
			}
		}
	}
	f.own = make([]float64, n)
	f.owns()
	f.mass = make([]float64, n)
	f.remass()
	f.weigh()
	return f
}

func (c *Model) isSource(slot int32) bool { return c.sh.isSource[slot] }

// Draw gives the random inputs the values x (in the order of
// Model.Uncertain) and evaluates again what depends on them. An error says
// which probability a draw put outside [0, 1]; the Floats is then not
// usable until the next Draw.
func (f *Floats) Draw(x []float64) error {
	c := f.c
	for i, s := range c.sh.sources {
		f.in[s.slot] = x[i]
	}
	tests := false
	for i := range f.order {
		d := &f.order[i]
		var v float64
		if d.slot >= 0 {
			v = d.a*f.in[d.slot] + d.b
		} else {
			v = d.prog.evalFloat(f.in)
		}
		switch d.kind {
		case figInput:
			f.in[d.i] = v
		case figCash:
			f.cash[d.i] = v
		case figProb:
			f.prob[d.i] = v
		case figPayoff:
			f.payoff[d.i] = v
			f.own[d.i] = v
		case figPrior:
			f.prior[d.i][d.j] = v
		case figLikelihood:
			f.lik[d.i][d.j][d.k] = v
		case figTestCost:
			f.tcost[d.i] = v
			tests = true
		}
	}
	if tests {
		f.owns()
	}
	if f.probs {
		if err := f.rests(); err != nil {
			return err
		}
		f.remass()
	}
	f.weigh()
	return nil
}

// floatFig is a figure Draw evaluates: where it goes, and either a linear
// function a·in[slot] + b of one input (most figures: an input, a cash
// flow written as a calculation on one input) or its program.
type floatFig struct {
	kind    figKind
	i, j, k int32
	slot    int32 // -1: run prog
	a, b    float64
	prog    *program
}

func newFloatFig(d dynFig) floatFig {
	f := floatFig{kind: d.kind, i: d.i, j: d.j, k: d.k, slot: -1, prog: d.prog}
	if a, b, ok := d.prog.linear(); ok {
		f.slot, f.a, f.b = d.prog.slots[0], a, b
	}
	return f
}

// linear reports whether the program computes a·x + b of the one input x
// it reads, with no division by it and no distribution, and returns a and
// b (in float64: the result may differ from running the program in the
// last bits).
func (p *program) linear() (a, b float64, ok bool) {
	if len(p.slots) != 1 {
		return 0, 0, false
	}
	type lin struct{ a, b float64 }
	var buf [16]lin
	st := buf[:0]
	for _, o := range p.ops {
		switch o.code {
		case opConst:
			st = append(st, lin{0, p.fconsts[o.arg]})
			continue
		case opSlot:
			st = append(st, lin{1, 0})
			continue
		case opNeg:
			st[len(st)-1] = lin{-st[len(st)-1].a, -st[len(st)-1].b}
			continue
		case opAdd, opSub, opMul, opDiv:
		default:
			return 0, 0, false
		}
		if len(st) < 2 {
			return 0, 0, false
		}
		x, y := st[len(st)-2], st[len(st)-1]
		st = st[:len(st)-1]
		var r lin
		switch o.code {
		case opAdd:
			r = lin{x.a + y.a, x.b + y.b}
		case opSub:
			r = lin{x.a - y.a, x.b - y.b}
		case opMul:
			switch {
			case x.a == 0:
				r = lin{x.b * y.a, x.b * y.b}
			case y.a == 0:
				r = lin{x.a * y.b, x.b * y.b}
			default:
				return 0, 0, false
			}
		case opDiv:
			if y.a != 0 || y.b == 0 {
				return 0, 0, false
			}
			r = lin{x.a / y.b, x.b / y.b}
		}
		st[len(st)-1] = r
	}
	if len(st) != 1 {
		return 0, 0, false
	}
	return st[0].a, st[0].b, true
}

// owns sets what every node adds itself from the payoffs and test costs.
func (f *Floats) owns() {
	sh := f.c.sh
	copy(f.own, f.payoff)
	if sh.test != nil {
		for i, t := range sh.test {
			if t >= 0 {
				f.own[i] = -f.tcost[t]
			}
		}
	}
}

// remass computes every node's mass from the probabilities. A tree with no
// named uncertainty (the usual case) takes a pass of its own that reuses
// the arrays; with named uncertainties the general pass runs (derive.go).
func (f *Floats) remass() {
	sh := f.c.sh
	if sh.unc != nil {
		// Float masses never grow too long, so no frame has a rho.
		f.mass, f.restart, _ = masses[float64](sh, floatArith{}, f.prob, f.prior, f.lik, nil)
		return
	}
	mass, first, kind := f.mass, sh.first, sh.kind
	for i := range f.restart {
		f.restart[i] = false
	}
	frames := false
	mass[0] = 1
	for i := range kind {
		from, to := first[i], first[i+1]
		mi := mass[i]
		if kind[i] != tree.KindChance {
			for k := from; k < to; k++ {
				mass[k] = mi
			}
			continue
		}
		for k := from; k < to; k++ {
			p := f.prob[k]
			if p == 0 {
				// Never reached: a frame of its own, as in derive.go.
				if f.restart == nil {
					f.restart = make([]bool, len(kind))
				}
				f.restart[k], frames = true, true
				mass[k] = 1
				continue
			}
			mass[k] = mi * p
		}
	}
	if !frames {
		f.restart = nil
	}
}

// rests takes the rest of every set of probabilities a draw changed and
// checks them.
func (f *Floats) rests() error {
	c := f.c
	bad := func(p float64, what string) error {
		return fmt.Errorf("a probability under %s is drawn as %.6g, outside [0, 1]; the distributions it reads must keep it within 0 .. 1", what, p)
	}
	for _, i := range f.restNodes {
		from, to := c.sh.first[i], c.sh.first[i+1]
		rest := int32(-1)
		if c.sh.restAt != nil {
			rest = c.sh.restAt[i]
		}
		sum := 0.0
		for k := from; k < to; k++ {
			if k != rest {
				if p := f.prob[k]; p < 0 || p > 1 {
					return bad(p, describeAt(c.sh.nodes[i]))
				}
				sum += f.prob[k]
			}
		}
		if rest >= 0 {
			f.prob[rest] = 1 - sum
			switch {
			case f.prob[rest] < -1e-12:
				return bad(f.prob[rest], describeAt(c.sh.nodes[i]))
			case f.prob[rest] < 0:
				f.prob[rest] = 0 // rounding: the others sum to 1
			}
		} else if math.Abs(sum-1) > sumSlack {
			return unsummed(sum, describeAt(c.sh.nodes[i]))
		}
	}
	for _, u := range f.restUncs {
		rest := c.sh.restState[u]
		sum := 0.0
		for s, p := range f.prior[u] {
			if int32(s) != rest {
				if p < 0 || p > 1 {
					return bad(p, "uncertainty "+c.sh.uncs[u].Name+atText(c.sh.uncs[u].Pos))
				}
				sum += p
			}
		}
		what := "uncertainty " + c.sh.uncs[u].Name + atText(c.sh.uncs[u].Pos)
		switch {
		case rest < 0:
			if math.Abs(sum-1) > sumSlack {
				return unsummed(sum, what)
			}
		case 1-sum < -1e-12:
			return bad(1-sum, what)
		default:
			f.prior[u][rest] = max(1-sum, 0)
		}
	}
	for _, t := range f.restTests {
		what := "test " + c.sh.tests[t].Name + atText(c.sh.tests[t].Pos)
		for st := range c.sh.uncs[c.TestOn(int(t))].States {
			rest := c.sh.restReading[t][st]
			sum := 0.0
			for r, ls := range f.lik[t] {
				if int32(r) != rest {
					if p := ls[st]; p < 0 || p > 1 {
						return bad(p, what)
					}
					sum += ls[st]
				}
			}
			switch {
			case rest < 0:
				if math.Abs(sum-1) > sumSlack {
					return unsummed(sum, what)
				}
			case 1-sum < -1e-12:
				return bad(1-sum, what)
			default:
				f.lik[t][rest][st] = max(1-sum, 0)
			}
		}
	}
	return nil
}

// describeAt names a node and where it is written: "M" at 4:5 (a model
// read from JSON has no positions).
func describeAt(n *tree.Node) string { return describe(n) + atText(n.Pos) }

// atText is " at LINE:COL", or "" for no position.
func atText(p tree.Pos) string {
	if !p.IsValid() {
		return ""
	}
	return " at " + p.String()
}

// sumSlack is how far drawn probabilities may miss summing to 1 by
// rounding.
const sumSlack = 1e-9

func unsummed(sum float64, what string) error {
	return fmt.Errorf("a draw makes the probabilities under %s sum to %.6g, not 1; write the last one as `rest`", what, sum)
}

func (f *Floats) weigh() {
	e, mass, cash, own := f.e, f.mass, f.cash, f.own
	for i := range e {
		e[i] = mass[i] * (cash[i] + own[i])
	}
}

// Rollback rolls the float64 copy back and returns the root's expected
// value (net).
func (f *Floats) Rollback() float64 {
	rollbackFloat(f.c.sh, f.restart, nil, f.e, f.t, f.best, nil)
	return f.t[0]
}

// Follow rolls the float64 copy back with every decision taking the
// branch policy gives it (as Rollback.Policy returns) and returns the
// root's expected value (net). Every node's value is still computed, so
// Total gives the value of each option of a decision with the policy
// followed below it.
func (f *Floats) Follow(policy []int32) float64 {
	rollbackFloat(f.c.sh, f.restart, nil, f.e, f.t, f.best, policy)
	return f.t[0]
}

// Value is the expected value from node i on after the last Rollback (net;
// the cash into i not included).
func (f *Floats) Value(i int) float64 { return f.t[i]/f.mass[i] - f.cash[i] }

// Total is the value of taking the branch into node i after the last
// Rollback: its cash plus the value from i on.
func (f *Floats) Total(i int) float64 { return f.t[i] / f.mass[i] }

// Best is decision i's first optimal branch after the last Rollback.
func (f *Floats) Best(i int) int { return int(f.best[i] &^ tiedBit) }

// Prob is the probability of the branch into node k at the current draw.
func (f *Floats) Prob(k int) float64 {
	c := f.c
	p := c.sh.parent[k]
	switch {
	case p < 0:
		return 1
	case c.sh.kind[p] != tree.KindChance:
		return 0
	case c.sh.unc == nil || c.sh.unc[p] < 0:
		return f.prob[k]
	case f.restart != nil && f.restart[k]:
		return 0
	}
	return f.mass[k] / f.mass[p]
}

// Cash is the net value of the branch into node k at the current draw;
// Own what node k adds itself (an end's payoff, or a test's cost,
// negative).
func (f *Floats) Cash(k int) float64 { return f.cash[k] }

// Own is what node k adds itself: an end's payoff, or minus the cost of the
// test it runs.
func (f *Floats) Own(k int) float64 { return f.own[k] }
