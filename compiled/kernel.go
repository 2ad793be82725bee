package compiled

import (
	"math/big"

	"github.com/forkcast/forkcast/internal/exact"
	"github.com/forkcast/forkcast/tree"
)

// The rollback kernel: one algorithm over the node arrays, run on 128-bit
// integers (the usual case), on big integers when the figures outgrow 128
// bits, and on float64 for simulation. See derive.go for what T and E are.

// number is what the kernel needs of a number type.
type number[T any] interface {
	add(T) (T, bool) // ok is false on overflow
	less(T) bool
	equal(T) bool
}

type wide exact.Wide

func (a wide) add(b wide) (wide, bool) {
	s, ok := exact.Wide(a).Add(exact.Wide(b))
	return wide(s), ok
}
func (a wide) less(b wide) bool  { return exact.Wide(a).Less(exact.Wide(b)) }
func (a wide) equal(b wide) bool { return a == b }

type flt float64

func (a flt) add(b flt) (flt, bool) { return a + b, true }
func (a flt) less(b flt) bool       { return a < b }
func (a flt) equal(b flt) bool      { return a == b }

type bigNum struct{ x *big.Int }

func (a bigNum) add(b bigNum) (bigNum, bool) { return bigNum{new(big.Int).Add(a.x, b.x)}, true }
func (a bigNum) less(b bigNum) bool          { return a.x.Cmp(b.x) < 0 }
func (a bigNum) equal(b bigNum) bool         { return a.x.Cmp(b.x) == 0 }

// tiedBit marks, in best, a decision with more than one optimal branch.
const tiedBit = 1 << 30

// rollback fills t from e bottom-up: a chance node's T is its E plus its
// children's T (a child in a frame of its own adds nothing), a decision's
// its E plus the largest child T (or the child policy names, when policy is
// not nil), an end's its E. best gets each decision's first optimal branch
// (tiedBit set when another ties with it). ok is false on overflow.
func rollback[T number[T]](sh *shape, restart []bool, e, t []T, best []int32, policy []int32) bool {
	ok := true
	first, kind := sh.first, sh.kind
	for i := len(kind) - 1; i >= 0; i-- {
		from, to := first[i], first[i+1]
		acc := e[i]
		switch kind[i] {
		case tree.KindChance:
			for k := from; k < to; k++ {
				if restart != nil && restart[k] {
					continue
				}
				var good bool
				if acc, good = acc.add(t[k]); !good {
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
					case m.less(t[k]):
						m, b, ties = t[k], k-from, 0
					case t[k].equal(m):
						ties = tiedBit
					}
				}
				b |= ties
			}
			best[i] = b
			var good bool
			if acc, good = acc.add(t[from+b&^tiedBit]); !good {
				ok = false
			}
		}
		t[i] = acc
	}
	return ok
}
