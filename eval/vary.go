package eval

import (
	"context"
	"errors"
	"fmt"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// What the sensitivity analyses share: the inputs they vary and over what
// range, the decision they watch, and one work budget for all their
// rollbacks. Each input is varied through the breakeven search's own
// machinery (search), so that a probability moves its siblings, and a
// range is cut where the model stops being valid, exactly as breakeven
// does it.

// VaryRange is an input to vary and, optionally, the range to vary it
// over.
type VaryRange struct {
	Vary Vary
	// Low and High are the range; nil (both) leaves it to the analysis:
	// a parameter's own `in LOW .. HIGH`, else what the analysis's
	// options say.
	Low, High *decimal.Decimal
}

// RangeFrom says where the range an input was varied over came from.
type RangeFrom uint8

const (
	// RangeOwn is a parameter's own `in LOW .. HIGH`.
	RangeOwn RangeFrom = iota
	// RangeGiven is a range the request gave.
	RangeGiven
	// RangePercent is ± a percentage of the input's base value.
	RangePercent
	// RangeFull is a probability over all of [0, 1] (cut where the model
	// stops being valid).
	RangeFull
)

// String says it in words.
func (r RangeFrom) String() string {
	switch r {
	case RangeOwn:
		return "its own range"
	case RangeGiven:
		return "the range given"
	case RangePercent:
		return "± a percentage of base"
	case RangeFull:
		return "0 to 1"
	}
	return fmt.Sprintf("RangeFrom(%d)", int(r))
}

// errSkip is an input that an analysis leaves out, with the reason, which
// becomes a note.
type errSkip struct{ why string }

func (e *errSkip) Error() string { return e.why }

// analysis is what one sensitivity analysis, sweep or strategy map keeps
// across its inputs.
type analysis struct {
	ctx    context.Context
	c      *compiled.Model
	obj    tree.Objective
	base   *Solution
	max    int    // rollbacks allowed in all
	used   int    // rollbacks spent so far
	option string // the option that raises max, for the budget error
	// The decision watched: its compiled number (-1 when the model has
	// none and none was asked for), the node, the labels on the way to it
	// and its options.
	watch    int
	decision *tree.Node
	path     []string
	options  []string
	notes    []string
}

// newAnalysis solves c and picks the decision to watch: at (see
// BreakevenOptions.At), or by default the root or, when the root is not a
// decision, the first decision on the optimal path. A model with no
// decision has none to watch (watch is -1) unless at names one.
func newAnalysis(ctx context.Context, c *compiled.Model, at string, max int, option string) (*analysis, error) {
	if c == nil {
		return nil, ErrNoModel
	}
	if ctx == nil {
		ctx = context.Background()
	}
	base, err := Solve(c)
	if err != nil {
		return nil, err
	}
	a := &analysis{ctx: ctx, c: c, obj: c.Objective(), base: base, max: max, option: option, watch: -1}
	d, notes, err := WatchedDecision(base, at)
	switch {
	case err != nil:
		return nil, err
	case d == nil:
		return a, nil // no decision in the model, and none asked for
	}
	a.watch, a.decision, a.notes = d.Number(), d.Node, notes
	for _, b := range d.Path() {
		a.path = append(a.path, b.Label)
	}
	for _, b := range d.Node.Branches {
		a.options = append(a.options, b.Label)
	}
	return a, nil
}

// search starts a breakeven search of v inside the analysis: the same
// decision, the budget that is left.
func (a *analysis) search(v Vary) *search {
	return &search{ctx: a.ctx, c: a.c, obj: a.obj, be: &Breakeven{Vary: v, Decision: a.decision, Path: a.path, Options: a.options},
		maxSamples: a.max, used: a.used, budgetOption: a.option, node: a.watch}
}

// spent adds a search's rollbacks to the analysis's.
func (a *analysis) spent(s *search) { a.used += s.be.Samples }

// target sets s up to vary vr: over vr's range when it has one; else over
// a parameter's own range; else, when pct is not nil, ± pct of the base
// value (a probability kept inside [0, 1]); else a probability over
// [0, 1]. A parameter's range is then cut to where the model is valid. An
// input that cannot be varied this way (a parameter with no range and no
// pct, a base of 0 under pct) is an *errSkip.
func (a *analysis) target(s *search, vr VaryRange, pct *decimal.Decimal) (RangeFrom, error) {
	v := vr.Vary
	opts := BreakevenOptions{Vary: v, Low: vr.Low, High: vr.High}
	from := RangeGiven
	if (vr.Low == nil) != (vr.High == nil) {
		return 0, reqErr("%s: give both ends of the range or neither", v)
	}
	if vr.Low != nil && vr.Low.Equal(*vr.High) {
		return 0, reqErr("%s: the range %s..%s is empty: give a low end below the high one", v, vr.Low, vr.High)
	}
	if vr.Low == nil {
		var cur decimal.Decimal
		isParam := v.Kind == VaryParam
		switch in, ok := a.c.InputNamed(v.Name); {
		case isParam && !ok:
			return 0, s.unknown(v)
		case isParam && in.HasRange:
			from = RangeOwn
		case isParam && pct == nil:
			return 0, &errSkip{fmt.Sprintf("%s has no range: give it one in the model (`let %s = … in LOW .. HIGH`) or in the request, or vary it by a percentage of its value with SensitivityOptions.Pct", v, v.Name)}
		case isParam:
			cur = in.Value
		default:
			// A probability: its current value from the search itself.
			probe := a.search(v)
			if err := probe.target(BreakevenOptions{Vary: v}); err != nil {
				return 0, err
			}
			cur = probe.be.Current
			from = RangeFull
		}
		if pct != nil && from != RangeOwn {
			from = RangePercent
			if cur.IsZero() {
				return 0, &errSkip{fmt.Sprintf("%s is 0, so a percentage of it is no change: give it a range", v)}
			}
			d := cur.Abs().Mul(*pct)
			lo, hi := cur.Sub(d), cur.Add(d)
			if !isParam {
				lo, hi = decimal.Max(lo, decimal.Zero), decimal.Min(hi, one)
			}
			opts.Low, opts.High = &lo, &hi
		}
	}
	if err := s.target(opts); err != nil {
		return 0, err
	}
	if v.Kind == VaryParam {
		if err := s.feasible(); err != nil {
			return 0, err
		}
	}
	return from, nil
}

// rolled is the model with s's input at x, and its rollback.
func (s *search) rolled(x decimal.Decimal) (*compiled.Model, *compiled.Rollback, error) {
	m, err := s.with(x)
	if err != nil {
		return nil, nil, err
	}
	return m, m.Rollback(), nil
}

// invalidError turns a value at which the model is invalid into a request
// error (the range asked for reaches it).
func invalidError(err error) error {
	var inv *invalidAt
	if errors.As(err, &inv) {
		return &RequestError{Msg: inv.msg}
	}
	return err
}

// usedAsProbability reports whether the parameter called name is read by
// some probability of the model (a state's, a likelihood, a chance
// branch's), so that people read its values as percentages.
func usedAsProbability(m *tree.Model, name string) bool {
	used := false
	look := func(e tree.Expr) {
		tree.Names(e, func(n *tree.Name) { used = used || n.Name == name })
	}
	for _, u := range m.Uncertainties {
		for _, s := range u.States {
			look(s.Prob)
		}
	}
	for _, t := range m.Tests {
		for _, rd := range t.Readings {
			for _, l := range rd.Given {
				look(l.Prob)
			}
		}
	}
	tree.Walk(m.Root, func(n *tree.Node, _ int) bool {
		for _, b := range n.Branches {
			look(b.Prob)
		}
		return !used
	})
	return used
}

// IsProbability reports whether the input v of model m stands for a
// probability: a state's or a branch's, or a parameter that some
// probability of the model reads (so that its values read as percentages).
func (v Vary) IsProbability(m *tree.Model) bool {
	return v.Kind != VaryParam || usedAsProbability(m, v.Name)
}

// figureOf is the value of node i of a rollback in the objective's terms,
// and whether it is exact.
func (a *analysis) figureOf(r *compiled.Rollback, i int) (decimal.Decimal, bool) {
	v, ok := r.Value(i)
	return a.obj.Figure(v), ok
}

// gridPoint is the k-th of n+1 evenly spaced values from lo to hi: exact
// when that has few decimal places, else rounded to the places of lo and
// hi plus the digits of n plus two. The rounding moves a point by at most a
// two-hundredth of a step, so the grid stays strictly ascending, and keeps
// the figures short: every point is solved exactly, and a figure of fifty
// decimal places costs the exact arithmetic far more than one of four.
func gridPoint(lo, hi decimal.Decimal, k, n int) decimal.Decimal {
	switch {
	case k <= 0:
		return lo
	case k >= n:
		return hi
	}
	places := max(-lo.Exponent(), -hi.Exponent(), 0) + int32(len(fmt.Sprint(n))) + 2
	return lo.Add(hi.Sub(lo).Mul(decimal.NewFromInt(int64(k))).DivRound(decimal.NewFromInt(int64(n)), places))
}

// showInputValue writes a value of input v for notes: as a percentage when
// v stands for a probability (as people wrote it), else as it is.
func showInputValue(m *tree.Model, v Vary, x decimal.Decimal) string {
	if v.IsProbability(m) {
		return x.Shift(2).String() + "%"
	}
	return x.String()
}
