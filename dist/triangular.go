package dist

import (
	"math/big"
	"math/rand/v2"

	"github.com/shopspring/decimal"
	"gonum.org/v1/gonum/stat/distuv"
)

// Triangular is the triangular distribution of a three-point estimate
// a ≤ m ≤ b (LOW, LIKELY, HIGH): its density rises linearly from a to the
// mode m and falls linearly to b. The zero value, and any a = m = b, is the
// point a.
type Triangular struct {
	low, likely, high float64
	exact             []decimal.Decimal // LOW, LIKELY, HIGH as given; nil when built from float64
}

// NewTriangular returns the triangular distribution of LOW ≤ LIKELY ≤ HIGH.
func NewTriangular(low, likely, high float64) (Triangular, error) {
	return newTriangular(floatArg("LOW", low), floatArg("LIKELY", likely), floatArg("HIGH", high))
}

// NewTriangularExact is [NewTriangular] of exact decimals, which it keeps
// so that [Triangular.MeanExact] is available.
func NewTriangularExact(low, likely, high decimal.Decimal) (Triangular, error) {
	return newTriangular(decimalArg("LOW", low), decimalArg("LIKELY", likely), decimalArg("HIGH", high))
}

func newTriangular(args ...arg) (Triangular, error) {
	c := checker{fn: "triangular"}
	c.finite(args...)
	c.notAbove(args, 0, 1)
	c.notAbove(args, 1, 2)
	if c.err != nil {
		return Triangular{}, c.err
	}
	d := Triangular{low: args[0].f, likely: args[1].f, high: args[2].f, exact: exactArgs(args...)}
	c.moments(d)
	return d, c.result()
}

// Low returns the lower end a.
func (d Triangular) Low() float64 { return d.low }

// Likely returns the most likely value m (the mode).
func (d Triangular) Likely() float64 { return d.likely }

// High returns the upper end b.
func (d Triangular) High() float64 { return d.high }

// shifted returns gonum's triangle moved to start at 0: (0, b − a, m − a).
// Mean and variance computed there cannot overflow or cancel in a² and b²
// when a and b are large; only for a < b.
func (d Triangular) shifted() distuv.Triangle {
	return distuv.NewTriangle(0, d.high-d.low, d.likely-d.low, nil)
}

// unit returns gonum's triangle scaled to [0, 1] with mode
// (m − a)/(b − a): the CDF and quantile are computed there, so products of
// tiny widths cannot underflow to 0/0; only for a < b.
func (d Triangular) unit(src rand.Source) distuv.Triangle {
	f := clamp((d.likely-d.low)/(d.high-d.low), 0, 1)
	return distuv.NewTriangle(0, 1, f, src)
}

// Mean returns (a + m + b)/3, computed as a + ((m − a) + (b − a))/3.
func (d Triangular) Mean() float64 {
	if d.high == d.low {
		return d.low
	}
	return d.low + d.shifted().Mean()
}

// Variance returns (a² + b² + m² − ab − am − bm)/18, computed with the
// shifted points 0, m − a, b − a (the variance does not change under a
// shift).
func (d Triangular) Variance() float64 {
	if d.high == d.low {
		return 0
	}
	return d.shifted().Variance()
}

// Quantile returns a + √(p(b − a)(m − a)) for p < (m − a)/(b − a) and
// b − √((1 − p)(b − a)(b − m)) otherwise, the inverse of the CDF.
func (d Triangular) Quantile(p float64) float64 {
	if !validP(p) {
		return nan()
	}
	if d.high == d.low {
		return d.low
	}
	return clamp(d.low+(d.high-d.low)*d.unit(nil).Quantile(p), d.low, d.high)
}

// CDF returns (x − a)²/((b − a)(m − a)) for a ≤ x ≤ m and
// 1 − (b − x)²/((b − a)(b − m)) for m < x ≤ b.
func (d Triangular) CDF(x float64) float64 {
	if d.high == d.low {
		return step(x, d.low)
	}
	return d.unit(nil).CDF((x - d.low) / (d.high - d.low))
}

// Rand returns a + (b − a)·Y with Y drawn by gonum's triangle sampler on
// [0, 1].
func (d Triangular) Rand(src rand.Source) float64 {
	if d.high == d.low {
		return d.low
	}
	return clamp(d.low+(d.high-d.low)*d.unit(src).Rand(), d.low, d.high)
}

// MeanExact returns (a + m + b)/3 exactly when built by [NewTriangularExact].
func (d Triangular) MeanExact() (*big.Rat, bool) {
	if d.exact == nil {
		return nil, false
	}
	s := new(big.Rat).Add(d.exact[0].Rat(), d.exact[1].Rat())
	s.Add(s, d.exact[2].Rat())
	return s.Quo(s, big.NewRat(3, 1)), true
}

// Bounds returns [a, b].
func (d Triangular) Bounds() (lo, hi float64) { return d.low, d.high }

// String returns "triangular(LOW, LIKELY, HIGH)".
func (d Triangular) String() string {
	return callString("triangular", shown(d.exact, d.low, d.likely, d.high)...)
}
