package dist

import (
	"math"
	"math/big"
	"testing"
)

func TestTriangular(t *testing.T) {
	cases := []struct{ a, m, b float64 }{
		{0, 0, 1}, {0, 1, 1}, {10, 12, 20}, {-50, 10, 30}, {380_000, 420_000, 610_000},
	}
	for _, c := range cases {
		d, err := NewTriangular(c.a, c.m, c.b)
		if err != nil {
			t.Fatal(err)
		}
		// Published formulas (Evans, Hastings & Peacock, Statistical
		// Distributions, the triangular distribution — recalled from memory):
		// mean (a + m + b)/3, variance (a² + b² + m² − ab − am − bm)/18.
		near(t, "mean", d.Mean(), (c.a+c.m+c.b)/3, 1e-12)
		near(t, "variance", d.Variance(), (c.a*c.a+c.b*c.b+c.m*c.m-c.a*c.b-c.a*c.m-c.b*c.m)/18, 1e-12)
		// The CDF is (x − a)²/((b − a)(m − a)) up to m and
		// 1 − (b − x)²/((b − a)(b − m)) beyond (same source); invert it by
		// bisection as the reference quantile.
		cdf := func(x float64) float64 {
			if x <= c.m {
				if c.m == c.a {
					return 0
				}
				return (x - c.a) * (x - c.a) / ((c.b - c.a) * (c.m - c.a))
			}
			return 1 - (c.b-x)*(c.b-x)/((c.b-c.a)*(c.b-c.m))
		}
		for _, p := range []float64{0.05, 0.1, 0.5, 0.9, 0.95} {
			want := invert(cdf, p, c.a, c.b)
			near(t, "quantile", d.Quantile(p), want, 1e-9)
			near(t, "CDF", d.CDF(want), p, 1e-9)
		}
		near(t, "CDF at the mode", d.CDF(c.m), (c.m-c.a)/(c.b-c.a), 1e-12)
	}
	got, ok := mustExact(NewTriangularExact(dec("0.1"), dec("0.2"), dec("0.7")))
	// (0.1 + 0.2 + 0.7)/3 = 1/3, worked by hand and in math/big.Rat.
	ref := new(big.Rat).Add(rat("0.1"), rat("0.2"))
	ref.Add(ref, rat("0.7")).Quo(ref, big.NewRat(3, 1))
	if !ok || got.Cmp(ref) != 0 || got.Cmp(big.NewRat(1, 3)) != 0 {
		t.Errorf("exact triangular mean = %v, want 1/3", got)
	}
}

// mustExact returns a distribution's exact mean, or nil when construction
// failed.
func mustExact[D Distribution](d D, err error) (*big.Rat, bool) {
	if err != nil {
		return nil, false
	}
	return d.MeanExact()
}

func TestUniform(t *testing.T) {
	d, err := NewUniform(-2, 6)
	if err != nil {
		t.Fatal(err)
	}
	// Uniform on [a, b]: mean (a + b)/2, variance (b − a)²/12, Q(p) = a + p(b − a)
	// (common practice; any probability text).
	near(t, "mean", d.Mean(), 2, 1e-12)
	near(t, "variance", d.Variance(), 64.0/12, 1e-12)
	near(t, "Q(0.25)", d.Quantile(0.25), 0, 1e-12)
	near(t, "CDF(5)", d.CDF(5), 7.0/8, 1e-12)
	got, ok := mustExact(NewUniformExact(dec("0.1"), dec("0.2")))
	if !ok || got.Cmp(rat("3/20")) != 0 { // (0.1 + 0.2)/2 in big.Rat
		t.Errorf("exact uniform mean = %v", got)
	}
	p, _ := NewUniform(3, 3)
	if p.Mean() != 3 || p.Variance() != 0 || p.Quantile(0.9) != 3 || p.CDF(2.9) != 0 || p.CDF(3) != 1 {
		t.Errorf("uniform(3, 3) is not the point 3")
	}
}

func TestNormal(t *testing.T) {
	d, err := NewNormal(100, 15)
	if err != nil {
		t.Fatal(err)
	}
	near(t, "mean", d.Mean(), 100, 1e-12)
	near(t, "variance", d.Variance(), 225, 1e-12)
	for _, p := range []float64{0.05, 0.1, 0.5, 0.8, 0.9, 0.975} {
		// Reference: Φ⁻¹ through math.Erfinv.
		near(t, "quantile", d.Quantile(p), 100+15*normalQuantile(p), 1e-9)
	}
	// Φ(1) = 0.8413447460685429 (standard normal table — recalled from memory)
	// and the same through math.Erfc.
	near(t, "CDF(μ + σ)", d.CDF(115), 0.8413447460685429, 1e-9)
	near(t, "CDF(μ + σ) against math.Erfc", d.CDF(115), normalCDF(1), 1e-12)
	// Φ⁻¹(0.975) = 1.959963984540054 (standard normal table — recalled).
	near(t, "Q(0.975)", d.Quantile(0.975), 100+15*1.959963984540054, 1e-9)
	if !math.IsInf(d.Quantile(0), -1) || !math.IsInf(d.Quantile(1), 1) {
		t.Errorf("normal quantiles at 0 and 1 = %v, %v; want −Inf, +Inf", d.Quantile(0), d.Quantile(1))
	}
	got, ok := mustExact(NewNormalExact(dec("12.345"), dec("2")))
	if !ok || got.Cmp(rat("12.345")) != 0 {
		t.Errorf("exact normal mean = %v", got)
	}
}

func TestLogNormalPercentiles(t *testing.T) {
	cases := []struct{ pl, xl, ph, xh float64 }{
		{0.1, 100, 0.9, 300},
		{0.05, 20_000, 0.95, 90_000},
		{0.1, 1, 0.5, 2},
		{0.2, 0.5, 0.99, 7},
	}
	for _, c := range cases {
		d, err := NewLogNormalPercentiles(c.pl, c.xl, c.ph, c.xh)
		if err != nil {
			t.Fatal(err)
		}
		// The defining property: the given percentiles come back.
		near(t, "lower percentile", d.Quantile(c.pl), c.xl, 1e-9)
		near(t, "upper percentile", d.Quantile(c.ph), c.xh, 1e-9)
		near(t, "CDF at the lower percentile", d.CDF(c.xl), c.pl, 1e-9)
		// ln X is normal: σ and μ from two equations ln x = μ + σ·z_p,
		// z through math.Erfinv; the mean exp(μ + σ²/2) and the variance
		// (exp(σ²) − 1)·exp(2μ + σ²) (any probability text; common practice).
		zl, zh := normalQuantile(c.pl), normalQuantile(c.ph)
		sigma := (math.Log(c.xh) - math.Log(c.xl)) / (zh - zl)
		mu := math.Log(c.xl) - sigma*zl
		near(t, "σ", d.Sigma(), sigma, 1e-9)
		near(t, "μ", d.Mu(), mu, 1e-9)
		near(t, "mean", d.Mean(), math.Exp(mu+sigma*sigma/2), 1e-9)
		near(t, "variance", d.Variance(), (math.Exp(sigma*sigma)-1)*math.Exp(2*mu+sigma*sigma), 1e-9)
		if _, ok := d.MeanExact(); ok {
			t.Error("a lognormal given by percentiles reports a rational mean")
		}
	}
	// With levels symmetric about 0.5 the median is the geometric mean of
	// the two percentiles: √(100 × 400) = 200.
	d, _ := NewLogNormalPercentiles(0.1, 100, 0.9, 400)
	near(t, "median", d.Quantile(0.5), 200, 1e-9)
	if d.CDF(0) != 0 || d.CDF(-1) != 0 {
		t.Error("a lognormal puts weight at or below 0")
	}
}

func TestLogNormalMeanSD(t *testing.T) {
	for _, c := range []struct{ m, s float64 }{{100, 30}, {1, 5}, {2e6, 1e5}} {
		d, err := NewLogNormalMeanSD(c.m, c.s)
		if err != nil {
			t.Fatal(err)
		}
		near(t, "mean", d.Mean(), c.m, 1e-9)
		near(t, "SD", math.Sqrt(d.Variance()), c.s, 1e-9)
	}
	got, ok := mustExact(NewLogNormalMeanSDExact(dec("250.5"), dec("40")))
	if !ok || got.Cmp(rat("250.5")) != 0 {
		t.Errorf("exact lognormal mean = %v", got)
	}
}
