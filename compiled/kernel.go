package compiled

import (
	"math/big"

	"github.com/forkcast/forkcast/internal/exact"
	"github.com/forkcast/forkcast/tree"
)

// The rollback kernel: one algorithm over the node arrays, run on 128-bit
// integers (the usual case), on big integers when the figures outgrow 128
// bits, and on float64 for simulation. See derive.go for what T and E are.

// ops is what the kernel needs of a number type T: a zero-size type whose
// methods do T's arithmetic, so that T itself may be a plain float64.
type ops[T, R any] interface {
	add(a, b T) (T, bool) // ok is false on overflow
	less(a, b T) bool
	equal(a, b T) bool
	// addScaled is a + t × r, for a frame's T weighted by its rho; ok is
	// false when the type cannot do it (then the big integers can).
	addScaled(a, t T, r R) (T, bool)
}

type wideOps struct{}

func (wideOps) add(a, b exact.Wide) (exact.Wide, bool) { return a.Add(b) }
func (wideOps) less(a, b exact.Wide) bool              { return a.Less(b) }
func (wideOps) equal(a, b exact.Wide) bool             { return a == b }
func (wideOps) addScaled(a, _ exact.Wide, _ struct{}) (exact.Wide, bool) {
	return a, false
}

type floatOps struct{}

func (floatOps) add(a, b float64) (float64, bool) { return a + b, true }
func (floatOps) less(a, b float64) bool           { return a < b }
func (floatOps) equal(a, b float64) bool          { return a == b }
func (floatOps) addScaled(a, t, r float64) (float64, bool) {
	return a + t*r, true
}

// bigOps compares exactly when tol is nil; in a model with rounded figures
// two values closer than the rounding could move them (tol, in T's units,
// or 10^-(DivisionScale-10) of their size) are equal: a tie, never a
// choice made by rounding noise.
type bigOps struct{ tol *big.Int }

func (bigOps) add(a, b *big.Int) (*big.Int, bool) { return new(big.Int).Add(a, b), true }
func (o bigOps) less(a, b *big.Int) bool {
	if o.tol == nil {
		return a.Cmp(b) < 0
	}
	return new(big.Int).Sub(b, a).Cmp(o.slack(a, b)) > 0
}
func (o bigOps) equal(a, b *big.Int) bool {
	if o.tol == nil {
		return a.Cmp(b) == 0
	}
	d := new(big.Int).Sub(a, b)
	return d.CmpAbs(o.slack(a, b)) <= 0
}

// slack is how far apart a and b may be and still count as equal.
func (o bigOps) slack(a, b *big.Int) *big.Int {
	s := new(big.Int).Abs(a)
	if b.CmpAbs(s) > 0 {
		s.Abs(b)
	}
	s.Quo(s, relTol)
	if s.Cmp(o.tol) < 0 {
		return o.tol
	}
	return s
}

// relTol is the relative part of a tolerant comparison: 10^(DivisionScale-10).
var relTol = new(big.Int).Exp(big.NewInt(10), big.NewInt(DivisionScale-10), nil)

// rhoScale is the scale of a rho as a big integer: rho × 10^rhoScale.
const rhoScale = MaxMassPlaces + 2*DivisionScale

var rhoUnit = new(big.Int).Exp(big.NewInt(10), big.NewInt(rhoScale), nil)

// addScaled is a + t × r / 10^rhoScale, rounded half away from zero.
func (bigOps) addScaled(a, t, r *big.Int) (*big.Int, bool) {
	p := new(big.Int).Mul(t, r)
	q, m := new(big.Int).QuoRem(p, rhoUnit, new(big.Int))
	if m.CmpAbs(new(big.Int).Rsh(rhoUnit, 1)) >= 0 {
		if p.Sign() < 0 {
			q.Sub(q, big.NewInt(1))
		} else {
			q.Add(q, big.NewInt(1))
		}
	}
	return q.Add(q, a), true
}

// tiedBit marks, in best, a decision with more than one optimal branch.
const tiedBit = 1 << 30

// rollback fills t from e bottom-up: a chance node's T is its E plus its
// children's T (a child in a frame of its own adds its rho times its T, or
// nothing when rho is nil or 0: a branch of probability 0), a decision's
// its E plus the largest child T (or the child policy names, when policy is
// not nil), an end's its E. best gets each decision's first optimal branch
// (tiedBit set when another ties with it). ok is false on overflow.
func rollback[T, R any, O ops[T, R]](o O, sh *shape, restart []bool, rho []R, e, t []T, best []int32, policy []int32) bool {
	ok := true
	first, kind := sh.first, sh.kind
	for i := len(kind) - 1; i >= 0; i-- {
		from, to := first[i], first[i+1]
		acc := e[i]
		switch kind[i] {
		case tree.KindChance:
			for k := from; k < to; k++ {
				if restart != nil && restart[k] {
					if rho != nil {
						var good bool
						if acc, good = o.addScaled(acc, t[k], rho[k]); !good {
							ok = false
						}
					}
					continue
				}
				var good bool
				if acc, good = o.add(acc, t[k]); !good {
					ok = false
				}
			}
		case tree.KindDecision:
			if from == to {
				break
			}
			var b int32
			if policy != nil {
				b = policy[i]
			} else {
				m := t[from]
				ties := int32(0)
				for k := from + 1; k < to; k++ {
					switch {
					case o.less(m, t[k]):
						m, b, ties = t[k], k-from, 0
					case o.equal(t[k], m):
						ties = tiedBit
					}
				}
				b |= ties
			}
			best[i] = b
			var good bool
			if acc, good = o.add(acc, t[from+b&^tiedBit]); !good {
				ok = false
			}
		}
		t[i] = acc
	}
	return ok
}
