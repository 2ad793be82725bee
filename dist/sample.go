package dist

import (
	"fmt"
	"math"
	"slices"
	"sort"

	"github.com/shopspring/decimal"
	"gonum.org/v1/gonum/stat"
)

// Sample summarises simulated values. Build it with [NewSample]; it keeps
// a sorted copy of the values and never changes afterwards.
type Sample struct {
	sorted   []float64
	mean, sd float64
}

// NewSample returns the summary of x, which it copies. x must hold at least
// one value, each finite.
func NewSample(x []float64) (Sample, error) {
	if len(x) == 0 {
		return Sample{}, fmt.Errorf("no values to summarise")
	}
	for i, v := range x {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return Sample{}, fmt.Errorf("value %d is %s; every value must be a finite number", i+1, formatFloat(v))
		}
	}
	s := Sample{sorted: slices.Clone(x)}
	slices.Sort(s.sorted)
	if len(x) == 1 {
		s.mean = x[0]
		return s, nil
	}
	s.mean, s.sd = stat.MeanStdDev(s.sorted, nil)
	if math.IsInf(s.mean, 0) || math.IsNaN(s.sd) || math.IsInf(s.sd, 0) {
		return Sample{}, fmt.Errorf("the values are too large in magnitude to summarise in float64 (their sum or spread overflows)")
	}
	return s, nil
}

// N returns the number of values.
func (s Sample) N() int { return len(s.sorted) }

// Mean returns the arithmetic mean, by gonum's stat.MeanStdDev.
func (s Sample) Mean() float64 { return s.mean }

// SD returns the sample standard deviation √(Σ(xᵢ − x̄)²/(n − 1)), by
// gonum's stat.MeanStdDev; 0 for a single value.
func (s Sample) SD() float64 { return s.sd }

// StdErr returns the standard error of the mean, SD/√n.
func (s Sample) StdErr() float64 { return s.sd / math.Sqrt(float64(len(s.sorted))) }

// Min returns the smallest value.
func (s Sample) Min() float64 { return s.sorted[0] }

// Max returns the largest value.
func (s Sample) Max() float64 { return s.sorted[len(s.sorted)-1] }

// Sorted returns a copy of the values in ascending order.
func (s Sample) Sorted() []float64 { return slices.Clone(s.sorted) }

// Percentile returns the smallest value whose cumulative proportion reaches
// p: the k-th smallest of n values with k = ⌈p·n⌉ (at least 1). That is
// forkcast's definition of a percentile throughout. p is read as the
// shortest decimal that prints as it (0.07 is 7/100) and p·n is computed
// exactly, so P7 of 100 values is the 7th smallest. (gonum's stat.Quantile
// with stat.Empirical follows the same rule but forms p·n in float64, where
// 0.07 × 100 = 7.000000000000001 selects the 8th.) It returns NaN for p
// outside [0, 1].
func (s Sample) Percentile(p float64) float64 {
	if !validP(p) || len(s.sorted) == 0 {
		return math.NaN()
	}
	k := decimal.NewFromFloat(p).Mul(decimal.NewFromInt(int64(len(s.sorted)))).Ceil().IntPart()
	k = max(k, 1)
	return s.sorted[k-1]
}

// ProbBelow returns the proportion of values below t, P(X < t): with t = 0,
// the probability of a loss.
func (s Sample) ProbBelow(t float64) float64 {
	return float64(sort.SearchFloat64s(s.sorted, t)) / float64(len(s.sorted))
}

// ProbAtMost returns the proportion of values at or below t, P(X ≤ t): the
// probability of staying within a budget t.
func (s Sample) ProbAtMost(t float64) float64 {
	i := sort.Search(len(s.sorted), func(i int) bool { return s.sorted[i] > t })
	return float64(i) / float64(len(s.sorted))
}

// ProbAbove returns the proportion of values above t, P(X > t).
func (s Sample) ProbAbove(t float64) float64 { return 1 - s.ProbAtMost(t) }
