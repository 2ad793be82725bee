package eval

import (
	"context"
	"errors"
	"fmt"
	"sort"
	"strings"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// One-way sensitivity analysis.
//
// AnalyseSensitivity moves one input at a time from its low to its high
// value, the others at their base values, and reports what that does to
// the expected value (of the whole tree, or of one decision): the value at
// each end with every decision re-optimised, the swing between them, the
// value at each end of the base case's policy held fixed (the gap is what
// re-deciding is worth), and where inside the range the best option at the
// watched decision changes. Every end is the compiled model with the input
// changed (compiled.Model.With) and one rollback; the switches come from
// the breakeven search (FindBreakeven's machinery), so they are exact
// where the values are linear in the input. The inputs come back sorted by
// swing, largest first: the order of a tornado diagram's bars.

// Defaults of SensitivityOptions.
const (
	// DefaultSensitivityGrid is the number of intervals each input's
	// breakeven search samples its range in before refining it.
	DefaultSensitivityGrid = 16
	// DefaultSensitivityMaxSamples caps the rollbacks of one analysis.
	DefaultSensitivityMaxSamples = 200_000
	// MaxCurvePoints is the most intervals a curve may ask for.
	MaxCurvePoints = 10_000
)

// SensitivityOptions say which inputs AnalyseSensitivity varies and how.
type SensitivityOptions struct {
	// Vary adds inputs to the ones varied by default (every parameter with
	// a range): probabilities of states or branches, or parameters, each
	// over its own range when it has one. A parameter already varied is
	// varied over the range given here instead of its own.
	Vary []VaryRange
	// Pct, when not nil, varies every parameter with no range, and every
	// input in Vary with no range given, by ± Pct of its base value (0.2
	// for ±20%); a probability stays inside [0, 1]. Without it such a
	// parameter is left out (a note says so) and such a probability runs
	// over [0, 1].
	Pct *decimal.Decimal
	// At is the decision whose value is reported (see
	// BreakevenOptions.At); "" reports the root's expected value. The
	// best option is watched at At, or by default at the root or, when
	// the root is not a decision, the first decision on the optimal path.
	At string
	// Points asks for each input's curve (its value over the range, for a
	// spider diagram) at Points+1 evenly spaced values as well as at the
	// ends, the base and the switches. 0 gives those only.
	Points int
	// Grid is the number of intervals of each breakeven search
	// (DefaultSensitivityGrid when 0).
	Grid int
	// MaxSamples caps the rollbacks of the whole analysis
	// (DefaultSensitivityMaxSamples when 0).
	MaxSamples int
	// Progress, when not nil, is called after each input with the
	// number done and the number in all.
	Progress func(done, total int)
}

// Sensitivity is the result of AnalyseSensitivity.
type Sensitivity struct {
	Objective tree.Objective
	// Base is the expected value (of the root, or of decision At) with
	// every input at its base value, in the objective's terms.
	Base decimal.Decimal
	// At is set when Base and every value below are decision At's
	// rather than the root's.
	At bool
	// Decision is the decision whose best option is watched, Path the
	// branch labels from the root to it and Options its branch labels;
	// nil and empty when the model has no decision.
	Decision *tree.Node
	Path     []string
	Options  []string
	// BaseBest is the best option at Decision in the base case (-1 when
	// there is none).
	BaseBest int
	// Inputs are the inputs varied, largest swing first (inputs of equal
	// swing in the order they were listed: parameters in definition
	// order, then Vary).
	Inputs []InputSensitivity
	// Exact is false when some value went through a rounded division.
	Exact bool
	// Samples is the number of rollbacks the analysis ran.
	Samples int
	// Notes explain choices made along the way: inputs left out, ranges
	// cut.
	Notes []string
}

// InputSensitivity is what moving one input does.
type InputSensitivity struct {
	Vary Vary
	// What describes the input for people.
	What string
	// Probability is set when the input is a probability or a parameter
	// used as one, to be shown as a percentage.
	Probability bool
	// From says where the range came from.
	From RangeFrom
	// Low, Base and High are the input's values: the ends of the range
	// (after any cut, see Narrowed) and its value in the model.
	Low, Base, High decimal.Decimal
	// Narrowed is set when the range was cut to keep the model valid;
	// Notes say how. Adjust says how the other probabilities make room
	// when a probability moves.
	Narrowed bool
	Adjust   string
	// ValueLow and ValueHigh are the expected value with the input at Low
	// and at High, every decision re-optimised; Swing is the distance
	// between them. FixedLow and FixedHigh are the value of the base
	// case's policy, held fixed, at Low and at High.
	ValueLow, ValueHigh decimal.Decimal
	Swing               decimal.Decimal
	FixedLow, FixedHigh decimal.Decimal
	// BestLow and BestHigh are the best option at the watched decision at
	// Low and at High (-1 when there is no decision).
	BestLow, BestHigh int
	// Switches are where the best option at the watched decision changes
	// inside the range, Segments the stretches between them (as
	// FindBreakeven gives them); empty with no decision.
	Switches []Switch
	Segments []Segment
	// Curve is the value over the range, ascending in the input: the
	// ends, the base, the switches and SensitivityOptions.Points more.
	Curve []CurvePoint
	// Exact is false when some value went through a rounded division.
	Exact bool
	// Notes are the breakeven search's notes for this input.
	Notes []string
}

// CurvePoint is the expected value with an input at X, in the objective's
// terms.
type CurvePoint struct {
	X, Value decimal.Decimal
}

// AnalyseSensitivity varies every input with a range (and those opts
// adds) one at a time and reports what each does to the expected value.
// It stops with ctx, and with a *BudgetError past opts.MaxSamples
// rollbacks. A request that does not fit the model is a *RequestError.
func AnalyseSensitivity(ctx context.Context, c *compiled.Model, opts SensitivityOptions) (*Sensitivity, error) {
	if opts.Points < 0 || opts.Points > MaxCurvePoints {
		return nil, reqErr("a curve of %d points: give 0 to %d", opts.Points, MaxCurvePoints)
	}
	if opts.Pct != nil && !opts.Pct.IsPositive() {
		return nil, reqErr("a percentage of %s%%: give one above 0", opts.Pct.Shift(2))
	}
	max := opts.MaxSamples
	if max <= 0 {
		max = DefaultSensitivityMaxSamples
	}
	a, err := newAnalysis(ctx, c, opts.At, max, "SensitivityOptions.MaxSamples")
	if err != nil {
		return nil, err
	}
	vnode := 0
	if opts.At != "" {
		vnode = a.watch
	}
	baseR := a.base.Rollback()
	policy := baseR.Policy()
	out := &Sensitivity{Objective: a.obj, At: opts.At != "", Decision: a.decision, Path: a.path, Options: a.options, BaseBest: -1, Exact: c.Exact()}
	var ok bool
	out.Base, ok = a.figureOf(baseR, vnode)
	out.Exact = out.Exact && ok
	if a.watch >= 0 {
		out.BaseBest = baseR.Best(a.watch)
	}
	out.Notes = append(out.Notes, a.notes...)

	list, skipped := sensitivityInputs(c, opts)
	if len(skipped) > 0 {
		out.Notes = append(out.Notes, fmt.Sprintf("not varied, having no range: %s (give them a range, or vary them by a percentage with SensitivityOptions.Pct)", strings.Join(skipped, ", ")))
	}
	grid := opts.Grid
	if grid <= 0 {
		grid = DefaultSensitivityGrid
	}
	for k, vr := range list {
		is, err := a.oneInput(vr, opts, vnode, policy, grid, out.Base)
		var skip *errSkip
		switch {
		case errors.As(err, &skip):
			out.Notes = append(out.Notes, "not varied: "+skip.why)
		case err != nil:
			return nil, err
		default:
			out.Inputs = append(out.Inputs, *is)
			out.Exact = out.Exact && is.Exact
		}
		if opts.Progress != nil {
			opts.Progress(k+1, len(list))
		}
	}
	if len(out.Inputs) == 0 {
		return nil, reqErr("nothing to vary: no input has a range (write `let NAME = VALUE in LOW .. HIGH`, name a probability in SensitivityOptions.Vary, or vary every input by a percentage with SensitivityOptions.Pct)")
	}
	sort.SliceStable(out.Inputs, func(i, j int) bool { return out.Inputs[i].Swing.GreaterThan(out.Inputs[j].Swing) })
	out.Samples = a.used
	return out, nil
}

// sensitivityInputs lists what to vary: every parameter with a range (or
// every parameter, with a percentage), in definition order, then the
// requested inputs not among them; a request for one among them replaces
// its range. skipped are the parameters left out.
func sensitivityInputs(c *compiled.Model, opts SensitivityOptions) (list []VaryRange, skipped []string) {
	at := map[string]int{}
	for _, in := range c.Inputs() {
		if !in.HasRange && opts.Pct == nil {
			skipped = append(skipped, in.Name)
			continue
		}
		v := Vary{Kind: VaryParam, Name: in.Name}
		at[v.String()] = len(list)
		list = append(list, VaryRange{Vary: v})
	}
	for _, vr := range opts.Vary {
		key := vr.Vary.String()
		if i, ok := at[key]; ok {
			list[i] = vr
			continue
		}
		at[key] = len(list)
		list = append(list, vr)
		if vr.Vary.Kind == VaryParam {
			for i, n := range skipped {
				if n == vr.Vary.Name {
					skipped = append(skipped[:i:i], skipped[i+1:]...)
					break
				}
			}
		}
	}
	return list, skipped
}

// oneInput varies one input: both ends, the base policy held fixed at
// each, the switches inside the range and the curve.
func (a *analysis) oneInput(vr VaryRange, opts SensitivityOptions, vnode int, policy []int32, grid int, base decimal.Decimal) (*InputSensitivity, error) {
	s := a.search(vr.Vary)
	defer a.spent(s)
	from, err := a.target(s, vr, opts.Pct)
	if err != nil {
		return nil, err
	}
	be := s.be
	is := &InputSensitivity{Vary: vr.Vary, What: be.What, Probability: vr.Vary.IsProbability(a.c.Source()), From: from,
		Low: be.Low, Base: be.Current, High: be.High, Narrowed: be.Narrowed, Adjust: be.Adjust, BestLow: -1, BestHigh: -1, Exact: true}
	end := func(x decimal.Decimal) (value, fixed decimal.Decimal, best int, err error) {
		m, r, err := s.rolled(x)
		if err != nil {
			return value, fixed, -1, invalidError(err)
		}
		v, ok1 := a.figureOf(r, vnode)
		f, ok2 := a.figureOf(m.Follow(policy), vnode)
		is.Exact = is.Exact && ok1 && ok2
		best = -1
		if a.watch >= 0 {
			best = r.Best(a.watch)
		}
		return v, f, best, nil
	}
	if is.ValueLow, is.FixedLow, is.BestLow, err = end(is.Low); err != nil {
		return nil, err
	}
	if is.ValueHigh, is.FixedHigh, is.BestHigh, err = end(is.High); err != nil {
		return nil, err
	}
	is.Swing = is.ValueHigh.Sub(is.ValueLow).Abs()
	if a.watch >= 0 {
		if _, err := s.run(BreakevenOptions{Grid: grid}); err != nil {
			return nil, invalidError(err)
		}
		is.Switches, is.Segments = be.Switches, be.Segments
	}
	if err := a.curve(s, is, opts.Points, vnode, base); err != nil {
		return nil, err
	}
	is.Notes = append([]string(nil), be.Notes...)
	return is, nil
}

// curve fills is.Curve: the ends and the base (known), the switches, and
// points+1 evenly spaced values of the input.
func (a *analysis) curve(s *search, is *InputSensitivity, points, vnode int, base decimal.Decimal) error {
	type point struct {
		x     decimal.Decimal
		v     decimal.Decimal
		known bool
	}
	byX := map[string]*point{}
	var ps []*point
	add := func(x, v decimal.Decimal, known bool) {
		if p, ok := byX[x.String()]; ok {
			if known && !p.known {
				p.v, p.known = v, true
			}
			return
		}
		p := &point{x, v, known}
		byX[x.String()] = p
		ps = append(ps, p)
	}
	add(is.Low, is.ValueLow, true)
	add(is.High, is.ValueHigh, true)
	add(is.Base, base, true)
	for _, sw := range is.Switches {
		add(sw.At, decimal.Zero, false)
	}
	width := is.High.Sub(is.Low)
	for k := 1; k < points && width.IsPositive(); k++ {
		add(gridPoint(is.Low, is.High, k, points), decimal.Zero, false)
	}
	sort.Slice(ps, func(i, j int) bool { return ps[i].x.LessThan(ps[j].x) })
	for _, p := range ps {
		if !p.known {
			_, r, err := s.rolled(p.x)
			if err != nil {
				return invalidError(err)
			}
			var ok bool
			p.v, ok = a.figureOf(r, vnode)
			is.Exact = is.Exact && ok
		}
		is.Curve = append(is.Curve, CurvePoint{X: p.x, Value: p.v})
	}
	return nil
}
