package dist

import (
	"fmt"

	"github.com/shopspring/decimal"
)

// ThreePointMethod is a rule that replaces a distribution by three of its
// percentiles with fixed weights, so that a tree with the distribution in
// it keeps exact rollback (Keefer & Bodily, 1983, "Three-point
// approximations for continuous random variables", Management Science
// 29(5)).
type ThreePointMethod int

const (
	// SwansonMegill is the extended Swanson–Megill rule: P10, P50, P90
	// with weights 0.3, 0.4, 0.3.
	SwansonMegill ThreePointMethod = iota + 1
	// PearsonTukey is the extended Pearson–Tukey rule: P5, P50, P95 with
	// weights 0.185, 0.63, 0.185.
	PearsonTukey
)

// String returns the method's name.
func (m ThreePointMethod) String() string {
	switch m {
	case SwansonMegill:
		return "extended Swanson–Megill"
	case PearsonTukey:
		return "extended Pearson–Tukey"
	}
	return fmt.Sprintf("ThreePointMethod(%d)", int(m))
}

// rule returns the method's percentile levels and weights.
func (m ThreePointMethod) rule() (levels [3]float64, weights [3]string, ok bool) {
	switch m {
	case SwansonMegill:
		return [3]float64{0.10, 0.50, 0.90}, [3]string{"0.3", "0.4", "0.3"}, true
	case PearsonTukey:
		return [3]float64{0.05, 0.50, 0.95}, [3]string{"0.185", "0.63", "0.185"}, true
	}
	return levels, weights, false
}

// ThreePoint is a distribution replaced by three values with weights: the
// branches of a three-branch chance node.
type ThreePoint struct {
	Method  ThreePointMethod
	Levels  [3]float64         // the percentile levels, ascending (0.1, 0.5, 0.9 or 0.05, 0.5, 0.95)
	Values  [3]float64         // the distribution's quantiles at Levels
	Weights [3]decimal.Decimal // exact weights, summing to 1
}

// Discretise returns the three-point approximation of d by method m. The
// values are d.Quantile at the method's levels; for a discrete d that is
// the smallest value whose cumulative probability reaches the level.
func Discretise(d Distribution, m ThreePointMethod) (ThreePoint, error) {
	levels, weights, ok := m.rule()
	if !ok {
		return ThreePoint{}, fmt.Errorf("unknown three-point method %d; use SwansonMegill or PearsonTukey", int(m))
	}
	if d == nil {
		return ThreePoint{}, fmt.Errorf("no distribution to discretise")
	}
	t := ThreePoint{Method: m, Levels: levels}
	for i := range levels {
		t.Values[i] = d.Quantile(levels[i])
		t.Weights[i] = decimal.RequireFromString(weights[i])
	}
	return t, nil
}

// Mean returns Σ wᵢvᵢ, the mean of the three-point approximation.
func (t ThreePoint) Mean() float64 {
	var m float64
	for i, v := range t.Values {
		m += t.Weights[i].InexactFloat64() * v
	}
	return m
}

// Variance returns Σ wᵢ(vᵢ − m)², the variance of the approximation.
func (t ThreePoint) Variance() float64 {
	m := t.Mean()
	var s float64
	for i, v := range t.Values {
		s += t.Weights[i].InexactFloat64() * (v - m) * (v - m)
	}
	return s
}
