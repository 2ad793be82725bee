package eval

import (
	"context"
	"errors"
	"fmt"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// One-way sweeps: every option's value at a decision over a grid of one
// input, with the switch points of the breakeven search over the same
// range. Each grid point is the compiled model with the input set
// (compiled.Model.With) and one rollback.

// Defaults and limits of sweeps and strategy maps.
const (
	// DefaultSweepSteps is the number of intervals a sweep's grid has.
	DefaultSweepSteps = 20
	// MaxSweepSteps is the most intervals of a one-way sweep.
	MaxSweepSteps = 10_000
	// DefaultSweepMaxSamples caps the rollbacks of one sweep or map.
	DefaultSweepMaxSamples = 1_000_000
)

// SweepOptions say what SweepInput varies, over what grid and at which
// decision.
type SweepOptions struct {
	// Vary is the input and, optionally, its range: by default a
	// parameter's own `in LOW .. HIGH`, or [0, 1] for a probability.
	Vary VaryRange
	// Steps is the number of intervals of the grid (DefaultSweepSteps
	// when 0): Steps+1 evenly spaced values from low to high.
	Steps int
	// At is the decision watched (see BreakevenOptions.At).
	At string
	// Grid is the number of intervals of the breakeven search that finds
	// the switches (DefaultSensitivityGrid when 0).
	Grid int
	// MaxSamples caps the rollbacks (DefaultSweepMaxSamples when 0).
	MaxSamples int
	// Progress, when not nil, is called as grid points are done, with
	// the number done and the number in all.
	Progress func(done, total int)
}

// SweepAxis is an input a sweep or map varies, and its grid.
type SweepAxis struct {
	Vary Vary
	// What describes the input for people.
	What string
	// Probability is set when the input is a probability or a parameter
	// used as one.
	Probability bool
	// From says where the range came from.
	From RangeFrom
	// Current is the input's value in the model; Low and High the range
	// (after any cut, see Narrowed).
	Current, Low, High decimal.Decimal
	// Narrowed is set when the range was cut to keep the model valid
	// (the notes say how); Adjust says how the other probabilities make
	// room when a probability moves.
	Narrowed bool
	Adjust   string
	// Values is the grid: evenly spaced from Low to High (rounded at
	// compiled.DivisionScale places when a step is no finite decimal).
	Values []decimal.Decimal
}

// Sweep is the result of SweepInput.
type Sweep struct {
	Objective tree.Objective
	Input     SweepAxis
	// Decision is the decision watched, Path the branch labels from the
	// root to it and Options its branch labels.
	Decision *tree.Node
	Path     []string
	Options  []string
	// Values[k][j] is option j's expected value (its cash included) at
	// Input.Values[k], in the objective's terms.
	Values [][]decimal.Decimal
	// Best[k] lists the optimal options at Input.Values[k] in model
	// order; more than one is a tie (the first is the one taken).
	Best [][]int
	// Switches and Segments are the breakeven search's over the same
	// range: exact switch points, and the best option between them.
	Switches []Switch
	Segments []Segment
	// Exact is false when some value went through a rounded division.
	Exact bool
	// Samples is the number of rollbacks run.
	Samples int
	// Notes explain choices made along the way.
	Notes []string
}

// SweepInput computes every option's value at a decision over a grid of
// one input, and where the best option changes. It stops with ctx, and
// with a *BudgetError past opts.MaxSamples rollbacks. A request that does
// not fit the model is a *RequestError.
func SweepInput(ctx context.Context, c *compiled.Model, opts SweepOptions) (*Sweep, error) {
	steps, err := sweepSteps(opts.Steps, MaxSweepSteps)
	if err != nil {
		return nil, err
	}
	a, err := newSweepAnalysis(ctx, c, opts.At, opts.MaxSamples)
	if err != nil {
		return nil, err
	}
	s := a.search(opts.Vary.Vary)
	defer a.spent(s)
	axis, err := a.axis(s, opts.Vary, steps)
	if err != nil {
		return nil, err
	}
	out := &Sweep{Objective: a.obj, Input: axis, Decision: a.decision, Path: a.path, Options: a.options, Exact: c.Exact()}
	for k, x := range axis.Values {
		sm, err := s.sample(x)
		if err != nil {
			return nil, invalidError(err)
		}
		out.Values = append(out.Values, s.figures(sm.values))
		out.Best = append(out.Best, sm.ties())
		out.Exact = out.Exact && sm.exact
		if opts.Progress != nil {
			opts.Progress(k+1, len(axis.Values))
		}
	}
	grid := opts.Grid
	if grid <= 0 {
		grid = DefaultSensitivityGrid
	}
	if _, err := s.run(BreakevenOptions{Grid: grid}); err != nil {
		return nil, invalidError(err)
	}
	out.Switches, out.Segments = s.be.Switches, s.be.Segments
	out.Notes = append(append(out.Notes, a.notes...), s.be.Notes...)
	out.Samples = a.used + s.be.Samples
	return out, nil
}

// sweepSteps checks a number of grid intervals, 0 taking the default.
func sweepSteps(steps, max int) (int, error) {
	switch {
	case steps == 0:
		return DefaultSweepSteps, nil
	case steps < 1 || steps > max:
		return 0, reqErr("a grid of %d steps: give 1 to %d", steps, max)
	}
	return steps, nil
}

// newSweepAnalysis is the analysis of a sweep or map, which needs a
// decision to watch.
func newSweepAnalysis(ctx context.Context, c *compiled.Model, at string, max int) (*analysis, error) {
	if max <= 0 {
		max = DefaultSweepMaxSamples
	}
	a, err := newAnalysis(ctx, c, at, max, "SweepOptions.MaxSamples")
	if err != nil {
		return nil, err
	}
	if a.watch < 0 {
		return nil, reqErr("the model has no decision, so there are no options to compare; a sensitivity analysis shows what the inputs do to its expected value")
	}
	return a, nil
}

// axis sets s up to vary vr and lays out its grid of steps intervals.
func (a *analysis) axis(s *search, vr VaryRange, steps int) (SweepAxis, error) {
	from, err := a.target(s, vr, nil)
	var skip *errSkip
	if errors.As(err, &skip) {
		return SweepAxis{}, reqErr("%s", skip.why)
	}
	if err != nil {
		return SweepAxis{}, err
	}
	be := s.be
	ax := SweepAxis{Vary: vr.Vary, What: be.What, Probability: vr.Vary.IsProbability(a.c.Source()), From: from,
		Current: be.Current, Low: be.Low, High: be.High, Narrowed: be.Narrowed, Adjust: be.Adjust}
	width := be.High.Sub(be.Low)
	if width.IsZero() {
		steps = 0
	}
	for k := 0; k <= steps; k++ {
		ax.Values = append(ax.Values, gridPoint(be.Low, be.High, k, steps))
	}
	// A map has two axes: each note says which input it is about.
	for _, n := range be.Notes {
		a.notes = append(a.notes, fmt.Sprintf("%s: %s", vr.Vary, n))
	}
	be.Notes = nil
	return ax, nil
}

// ties lists the optimal options of a sample in model order.
func (sm *sample) ties() []int {
	if sm.best < 0 {
		return nil
	}
	out := []int{}
	for j := range sm.t {
		if sm.t[j].Equal(sm.t[sm.best]) {
			out = append(out, j)
		}
	}
	return out
}

// describeAxis is a short phrase for an axis in errors.
func describeAxis(ax SweepAxis) string { return fmt.Sprintf("%s (%s)", ax.Vary, ax.What) }
