package register

import (
	"math"
	"math/big"

	"github.com/shopspring/decimal"
)

// Figure is an amount worked out exactly, as a fraction: expected values
// are sums of products of decimals and of means such as PERT's
// (a + 4m + b)/6, which need not be finite decimals. A figure into which
// an irrational mean entered (a lognormal's) is rounded, and says so.
// The zero Figure is an exact 0.
type Figure struct {
	r       *big.Rat
	inexact bool
}

func ratFigure(r *big.Rat, exact bool) Figure { return Figure{r: r, inexact: !exact} }

func decFigure(d decimal.Decimal) Figure { return Figure{r: d.Rat()} }

func (f Figure) rat() *big.Rat {
	if f.r == nil {
		return new(big.Rat)
	}
	return f.r
}

// Rat returns the figure as a fraction (a copy).
func (f Figure) Rat() *big.Rat { return new(big.Rat).Set(f.rat()) }

// Exact reports whether the figure is exact.
func (f Figure) Exact() bool { return !f.inexact }

// Float64 returns the nearest float64.
func (f Figure) Float64() float64 {
	x, _ := f.rat().Float64()
	return x
}

// Sign returns −1, 0 or +1.
func (f Figure) Sign() int { return f.rat().Sign() }

// Cmp compares f with g.
func (f Figure) Cmp(g Figure) int { return f.rat().Cmp(g.rat()) }

// Add returns f + g.
func (f Figure) Add(g Figure) Figure {
	return Figure{r: new(big.Rat).Add(f.rat(), g.rat()), inexact: f.inexact || g.inexact}
}

// Sub returns f − g.
func (f Figure) Sub(g Figure) Figure {
	return Figure{r: new(big.Rat).Sub(f.rat(), g.rat()), inexact: f.inexact || g.inexact}
}

// Mul returns f × g.
func (f Figure) Mul(g Figure) Figure {
	return Figure{r: new(big.Rat).Mul(f.rat(), g.rat()), inexact: f.inexact || g.inexact}
}

// Neg returns −f.
func (f Figure) Neg() Figure { return Figure{r: new(big.Rat).Neg(f.rat()), inexact: f.inexact} }

// Finite reports whether the figure is a finite decimal (its denominator
// has no prime factors but 2 and 5).
func (f Figure) Finite() bool {
	_, ok := decimalPlaces(f.rat())
	return ok
}

// Decimal returns the figure as a decimal: exactly when it is a finite
// decimal, otherwise rounded to 34 significant digits.
func (f Figure) Decimal() decimal.Decimal {
	r := f.rat()
	if places, ok := decimalPlaces(r); ok {
		return decimal.NewFromBigRat(r, places)
	}
	// 34 significant digits: as many places as the integer part leaves.
	x, _ := r.Float64()
	digits := 1
	if ax := math.Abs(x); ax >= 1 {
		digits = int(math.Floor(math.Log10(ax))) + 1
	}
	return decimal.NewFromBigRat(r, int32(max(34-digits, 0)))
}

// String returns the decimal, exact or rounded.
func (f Figure) String() string { return f.Decimal().String() }

// Fraction returns the figure as "NUM/DEN", or as an integer.
func (f Figure) Fraction() string { return f.rat().RatString() }

// maxPlaces bounds the decimal places decimalPlaces accepts: a figure
// with more is rounded (a denominator 2^1000 is no money anyone writes).
const maxPlaces = 200

// decimalPlaces returns how many decimal places r needs, and false when
// it is no finite decimal.
func decimalPlaces(r *big.Rat) (int32, bool) {
	d := new(big.Int).Set(r.Denom())
	two, five := big.NewInt(2), big.NewInt(5)
	var m big.Int
	count := func(p *big.Int) int32 {
		n := int32(0)
		for n <= maxPlaces {
			q, rem := new(big.Int).QuoRem(d, p, &m)
			if rem.Sign() != 0 {
				break
			}
			d = q
			n++
		}
		return n
	}
	a, b := count(two), count(five)
	if d.Cmp(big.NewInt(1)) != 0 || a > maxPlaces || b > maxPlaces {
		return 0, false
	}
	return max(a, b), true
}
