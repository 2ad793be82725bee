package dist

import (
	"math"
	"math/big"
	"math/rand/v2"

	"github.com/shopspring/decimal"
)

// Event is a value that occurs with probability p, drawn then from its
// impact distribution, and is 0 otherwise: a risk in a register, whose
// impact counts only if it happens. For impact I with mean μ and variance
// σ², the event X = B·I with B ~ Bernoulli(p) independent of I has
//
//	E[X] = pμ,  Var[X] = E[X²] − E[X]² = p(σ² + μ²) − p²μ².
//
// Build it with [NewEvent] or [NewEventExact]; the zero value is not a
// distribution.
type Event struct {
	p      float64
	exactP *decimal.Decimal // nil when built from float64
	impact Distribution
}

// NewEvent returns the event of probability p (in [0, 1]) with the given
// impact.
func NewEvent(p float64, impact Distribution) (Event, error) {
	return newEvent(floatArg("the probability", p), impact)
}

// NewEventExact is [NewEvent] with an exact probability, which it keeps so
// that [Event.MeanExact] is available when the impact's mean is exact too.
func NewEventExact(p decimal.Decimal, impact Distribution) (Event, error) {
	return newEvent(decimalArg("the probability", p), impact)
}

func newEvent(p arg, impact Distribution) (Event, error) {
	c := checker{fn: "event"}
	switch {
	case p.problem() != "":
		c.fail(0, "the probability %s", p.problem())
	case p.f < 0 || p.f > 1 || (p.exact && (p.d.Sign() < 0 || p.d.GreaterThan(decimal.NewFromInt(1)))):
		c.fail(0, "the probability is %s; a probability must lie between 0 and 1", p)
	case impact == nil:
		c.fail(1, "no impact given")
	}
	if c.err != nil {
		return Event{}, c.err
	}
	e := Event{p: p.f, impact: impact}
	if p.exact {
		d := p.d
		e.exactP = &d
	}
	c.moments(e)
	return e, c.result()
}

// P returns the probability that the event occurs.
func (e Event) P() float64 { return e.p }

// Impact returns the distribution of the value when the event occurs.
func (e Event) Impact() Distribution { return e.impact }

// Mean returns pμ.
func (e Event) Mean() float64 {
	if e.p == 0 {
		return 0
	}
	return e.p * e.impact.Mean()
}

// Variance returns p(σ² + μ²) − p²μ².
func (e Event) Variance() float64 {
	if e.p == 0 {
		return 0
	}
	mu, v := e.impact.Mean(), e.impact.Variance()
	return e.p*(v+mu*mu) - e.p*e.p*mu*mu
}

// CDF returns (1 − p)·[x ≥ 0] + p·F(x), F the impact's CDF.
func (e Event) CDF(x float64) float64 {
	if e.p == 0 {
		return step(x, 0)
	}
	return (1-e.p)*step(x, 0) + e.p*e.impact.CDF(x)
}

// Quantile returns the smallest x with CDF(x) ≥ u. With Q the impact's
// quantile: Q(u/p) when u ≤ p and that is negative (a draw below 0 when it
// occurs); otherwise 0 when (1 − p) + p·F(0) ≥ u; otherwise
// Q((u − (1 − p))/p). Quantile(0) is the lower end of the support.
func (e Event) Quantile(u float64) float64 {
	if !validP(u) {
		return nan()
	}
	if e.p == 0 {
		return 0
	}
	if u == 0 {
		lo := e.impact.Quantile(0)
		if e.p < 1 {
			lo = math.Min(lo, 0)
		}
		return lo
	}
	if u <= e.p {
		if x := e.impact.Quantile(u / e.p); x < 0 {
			return x
		}
	}
	if (1-e.p)+e.p*e.impact.CDF(0) >= u {
		return 0
	}
	return e.impact.Quantile(math.Min(1, math.Max(0, (u-(1-e.p))/e.p)))
}

// Rand draws whether the event occurs (a uniform variate below p) and, if
// it does, its impact.
func (e Event) Rand(src rand.Source) float64 {
	if rand.New(src).Float64() >= e.p {
		return 0
	}
	return e.impact.Rand(src)
}

// MeanExact returns p × the impact's exact mean when built by
// [NewEventExact] and the impact's mean is exact.
func (e Event) MeanExact() (*big.Rat, bool) {
	if e.exactP == nil {
		return nil, false
	}
	if e.exactP.IsZero() {
		return new(big.Rat), true
	}
	m, ok := e.impact.MeanExact()
	if !ok {
		return nil, false
	}
	return m.Mul(m, e.exactP.Rat()), true
}

// Bounds returns the impact's bounds widened to include 0 (unless p = 1).
func (e Event) Bounds() (lo, hi float64) {
	if e.p == 0 {
		return 0, 0
	}
	lo, hi = e.impact.Bounds()
	if e.p < 1 {
		lo, hi = math.Min(lo, 0), math.Max(hi, 0)
	}
	return lo, hi
}

// String returns "event(P, IMPACT)".
func (e Event) String() string {
	p := formatFloat(e.p)
	if e.exactP != nil {
		p = e.exactP.String()
	}
	imp := "none"
	if e.impact != nil {
		imp = e.impact.String()
	}
	return callString("event", p, imp)
}
