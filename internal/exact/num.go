// Package exact holds the exact decimal numbers that the compiled form of a
// model and the rollback kernel compute with.
//
// Figures (cash, probabilities, masses) are Num: c × 10^e in machine words
// while they fit, falling back to a shopspring decimal kept in a Pool when
// they do not. Amounts the kernel sums over a whole tree are Wide: 128-bit
// integers at one scale chosen for the tree, so a rollback is integer
// additions and comparisons only. Every path is exact; which one is taken
// never changes a result.
package exact

import (
	"math"
	"math/big"
	"math/bits"

	"github.com/shopspring/decimal"
)

// Num is an exact decimal c × 10^e. When x > 0 the value is instead
// Pool.bigs[x-1] (it outgrew int64). Num holds no pointers, so slices of
// them cost the garbage collector nothing.
type Num struct {
	c int64
	e int32
	x int32
}

// Zero and One are the Nums 0 and 1.
var (
	Zero = Num{}
	One  = Num{c: 1}
)

// Pool keeps the values that outgrew int64. A Pool only grows; a Num is
// valid with the Pool that made it and any Pool derived from it by Fork.
type Pool struct {
	bigs []decimal.Decimal
}

// Fork returns a Pool that reads every value of p and appends its own
// without disturbing p (a derived model shares its parent's values).
func (p *Pool) Fork() *Pool {
	return &Pool{bigs: p.bigs[:len(p.bigs):len(p.bigs)]}
}

// Len is the number of values kept.
func (p *Pool) Len() int { return len(p.bigs) }

var pow10 = func() (t [19]int64) {
	t[0] = 1
	for i := 1; i < len(t); i++ {
		t[i] = t[i-1] * 10
	}
	return t
}()

// Small makes c × 10^e (normalised: no trailing zeros in c).
func Small(c int64, e int32) Num { return norm(c, e) }

func norm(c int64, e int32) Num {
	if c == 0 {
		return Num{}
	}
	for c%10 == 0 && e < math.MaxInt32 {
		c /= 10
		e++
	}
	return Num{c: c, e: e}
}

// Of converts a decimal.
func (p *Pool) Of(d decimal.Decimal) Num {
	if d.IsZero() {
		return Num{}
	}
	if d.NumDigits() <= 18 {
		return norm(d.CoefficientInt64(), d.Exponent())
	}
	return p.keep(d)
}

func (p *Pool) keep(d decimal.Decimal) Num {
	d = trim(d)
	// A value that fits after all (a big result that shrank) goes back
	// into machine words, so equal values have one form where possible.
	if d.NumDigits() <= 18 {
		return norm(d.CoefficientInt64(), d.Exponent())
	}
	p.bigs = append(p.bigs, d)
	return Num{x: int32(len(p.bigs))}
}

// trimPowers are the powers of ten trim divides by, largest first.
var trimPowers = func() (t [5]struct {
	n int32
	p *big.Int
}) {
	for i, n := range []int32{32, 8, 4, 2, 1} {
		t[i].n, t[i].p = n, new(big.Int).Exp(big.NewInt(10), big.NewInt(int64(n)), nil)
	}
	return t
}()

// trim drops the trailing zeros of d's coefficient, so that products of
// rounded figures do not drag ever more zeros along (and Places is just
// the exponent).
func trim(d decimal.Decimal) decimal.Decimal {
	c := d.Coefficient()
	if c.Sign() == 0 {
		return decimal.Zero
	}
	if !tenDivides(c) {
		return d // most coefficients: no division needed to know
	}
	var q, r big.Int
	e := d.Exponent()
	for _, tp := range trimPowers {
		for {
			q.QuoRem(c, tp.p, &r)
			if r.Sign() != 0 {
				break
			}
			c.Set(&q)
			e += tp.n
		}
	}
	return decimal.NewFromBigInt(c, e)
}

// tenDivides reports whether 10 divides c, from its words alone: 2 does
// when the lowest bit is clear, and 5 when the sum of the 64-bit words
// is a multiple of 5 (a word is 2³² or 2⁶⁴, both ≡ 1 mod 5).
func tenDivides(c *big.Int) bool {
	if c.Bit(0) != 0 {
		return false
	}
	var sum uint64
	for _, w := range c.Bits() {
		sum += uint64(w) % 5
	}
	return sum%5 == 0
}

// Dec is n as a decimal.
func (p *Pool) Dec(n Num) decimal.Decimal {
	if n.x > 0 {
		return p.bigs[n.x-1]
	}
	return decimal.New(n.c, n.e)
}

// IsBig reports whether n lives in the pool.
func (n Num) IsBig() bool { return n.x > 0 }

// Within reports whether n is held in machine words with its power of ten
// in [−limit, limit].
func (n Num) Within(limit int32) bool { return n.x == 0 && n.e >= -limit && n.e <= limit }

// IsZero reports whether n is 0.
func (n Num) IsZero() bool { return n.x == 0 && n.c == 0 }

// Sign is -1, 0 or +1.
func (p *Pool) Sign(n Num) int {
	if n.x > 0 {
		return p.bigs[n.x-1].Sign()
	}
	switch {
	case n.c < 0:
		return -1
	case n.c > 0:
		return 1
	}
	return 0
}

// Places is the number of decimal places n needs (0 for an integer).
func (p *Pool) Places(n Num) int32 {
	e := n.e
	if n.x > 0 {
		e = p.bigs[n.x-1].Exponent() // kept trimmed: no trailing zeros
	}
	if e >= 0 {
		return 0
	}
	return -e
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
func align(x, y Num) (a, b int64, e int32, ok bool) {
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

// Add is x + y.
func (p *Pool) Add(x, y Num) Num {
	if x.x == 0 && y.x == 0 {
		if x.c == 0 {
			return y
		}
		if y.c == 0 {
			return x
		}
		if a, b, e, ok := align(x, y); ok {
			s := a + b
			// Overflow iff both operands have one sign and the sum another.
			if (a >= 0) != (b >= 0) || (s >= 0) == (a >= 0) {
				return norm(s, e)
			}
		}
	}
	return p.keep(p.Dec(x).Add(p.Dec(y)))
}

// Neg is -x.
func (p *Pool) Neg(x Num) Num {
	if x.x == 0 && x.c != math.MinInt64 {
		return Num{c: -x.c, e: x.e}
	}
	return p.keep(p.Dec(x).Neg())
}

// Sub is x - y.
func (p *Pool) Sub(x, y Num) Num { return p.Add(x, p.Neg(y)) }

// Mul is x × y.
func (p *Pool) Mul(x, y Num) Num {
	if x.x == 0 && y.x == 0 {
		if x.c == 0 || y.c == 0 {
			return Num{}
		}
		hi, lo := bits.Mul64(uabs(x.c), uabs(y.c))
		e := int64(x.e) + int64(y.e)
		if hi == 0 && lo <= math.MaxInt64 && e >= math.MinInt32/2 && e <= math.MaxInt32/2 {
			c := int64(lo)
			if (x.c < 0) != (y.c < 0) {
				c = -c
			}
			return norm(c, int32(e))
		}
	}
	return p.keep(p.Dec(x).Mul(p.Dec(y)))
}

// Cmp is -1, 0 or +1 as x is less than, equal to or greater than y.
func (p *Pool) Cmp(x, y Num) int {
	if x.x == 0 && y.x == 0 {
		if a, b, _, ok := align(x, y); ok {
			switch {
			case a < b:
				return -1
			case a > b:
				return 1
			}
			return 0
		}
	}
	return p.Dec(x).Cmp(p.Dec(y))
}

// Equal reports whether x = y.
func (p *Pool) Equal(x, y Num) bool {
	if x.x == 0 && y.x == 0 {
		return x == y // both normalised
	}
	return p.Cmp(x, y) == 0
}

// Div is x / y carried to places decimal places (rounded half away from
// zero at the last), and whether that is exact. y must not be 0.
func (p *Pool) Div(x, y Num, places int32) (Num, bool) {
	dx, dy := p.Dec(x), p.Dec(y)
	q := dx.DivRound(dy, places)
	return p.keep(q), q.Mul(dy).Equal(dx)
}

// Float64 is n as the nearest float64 (for simulation and charts only).
func (p *Pool) Float64(n Num) float64 {
	if n.x > 0 {
		return p.bigs[n.x-1].InexactFloat64()
	}
	if n.e == 0 {
		return float64(n.c)
	}
	// A coefficient and a power of ten that float64 holds exactly give the
	// correctly rounded result in one division or multiplication.
	if n.c < 1<<53 && n.c > -(1<<53) {
		switch {
		case n.e < 0 && n.e >= -22:
			return float64(n.c) / float64pow10[-n.e]
		case n.e > 0 && n.e <= 22:
			return float64(n.c) * float64pow10[n.e]
		}
	}
	return decimal.New(n.c, n.e).InexactFloat64()
}

var float64pow10 = func() (t [23]float64) {
	t[0] = 1
	for i := 1; i < len(t); i++ {
		t[i] = t[i-1] * 10
	}
	return t
}()

// Digits is the number of significant digits of n's coefficient.
func (p *Pool) Digits(n Num) int {
	if n.x > 0 {
		return int(p.bigs[n.x-1].NumDigits())
	}
	c := uabs(n.c)
	d := 1
	for c >= 10 {
		c /= 10
		d++
	}
	return d
}

// Bounded reports whether n has at most max significant digits and lies
// within 10^±max in size: the limit that keeps a runaway figure (a number
// squared again and again) from exhausting memory.
func (p *Pool) Bounded(n Num, max int) bool {
	if n.x == 0 {
		return n.e >= int32(-2*max) && n.e <= int32(max)
	}
	d := p.bigs[n.x-1]
	digits := int(d.NumDigits())
	e := int(d.Exponent())
	return digits <= max && e+digits <= max && e >= -2*max
}
