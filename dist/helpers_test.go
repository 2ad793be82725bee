package dist

import (
	"math"
	"math/big"
	"testing"

	"github.com/shopspring/decimal"
)

// near fails the test unless got is within tol of want, relative to
// max(1, |want|).
func near(t *testing.T, what string, got, want, tol float64) {
	t.Helper()
	if math.IsNaN(got) || math.Abs(got-want) > tol*math.Max(1, math.Abs(want)) {
		t.Errorf("%s = %.17g, want %.17g (tolerance %g)", what, got, want, tol)
	}
}

// dec parses a decimal literal.
func dec(s string) decimal.Decimal { return decimal.RequireFromString(s) }

// rat parses an exact rational.
func rat(s string) *big.Rat {
	r, ok := new(big.Rat).SetString(s)
	if !ok {
		panic("bad rational " + s)
	}
	return r
}

// binomialCoefficient returns C(n, k) as a float64 (exact for small n).
func binomialCoefficient(n, k int) float64 {
	c := 1.0
	for i := 1; i <= k; i++ {
		c = c * float64(n-k+i) / float64(i)
	}
	return c
}

// incBetaInteger is the regularised incomplete beta I_y(a, b) for positive
// integers a and b by its binomial-sum form
//
//	I_y(a, b) = Σ_{j=a}^{n} C(n, j) yʲ(1 − y)ⁿ⁻ʲ,  n = a + b − 1
//
// (Abramowitz & Stegun, Handbook of Mathematical Functions, 26.5.24 —
// recalled from memory; it is the identity between the binomial tail and
// the beta CDF).
func incBetaInteger(y float64, a, b int) float64 {
	n := a + b - 1
	var s float64
	for j := a; j <= n; j++ {
		s += binomialCoefficient(n, j) * math.Pow(y, float64(j)) * math.Pow(1-y, float64(n-j))
	}
	return s
}

// invert returns x in [lo, hi] with cdf(x) = p by bisection, for an
// increasing cdf: a reference quantile independent of the code under test.
func invert(cdf func(float64) float64, p, lo, hi float64) float64 {
	for range 200 {
		mid := (lo + hi) / 2
		if cdf(mid) < p {
			lo = mid
		} else {
			hi = mid
		}
	}
	return (lo + hi) / 2
}

// normalQuantile is Φ⁻¹(p) = √2·erfinv(2p − 1), from Go's math package.
func normalQuantile(p float64) float64 { return math.Sqrt2 * math.Erfinv(2*p-1) }

// normalCDF is Φ(x) = erfc(−x/√2)/2, from Go's math package.
func normalCDF(x float64) float64 { return math.Erfc(-x/math.Sqrt2) / 2 }
