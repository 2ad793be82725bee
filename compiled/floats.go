package compiled

import (
	"fmt"
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
	// Call is the distribution as written; Input the `let` whose whole
	// expression it is ("" when it stands inside a larger expression).
	Call  *tree.Call
	Input string
	// Dist is the distribution, its arguments evaluated at the model's
	// inputs.
	Dist dist.Distribution
	// Mean is the value exact analyses use; Exact is false when it had to
	// be rounded (a lognormal's mean is irrational).
	Mean  decimal.Decimal
	Exact bool
}

// Uncertain lists the distributions written in the model, in the order
// they appear (inputs first).
func (c *Model) Uncertain() []Uncertain {
	out := make([]Uncertain, len(c.sh.sources))
	for i, s := range c.sh.sources {
		args := s.prog.args(c.pool, c.in)
		d, mean, ok, _ := meanOf(functions[s.call.Func], args)
		u := Uncertain{Call: s.call, Dist: d, Mean: mean, Exact: ok}
		if s.let >= 0 {
			u.Input = c.sh.params[s.let].Name
		}
		out[i] = u
	}
	return out
}

// args evaluates the arguments of a distribution's program (everything
// before its final opCall).
func (p *program) args(pool *exact.Pool, in []exact.Num) []decimal.Decimal {
	body := &program{ops: p.ops[:len(p.ops)-1], consts: p.consts}
	n := int(p.ops[len(p.ops)-1].arg)
	out := make([]decimal.Decimal, n)
	// Each argument is evaluated by running the body and reading the
	// stack: the body leaves the n arguments on it.
	var buf [16]exact.Num
	st := buf[:0]
	for _, o := range body.ops {
		switch o.code {
		case opConst:
			st = append(st, body.consts[o.arg])
		case opSlot:
			st = append(st, in[o.arg])
		case opNeg:
			st[len(st)-1] = pool.Neg(st[len(st)-1])
		default:
			x, y := st[len(st)-2], st[len(st)-1]
			st = st[:len(st)-1]
			var r exact.Num
			switch o.code {
			case opAdd:
				r = pool.Add(x, y)
			case opSub:
				r = pool.Sub(x, y)
			case opMul:
				r = pool.Mul(x, y)
			case opDiv:
				if !y.IsZero() {
					r, _ = pool.Div(x, y, DivisionScale)
				}
			}
			st[len(st)-1] = r
		}
	}
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
	rho     []float64
	e, t    []float64
	best    []int32
	// order lists the figures the random inputs reach, in evaluation
	// order; probs is set when one of them is a probability.
	order []int32
	probs bool
	// rests lists the plain chance nodes and uncertainties whose rest
	// must be taken again after a draw.
	restNodes []int32
	restUncs  []int32
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
		f.cash[i], f.prob[i], f.payoff[i] = fl(c.cash[i]), fl(c.prob[i]), fl(c.payoff[i])
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
	for fi := range reached {
		f.order = append(f.order, fi)
	}
	sort.Slice(f.order, func(a, b int) bool { return f.order[a] < f.order[b] })
	nodes, uncs := map[int32]bool{}, map[int32]bool{}
	for _, fi := range f.order {
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
		}
	}
	f.mass, f.restart, f.rho = masses[float64](c.sh, floatArith{}, f.prob, f.prior, f.lik, nil)
	f.weigh()
	return f
}

func (c *Model) isSource(slot int32) bool { return int(slot) >= len(c.sh.params) }

// Draw gives the random inputs the values x (in the order of
// Model.Uncertain) and evaluates again what depends on them. An error says
// which probability a draw put outside [0, 1]; the Floats is then not
// usable until the next Draw.
func (f *Floats) Draw(x []float64) error {
	c := f.c
	for i, s := range c.sh.sources {
		f.in[s.slot] = x[i]
	}
	for _, fi := range f.order {
		d := c.sh.dyn[fi]
		v := d.prog.evalFloat(f.in)
		switch d.kind {
		case figInput:
			f.in[d.i] = v
		case figCash:
			f.cash[d.i] = v
		case figProb:
			f.prob[d.i] = v
		case figPayoff:
			f.payoff[d.i] = v
		case figPrior:
			f.prior[d.i][d.j] = v
		case figLikelihood:
			f.lik[d.i][d.j][d.k] = v
		case figTestCost:
			f.tcost[d.i] = v
		}
	}
	if f.probs {
		if err := f.rests(); err != nil {
			return err
		}
		f.mass, f.restart, f.rho = masses[float64](c.sh, floatArith{}, f.prob, f.prior, f.lik, nil)
	}
	f.weigh()
	return nil
}

// rests takes the rest of every set of probabilities a draw changed and
// checks them.
func (f *Floats) rests() error {
	c := f.c
	bad := func(p float64, what string) error {
		return fmt.Errorf("a draw makes a probability under %s %v, outside [0, 1]", what, p)
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
					return bad(p, describe(c.sh.nodes[i]))
				}
				sum += f.prob[k]
			}
		}
		if rest >= 0 {
			f.prob[rest] = 1 - sum
			if f.prob[rest] < -1e-12 {
				return bad(f.prob[rest], describe(c.sh.nodes[i]))
			}
		}
	}
	for _, u := range f.restUncs {
		rest := c.sh.restState[u]
		sum := 0.0
		for s, p := range f.prior[u] {
			if int32(s) != rest {
				if p < 0 || p > 1 {
					return bad(p, "uncertainty "+c.sh.uncs[u].Name)
				}
				sum += p
			}
		}
		if rest >= 0 {
			f.prior[u][rest] = 1 - sum
		}
	}
	return nil
}

func (f *Floats) weigh() {
	c := f.c
	for i := range f.e {
		own := f.payoff[i]
		if c.sh.test != nil && c.sh.test[i] >= 0 {
			own = -f.tcost[c.sh.test[i]]
		}
		f.e[i] = f.mass[i] * (f.cash[i] + own)
	}
}

// Rollback rolls the float64 copy back and returns the root's expected
// value (net).
func (f *Floats) Rollback() float64 {
	rollback[float64, float64, floatOps](floatOps{}, f.c.sh, f.restart, f.rho, f.e, f.t, f.best, nil)
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
func (f *Floats) Own(k int) float64 {
	if c := f.c; c.sh.test != nil && c.sh.test[k] >= 0 {
		return -f.tcost[c.sh.test[k]]
	}
	return f.payoff[k]
}
