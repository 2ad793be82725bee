package compiled

import (
	"fmt"
	"math/big"
	"sync"

	"github.com/forkcast/forkcast/internal/bulk"
	"github.com/forkcast/forkcast/internal/exact"
	"github.com/forkcast/forkcast/tree"
)

// Rollback works on masses instead of probabilities.
//
// The mass of a node is the probability of reaching it from the root,
// counting chance outcomes only (decisions are choices, not events): the
// product of the plain chance probabilities on its path times, for every
// named uncertainty, the joint probability of the states and test readings
// seen on the way. Where a test was read, that joint probability is
// P(state) × Π P(reading | state) summed over the states still possible —
// Bayes' rule without its division. So masses are products of the model's
// own figures and stay exact.
//
// The kernel then rolls back T(n) = mass(n) × (the value from n on, plus
// the cash on the branch into n): T of an end is its mass times its cash
// and payoff (E below), a chance node adds its children's T, a decision
// takes the largest. Comparing T at a decision compares values (all its
// options share its mass), so a rollback is additions and comparisons of
// integers at one scale, with no division anywhere; a node's value is T
// over its mass, divided only when someone asks for it.
//
// A branch of probability 0 leads to a subtree nobody reaches; its mass
// would be 0 and its values undefined. Such a subtree is rolled back in a
// frame of its own ("restart"): its masses start again as if the branch had
// been taken (a known state stays known; a reading of probability 0 leaves
// the prior as it was), and its T adds nothing to the node above it.
//
// A very deep tree would make masses of thousands of digits (a chain of
// 100,000 chance nodes of 30% has masses down to 0.3^100000). Where a mass
// would need more than MaxMassPlaces decimal places, its subtree too gets a
// frame of its own, its masses starting again near 1, and adds rho × its T
// to the node above, where rho is the mass it would have had (and, below a
// test, the joint probabilities are rescaled to sum to 1, rounded at
// DivisionScale places). The rollback is then no longer exact, and the
// model says so; no figure grows without bound.
type derived struct {
	mass    []exact.Num
	restart []bool      // nil when no subtree has a frame of its own
	rho     []exact.Num // per frame start: what its T is worth above it; nil when every frame start is a branch of probability 0
	scale   int32       // E and T are integers: value × 10^scale
	e       []exact.Wide
	eBig    []*big.Int // set when E does not fit in 128 bits at the scale
	exact   bool

	workOnce sync.Once
	work     int
	rhoOnce  sync.Once
	rhoBig   []*big.Int
	bigOnce  sync.Once
	bigE     []*big.Int
	fltOnce  sync.Once
	fltE     []float64
	fltMass  []float64
}

// arith is the arithmetic the mass pass needs, so that one pass serves
// exact figures and their float64 twins.
type arith[T any] interface {
	mul(a, b T) T
	add(a, b T) T
	isZero(a T) bool
	one() T
	zero() T
	// tooLong reports whether a mass needs a frame of its own to stay
	// bounded; scale(a, b) is a / b for a frame's rho and normalize makes a
	// joint vector sum to 1, both rounded.
	tooLong(a T) bool
	scale(a, b T) T
	normalize(j []T) []T
}

type exactArith struct{ pool *exact.Pool }

func (a exactArith) mul(x, y exact.Num) exact.Num { return a.pool.Mul(x, y) }
func (a exactArith) add(x, y exact.Num) exact.Num { return a.pool.Add(x, y) }
func (exactArith) isZero(x exact.Num) bool        { return x.IsZero() }
func (exactArith) one() exact.Num                 { return exact.One }
func (exactArith) zero() exact.Num                { return exact.Zero }
func (a exactArith) tooLong(x exact.Num) bool     { return x.IsBig() && a.pool.Places(x) > MaxMassPlaces }
func (a exactArith) scale(x, y exact.Num) exact.Num {
	q, _ := a.pool.Div(x, y, a.pool.Places(x)+DivisionScale)
	return q
}
func (a exactArith) normalize(j []exact.Num) []exact.Num {
	sum := exact.Zero
	for _, x := range j {
		sum = a.pool.Add(sum, x)
	}
	out := make([]exact.Num, len(j))
	for i, x := range j {
		out[i], _ = a.pool.Div(x, sum, DivisionScale)
	}
	return out
}

type floatArith struct{}

func (floatArith) mul(x, y float64) float64   { return x * y }
func (floatArith) add(x, y float64) float64   { return x + y }
func (floatArith) isZero(x float64) bool      { return x == 0 }
func (floatArith) one() float64               { return 1 }
func (floatArith) zero() float64              { return 0 }
func (floatArith) tooLong(float64) bool       { return false }
func (floatArith) scale(x, y float64) float64 { return x / y }
func (floatArith) normalize(j []float64) []float64 {
	sum := 0.0
	for _, x := range j {
		sum += x
	}
	out := make([]float64, len(j))
	for i, x := range j {
		out[i] = x / sum
	}
	return out
}

// ctx is what is known about the named uncertainties on the way to a
// node: for each one seen, the joint probability of each state with the
// readings and outcomes so far. It is a persistent list, newest first,
// shared by every node below the point where it was made.
type ctx[T any] struct {
	u    int32
	j    []T
	sum  T // Σ j
	prod T // Π over the list of the sums: the joint probability of everything seen
	prev *ctx[T]
}

// joint is u's joint vector in x, or its prior when u has not been seen.
func joint[T any](x *ctx[T], prior [][]T, u int32) []T {
	for n := x; n != nil; n = n.prev {
		if n.u == u {
			return n.j
		}
	}
	return prior[u]
}

// with returns x with u's joint vector set to j. fresh says u is not in x
// yet (the usual case: the first node on u on the way down), which costs
// one multiplication; otherwise the list is rebuilt without u's old entry.
func with[T any](ar arith[T], x *ctx[T], u int32, j []T, fresh bool) *ctx[T] {
	if !fresh {
		x = without(ar, x, u)
	}
	return push(ar, x, u, j)
}

func push[T any](ar arith[T], x *ctx[T], u int32, j []T) *ctx[T] {
	s := ar.zero()
	for _, v := range j {
		s = ar.add(s, v)
	}
	return &ctx[T]{u: u, j: j, sum: s, prod: ar.mul(prodOf(ar, x), s), prev: x}
}

// without rebuilds x without u, oldest entry first.
func without[T any](ar arith[T], x *ctx[T], u int32) *ctx[T] {
	var keep []*ctx[T]
	for n := x; n != nil; n = n.prev {
		if n.u != u {
			keep = append(keep, n)
		}
	}
	var y *ctx[T]
	for i := len(keep) - 1; i >= 0; i-- {
		y = &ctx[T]{u: keep[i].u, j: keep[i].j, sum: keep[i].sum, prod: ar.mul(prodOf(ar, y), keep[i].sum), prev: y}
	}
	return y
}

func prodOf[T any](ar arith[T], x *ctx[T]) T {
	if x == nil {
		return ar.one()
	}
	return x.prod
}

// masses computes every node's mass and the frames of their own (see the
// comment on derived) from the probabilities of plain chance branches, the
// priors and the likelihoods. zeroReading is called for a test reading
// that cannot occur where it stands (k, the node under it; t, the test).
func masses[T any](sh *shape, ar arith[T], prob []T, prior [][]T, lik [][][]T, zeroReading func(k int, t int32)) (mass []T, restart []bool, rho []T) {
	n := len(sh.kind)
	mass = bulk.Make[T](n)
	mass[0] = ar.one()
	named := sh.unc != nil
	var plain []T
	var ctxs []*ctx[T]
	if named {
		plain = make([]T, n)
		ctxs = make([]*ctx[T], n)
		plain[0] = ar.one()
	}
	markRestart := func(k int) {
		if restart == nil {
			restart = make([]bool, n)
		}
		restart[k] = true
	}
	// bound gives node k a frame of its own when its mass grew too long.
	bound := func(k int) {
		if !ar.tooLong(mass[k]) {
			return
		}
		was := mass[k]
		mass[k] = ar.one()
		if named {
			plain[k] = ar.one()
			if x := ctxs[k]; x != nil {
				var entries []*ctx[T]
				for n := x; n != nil; n = n.prev {
					entries = append(entries, n)
				}
				var y *ctx[T]
				for e := len(entries) - 1; e >= 0; e-- {
					y = push(ar, y, entries[e].u, ar.normalize(entries[e].j))
				}
				ctxs[k] = y
				mass[k] = y.prod
			}
		}
		markRestart(k)
		if rho == nil {
			rho = make([]T, n)
			for i := range rho {
				rho[i] = ar.zero()
			}
		}
		rho[k] = ar.scale(was, mass[k])
	}
	for i := 0; i < n; i++ {
		from, to := int(sh.first[i]), int(sh.first[i+1])
		if from == to {
			continue
		}
		mi := mass[i]
		switch {
		case sh.kind[i] == tree.KindDecision:
			for k := from; k < to; k++ {
				mass[k] = mi
				if named {
					plain[k], ctxs[k] = plain[i], ctxs[i]
				}
			}
		case !named || sh.unc[i] < 0:
			// A plain chance node.
			for k := from; k < to; k++ {
				p := prob[k]
				if named {
					plain[k], ctxs[k] = ar.mul(plain[i], p), ctxs[i]
				}
				if ar.isZero(p) {
					markRestart(k)
					mass[k] = ar.one()
					if named {
						plain[k] = ar.one()
						mass[k] = prodOf(ar, ctxs[k])
					}
					continue
				}
				mass[k] = ar.mul(mi, p)
			}
		default:
			u := sh.unc[i]
			t := sh.test[i]
			fresh := !sh.seen[i]
			j := prior[u]
			if !fresh {
				j = joint(ctxs[i], prior, u)
			}
			for k := from; k < to; k++ {
				o := sh.out[k]
				nj := make([]T, len(j))
				if t >= 0 {
					for s := range j {
						nj[s] = ar.mul(j[s], lik[t][o][s])
					}
				} else {
					for s := range nj {
						nj[s] = ar.zero()
					}
					nj[o] = j[o]
				}
				x := with(ar, ctxs[i], u, nj, fresh)
				plain[k] = plain[i]
				if ar.isZero(x.prod) {
					// Never reached: a frame of its own. A known state
					// stays known; a reading that cannot occur leaves the
					// uncertainty as it was before it.
					markRestart(k)
					if t >= 0 {
						x = with(ar, ctxs[i], u, j, fresh)
						if ar.isZero(x.prod) {
							x = with(ar, ctxs[i], u, prior[u], fresh)
						}
						if zeroReading != nil {
							zeroReading(k, t)
						}
					} else {
						unit := make([]T, len(j))
						for s := range unit {
							unit[s] = ar.zero()
						}
						unit[o] = ar.one()
						x = with(ar, ctxs[i], u, unit, fresh)
					}
					plain[k] = ar.one()
				}
				ctxs[k] = x
				mass[k] = ar.mul(plain[k], x.prod)
			}
		}
		for k := from; k < to; k++ {
			if restart == nil || !restart[k] {
				bound(k)
			}
		}
	}
	return mass, restart, rho
}

// derive computes the masses and E of c's figures. With check it also
// reports what only the masses show (a test reading of probability 0, a
// probability written under a named node that differs from the one the
// declarations give).
func (c *Model) derive(check bool) (*derived, tree.Diagnostics) {
	if !c.HasTree() {
		return &derived{exact: true}, nil // registers alone: no masses
	}
	var ds tree.Diagnostics
	zeroWarned := map[int32]bool{}
	var zero func(k int, t int32)
	if check {
		zero = func(k int, t int32) {
			if !zeroWarned[t] {
				zeroWarned[t] = true
				b := c.Branch(k)
				ds.Warn(b.Pos, "the subtree under it can never be reached; check the likelihoods", "reading %q of test %q has probability 0 here", b.Label, c.sh.tests[t].Name)
			}
		}
	}
	d := &derived{exact: true}
	d.mass, d.restart, d.rho = masses[exact.Num](c.sh, exactArith{c.pool}, c.prob, c.prior, c.lik, zero)
	d.exact = d.rho == nil
	if check && c.sh.unc != nil {
		for i := range c.sh.kind {
			if c.sh.kind[i] == tree.KindChance && c.sh.unc[i] >= 0 {
				c.checkGiven(i, d, &ds)
			}
		}
	}
	c.weigh(d)
	return d, ds
}

// checkGiven checks the probabilities written under a named node (solved
// JSON carries them, revised by Bayes' rule, so it reads back): each must
// be the one the declarations give there; any other is a mistake, never
// silently replaced.
func (c *Model) checkGiven(i int, d *derived, ds *tree.Diagnostics) {
	n := c.sh.nodes[i]
	from := int(c.sh.first[i])
	what := fmt.Sprintf("uncertainty %q", n.Uncertainty)
	if n.Test != "" {
		what = fmt.Sprintf("test %q", n.Test)
	}
	for j, b := range n.Branches {
		if b.Prob == nil || c.sh.out[from+j] < 0 {
			continue
		}
		p, err := compileExpr(c.pool, b.Prob, func(nm *tree.Name) (int32, *EvalError) {
			if s, ok := c.sh.slotOf[nm.Name]; ok {
				return s, nil
			}
			return 0, &EvalError{Pos: nm.At, Msg: fmt.Sprintf("unknown name %q", nm.Name)}
		}, func(call *tree.Call) (int32, *EvalError) {
			return 0, &EvalError{Pos: call.At, Msg: "a distribution as the probability of a branch under " + what,
				Hint: "remove it: the probability comes from the declaration"}
		})
		if err != nil {
			ds.Add(err.Pos, err.Hint, "%s", err.Msg)
			continue
		}
		v, _, err := p.eval(c.pool, c.in, nil)
		if err != nil {
			ds.Add(err.Pos, err.Hint, "%s", err.Msg)
			continue
		}
		want := c.probOf(d, from+j)
		if !c.pool.Equal(v, want) {
			ds.Add(b.Prob.Pos(), "remove it: the probability comes from the declaration", "branch %q under %s has probability %s of its own, but the declaration gives %s here", b.Label, what, c.pool.Dec(v), c.pool.Dec(want))
		}
	}
}

// probOf is the probability of the branch into node k: its figure under a
// plain chance node, mass(k)/mass(parent) under a named one (rounded at
// DivisionScale when that is no finite decimal), 0 when k is never reached.
func (c *Model) probOf(d *derived, k int) exact.Num {
	p := c.sh.parent[k]
	if p < 0 {
		return exact.One
	}
	if c.sh.kind[p] != tree.KindChance {
		return exact.Zero
	}
	if c.sh.unc == nil || c.sh.unc[p] < 0 {
		return c.prob[k]
	}
	m := d.mass[k]
	if d.restart != nil && d.restart[k] {
		if d.rho == nil || d.rho[k].IsZero() {
			return exact.Zero // never reached
		}
		m = c.pool.Mul(d.rho[k], m) // its mass in the frame above
	}
	q, _ := c.pool.Div(m, d.mass[p], DivisionScale)
	return q
}

// own is what node i adds itself, beside the cash on the branch into it:
// an end's payoff, or a test's cost (negative) at the node that runs it.
func (c *Model) own(i int) exact.Num {
	if c.sh.test != nil && c.sh.test[i] >= 0 {
		return c.pool.Neg(c.tcost[c.sh.test[i]])
	}
	return c.payoffAt(i)
}

// payoffAt is end node i's own value: 0 when no end has one (payoff is
// nil then).
func (c *Model) payoffAt(i int) exact.Num {
	if c.payoff == nil {
		return exact.Zero
	}
	return c.payoff[i]
}

// weigh computes E = mass × (cash + own) for every node at one scale: the
// most decimal places any E has. The E are kept until the scale is known
// (computing each again instead would save an array the model's size, but
// cost twice the products where figures are big numbers, as in the
// exact confirmation of a switch).
func (c *Model) weigh(d *derived) {
	n := len(d.mass)
	pool := c.pool
	es := bulk.Make[exact.Num](n)
	scale := int32(0)
	for i := 0; i < n; i++ {
		v := pool.Add(c.cash[i], c.own(i))
		if v.IsZero() {
			continue
		}
		e := pool.Mul(d.mass[i], v)
		es[i] = e
		if p := pool.Places(e); p > scale {
			scale = p
		}
	}
	d.scale = scale
	if scale <= 38 {
		w := bulk.Make[exact.Wide](n)
		ok := true
		for i, e := range es {
			if e.IsZero() {
				continue
			}
			if w[i], ok = pool.WideOf(e, scale); !ok {
				break
			}
		}
		if ok {
			d.e = w
			return
		}
	}
	d.eBig = make([]*big.Int, n)
	for i, e := range es {
		if e.IsZero() {
			d.eBig[i] = bigZero
			continue
		}
		d.eBig[i], _ = pool.BigOf(e, scale)
	}
}
