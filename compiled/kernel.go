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
type ops[T any] interface {
	add(a, b T) (T, bool) // ok is false on overflow
	less(a, b T) bool
	equal(a, b T) bool
}

type wideOps struct{}

func (wideOps) add(a, b exact.Wide) (exact.Wide, bool) { return a.Add(b) }
func (wideOps) less(a, b exact.Wide) bool              { return a.Less(b) }
func (wideOps) equal(a, b exact.Wide) bool             { return a == b }

type floatOps struct{}

func (floatOps) add(a, b float64) (float64, bool) { return a + b, true }
func (floatOps) less(a, b float64) bool           { return a < b }
func (floatOps) equal(a, b float64) bool          { return a == b }

type bigOps struct{}

func (bigOps) add(a, b *big.Int) (*big.Int, bool) { return new(big.Int).Add(a, b), true }
func (bigOps) less(a, b *big.Int) bool            { return a.Cmp(b) < 0 }
func (bigOps) equal(a, b *big.Int) bool           { return a.Cmp(b) == 0 }

// tiedBit marks, in best, a decision with more than one optimal branch.
const tiedBit = 1 << 30

// rollback fills t from e bottom-up: a chance node's T is its E plus its
// children's T (a child in a frame of its own adds nothing), a decision's
// its E plus the largest child T (or the child policy names, when policy is
// not nil), an end's its E. best gets each decision's first optimal branch
// (tiedBit set when another ties with it). ok is false on overflow.
func rollback[T any, O ops[T]](sh *shape, restart []bool, e, t []T, best []int32, policy []int32) bool {
	var o O
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
