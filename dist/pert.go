package dist

import (
	"math/big"
	"math/rand/v2"

	"github.com/shopspring/decimal"
	"gonum.org/v1/gonum/stat/distuv"
)

// PERT is the beta-PERT distribution of a three-point estimate a ≤ m ≤ b
// (LOW, LIKELY, HIGH): a beta distribution on [a, b] with shape parameters
//
//	α = 1 + 4(m − a)/(b − a),  β = 1 + 4(b − m)/(b − a)
//
// (Malcolm, Roseboom, Clark & Fazar, 1959, "Application of a technique for
// research and development program evaluation", Operations Research 7(5)).
// The zero value, and any a = m = b, is the point a.
type PERT struct {
	low, likely, high float64
	exact             []decimal.Decimal // LOW, LIKELY, HIGH as given; nil when built from float64
}

// NewPERT returns the PERT distribution of LOW ≤ LIKELY ≤ HIGH.
func NewPERT(low, likely, high float64) (PERT, error) {
	return newPERT(floatArg("LOW", low), floatArg("LIKELY", likely), floatArg("HIGH", high))
}

// NewPERTExact is [NewPERT] of exact decimals, which it keeps so that
// [PERT.MeanExact] is available.
func NewPERTExact(low, likely, high decimal.Decimal) (PERT, error) {
	return newPERT(decimalArg("LOW", low), decimalArg("LIKELY", likely), decimalArg("HIGH", high))
}

func newPERT(args ...arg) (PERT, error) {
	c := checker{fn: "pert"}
	c.finite(args...)
	c.notAbove(args, 0, 1)
	c.notAbove(args, 1, 2)
	if c.err != nil {
		return PERT{}, c.err
	}
	d := PERT{low: args[0].f, likely: args[1].f, high: args[2].f, exact: exactArgs(args...)}
	c.moments(d)
	return d, c.result()
}

// Low returns the lower end a.
func (d PERT) Low() float64 { return d.low }

// Likely returns the most likely value m (the mode).
func (d PERT) Likely() float64 { return d.likely }

// High returns the upper end b.
func (d PERT) High() float64 { return d.high }

// Shape returns the beta shape parameters α = 1 + 4(m − a)/(b − a) and
// β = 1 + 4(b − m)/(b − a); α + β = 6. A point has no shape (0, 0).
func (d PERT) Shape() (alpha, beta float64) {
	w := d.high - d.low
	if w == 0 {
		return 0, 0
	}
	return 1 + 4*(d.likely-d.low)/w, 1 + 4*(d.high-d.likely)/w
}

func (d PERT) beta(src rand.Source) distuv.Beta {
	a, b := d.Shape()
	return distuv.Beta{Alpha: a, Beta: b, Src: src}
}

// Mean returns (a + 4m + b)/6, the mean of the beta on [a, b]:
// a + (b − a)·α/(α + β) = a + (b − a)(α/6) = (a + 4m + b)/6. It is computed
// as a + (4(m − a) + (b − a))/6, which cannot overflow for large a and b.
func (d PERT) Mean() float64 { return d.low + (4*(d.likely-d.low)+(d.high-d.low))/6 }

// Variance returns (μ − a)(b − μ)/7.
//
// Derivation: a beta on [a, b] has variance (b − a)²·αβ/((α + β)²(α + β + 1)).
// Here α + β = 2 + 4(b − a)/(b − a) = 6, so the variance is (b − a)²·αβ/252.
// From the mean, μ = a + (b − a)α/6, so α = 6(μ − a)/(b − a) and
// β = 6 − α = 6(b − μ)/(b − a); then αβ = 36(μ − a)(b − μ)/(b − a)² and the
// variance is 36(μ − a)(b − μ)/252 = (μ − a)(b − μ)/7.
func (d PERT) Variance() float64 {
	mu := d.Mean()
	return (mu - d.low) * (d.high - mu) / 7
}

// Quantile returns a + (b − a)·I⁻¹(p; α, β), the inverse regularised
// incomplete beta function from gonum.
func (d PERT) Quantile(p float64) float64 {
	if !validP(p) {
		return nan()
	}
	if d.high == d.low {
		return d.low
	}
	return clamp(d.low+(d.high-d.low)*d.beta(nil).Quantile(p), d.low, d.high)
}

// CDF returns I((x − a)/(b − a); α, β), the regularised incomplete beta
// function from gonum.
func (d PERT) CDF(x float64) float64 {
	if d.high == d.low {
		return step(x, d.low)
	}
	return d.beta(nil).CDF((x - d.low) / (d.high - d.low))
}

// Rand returns a + (b − a)·Y with Y drawn from gonum's beta sampler.
func (d PERT) Rand(src rand.Source) float64 {
	if d.high == d.low {
		return d.low
	}
	return clamp(d.low+(d.high-d.low)*d.beta(src).Rand(), d.low, d.high)
}

// MeanExact returns (a + 4m + b)/6 exactly when built by [NewPERTExact].
func (d PERT) MeanExact() (*big.Rat, bool) {
	if d.exact == nil {
		return nil, false
	}
	a, m, b := d.exact[0].Rat(), d.exact[1].Rat(), d.exact[2].Rat()
	s := new(big.Rat).Mul(big.NewRat(4, 1), m)
	s.Add(s, a).Add(s, b)
	return s.Quo(s, big.NewRat(6, 1)), true
}

// Bounds returns [a, b].
func (d PERT) Bounds() (lo, hi float64) { return d.low, d.high }

// String returns "pert(LOW, LIKELY, HIGH)".
func (d PERT) String() string {
	return callString("pert", shown(d.exact, d.low, d.likely, d.high)...)
}
