package dist

import (
	"math/big"
	"math/rand/v2"

	"github.com/shopspring/decimal"
	"gonum.org/v1/gonum/stat/distuv"
)

// Uniform is the continuous uniform distribution on [a, b] (LOW, HIGH).
// The zero value, and any a = b, is the point a.
type Uniform struct {
	low, high float64
	exact     []decimal.Decimal // LOW, HIGH as given; nil when built from float64
}

// NewUniform returns the uniform distribution on [LOW, HIGH].
func NewUniform(low, high float64) (Uniform, error) {
	return newUniform(floatArg("LOW", low), floatArg("HIGH", high))
}

// NewUniformExact is [NewUniform] of exact decimals, which it keeps so that
// [Uniform.MeanExact] is available.
func NewUniformExact(low, high decimal.Decimal) (Uniform, error) {
	return newUniform(decimalArg("LOW", low), decimalArg("HIGH", high))
}

func newUniform(args ...arg) (Uniform, error) {
	c := checker{fn: "uniform"}
	c.finite(args...)
	c.notAbove(args, 0, 1)
	if c.err != nil {
		return Uniform{}, c.err
	}
	d := Uniform{low: args[0].f, high: args[1].f, exact: exactArgs(args...)}
	c.moments(d)
	return d, c.result()
}

// Low returns the lower end a.
func (d Uniform) Low() float64 { return d.low }

// High returns the upper end b.
func (d Uniform) High() float64 { return d.high }

func (d Uniform) u(src rand.Source) distuv.Uniform {
	return distuv.Uniform{Min: d.low, Max: d.high, Src: src}
}

// Mean returns (a + b)/2, computed as a/2 + b/2, which cannot overflow.
func (d Uniform) Mean() float64 { return d.low/2 + d.high/2 }

// Variance returns (b − a)²/12.
func (d Uniform) Variance() float64 { return d.u(nil).Variance() }

// Quantile returns a + p(b − a).
func (d Uniform) Quantile(p float64) float64 {
	if !validP(p) {
		return nan()
	}
	return clamp(d.u(nil).Quantile(p), d.low, d.high)
}

// CDF returns (x − a)/(b − a) within [a, b].
func (d Uniform) CDF(x float64) float64 {
	if d.high == d.low {
		return step(x, d.low)
	}
	return d.u(nil).CDF(x)
}

// Rand returns a draw by gonum's uniform sampler.
func (d Uniform) Rand(src rand.Source) float64 {
	return clamp(d.u(src).Rand(), d.low, d.high)
}

// MeanExact returns (a + b)/2 exactly when built by [NewUniformExact].
func (d Uniform) MeanExact() (*big.Rat, bool) {
	if d.exact == nil {
		return nil, false
	}
	s := new(big.Rat).Add(d.exact[0].Rat(), d.exact[1].Rat())
	return s.Quo(s, big.NewRat(2, 1)), true
}

// Bounds returns [a, b].
func (d Uniform) Bounds() (lo, hi float64) { return d.low, d.high }

// String returns "uniform(LOW, HIGH)".
func (d Uniform) String() string {
	return callString("uniform", shown(d.exact, d.low, d.high)...)
}
