package exact

import (
	"math"
	"math/big"
	"math/bits"

	"github.com/shopspring/decimal"
)

type bigInt = big.Int

var bigTen = big.NewInt(10)

// bigPow10 holds 10^0 … 10^79, read only: scaling a figure to the tree's
// scale is done for every node of every weighing, and computing the power
// each time cost more than the multiplication.
var bigPow10 = func() (t [80]*big.Int) {
	t[0] = big.NewInt(1)
	for i := 1; i < len(t); i++ {
		t[i] = new(big.Int).Mul(t[i-1], bigTen)
	}
	return t
}()

// pow10Big is 10^k (k ≥ 0), from the table when it is there; the caller
// must not change it.
func pow10Big(k int64) *big.Int {
	if k < int64(len(bigPow10)) {
		return bigPow10[k]
	}
	return new(big.Int).Exp(bigTen, big.NewInt(k), nil)
}

// Wide is a signed 128-bit integer (two's complement): an amount at the
// tree's scale, so that the kernel sums and compares integers only.
type Wide struct {
	Lo uint64
	Hi int64
}

// WideOf returns n × 10^scale as a Wide; ok is false when that is not an
// integer or does not fit in 126 bits (the headroom keeps sums of a few
// values from overflowing before they are checked).
func (p *Pool) WideOf(n Num, scale int32) (Wide, bool) {
	if n.x > 0 {
		b, ok := p.BigOf(n, scale)
		if !ok {
			return Wide{}, false
		}
		return WideFromBig(b)
	}
	if n.c == 0 {
		return Wide{}, true
	}
	k := int64(scale) + int64(n.e)
	if k < 0 || k > 38 {
		return Wide{}, false
	}
	// |c| × 10^k as a 128-bit magnitude.
	mag := [2]uint64{uabs(n.c), 0}
	for k > 0 {
		step := min(k, 18)
		hi1, lo := bits.Mul64(mag[0], uint64(pow10[step]))
		hi2, lo2 := bits.Mul64(mag[1], uint64(pow10[step]))
		if hi2 != 0 {
			return Wide{}, false
		}
		hi, c := bits.Add64(hi1, lo2, 0)
		if c != 0 {
			return Wide{}, false
		}
		mag = [2]uint64{lo, hi}
		k -= step
	}
	if mag[1] >= 1<<62 {
		return Wide{}, false
	}
	w := Wide{Lo: mag[0], Hi: int64(mag[1])}
	if n.c < 0 {
		w = w.Neg()
	}
	return w, true
}

// BigOf returns n × 10^scale as a big integer; ok is false when that is
// not an integer.
func (p *Pool) BigOf(n Num, scale int32) (*big.Int, bool) {
	var c *big.Int
	var k int64
	if n.x > 0 {
		d := p.bigs[n.x-1]
		k = int64(scale) + int64(d.Exponent())
		c = d.Coefficient() // a copy
	} else {
		k = int64(scale) + int64(n.e)
		c = big.NewInt(n.c)
	}
	if k >= 0 {
		return c.Mul(c, pow10Big(k)), true
	}
	q, r := new(big.Int).QuoRem(c, pow10Big(-k), new(big.Int))
	return q, r.Sign() == 0
}

// WideFromBig converts b; ok is false when it needs more than 126 bits.
func WideFromBig(b *big.Int) (Wide, bool) {
	if b.BitLen() > 125 {
		return Wide{}, false
	}
	var mag [2]uint64
	ws := b.Bits()
	for i, w := range ws {
		mag[i] = uint64(w)
	}
	if bits.UintSize == 32 {
		mag = [2]uint64{0, 0}
		var t big.Int
		t.Abs(b)
		mag[0] = t.Uint64()
		t.Rsh(&t, 64)
		mag[1] = t.Uint64()
	}
	w := Wide{Lo: mag[0], Hi: int64(mag[1])}
	if b.Sign() < 0 {
		w = w.Neg()
	}
	return w, true
}

// Neg is -a.
func (a Wide) Neg() Wide {
	lo, c := bits.Add64(^a.Lo, 1, 0)
	return Wide{Lo: lo, Hi: ^a.Hi + int64(c)}
}

// Add is a + b; ok is false on overflow.
func (a Wide) Add(b Wide) (Wide, bool) {
	lo, c := bits.Add64(a.Lo, b.Lo, 0)
	hi := a.Hi + b.Hi + int64(c)
	// Signed overflow of the high word: both inputs of one sign and the
	// result of the other. (The carry cannot flip a sign on its own: it
	// turns -1 into 0 only when the true sum is non-negative.)
	if (a.Hi >= 0) == (b.Hi >= 0) && (hi >= 0) != (a.Hi >= 0) {
		return Wide{}, false
	}
	return Wide{Lo: lo, Hi: hi}, true
}

// Sub is a - b; ok is false on overflow.
func (a Wide) Sub(b Wide) (Wide, bool) {
	if b.Hi == math.MinInt64 && b.Lo == 0 {
		return Wide{}, false
	}
	return a.Add(b.Neg())
}

// Cmp is -1, 0 or +1 as a is less than, equal to or greater than b.
func (a Wide) Cmp(b Wide) int {
	switch {
	case a.Hi < b.Hi:
		return -1
	case a.Hi > b.Hi:
		return 1
	case a.Lo < b.Lo:
		return -1
	case a.Lo > b.Lo:
		return 1
	}
	return 0
}

// Less reports whether a < b.
func (a Wide) Less(b Wide) bool {
	return a.Hi < b.Hi || (a.Hi == b.Hi && a.Lo < b.Lo)
}

// Sign is -1, 0 or +1.
func (a Wide) Sign() int {
	switch {
	case a.Hi < 0:
		return -1
	case a.Hi == 0 && a.Lo == 0:
		return 0
	}
	return 1
}

// Big is a as a big integer.
func (a Wide) Big() *big.Int {
	neg := a.Hi < 0
	if neg {
		a = a.Neg()
	}
	b := new(big.Int).SetUint64(uint64(a.Hi))
	b.Lsh(b, 64)
	b.Or(b, new(big.Int).SetUint64(a.Lo))
	if neg {
		b.Neg(b)
	}
	return b
}

// Decimal is a × 10^-scale.
func (a Wide) Decimal(scale int32) decimal.Decimal {
	if a.Hi == 0 && a.Lo <= math.MaxInt64 {
		return decimal.New(int64(a.Lo), -scale)
	}
	if a.Hi == -1 && a.Lo > math.MaxInt64 {
		return decimal.New(int64(a.Lo), -scale)
	}
	return decimal.NewFromBigInt(a.Big(), -scale)
}

// Float64 is a × 10^-scale as the nearest float64 (approximately).
func (a Wide) Float64(scale int32) float64 {
	f := float64(a.Hi)*18446744073709551616.0 + float64(a.Lo)
	return f / math.Pow(10, float64(scale))
}
