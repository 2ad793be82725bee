package dist

import (
	"math"
	"math/big"
	"math/rand/v2"

	"github.com/shopspring/decimal"
	"gonum.org/v1/gonum/stat/distuv"
)

// Normal is the normal (Gaussian) distribution with mean μ and standard
// deviation σ > 0. Build it with [NewNormal] or [NewNormalExact]; the zero
// value is not a distribution.
type Normal struct {
	mean, sd float64
	exact    []decimal.Decimal // MEAN, SD as given; nil when built from float64
}

// NewNormal returns the normal distribution with the given mean and
// standard deviation; SD must be positive.
func NewNormal(mean, sd float64) (Normal, error) {
	return newNormal(floatArg("MEAN", mean), floatArg("SD", sd))
}

// NewNormalExact is [NewNormal] of exact decimals, which it keeps so that
// [Normal.MeanExact] is available.
func NewNormalExact(mean, sd decimal.Decimal) (Normal, error) {
	return newNormal(decimalArg("MEAN", mean), decimalArg("SD", sd))
}

func newNormal(args ...arg) (Normal, error) {
	c := checker{fn: "normal"}
	c.finite(args...)
	if c.err == nil && !(args[1].f > 0) {
		c.fail(1, "SD is %s; a standard deviation must be positive", args[1])
	}
	if c.err != nil {
		return Normal{}, c.err
	}
	d := Normal{mean: args[0].f, sd: args[1].f, exact: exactArgs(args...)}
	c.moments(d)
	return d, c.result()
}

// SD returns the standard deviation σ.
func (d Normal) SD() float64 { return d.sd }

func (d Normal) n(src rand.Source) distuv.Normal {
	return distuv.Normal{Mu: d.mean, Sigma: d.sd, Src: src}
}

// Mean returns μ.
func (d Normal) Mean() float64 { return d.mean }

// Variance returns σ².
func (d Normal) Variance() float64 { return d.sd * d.sd }

// Quantile returns μ + σ·Φ⁻¹(p), from gonum (−Inf at 0, +Inf at 1).
func (d Normal) Quantile(p float64) float64 {
	if !validP(p) {
		return nan()
	}
	return d.n(nil).Quantile(p)
}

// CDF returns Φ((x − μ)/σ), from gonum.
func (d Normal) CDF(x float64) float64 { return d.n(nil).CDF(x) }

// Rand returns a draw by gonum's normal sampler.
func (d Normal) Rand(src rand.Source) float64 { return d.n(src).Rand() }

// MeanExact returns μ exactly when built by [NewNormalExact].
func (d Normal) MeanExact() (*big.Rat, bool) {
	if d.exact == nil {
		return nil, false
	}
	return d.exact[0].Rat(), true
}

// Bounds returns (−Inf, +Inf).
func (d Normal) Bounds() (lo, hi float64) { return math.Inf(-1), math.Inf(1) }

// String returns "normal(MEAN, SD)".
func (d Normal) String() string {
	return callString("normal", shown(d.exact, d.mean, d.sd)...)
}
