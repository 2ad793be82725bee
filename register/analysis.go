package register

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/big"
	"sort"
	"strings"

	"github.com/forkcast/forkcast/dist"
	"github.com/shopspring/decimal"
)

// DefaultRuns is the number of runs Analyse makes unless told otherwise.
const DefaultRuns = 10_000

// DefaultSeed is the seed a command uses unless told otherwise: fixed, so
// that an analysis run twice gives the same figures.
const DefaultSeed = 1

// MaxRuns caps the runs of one analysis: every run's totals are kept (for
// percentiles), 8 bytes a run for each, and the ranking needs one more
// array of the runs per worker.
const MaxRuns = 10_000_000

// DefaultConfidence is the confidence the reserve is sized for unless told
// otherwise: 80%, a common level for a project's contingency (common
// practice).
const DefaultConfidence = 0.8

// Percentiles are the levels every analysis reports, in percent.
var Percentiles = [...]int{50, 80, 90, 95}

// Options say how Analyse simulates.
type Options struct {
	// Runs is the number of runs (DefaultRuns when 0; at most MaxRuns).
	Runs int
	// Seed picks the random streams; the same seed gives the same
	// figures.
	Seed uint64
	// Workers is the number of goroutines (0: one per available CPU). It
	// never changes the figures.
	Workers int
	// Confidence is the level the reserve is sized for, strictly between
	// 0 and 1 (0: DefaultConfidence). The ranking measures what each risk
	// adds to the total's percentile at this level.
	Confidence float64
	// Budget, when set, is the money available for the register's risks:
	// the analysis gives the probability that the total stays within it.
	Budget *decimal.Decimal
	// Progress, when set, is called now and then with the runs done so
	// far, from several goroutines at once: it must be safe for
	// concurrent use.
	Progress func(done int)
}

// Appraisal is what a risk's planned response is worth by expected value.
type Appraisal struct {
	// Reduction is what the response takes off the expected cost: the
	// risk's EMV before it less its EMV after it.
	Reduction Figure
	// Cost is the response's cost.
	Cost Figure
	// Net is Reduction − Cost; the response pays when it is positive.
	Net Figure
	// Take says whether the response is in the best set (see
	// Analysis.Best).
	Take bool
}

// Pays reports whether the response saves more in expected impact than
// it costs.
func (a *Appraisal) Pays() bool { return a.Net.Sign() > 0 }

// RiskResult is what the analysis found for one risk. Money is cost: a
// threat's figures are positive, an opportunity's negative (a saving).
type RiskResult struct {
	// Risk is the risk as given.
	Risk *Risk
	// MeanImpact is the mean of the impact if the risk occurs, as
	// written (positive for both kinds).
	MeanImpact Figure
	// EMV is the expected effect on the cost: probability × mean impact,
	// negative for an opportunity. EMVAfter is the same once the
	// response is taken, its cost left out; EMV when there is none.
	EMV, EMVAfter Figure
	// SD is the standard deviation of the risk's effect on the cost:
	// √(p(σ² + μ²) − p²μ²) for impact mean μ and variance σ².
	SD float64
	// Days is the expected schedule impact in days (probability × mean
	// delay); zero when none is given.
	Days Figure
	// Response is the appraisal of the planned response, nil when there
	// is none.
	Response *Appraisal
	// Share is EMV as a share of the register's total EMV (0 when the
	// total is 0).
	Share float64
	// Contribution is what the risk adds to the total's percentile at
	// the chosen confidence: that percentile less the same percentile of
	// the total without the risk (negative for most opportunities). Rank
	// orders the risks by its size, 1 the largest. Both are zero when the
	// simulation was stopped before the ranking.
	Contribution float64
	Rank         int
}

// Analysis is the result of Analyse. It owns its numbers.
type Analysis struct {
	// Register is the register analysed.
	Register *Register
	// Risks are the risks' results, in the register's order.
	Risks []RiskResult
	// Threats is the threats' total EMV, Opportunities the
	// opportunities' (negative: a saving), Total their sum: the
	// contingency reserve by the expected-value method.
	Threats, Opportunities, Total Figure
	// SD is the standard deviation of the total, from the formulas (the
	// risks are independent, so their variances add).
	SD float64
	// Planned is the expected cost with every planned response taken, the
	// responses' costs included; Best the same with the responses of the
	// best set (those whose Net is positive) taken and no others.
	Planned, Best Figure
	// Days is the total expected schedule impact in days; HasDays says
	// whether any risk has one.
	Days    Figure
	HasDays bool

	// Confidence is the level of Reserve; Budget the budget asked about,
	// nil when none.
	Confidence float64
	Budget     *decimal.Decimal

	// The simulation: Runs done of Asked (fewer when Stopped), with Seed.
	Runs, Asked int
	Stopped     bool
	Seed        uint64
	// AsIs is the total as the register stands in every run; Planned
	// with every planned response taken; Chosen with the best set taken
	// (nil when that is every planned response); DaysSample the total
	// schedule impact (nil when no risk has one).
	AsIs, WithPlanned dist.Sample
	WithBest          *dist.Sample
	DaysSample        *dist.Sample
	// Reserve is AsIs's percentile at Confidence: the reserve that covers
	// the total in that share of runs. WithinEMV is the share of runs in
	// which the total stays within the EMV reserve; WithinBudget within
	// Budget (0 when none is given).
	Reserve      float64
	WithinEMV    float64
	WithinBudget float64
	// Notes explain what was done along the way.
	Notes []string
}

// ProblemsError is a register that cannot be analysed: every problem
// found.
type ProblemsError struct {
	Register *Register
	Problems []Problem
}

func (e *ProblemsError) Error() string {
	var b strings.Builder
	for i, p := range e.Problems {
		if i > 0 {
			b.WriteString("; ")
		}
		if p.Risk >= 0 && p.Risk < len(e.Register.Risks) && e.Register.Risks[p.Risk].ID != "" {
			fmt.Fprintf(&b, "risk %s: ", e.Register.Risks[p.Risk].ID)
		} else if p.Risk >= 0 {
			fmt.Fprintf(&b, "risk %d: ", p.Risk+1)
		}
		b.WriteString(p.Msg)
	}
	return b.String()
}

// Analyse quantifies reg: the exact expected values first, then the
// Monte Carlo simulation of the total, the ranking and the responses. It
// stops with ctx: the result then holds the runs done by then (Stopped
// set, no ranking) and the error is nil unless no run was done.
func Analyse(ctx context.Context, reg *Register, opts Options) (*Analysis, error) {
	if reg == nil {
		return nil, errors.New("register: no register given")
	}
	if ps := reg.Check(); len(ps) > 0 {
		return nil, &ProblemsError{Register: reg, Problems: ps}
	}
	if ctx == nil {
		ctx = context.Background()
	}
	runs := opts.Runs
	switch {
	case runs == 0:
		runs = DefaultRuns
	case runs < 0:
		return nil, fmt.Errorf("register: %d runs: ask for at least 1", runs)
	case runs > MaxRuns:
		return nil, fmt.Errorf("register: %d runs: at most %d", runs, MaxRuns)
	}
	conf := opts.Confidence
	if conf == 0 {
		conf = DefaultConfidence
	}
	if !(conf > 0 && conf < 1) {
		return nil, fmt.Errorf("register: a confidence of %v: give a level strictly between 0 and 1 (80%% is 0.8)", conf)
	}

	a := exactParts(reg)
	a.Confidence, a.Budget, a.Asked, a.Seed = conf, opts.Budget, runs, opts.Seed
	if len(reg.Risks) == 0 {
		a.Notes = append(a.Notes, "the register has no risks: every total is 0")
	}

	take := make([]bool, len(reg.Risks))
	for i, r := range a.Risks {
		take[i] = r.Response != nil && r.Response.Take
	}
	c := newCore(reg, opts.Seed)
	t, done, err := c.run(ctx, runs, opts.Workers, take, opts.Progress)
	if opts.Progress != nil {
		opts.Progress(done)
	}
	if err != nil && done == 0 {
		return nil, err
	}
	a.Runs, a.Stopped = done, done < runs
	if a.Stopped {
		a.Notes = append(a.Notes, fmt.Sprintf("stopped after %d of %d runs; the simulated figures are from those runs, and the risks are not ranked", done, runs))
	}
	if a.AsIs, err = dist.NewSample(t.asIs); err != nil {
		return nil, fmt.Errorf("register: the total: %w", err)
	}
	if a.WithPlanned, err = dist.NewSample(t.planned); err != nil {
		return nil, fmt.Errorf("register: the total with the responses: %w", err)
	}
	if t.chosen != nil {
		s, err := dist.NewSample(t.chosen)
		if err != nil {
			return nil, fmt.Errorf("register: the total with the best responses: %w", err)
		}
		a.WithBest = &s
	}
	if t.days != nil {
		s, err := dist.NewSample(t.days)
		if err != nil {
			return nil, fmt.Errorf("register: the schedule impact: %w", err)
		}
		a.DaysSample = &s
	}
	a.Reserve = a.AsIs.Percentile(conf)
	a.WithinEMV = a.AsIs.ProbAtMost(a.Total.Float64())
	if opts.Budget != nil {
		a.WithinBudget = a.AsIs.ProbAtMost(floatOf(*opts.Budget))
	}
	if !a.Stopped && len(reg.Risks) > 0 {
		if err := a.rank(ctx, c, t.asIs, opts.Workers); err != nil {
			a.Stopped = true
			a.Notes = append(a.Notes, "stopped while ranking the risks; they are not ranked")
		}
	}
	return a, nil
}

// exactParts works out everything that needs no simulation.
func exactParts(reg *Register) *Analysis {
	a := &Analysis{Register: reg, Risks: make([]RiskResult, len(reg.Risks))}
	for i := range reg.Risks {
		k := &reg.Risks[i]
		sign := decFigure(decimal.NewFromInt(k.Kind.sign()))
		p := decFigure(k.P)
		mean, exact := k.Impact.Mean()
		mu := ratFigure(mean, exact)
		res := RiskResult{Risk: k, MeanImpact: mu}
		res.EMV = sign.Mul(p).Mul(mu)
		res.EMVAfter = res.EMV
		res.SD = eventSD(floatOf(k.P), k.Impact.MeanFloat(), k.Impact.Variance())
		if k.Delay != nil {
			dm, dx := k.Delay.Mean()
			res.Days = p.Mul(ratFigure(dm, dx))
			a.HasDays = true
		}
		if rs := k.Response; rs != nil {
			rm, rx := rs.Impact.Mean()
			res.EMVAfter = sign.Mul(decFigure(rs.P)).Mul(ratFigure(rm, rx))
			ap := &Appraisal{Reduction: res.EMV.Sub(res.EMVAfter), Cost: decFigure(rs.Cost)}
			ap.Net = ap.Reduction.Sub(ap.Cost)
			ap.Take = ap.Pays()
			res.Response = ap
		}
		if res.EMV.Sign() > 0 {
			a.Threats = a.Threats.Add(res.EMV)
		} else {
			a.Opportunities = a.Opportunities.Add(res.EMV)
		}
		a.Total = a.Total.Add(res.EMV)
		a.Days = a.Days.Add(res.Days)
		a.SD += res.SD * res.SD
		a.Risks[i] = res
	}
	a.SD = math.Sqrt(a.SD)
	// The best set of responses. Taking a response changes only its own
	// risk's term of the expected total: E[Σ Xᵢ] = Σ E[Xᵢ] (linearity of
	// expectation), so the 2^k choices separate into k choices, each
	// exact — take a response when its net saving (reduction less cost)
	// is positive. Linearity holds whether or not the risks are
	// independent. What needs independence is a criterion that is not an
	// expected value: with an exponential utility the certainty
	// equivalent of a sum of independent risks is the sum of theirs (the
	// product of their moment-generating functions), so it would still
	// separate; a percentile (the reserve at a confidence) never does,
	// with or without independence — P80(X + Y) is not P80(X) + P80(Y).
	// The analysis therefore decides by expected value, exactly, and
	// shows by simulation what the set chosen does to the reserve at the
	// chosen confidence (Analysis.WithBest next to AsIs and WithPlanned)
	// instead of searching the 2^k sets for the one that minimises a
	// percentile, which would be neither exact nor cheap.
	for _, r := range a.Risks {
		if r.Response == nil {
			a.Planned = a.Planned.Add(r.EMV)
			a.Best = a.Best.Add(r.EMV)
			continue
		}
		after := r.EMVAfter.Add(r.Response.Cost)
		a.Planned = a.Planned.Add(after)
		if r.Response.Take {
			a.Best = a.Best.Add(after)
		} else {
			a.Best = a.Best.Add(r.EMV)
		}
	}
	if a.Total.Sign() != 0 {
		for i := range a.Risks {
			q := new(big.Rat).Quo(a.Risks[i].EMV.rat(), a.Total.rat())
			a.Risks[i].Share, _ = q.Float64()
		}
	}
	return a
}

// eventSD is the standard deviation of a risk of probability p whose
// impact has mean mu and variance v: Var = p(σ² + μ²) − p²μ², the
// variance of B·I for B ~ Bernoulli(p) independent of I.
func eventSD(p, mu, v float64) float64 {
	x := p*(v+mu*mu) - p*p*mu*mu
	if x < 0 { // rounding, when p is 0 or 1
		return 0
	}
	return math.Sqrt(x)
}

// rank measures what each risk adds to the percentile at the confidence
// and orders the risks by its size.
func (a *Analysis) rank(ctx context.Context, c *core, asIs []float64, workers int) error {
	without, err := c.without(ctx, asIs, a.Confidence, workers)
	if err != nil {
		return err
	}
	order := make([]int, len(a.Risks))
	for i := range a.Risks {
		a.Risks[i].Contribution = a.Reserve - without[i]
		order[i] = i
	}
	sort.SliceStable(order, func(x, y int) bool {
		rx, ry := &a.Risks[order[x]], &a.Risks[order[y]]
		cx, cy := math.Abs(rx.Contribution), math.Abs(ry.Contribution)
		if cx != cy {
			return cx > cy
		}
		// Equal contributions (often 0 for small risks): the larger
		// expected impact first.
		return new(big.Rat).Abs(rx.EMV.rat()).Cmp(new(big.Rat).Abs(ry.EMV.rat())) > 0
	})
	for r, i := range order {
		a.Risks[i].Rank = r + 1
	}
	return nil
}

// Ranked returns the risks' results in rank order (the register's order
// when the risks were not ranked).
func (a *Analysis) Ranked() []*RiskResult {
	out := make([]*RiskResult, len(a.Risks))
	for i := range a.Risks {
		out[i] = &a.Risks[i]
	}
	sort.SliceStable(out, func(x, y int) bool { return out[x].Rank < out[y].Rank })
	return out
}

// Percentile returns the simulated total's percentile at level p (as
// it stands).
func (a *Analysis) Percentile(p float64) float64 { return a.AsIs.Percentile(p) }
