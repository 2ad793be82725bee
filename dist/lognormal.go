package dist

import (
	"math"
	"math/big"
	"math/rand/v2"

	"github.com/shopspring/decimal"
	"gonum.org/v1/gonum/stat/distuv"
)

// LogNormal is the lognormal distribution: X = exp(Y) with Y normal of mean
// μ and standard deviation σ > 0. Estimates are usually elicited as two
// percentiles ([NewLogNormalPercentiles]); a mean and SD also fix it
// ([NewLogNormalMeanSD]). Build it with a constructor; the zero value is not
// a distribution.
type LogNormal struct {
	mu, sigma float64
	// How it was given, for String and MeanExact: the four percentile
	// arguments, or the mean and SD.
	byMean bool
	given  []float64
	exact  []decimal.Decimal
}

// NewLogNormalPercentiles returns the lognormal whose pLow-quantile is xLow
// and pHigh-quantile is xHigh (for example 0.1, 120, 0.9, 300 for P10 = 120
// and P90 = 300), with 0 < pLow < pHigh < 1 and 0 < xLow < xHigh.
//
// Since ln X is normal, ln x_p = μ + σ·z_p with z_p = Φ⁻¹(p), so
//
//	σ = (ln xHigh − ln xLow)/(z_pHigh − z_pLow),  μ = ln xLow − σ·z_pLow.
func NewLogNormalPercentiles(pLow, xLow, pHigh, xHigh float64) (LogNormal, error) {
	return newLogNormalPercentiles(floatArg("", pLow), floatArg("", xLow), floatArg("", pHigh), floatArg("", xHigh))
}

// NewLogNormalPercentilesExact is [NewLogNormalPercentiles] of exact
// decimals (kept for messages and String; the mean is not rational).
func NewLogNormalPercentilesExact(pLow, xLow, pHigh, xHigh decimal.Decimal) (LogNormal, error) {
	return newLogNormalPercentiles(decimalArg("", pLow), decimalArg("", xLow), decimalArg("", pHigh), decimalArg("", xHigh))
}

// levelName names a percentile level: 0.1 → "P10", 0.025 → "P2.5".
func levelName(a arg) string {
	d := a.d
	if !a.exact {
		d = decimal.NewFromFloat(a.f)
	}
	return "P" + d.Shift(2).String()
}

func newLogNormalPercentiles(args ...arg) (LogNormal, error) {
	c := checker{fn: "lognormal"}
	args[0].name, args[2].name = "the lower level", "the upper level"
	args[1].name, args[3].name = "the lower percentile", "the upper percentile"
	c.finite(args...)
	if c.err != nil {
		return LogNormal{}, c.err
	}
	for _, i := range []int{0, 2} {
		if !(args[i].f > 0 && args[i].f < 1) {
			c.fail(i, "%s %s is not a probability strictly between 0 and 1", args[i].name, args[i])
		}
	}
	if c.err != nil {
		return LogNormal{}, c.err
	}
	lo, hi := levelName(args[0]), levelName(args[2])
	args[1].name, args[3].name = lo, hi
	switch {
	case cmp(args[0], args[2]) >= 0:
		c.fail(2, "percentiles in the wrong order: %s is given before %s; give the lower percentile first", lo, hi)
	case !(args[1].f > 0):
		c.fail(1, "%s is %s; a lognormal takes only positive values", lo, args[1])
	case cmp(args[1], args[3]) > 0:
		c.fail(3, "%s (%s) is above %s (%s); a higher percentile cannot be smaller", lo, args[1], hi, args[3])
	case cmp(args[1], args[3]) == 0:
		c.fail(3, "%s and %s are both %s; a lognormal needs them apart (write the figure itself for a fixed value)", lo, hi, args[1])
	}
	if c.err != nil {
		return LogNormal{}, c.err
	}
	zl, zh := distuv.UnitNormal.Quantile(args[0].f), distuv.UnitNormal.Quantile(args[2].f)
	sigma := (math.Log(args[3].f) - math.Log(args[1].f)) / (zh - zl)
	d := LogNormal{
		mu:    math.Log(args[1].f) - sigma*zl,
		sigma: sigma,
		given: []float64{args[0].f, args[1].f, args[2].f, args[3].f},
		exact: exactArgs(args...),
	}
	if !(sigma > 0) {
		c.fail(3, "%s (%s) and %s (%s) are too close together to compute", lo, args[1], hi, args[3])
		return LogNormal{}, c.err
	}
	c.moments(d)
	return d, c.result()
}

// NewLogNormalMeanSD returns the lognormal with the given mean m > 0 and
// standard deviation s > 0:
//
//	σ² = ln(1 + s²/m²),  μ = ln m − σ²/2,
//
// inverting E[X] = exp(μ + σ²/2) and Var[X] = (exp(σ²) − 1)·exp(2μ + σ²).
func NewLogNormalMeanSD(mean, sd float64) (LogNormal, error) {
	return newLogNormalMeanSD(floatArg("MEAN", mean), floatArg("SD", sd))
}

// NewLogNormalMeanSDExact is [NewLogNormalMeanSD] of exact decimals, which
// it keeps so that [LogNormal.MeanExact] is available.
func NewLogNormalMeanSDExact(mean, sd decimal.Decimal) (LogNormal, error) {
	return newLogNormalMeanSD(decimalArg("MEAN", mean), decimalArg("SD", sd))
}

func newLogNormalMeanSD(args ...arg) (LogNormal, error) {
	c := checker{fn: "lognormal"}
	c.finite(args...)
	if c.err == nil && !(args[0].f > 0) {
		c.fail(0, "MEAN is %s; a lognormal takes only positive values, so its mean must be positive", args[0])
	}
	if c.err == nil && !(args[1].f > 0) {
		c.fail(1, "SD is %s; a standard deviation must be positive", args[1])
	}
	if c.err != nil {
		return LogNormal{}, c.err
	}
	m, s := args[0].f, args[1].f
	r := s / m
	s2 := math.Log1p(r * r)
	d := LogNormal{
		mu:     math.Log(m) - s2/2,
		sigma:  math.Sqrt(s2),
		byMean: true,
		given:  []float64{m, s},
		exact:  exactArgs(args...),
	}
	if !(d.sigma > 0) || math.IsInf(s2, 0) {
		c.fail(1, "SD %s is too small or too large against MEAN %s to compute", args[1], args[0])
		return LogNormal{}, c.err
	}
	c.moments(d)
	return d, c.result()
}

// Mu returns μ, the mean of ln X.
func (d LogNormal) Mu() float64 { return d.mu }

// Sigma returns σ, the standard deviation of ln X.
func (d LogNormal) Sigma() float64 { return d.sigma }

func (d LogNormal) ln(src rand.Source) distuv.LogNormal {
	return distuv.LogNormal{Mu: d.mu, Sigma: d.sigma, Src: src}
}

// Mean returns exp(μ + σ²/2).
func (d LogNormal) Mean() float64 { return d.ln(nil).Mean() }

// Variance returns (exp(σ²) − 1)·exp(2μ + σ²).
func (d LogNormal) Variance() float64 { return d.ln(nil).Variance() }

// Quantile returns exp(μ + σ·Φ⁻¹(p)), from gonum (+Inf at p = 1).
func (d LogNormal) Quantile(p float64) float64 {
	if !validP(p) {
		return nan()
	}
	return d.ln(nil).Quantile(p)
}

// CDF returns Φ((ln x − μ)/σ) for x > 0, from gonum, and 0 for x ≤ 0.
func (d LogNormal) CDF(x float64) float64 {
	if x <= 0 {
		return 0
	}
	return d.ln(nil).CDF(x)
}

// Rand returns a draw by gonum's lognormal sampler.
func (d LogNormal) Rand(src rand.Source) float64 { return d.ln(src).Rand() }

// MeanExact returns the mean exactly when built by
// [NewLogNormalMeanSDExact]; a lognormal given by percentiles has an
// irrational mean.
func (d LogNormal) MeanExact() (*big.Rat, bool) {
	if !d.byMean || d.exact == nil {
		return nil, false
	}
	return d.exact[0].Rat(), true
}

// Bounds returns (0, +Inf).
func (d LogNormal) Bounds() (lo, hi float64) { return 0, math.Inf(1) }

// String returns "lognormal(P10=…, P90=…)" or "lognormal(mean=…, sd=…)",
// as the distribution was given.
func (d LogNormal) String() string {
	s := shown(d.exact, d.given...)
	if d.byMean {
		return callString("lognormal", "mean="+s[0], "sd="+s[1])
	}
	if len(s) != 4 {
		return "lognormal()"
	}
	lo, hi := arg{f: d.given[0]}, arg{f: d.given[2]}
	if d.exact != nil {
		lo, hi = arg{d: d.exact[0], exact: true}, arg{d: d.exact[2], exact: true}
	}
	return callString("lognormal", levelName(lo)+"="+s[1], levelName(hi)+"="+s[3])
}
