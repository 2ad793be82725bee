package compiled

import (
	"math"
	"math/big"

	"github.com/forkcast/forkcast/internal/bulk"
	"github.com/forkcast/forkcast/internal/exact"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// Rollback is a compiled model rolled back: the expected value from every
// node on and the optimal branches of every decision (or the branches a
// given policy takes). It owns its numbers: nothing that happens to the
// model afterwards changes them.
type Rollback struct {
	c      *Model
	wide   []exact.Wide // T as 128-bit integers at c's scale, or
	bigs   []*big.Int   // as big integers when they outgrew 128 bits
	best   []int32      // per decision: first optimal branch, tiedBit when tied
	follow bool         // the decisions follow a given policy
	ops    bigOps       // how bigs compare (tolerantly in a model with rounded figures)
}

// Rollback rolls c back: every decision takes its best branch (the first in
// model order when several tie).
func (c *Model) Rollback() *Rollback { return c.rollback(nil) }

// Follow rolls c back with every decision taking the branch policy gives it
// (policy[i] for decision node i; other entries are ignored), as when the
// value of a fixed plan is wanted under other inputs.
func (c *Model) Follow(policy []int32) *Rollback { return c.rollback(policy) }

// RollbackInto is Rollback reusing the arrays of dst, a rollback of a
// model of the same tree that the caller no longer needs (its figures are
// overwritten): the loop of a sweep or a simulation, without allocating
// per sample. dst may be nil.
func (c *Model) RollbackInto(dst *Rollback) *Rollback { return c.rollbackInto(dst, nil) }

func (c *Model) rollback(policy []int32) *Rollback { return c.rollbackInto(nil, policy) }

func (c *Model) rollbackInto(dst *Rollback, policy []int32) *Rollback {
	d := c.d
	n := len(c.sh.kind)
	r := &Rollback{c: c, follow: policy != nil}
	if dst != nil && len(dst.best) == n {
		r.best, r.wide, r.bigs = dst.best, dst.wide, dst.bigs
		*dst = Rollback{}
	} else {
		r.best = bulk.Make[int32](n)
	}
	if d.e != nil && c.Exact() {
		if len(r.wide) != n {
			r.wide = bulk.Make[exact.Wide](n)
		}
		if rollbackWide(c.sh, d.restart, d.e, r.wide, r.best, policy) {
			r.bigs = nil
			return r
		}
	}
	r.wide = nil
	r.bigs = make([]*big.Int, n)
	o := bigOps{}
	if !c.Exact() {
		// An absolute floor of 10^-(DivisionScale-5) in value at mass 1.
		// At a coarser scale figures that differ at all differ by more
		// than that (one unit of the scale): no floor, only the relative
		// part (a floor of one unit made options a whole unit apart tie
		// in a model of whole numbers with a mean taken from float64).
		if k := int64(d.scale) - (DivisionScale - 5); k > 0 {
			o.tol = new(big.Int).Exp(big.NewInt(10), big.NewInt(k), nil)
		} else {
			o.tol = new(big.Int)
		}
	}
	r.ops = o
	rollbackBig(o, c.sh, d.restart, c.bigRho(), c.bigE(), r.bigs, r.best, policy)
	return r
}

// bigZero stands for every E of 0 among big integers. Nothing writes to
// an E: the kernel adds into integers of its own (rollbackBig).
var bigZero = new(big.Int)

// bigE is E as big integers, made once when first needed (figures that
// outgrew 128 bits, or sums that overflowed them).
func (c *Model) bigE() []*big.Int {
	d := c.d
	d.bigOnce.Do(func() {
		n := len(c.sh.kind)
		d.bigE = make([]*big.Int, n)
		for i := 0; i < n; i++ {
			switch {
			case d.eBig != nil:
				d.bigE[i] = d.eBig[i]
			case d.e != nil && d.e[i] != exact.Wide{}:
				d.bigE[i] = d.e[i].Big()
			}
			if d.bigE[i] == nil {
				d.bigE[i] = bigZero
			}
		}
	})
	return d.bigE
}

// Model is the compiled model rolled back.
func (r *Rollback) Model() *Model { return r.c }

// t is node i's T as a decimal: mass × (value from i on + cash into i).
func (r *Rollback) t(i int) decimal.Decimal {
	if r.wide != nil {
		return r.wide[i].Decimal(r.c.d.scale)
	}
	return decimal.NewFromBigInt(r.bigs[i], -r.c.d.scale)
}

// cmpT compares the T of two nodes: meaningful between siblings under a
// decision (they share its mass); exact, except that in a model with
// rounded figures values closer than the rounding could move them are
// equal.
func (r *Rollback) cmpT(a, b int) int {
	if r.wide != nil {
		return r.wide[a].Cmp(r.wide[b])
	}
	switch x, y := r.bigs[a], r.bigs[b]; {
	case r.ops.equal(x, y):
		return 0
	case r.ops.less(x, y):
		return -1
	}
	return 1
}

// Value is the expected value from node i on (net value; the cash on the
// branch into i is not included), and whether it is exact: a value below a
// test reading is a ratio of exact figures and is rounded at DivisionScale
// places when that is no finite decimal.
func (r *Rollback) Value(i int) (decimal.Decimal, bool) {
	v, ok := r.total(i)
	return v.Sub(r.c.Cash(i)), ok
}

// Total is the value of taking the branch into node i: its cash plus the
// value from i on, and whether it is exact (see Value).
func (r *Rollback) Total(i int) (decimal.Decimal, bool) { return r.total(i) }

func (r *Rollback) total(i int) (decimal.Decimal, bool) {
	c := r.c
	m := c.d.mass[i]
	t := r.t(i)
	if c.pool.Equal(m, exact.One) {
		if c.d.scale > DivisionScale && !c.Exact() {
			// Rounded figures (very deep trees, long divisions): the value
			// is shown at the division's precision, not at the length the
			// rounding left.
			q := t.Round(DivisionScale)
			return q, q.Equal(t)
		}
		return t, true
	}
	md := c.pool.Dec(m)
	q := t.DivRound(md, DivisionScale)
	return q, q.Mul(md).Equal(t)
}

// Best is the first optimal branch of decision i (the one the policy takes
// when several tie), or -1 for another node.
func (r *Rollback) Best(i int) int {
	if r.c.sh.kind[i] != tree.KindDecision || r.c.sh.first[i] == r.c.sh.first[i+1] {
		return -1
	}
	return int(r.best[i] &^ tiedBit)
}

// Tied reports whether decision i has more than one optimal branch. Under
// a followed policy nothing is tied.
func (r *Rollback) Tied(i int) bool { return r.best[i]&tiedBit != 0 }

// Compare compares the values of taking branches a and b of decision i
// (−1, 0, +1), exactly.
func (r *Rollback) Compare(i, a, b int) int {
	from := int(r.c.sh.first[i])
	return r.cmpT(from+a, from+b)
}

// Ties lists the optimal branches of decision i in model order.
func (r *Rollback) Ties(i int) []int {
	b := r.Best(i)
	if b < 0 {
		return nil
	}
	if !r.Tied(i) {
		return []int{b}
	}
	from, to := r.c.Kids(i)
	var out []int
	for k := from + b; k < to; k++ {
		if r.cmpT(k, from+b) == 0 {
			out = append(out, k-from)
		}
	}
	return out
}

// Diff is the value of branch a of decision i minus that of branch b
// (net value), and whether it is exact (see Value).
func (r *Rollback) Diff(i, a, b int) (decimal.Decimal, bool) {
	from := int(r.c.sh.first[i])
	dt := r.t(from + a).Sub(r.t(from + b))
	m := r.c.d.mass[i]
	if r.c.pool.Equal(m, exact.One) || dt.IsZero() {
		return dt, true
	}
	md := r.c.pool.Dec(m)
	q := dt.DivRound(md, DivisionScale)
	return q, q.Mul(md).Equal(dt)
}

// Policy is the branch every decision takes, indexed by node (other
// entries are -1): the input Follow takes.
func (r *Rollback) Policy() []int32 {
	p := make([]int32, len(r.best))
	for i := range p {
		p[i] = int32(r.Best(i))
	}
	return p
}

// floatE is E in float64, made once when first needed.
func (c *Model) floatE() []float64 {
	d := c.d
	d.fltOnce.Do(func() {
		n := len(c.sh.kind)
		d.fltE = make([]float64, n)
		for i := 0; i < n; i++ {
			switch {
			case d.e != nil:
				d.fltE[i] = d.e[i].Float64(d.scale)
			default:
				f, _ := new(big.Float).SetInt(d.eBig[i]).Float64()
				d.fltE[i] = f / math.Pow(10, float64(d.scale))
			}
		}
	})
	return d.fltE
}

// RollbackFloat rolls c back in float64 (the twin of Rollback for
// simulation, where speed matters more than exactness) and returns the
// root's expected value (net). t and best are work space of Len() entries
// each, reused across calls; best receives each decision's choice.
func (c *Model) RollbackFloat(t []float64, best []int32) float64 {
	rollbackFloat(c.sh, c.d.restart, c.floatRho(), c.floatE(), t, best, nil)
	return t[0]
}

// Weighted is node i's T: its mass times the value of taking the branch
// into it (cash plus the value from i on). Sums and differences of T
// between siblings are exact; dividing by the mass gives values.
func (r *Rollback) Weighted(i int) decimal.Decimal { return r.t(i) }

// bigRho is each frame's rho as a big integer at rhoScale (nil when no
// frame has one), made once when first needed.
func (c *Model) bigRho() []*big.Int {
	d := c.d
	if d.rho == nil {
		return nil
	}
	d.rhoOnce.Do(func() {
		d.rhoBig = make([]*big.Int, len(d.rho))
		for i, r := range d.rho {
			d.rhoBig[i], _ = c.pool.BigOf(r, rhoScale)
		}
	})
	return d.rhoBig
}

// floatRho is each frame's rho in float64 (nil when no frame has one).
func (c *Model) floatRho() []float64 {
	d := c.d
	if d.rho == nil {
		return nil
	}
	out := make([]float64, len(d.rho))
	for i, r := range d.rho {
		out[i] = c.pool.Float64(r)
	}
	return out
}
