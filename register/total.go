package register

import (
	"fmt"
	"math"
	"math/big"
	"math/rand/v2"
	"slices"
	"sort"
	"sync"

	"github.com/forkcast/forkcast/dist"
)

// Total is the distribution of a register's total cost impact, or of one
// of its risks': the sum of independent events, each 0 or (with its
// probability) a draw of its impact, positive for a threat and negative
// for an opportunity, plus, with the responses taken, their costs. It is
// how a register's figure enters a decision tree as a random input (`let
// x = register NAME total`): exact analyses take its mean, which is exact
// when every probability and mean impact is (the EMV total), and
// simulation draws it (Rand).
//
// Its mean, variance and bounds follow from the risks'. A sum of events
// has no closed-form CDF, so CDF and Quantile are estimates from a fixed
// sample of quantileDraws draws made with a fixed seed the first time
// either is asked for (nothing in forkcast asks: a split, which would,
// refuses an input taken from a register).
type Total struct {
	key     string // "register NAME": totals of one register share draws
	written string
	terms   []totalTerm
	costs   float64 // responses' costs, paid whatever happens
	mean    float64
	exact   *big.Rat // nil when some mean is not exact
	vari    float64
	lo, hi  float64

	once   sync.Once
	sorted []float64
}

// totalTerm is one risk in a Total.
type totalTerm struct {
	risk   uint64 // its index in the register: what its draws derive from
	sign   float64
	p      float64
	impact dist.Distribution // nil: fixed
	fixed  float64
}

// TotalOptions say what NewTotal sums.
type TotalOptions struct {
	// Risk is the index of the one risk to take, or −1 for all of them.
	Risk int
	// Responses takes the planned responses: each responded risk at its
	// residual probability and impact, and the response's cost added.
	Responses bool
	// Written is how the value is written in the model (String returns
	// it); "" gives "register NAME total".
	Written string
}

// quantileDraws is the size of the sample CDF and Quantile estimate
// from, and quantileSeed its seed.
const (
	quantileDraws = 20_000
	quantileSeed  = 0x7265676973746572
)

// NewTotal returns the distribution of reg's total, or of one risk's. reg
// must pass Check.
func NewTotal(reg *Register, opts TotalOptions) (*Total, error) {
	if ps := reg.Check(); len(ps) > 0 {
		return nil, &ProblemsError{Register: reg, Problems: ps}
	}
	if opts.Risk >= len(reg.Risks) {
		return nil, fmt.Errorf("register: risk %d of %d", opts.Risk+1, len(reg.Risks))
	}
	t := &Total{key: "register " + reg.Name, written: opts.Written, exact: new(big.Rat)}
	if t.written == "" {
		t.written = "register " + reg.Name + " total"
	}
	for i := range reg.Risks {
		if opts.Risk >= 0 && i != opts.Risk {
			continue
		}
		k := &reg.Risks[i]
		p, impact := k.P, k.Impact
		if rs := k.Response; rs != nil && opts.Responses {
			p, impact = rs.P, rs.Impact
			c := floatOf(rs.Cost)
			t.costs += c
			t.mean += c
			t.lo += c
			t.hi += c
			if t.exact != nil {
				t.exact.Add(t.exact, rs.Cost.Rat())
			}
		}
		sign := float64(k.Kind.sign())
		tt := totalTerm{risk: uint64(i), sign: sign, p: floatOf(p), impact: impact.Dist, fixed: floatOf(impact.Fixed)}
		t.terms = append(t.terms, tt)
		mu, v := impact.MeanFloat(), impact.Variance()
		t.mean += sign * tt.p * mu
		t.vari += max(tt.p*(v+mu*mu)-tt.p*tt.p*mu*mu, 0)
		if m, ok := impact.Mean(); ok && t.exact != nil {
			m.Mul(m, p.Rat())
			if sign < 0 {
				m.Neg(m)
			}
			t.exact.Add(t.exact, m)
		} else {
			t.exact = nil
		}
		lo, hi := tt.fixed, tt.fixed
		if tt.impact != nil {
			lo, hi = tt.impact.Bounds()
		}
		lo, hi = sign*lo, sign*hi
		if sign < 0 {
			lo, hi = hi, lo
		}
		if tt.p < 1 {
			lo, hi = math.Min(lo, 0), math.Max(hi, 0)
		}
		if tt.p == 0 {
			lo, hi = 0, 0
		}
		t.lo += lo
		t.hi += hi
	}
	return t, nil
}

// Mean returns the expected total: the sum of the risks' EMVs (and the
// responses' costs, when taken).
func (t *Total) Mean() float64 { return t.mean }

// MeanExact returns the mean as a fraction when every probability and
// mean impact is exact.
func (t *Total) MeanExact() (*big.Rat, bool) {
	if t.exact == nil {
		return nil, false
	}
	return new(big.Rat).Set(t.exact), true
}

// Variance returns the sum of the risks' variances, p(σ² + μ²) − p²μ²
// each: they are independent.
func (t *Total) Variance() float64 { return t.vari }

// Bounds returns the smallest and largest totals a draw can take.
func (t *Total) Bounds() (lo, hi float64) { return t.lo, t.hi }

// Rand draws the total (DrawShared with a seed taken from src).
func (t *Total) Rand(src rand.Source) float64 { return t.DrawShared(src.Uint64()) }

// DrawKey is "register NAME": in a simulation the totals of one register
// (with and without its responses, or one of its risks) draw the same
// risks in a run, as one project would see them.
func (t *Total) DrawKey() string { return t.key }

// DrawShared draws the total from seed. Each risk draws from two uniform
// variates that depend only on the seed and the risk's place in the
// register: it occurs when the first lies below its probability, and its
// impact is the impact's quantile at the second. So with the same seed a
// risk occurs in a total with responses only if it occurs in the total
// without (when the residual probability is the lower), and its residual
// impact sits at the same quantile as its impact.
func (t *Total) DrawShared(seed uint64) float64 {
	x := t.costs
	for i := range t.terms {
		tt := &t.terms[i]
		z := splitmix(seed ^ splitmix(tt.risk+1))
		if unit(z) >= tt.p {
			continue
		}
		v := tt.fixed
		if tt.impact != nil {
			v = tt.impact.Quantile(unit(splitmix(z)))
		}
		x += tt.sign * v
	}
	return x
}

// splitmix is the SplitMix64 step: a bijection that scatters its input.
func splitmix(z uint64) uint64 {
	z += 0x9e3779b97f4a7c15
	z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9
	z = (z ^ (z >> 27)) * 0x94d049bb133111eb
	return z ^ (z >> 31)
}

// unit maps a word to [0, 1) with 53 bits.
func unit(z uint64) float64 { return float64(z>>11) * 0x1p-53 }

// sample returns the sorted sample CDF and Quantile estimate from.
func (t *Total) sample() []float64 {
	t.once.Do(func() {
		src := rand.NewPCG(quantileSeed, quantileSeed>>1)
		xs := make([]float64, quantileDraws)
		for i := range xs {
			xs[i] = t.Rand(src)
		}
		slices.Sort(xs)
		t.sorted = xs
	})
	return t.sorted
}

// CDF estimates P(total ≤ x) from a fixed sample (see Total).
func (t *Total) CDF(x float64) float64 {
	switch {
	case math.IsNaN(x):
		return math.NaN()
	case x < t.lo:
		return 0
	case x >= t.hi:
		return 1
	}
	xs := t.sample()
	n := sort.Search(len(xs), func(i int) bool { return xs[i] > x })
	return float64(n) / float64(len(xs))
}

// Quantile estimates the smallest total whose cumulative probability
// reaches p, from a fixed sample (see Total); Quantile(0) and Quantile(1)
// are the bounds.
func (t *Total) Quantile(p float64) float64 {
	switch {
	case math.IsNaN(p) || p < 0 || p > 1:
		return math.NaN()
	case p == 0:
		return t.lo
	case p == 1:
		return t.hi
	}
	xs := t.sample()
	i := int(math.Ceil(p*float64(len(xs)))) - 1
	return xs[min(max(i, 0), len(xs)-1)]
}

// String returns the value as written in the model, such as "register
// works total".
func (t *Total) String() string { return t.written }
