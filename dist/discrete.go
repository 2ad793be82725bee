package dist

import (
	"math"
	"math/big"
	"math/rand/v2"
	"slices"
	"sort"

	"github.com/shopspring/decimal"
)

// Discrete is a distribution over finitely many values, each with its
// probability. The zero value is the point 0.
//
// Draws are by inversion: the smallest value whose cumulative probability
// exceeds a uniform variate. (gonum's Categorical binds its random source
// when it is built, while this package passes a source to each draw.)
type Discrete struct {
	values, probs  []float64         // as given
	exactV, exactP []decimal.Decimal // as given; nil when built from float64
	support, cum   []float64         // values with positive probability, ascending, and P(X ≤ value)
}

// discreteTolerance is how far float64 probabilities may sum from 1 before
// NewDiscrete rejects them; the exact form must sum to 1 exactly.
const discreteTolerance = 1e-9

// NewDiscrete returns the distribution taking values[i] with probability
// probs[i]. The probabilities must lie in [0, 1] and sum to 1 within 1e-9
// (they are then rescaled to sum to 1). A value may appear more than once;
// its probabilities add up. In an [ArgError], Arg is the index of the
// outcome (value and probability) to blame.
func NewDiscrete(values, probs []float64) (Discrete, error) {
	args := make([]arg, 0, 2*len(values))
	for i := range values {
		args = append(args, floatArg("value", values[i]))
		if i < len(probs) {
			args = append(args, floatArg("probability", probs[i]))
		}
	}
	return newDiscrete(len(values), len(probs), args)
}

// NewDiscreteExact is [NewDiscrete] of exact decimals; the probabilities
// must sum to exactly 1. It keeps them so that [Discrete.MeanExact] is
// available.
func NewDiscreteExact(values, probs []decimal.Decimal) (Discrete, error) {
	args := make([]arg, 0, 2*len(values))
	for i := range values {
		args = append(args, decimalArg("value", values[i]))
		if i < len(probs) {
			args = append(args, decimalArg("probability", probs[i]))
		}
	}
	return newDiscrete(len(values), len(probs), args)
}

func newDiscrete(nv, np int, args []arg) (Discrete, error) {
	c := checker{fn: "discrete"}
	switch {
	case nv == 0:
		c.fail(0, "no values given; a discrete distribution needs at least one value and its probability")
	case nv != np:
		c.fail(min(nv, np), "%d values but %d probabilities; give one probability per value", nv, np)
	}
	if c.err != nil {
		return Discrete{}, c.err
	}
	exact := args[0].exact
	sum := decimal.Zero
	var fsum float64
	for i := 0; i < nv; i++ {
		v, p := args[2*i], args[2*i+1]
		switch {
		case v.problem() != "":
			c.fail(i, "value %d %s", i+1, v.problem())
		case p.problem() != "":
			c.fail(i, "the probability of value %s %s", v, p.problem())
		case p.f < 0 || p.f > 1 || (exact && (p.d.Sign() < 0 || p.d.GreaterThan(decimal.NewFromInt(1)))):
			c.fail(i, "the probability of value %s is %s; a probability must lie between 0 and 1", v, p)
		}
		if c.err != nil {
			return Discrete{}, c.err
		}
		sum = sum.Add(p.d)
		fsum += p.f
	}
	if exact && !sum.Equal(decimal.NewFromInt(1)) {
		c.fail(nv-1, "the probabilities sum to %s, not 1", sum)
	}
	if !exact && math.Abs(fsum-1) > discreteTolerance {
		c.fail(nv-1, "the probabilities sum to %s, not 1", formatFloat(fsum))
	}
	if c.err != nil {
		return Discrete{}, c.err
	}
	d := Discrete{values: make([]float64, nv), probs: make([]float64, nv)}
	if exact {
		d.exactV, d.exactP = make([]decimal.Decimal, nv), make([]decimal.Decimal, nv)
	}
	for i := 0; i < nv; i++ {
		d.values[i], d.probs[i] = args[2*i].f, args[2*i+1].f/fsum
		if exact {
			d.exactV[i], d.exactP[i] = args[2*i].d, args[2*i+1].d
			d.probs[i] = args[2*i+1].f
		}
	}
	d.tabulate()
	c.moments(d)
	return d, c.result()
}

// tabulate fills support and cum: the distinct values with positive
// probability in ascending order and the cumulative probability at each,
// summed exactly when the probabilities are exact; the last is exactly 1.
func (d *Discrete) tabulate() {
	order := make([]int, len(d.values))
	for i := range order {
		order[i] = i
	}
	slices.SortStableFunc(order, func(i, j int) int {
		switch {
		case d.values[i] < d.values[j]:
			return -1
		case d.values[i] > d.values[j]:
			return 1
		}
		return 0
	})
	exactSum := decimal.Zero
	var sum float64
	for _, i := range order {
		if d.probs[i] == 0 && (d.exactP == nil || d.exactP[i].IsZero()) {
			continue
		}
		if d.exactP != nil {
			exactSum = exactSum.Add(d.exactP[i])
			sum, _ = exactSum.Float64()
		} else {
			sum += d.probs[i]
		}
		if n := len(d.support); n > 0 && d.support[n-1] == d.values[i] {
			d.cum[n-1] = sum
			continue
		}
		d.support = append(d.support, d.values[i])
		d.cum = append(d.cum, sum)
	}
	if n := len(d.cum); n > 0 {
		d.cum[n-1] = 1
	}
}

// Len returns the number of outcomes as given.
func (d Discrete) Len() int { return len(d.values) }

// Outcome returns the i-th value and its probability as given (float64
// probabilities rescaled to sum to 1).
func (d Discrete) Outcome(i int) (value, prob float64) { return d.values[i], d.probs[i] }

// Mean returns Σ pᵢvᵢ.
func (d Discrete) Mean() float64 {
	var m float64
	for i, v := range d.values {
		m += d.probs[i] * v
	}
	return m
}

// Variance returns Σ pᵢ(vᵢ − μ)².
func (d Discrete) Variance() float64 {
	mu := d.Mean()
	var s float64
	for i, v := range d.values {
		s += d.probs[i] * (v - mu) * (v - mu)
	}
	return s
}

// Quantile returns the smallest value whose cumulative probability reaches
// p; Quantile(0) is the smallest value with positive probability.
func (d Discrete) Quantile(p float64) float64 {
	if !validP(p) {
		return nan()
	}
	if len(d.support) == 0 {
		return 0
	}
	i := sort.SearchFloat64s(d.cum, p) // first cum ≥ p
	return d.support[min(i, len(d.support)-1)]
}

// CDF returns the sum of the probabilities of the values ≤ x.
func (d Discrete) CDF(x float64) float64 {
	if len(d.support) == 0 {
		return step(x, 0)
	}
	i := sort.Search(len(d.support), func(i int) bool { return d.support[i] > x })
	if i == 0 {
		return 0
	}
	return d.cum[i-1]
}

// Rand returns the smallest value whose cumulative probability exceeds a
// uniform variate u in [0, 1), so each value comes with its probability.
func (d Discrete) Rand(src rand.Source) float64 {
	if len(d.support) == 0 {
		return 0
	}
	u := rand.New(src).Float64()
	i := sort.Search(len(d.cum), func(i int) bool { return d.cum[i] > u })
	return d.support[min(i, len(d.support)-1)]
}

// MeanExact returns Σ pᵢvᵢ exactly when built by [NewDiscreteExact].
func (d Discrete) MeanExact() (*big.Rat, bool) {
	if d.exactV == nil {
		if len(d.values) == 0 {
			return new(big.Rat), true
		}
		return nil, false
	}
	m := decimal.Zero
	for i, v := range d.exactV {
		m = m.Add(v.Mul(d.exactP[i]))
	}
	return m.Rat(), true
}

// Bounds returns the smallest and largest values with positive probability.
func (d Discrete) Bounds() (lo, hi float64) {
	if len(d.support) == 0 {
		return 0, 0
	}
	return d.support[0], d.support[len(d.support)-1]
}

// String returns "discrete(VALUE: PROBABILITY, …)".
func (d Discrete) String() string {
	out := make([]string, len(d.values))
	vs, ps := shown(d.exactV, d.values...), shown(d.exactP, d.probs...)
	for i := range out {
		out[i] = vs[i] + ": " + ps[i]
	}
	return callString("discrete", out...)
}
