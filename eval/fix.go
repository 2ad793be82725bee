package eval

import (
	"math"
	"math/bits"

	"github.com/shopspring/decimal"
)

// fix is an exact decimal c × 10^e held in machine words while it fits. A
// value that does not fit lives in an arena as a shopspring decimal and fix
// holds its index (big = index + 1). Rollback adds and multiplies millions
// of numbers; on big integers every step allocates, so the common case
// (amounts and probabilities with few digits) stays in int64 and only
// overflow falls back to big arithmetic. Both paths are exact, so results
// never depend on which was taken. fix holds no pointers, so a slice of
// them costs the garbage collector nothing to scan.
type fix struct {
	c   int64
	e   int32
	big int32
}

// arena keeps the values that outgrew int64.
type arena struct {
	bigs []decimal.Decimal
}

var pow10 = func() (p [19]int64) {
	p[0] = 1
	for i := 1; i < len(p); i++ {
		p[i] = p[i-1] * 10
	}
	return p
}()

func (a *arena) fixOf(d decimal.Decimal) fix {
	if d.NumDigits() <= 18 {
		return fix{c: d.CoefficientInt64(), e: d.Exponent()}
	}
	return a.keep(d)
}

func (a *arena) keep(d decimal.Decimal) fix {
	a.bigs = append(a.bigs, d)
	return fix{big: int32(len(a.bigs))}
}

func (a *arena) dec(x fix) decimal.Decimal {
	if x.big > 0 {
		return a.bigs[x.big-1]
	}
	return decimal.New(x.c, x.e)
}

// scaleUp multiplies c by 10^k, reporting overflow.
func scaleUp(c int64, k int32) (int64, bool) {
	if k == 0 || c == 0 {
		return c, true
	}
	if k < 0 || k > 18 {
		return 0, false
	}
	hi, lo := bits.Mul64(uabs(c), uint64(pow10[k]))
	if hi != 0 || lo > math.MaxInt64 {
		return 0, false
	}
	if c < 0 {
		return -int64(lo), true
	}
	return int64(lo), true
}

func uabs(c int64) uint64 {
	if c < 0 {
		return uint64(-c)
	}
	return uint64(c)
}

// align brings x and y to the smaller exponent; ok is false on overflow.
func align(x, y fix) (a, b int64, e int32, ok bool) {
	switch {
	case x.e == y.e:
		return x.c, y.c, x.e, true
	case x.e > y.e:
		a, ok = scaleUp(x.c, x.e-y.e)
		return a, y.c, y.e, ok
	default:
		b, ok = scaleUp(y.c, y.e-x.e)
		return x.c, b, x.e, ok
	}
}

func (a *arena) add(x, y fix) fix {
	if x.big == 0 && y.big == 0 {
		if x.c == 0 {
			return y
		}
		if y.c == 0 {
			return x
		}
		if p, q, e, ok := align(x, y); ok {
			s := p + q
			// Overflow iff both operands have one sign and the sum another.
			if (p >= 0) != (q >= 0) || (s >= 0) == (p >= 0) {
				return fix{c: s, e: e}
			}
		}
	}
	return a.keep(a.dec(x).Add(a.dec(y)))
}

func (a *arena) mul(x, y fix) fix {
	if x.big == 0 && y.big == 0 {
		if x.c == 0 || y.c == 0 {
			return fix{}
		}
		hi, lo := bits.Mul64(uabs(x.c), uabs(y.c))
		e := int64(x.e) + int64(y.e)
		if hi == 0 && lo <= math.MaxInt64 && e >= math.MinInt32 && e <= math.MaxInt32 {
			c := int64(lo)
			if (x.c < 0) != (y.c < 0) {
				c = -c
			}
			return fix{c: c, e: int32(e)}
		}
	}
	return a.keep(a.dec(x).Mul(a.dec(y)))
}

// cmp returns -1, 0 or +1 as x is less than, equal to or greater than y.
func (a *arena) cmp(x, y fix) int {
	if x.big == 0 && y.big == 0 {
		if p, q, _, ok := align(x, y); ok {
			switch {
			case p < q:
				return -1
			case p > q:
				return 1
			}
			return 0
		}
	}
	return a.dec(x).Cmp(a.dec(y))
}
