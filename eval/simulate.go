package eval

import (
	"context"
	"errors"
	"fmt"
	"math/rand/v2"
	"runtime"
	"sync/atomic"

	"github.com/forkcast/forkcast/compiled"
	pdist "github.com/forkcast/forkcast/dist"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// Monte Carlo simulation of a compiled model: every distribution written in
// it (pert(...), normal(...), …) is drawn, run after run, on the float64
// copy of the compiled form (compiled.Floats).
//
// Each run r draws the random inputs, evaluates again the figures that
// depend on them and rolls the tree back twice: once with every decision
// re-made knowing the draws, once following the base-case policy (the
// policy exact analysis recommends at the means). From these come, for
// each option of the watched decision:
//
//   - its payoff when it is taken and the base-case policy is followed
//     after it: either one path walked down the tree, chance outcomes drawn
//     with the run's probabilities (the default), or the expected value of
//     the option with the run's inputs (InputsOnly);
//   - whether it is best when the decision is re-made knowing the run's
//     inputs (P(best));
//
// and the expected value of knowing the inputs before deciding: the mean
// over runs of the best option's value with the inputs known minus the
// base-case option's value with the same inputs.
//
// A tree with no decision (a project's cost with its chance events, say)
// has one distribution, of the whole tree's payoff, and no P(best) or value
// of knowing: there is no choice for the knowledge to change.
//
// Runs are reproducible: run r's draws depend only on the seed and r
// (pdist.Streams), so the results for a seed are identical whatever the
// number of workers, and a longer simulation starts with the runs of a
// shorter one. Correlated inputs are the exception to the second: they
// are paired by rank over all the runs asked for (Iman–Conover), so
// another number of runs pairs them differently (Simulation.Correlated).

// DefaultRuns is the number of runs Simulate makes unless told otherwise.
const DefaultRuns = 10_000

// DefaultSeed is the seed Simulate uses unless told otherwise: fixed, so
// that a simulation run twice gives the same figures.
const DefaultSeed = 1

// MaxRuns caps the runs of one simulation: every run's values are kept
// (for percentiles), about 8 bytes per run for each input and 16 for each
// option.
const MaxRuns = 10_000_000

// Percentiles are the levels a simulation reports for every option, in
// percent: P5 … P95, with P80 (a common contingency level).
var Percentiles = [...]int{5, 10, 20, 30, 40, 50, 60, 70, 80, 90, 95}

// SimulateOptions say how Simulate samples.
type SimulateOptions struct {
	// Runs is the number of runs (DefaultRuns when 0; at most MaxRuns).
	Runs int
	// Seed picks the random streams; the same seed gives the same
	// results. Use DefaultSeed for the default.
	Seed uint64
	// Workers is the number of goroutines (0: one per available CPU). It
	// never changes the results.
	Workers int
	// InputsOnly draws the inputs only: each option's payoff in a run is
	// its expected value with the run's inputs, chance outcomes averaged
	// exactly as in the tree, instead of one path walked down it.
	InputsOnly bool
	// At names the decision to watch (see WatchedDecision).
	At string
	// KeepDraws keeps every run's input draws in the result (Draws), for
	// a program that wants to save or inspect them.
	KeepDraws bool
	// Progress, when set, is called now and then with the number of runs
	// done so far, from several goroutines at once: it must be safe for
	// concurrent use.
	Progress func(done int)
}

// SimInput is one distribution written in the model.
type SimInput struct {
	// Name is the input (`let`) it is the whole expression of, or "" when
	// it stands inside a larger expression; Written is the call as written.
	Name    string
	Written string
	// Dist is the distribution with its arguments evaluated; Mean the
	// value exact analyses give it (exact where the mean is rational).
	Dist      pdist.Distribution
	Mean      decimal.Decimal
	MeanExact bool
}

// Label is how the input is named in reports: its name, or the call as
// written.
func (in SimInput) Label() string {
	if in.Name != "" {
		return in.Name
	}
	return in.Written
}

// SimOption is what a simulation found for one option of the watched
// decision, or for the whole tree when it has no decision. Figures are in
// the objective's terms (a payoff under max, a cost under min).
type SimOption struct {
	// Label is the option's label ("" for the whole tree).
	Label string
	// Sample holds the option's payoff in every run done.
	Sample pdist.Sample
	// AtMeans is the option's exact expected value with every
	// distribution at its mean (what solve reports).
	AtMeans decimal.Decimal
	// Base marks the option the base-case policy takes.
	Base bool
	// PBest is the share of runs in which the option is best when the
	// decision is re-made knowing the run's inputs (ties go to the first
	// option in the model); 0 for the whole tree, which has no decision.
	PBest float64
	// PLoss is the share of runs whose net value is below zero: a
	// negative payoff under max, a cost above zero under min.
	PLoss float64
}

// Estimate is a mean over runs with its standard error.
type Estimate struct {
	Mean, StdErr float64
}

// Simulation is the result of Simulate. It owns its numbers.
type Simulation struct {
	// Runs is the number of runs done; Asked the number asked for (more
	// when the simulation was stopped early: Stopped is then set).
	Runs, Asked int
	Stopped     bool
	Seed        uint64
	// Correlated is set when the model correlates inputs: their draws
	// were paired by rank over all Asked runs, so a simulation of the
	// same seed with another number of runs gives other figures from its
	// first run on (without correlations the runs of a seed are a prefix
	// of every longer simulation's).
	Correlated bool
	InputsOnly bool
	Objective  tree.Objective
	// Model is the model as written.
	Model *tree.Model
	// Decision is the decision watched and Path the branch labels from
	// the root to it. Decision is nil when the tree has no decision:
	// Options then holds one entry, the whole tree's payoff, and
	// KnowInputs and BestKnown are zero.
	Decision *tree.Node
	Path     []string
	// Inputs are the distributions drawn, in the order of
	// compiled.Model.Uncertain.
	Inputs []SimInput
	// Options are the watched decision's options, in model order.
	Options []SimOption
	// KnowInputs is the expected value of knowing the inputs before
	// deciding: the mean over runs of the best option's value with the
	// run's inputs known minus the base-case option's (never negative).
	KnowInputs Estimate
	// Draws holds, when SimulateOptions.KeepDraws was set, each input's
	// draw in every run done (Draws[input][run]); Values each option's
	// payoff in every run (Values[option][run], in the objective's terms),
	// and BestKnown the option best with the run's inputs known.
	Draws     [][]float64
	Values    [][]float64
	BestKnown []int
	// Notes explain choices made along the way.
	Notes []string
}

// Simulate samples c by Monte Carlo (see the top of this file). It stops
// with ctx: the result then holds the runs done by then, Stopped set, and
// the error is nil unless no run was done.
func Simulate(ctx context.Context, c *compiled.Model, opts SimulateOptions) (*Simulation, error) {
	if c == nil {
		return nil, ErrNoModel
	}
	if ctx == nil {
		ctx = context.Background()
	}
	runs := opts.Runs
	switch {
	case runs == 0:
		runs = DefaultRuns
	case runs < 0:
		return nil, reqErr("%d runs: ask for at least 1", runs)
	case runs > MaxRuns:
		return nil, &BudgetError{What: fmt.Sprintf("%d runs, more than %d", runs, MaxRuns), Option: "SimulateOptions.Runs"}
	}
	base, err := Solve(c)
	if err != nil {
		return nil, err
	}
	d, notes, err := WatchedDecision(base, opts.At)
	if err != nil {
		return nil, err
	}
	s := &Simulation{Asked: runs, Seed: opts.Seed, InputsOnly: opts.InputsOnly, Objective: c.Objective(),
		Model: c.Source(), Notes: notes}
	if d != nil {
		s.Decision = d.Node
		for _, b := range d.Path() {
			s.Path = append(s.Path, b.Label)
		}
	}
	for _, u := range c.Uncertain() {
		s.Inputs = append(s.Inputs, SimInput{Name: u.Input, Written: u.Written(), Dist: u.Dist, Mean: u.Mean, MeanExact: u.Exact})
	}
	if len(s.Inputs) == 0 {
		if opts.InputsOnly {
			s.Notes = append(s.Notes, "the model has no distributions: every run is the same")
		} else {
			s.Notes = append(s.Notes, "the model has no distributions: only chance outcomes are drawn")
		}
	}

	streams := pdist.NewStreams(opts.Seed)
	inputs := streams.Sub(streamInputs)
	shared := streams.Sub(streamShared)
	hasShared := false
	for _, in := range s.Inputs {
		if _, ok := in.Dist.(compiled.SharedDraws); ok {
			hasShared = true
		}
	}
	// Correlated inputs are drawn for every run first, then paired by
	// rank (Iman–Conover needs whole columns); the others are drawn in
	// each run as it goes. Either way input j of run r is the j-th draw of
	// run r's own stream of the inputs family.
	pre, err := correlatedDraws(ctx, c, s.Inputs, inputs, streams.Sub(streamPairing), runs, opts.Workers)
	if err != nil {
		return nil, err
	}
	_, corrCols := c.Correlation()
	s.Correlated = len(corrCols) > 0
	var keep [][]float64
	if opts.KeepDraws {
		keep = make([][]float64, len(s.Inputs))
		for j := range keep {
			keep[j] = make([]float64, runs)
		}
	}

	sim := &simRun{c: c, policy: base.Rollback().Policy(), full: !opts.InputsOnly, whole: d == nil}
	nopt := 1
	if d != nil {
		sim.node = d.Number()
		from, to := c.Kids(sim.node)
		sim.from, nopt = from, to-from
	}
	values := make([][]float64, nopt)
	for j := range values {
		values[j] = make([]float64, runs)
	}
	bestKnown := make([]int32, runs)
	know := make([]float64, runs)
	workers := opts.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	// Work space per worker, made by the worker itself on its first run:
	// entry w is only ever touched by worker w.
	spaces := make([]*worker, workers)
	var counted atomic.Int64
	done, runErr := pdist.ForEachRun(ctx, streams.Sub(streamOutcomes), runs, workers, func(w, run int, r *rand.Rand) error {
		ws := spaces[w]
		if ws == nil {
			ws = newWorker(c, len(s.Inputs))
			spaces[w] = ws
		}
		inputs.Reset(ws.src, uint64(run))
		var sharedBase uint64
		if hasShared {
			shared.Reset(ws.shared, uint64(run))
			sharedBase = ws.shared.Uint64()
		}
		for j, in := range s.Inputs {
			var v float64
			if sd, ok := in.Dist.(compiled.SharedDraws); ok {
				// Values drawn from one source (a register's total
				// and one of its risks) share the run's seed for it.
				v = sd.DrawShared(sharedBase ^ keyHash(sd.DrawKey()))
			} else {
				v = in.Dist.Rand(ws.rand)
			}
			if pre[j] != nil {
				v = pre[j][run]
			}
			ws.x[j] = v
			if keep != nil {
				keep[j][run] = v
			}
		}
		if err := ws.f.Draw(ws.x); err != nil {
			return err
		}
		sim.run(ws, r, run, values, bestKnown, know)
		if opts.Progress != nil {
			if ws.since++; ws.since == progressEvery {
				opts.Progress(int(counted.Add(int64(ws.since))))
				ws.since = 0
			}
		}
		return nil
	})
	if runErr != nil && (done == 0 || !isStop(runErr)) {
		if isStop(runErr) {
			return nil, runErr
		}
		return nil, &SimulationError{Err: runErr}
	}
	if opts.Progress != nil {
		opts.Progress(done)
	}
	s.Runs = done
	s.Stopped = done < runs
	if s.Stopped {
		note := fmt.Sprintf("stopped after %d of %d runs; the figures are from those runs", done, runs)
		if s.Correlated {
			note += fmt.Sprintf(" (the correlated inputs were paired over all %d runs asked for, so no simulation of %d runs repeats them)", runs, done)
		}
		s.Notes = append(s.Notes, note)
	}
	obj := c.Objective()
	counts := make([]int, nopt)
	for _, b := range bestKnown[:done] {
		counts[b]++
	}
	if d == nil {
		counts[0] = 0 // no decision: nothing is best
	}
	for j := range nopt {
		vs := values[j][:done]
		loss := 0
		for i, v := range vs {
			if v < 0 {
				loss++
			}
			vs[i] = obj.FigureFloat(v)
		}
		label, what := "", "the whole tree"
		atMeans, taken := base.Value(), true
		if d != nil {
			label = d.Node.Branches[j].Label
			what = fmt.Sprintf("option %q", label)
			atMeans, taken = d.BranchValue(j), j == d.Chosen()
		}
		sample, err := pdist.NewSample(vs)
		if err != nil {
			return nil, &SimulationError{Err: fmt.Errorf("%s: %w", what, err)}
		}
		s.Options = append(s.Options, SimOption{
			Label:   label,
			Sample:  sample,
			AtMeans: atMeans,
			Base:    taken,
			PBest:   float64(counts[j]) / float64(done),
			PLoss:   float64(loss) / float64(done),
		})
	}
	if d != nil {
		ks, err := pdist.NewSample(know[:done])
		if err != nil {
			return nil, &SimulationError{Err: err}
		}
		s.KnowInputs = Estimate{Mean: ks.Mean(), StdErr: ks.StdErr()}
	}
	if opts.KeepDraws {
		s.Draws = make([][]float64, len(keep))
		for j := range keep {
			s.Draws[j] = keep[j][:done]
		}
		s.Values = make([][]float64, nopt)
		for j := range values {
			s.Values[j] = values[j][:done]
		}
		s.BestKnown = make([]int, done)
		for i, b := range bestKnown[:done] {
			s.BestKnown[i] = int(b)
		}
	}
	return s, nil
}

// Sub-streams of a simulation's seed: one family for the inputs, one for
// chance outcomes, one for the pairing of correlated inputs. Fixed, so
// that a printed seed reproduces its results in later versions.
const (
	streamInputs   = 1
	streamOutcomes = 2
	streamPairing  = 3
	streamShared   = 4 // one seed a run for the values that share draws (compiled.SharedDraws)
)

// progressEvery is how many runs a worker does between calls of
// SimulateOptions.Progress.
const progressEvery = 1024

// SimulationError is a simulation that could not be completed: a draw
// that makes a figure unusable (a probability outside [0, 1]), say.
type SimulationError struct{ Err error }

func (e *SimulationError) Error() string { return "simulation: " + e.Err.Error() }

// Unwrap returns the cause.
func (e *SimulationError) Unwrap() error { return e.Err }

// isStop reports whether err is a cancellation (context cancelled or past
// its deadline).
func isStop(err error) bool {
	return errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded)
}

// correlatedDraws draws, for every run, the inputs that the model
// correlates, and pairs them by rank to carry the target correlations
// (Iman–Conover). pre[j] is input j's column, nil for an input drawn in
// each run as it goes.
func correlatedDraws(ctx context.Context, c *compiled.Model, ins []SimInput, inputs, pairing pdist.Streams, runs, workers int) ([][]float64, error) {
	pre := make([][]float64, len(ins))
	target, cols := c.Correlation()
	if len(cols) == 0 {
		return pre, nil
	}
	for _, j := range cols {
		pre[j] = make([]float64, runs)
	}
	_, err := pdist.ForEachRun(ctx, inputs, runs, workers, func(_, run int, r *rand.Rand) error {
		for j, in := range ins {
			v := in.Dist.Rand(r) // every input, so each keeps its place in the stream
			if pre[j] != nil {
				pre[j][run] = v
			}
		}
		return nil
	})
	if err != nil {
		return nil, err
	}
	columns := make([][]float64, len(cols))
	for k, j := range cols {
		columns[k] = pre[j]
	}
	if err := pdist.ImanConover(columns, target, pairing.Source(0)); err != nil {
		return nil, &SimulationError{Err: err}
	}
	return pre, nil
}

// worker is one goroutine's work space.
type worker struct {
	f      *compiled.Floats
	src    *rand.PCG // the inputs' stream, reset for each run
	shared *rand.PCG // the shared draws' stream, reset for each run
	rand   *rand.Rand
	x      []float64 // the run's input draws
	since  int       // runs since the last progress report
}

func newWorker(c *compiled.Model, inputs int) *worker {
	src := rand.NewPCG(0, 0)
	return &worker{f: c.NewFloats(), src: src, shared: rand.NewPCG(0, 0), rand: rand.New(src), x: make([]float64, inputs)}
}

// keyHash is FNV-1a of a shared draw's key: values of different keys
// draw from different seeds in the same run.
func keyHash(key string) uint64 {
	h := uint64(14695981039346656037)
	for i := 0; i < len(key); i++ {
		h ^= uint64(key[i])
		h *= 1099511628211
	}
	return h
}

// simRun is what every run of one simulation shares (read only).
type simRun struct {
	c      *compiled.Model
	node   int     // the watched decision
	from   int     // its first child
	policy []int32 // the base-case policy
	full   bool    // walk a path for each option (not InputsOnly)
	whole  bool    // no decision: one value a run, the whole tree's
}

// run evaluates one run on ws.f, whose inputs are drawn: every decision
// re-made knowing them (P(best), the value of knowing), then the base-case
// policy followed (each option's payoff). Values are net.
func (s *simRun) run(ws *worker, r *rand.Rand, run int, values [][]float64, bestKnown []int32, know []float64) {
	f := ws.f
	if s.whole {
		// No decision to re-make: the tree's value, or one path.
		if s.full {
			values[0][run] = s.walk(f, 0, r)
		} else {
			f.Rollback()
			values[0][run] = f.Total(0)
		}
		return
	}
	f.Rollback()
	b := f.Best(s.node)
	bestKnown[run] = int32(b)
	best := f.Total(s.from + b)
	f.Follow(s.policy)
	know[run] = best - f.Total(s.from+int(s.policy[s.node]))
	for j := range values {
		k := s.from + j
		if !s.full {
			values[j][run] = f.Total(k)
			continue
		}
		values[j][run] = s.walk(f, k, r)
	}
}

// walk follows one path from node k down, taking the base-case policy at
// decisions and drawing chance outcomes with the run's probabilities, and
// returns the cash along it (the cash into k included).
func (s *simRun) walk(f *compiled.Floats, k int, r *rand.Rand) float64 {
	c := s.c
	total := f.Cash(k)
	for {
		total += f.Own(k)
		from, to := c.Kids(k)
		if from == to {
			return total
		}
		switch c.Kind(k) {
		case tree.KindDecision:
			k = from + int(s.policy[k])
		default:
			u := r.Float64()
			next := to - 1 // rounding may leave u above the last sum
			for j := from; j < to; j++ {
				if u -= f.Prob(j); u < 0 {
					next = j
					break
				}
			}
			// A branch of probability 0 is never taken, also when
			// rounding leaves u at the end.
			for next > from && f.Prob(next) == 0 {
				next--
			}
			k = next
		}
		total += f.Cash(k)
	}
}
