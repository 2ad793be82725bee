package eval

import (
	"context"
	"fmt"
	"math"

	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// Breakeven risk tolerance.
//
// FindToleranceBreakeven finds the risk tolerances at which the choice at a
// decision changes when the tree is rolled back on certainty equivalents.
// Small tolerances make the decision maker judge an option by its worst
// outcomes; as the tolerance grows the certainty equivalents tend to the
// expected values and the choice to the expected-value one. The search
// samples the range on a grid even in ln R and narrows every step across
// which the choice changes by bisection on ln R. Certainty equivalents are
// float64 figures, so a switch is approximate (to about 12 significant
// digits), and a switch and back again inside one step of the grid can be
// missed.

// ToleranceOptions say where FindToleranceBreakeven looks.
type ToleranceOptions struct {
	// At is the decision to watch, as BreakevenOptions.At.
	At string
	// Low and High are the range of risk tolerances searched; nil takes
	// the spread of the decision's payoffs (highest minus lowest) divided
	// and multiplied by 1000.
	Low, High *decimal.Decimal
	// Grid is the number of steps the range is sampled in (DefaultGrid
	// when 0).
	Grid int
	// MaxSamples caps the rollbacks (DefaultMaxSamples when 0).
	MaxSamples int
}

// ToleranceBreakeven is the result of FindToleranceBreakeven.
type ToleranceBreakeven struct {
	// Decision is the decision watched and Path the branch labels from
	// the root to it; Options are its branch labels.
	Decision *tree.Node
	Path     []string
	Options  []string
	// Low and High are the range of risk tolerances searched; Spread is
	// the highest minus the lowest payoff after the decision, which the
	// range is taken from when none is given (Default).
	Low, High decimal.Decimal
	Spread    decimal.Decimal
	Default   bool
	// Segments cover [Low, High] in order, each with the option of the
	// largest certainty equivalent; Switches are the tolerances between
	// them (approximate).
	Segments []Segment
	Switches []ToleranceSwitch
	// Neutral is the option the expected-value policy takes: the choice as
	// the tolerance grows without bound.
	Neutral int
	// Samples is the number of rollbacks the search ran.
	Samples int
	// Notes explain choices made along the way.
	Notes []string
}

// ToleranceSwitch is a risk tolerance at which the choice changes.
type ToleranceSwitch struct {
	// At is the tolerance, to 12 significant digits.
	At decimal.Decimal
	// Below is the option taken just below At, Above just above it.
	Below, Above int
	// CE holds every option's certainty equivalent at At, in the
	// objective's terms, rounded to RiskDigits significant digits.
	CE []decimal.Decimal
}

// FindToleranceBreakeven finds the risk tolerances at which the choice at a
// decision of sol changes under exponential utility. It stops with ctx.
func FindToleranceBreakeven(ctx context.Context, sol *Solution, opts ToleranceOptions) (*ToleranceBreakeven, error) {
	if sol == nil {
		return nil, ErrNoModel
	}
	if ctx == nil {
		ctx = context.Background()
	}
	d, notes, err := WatchedDecision(sol, opts.At)
	if err != nil {
		return nil, err
	}
	if d == nil {
		return nil, reqErr("the model has no decision to watch")
	}
	tb := &ToleranceBreakeven{Decision: d.Node, Notes: notes, Neutral: d.Chosen()}
	for _, b := range d.Path() {
		tb.Path = append(tb.Path, b.Label)
	}
	for _, b := range d.Node.Branches {
		tb.Options = append(tb.Options, b.Label)
	}
	switch {
	case opts.Low != nil && opts.High != nil:
		tb.Low, tb.High = *opts.Low, *opts.High
		if _, err := toleranceFloat(tb.Low); err != nil {
			return nil, err
		}
		if _, err := toleranceFloat(tb.High); err != nil {
			return nil, err
		}
		if tb.Low.GreaterThan(tb.High) {
			return nil, reqErr("the range %s..%s runs downwards: write the smaller bound first", tb.Low, tb.High)
		}
	default:
		rgs := sol.Ranges()
		rg := rgs[d.Index()]
		width := rg.Hi.Sub(rg.Lo)
		certain := true
		for _, k := range d.Kids() {
			certain = certain && rgs[k.Index()].Lo.Equal(rgs[k.Index()].Hi)
		}
		if certain {
			return nil, reqErr("every option of %q has a certain payoff: no risk tolerance changes the choice", d.Node.Display())
		}
		thousand := decimal.NewFromInt(1000)
		tb.Low, tb.High = width.DivRound(thousand, 6), width.Mul(thousand)
		if tb.Low.IsZero() {
			tb.Low = decimal.New(1, -6)
		}
		tb.Spread, tb.Default = width, true
	}
	grid := opts.Grid
	if grid <= 0 {
		grid = DefaultGrid
	}
	maxSamples := opts.MaxSamples
	if maxSamples <= 0 {
		maxSamples = DefaultMaxSamples
	}
	c := sol.Compiled
	l := newCELayout(c)
	ce := make([]float64, c.Len())
	policy := make([]int32, c.Len())
	dn := d.Number()
	choose := func(x float64) (int, error) {
		if tb.Samples >= maxSamples {
			return 0, &BudgetError{What: fmt.Sprintf("more than %d rollbacks", maxSamples), Option: "ToleranceOptions.MaxSamples"}
		}
		if err := ctx.Err(); err != nil {
			return 0, err
		}
		tb.Samples++
		l.fold(math.Exp(x), ce, policy)
		return int(policy[dn]), nil
	}
	lo, _ := toleranceFloat(tb.Low)
	hi, _ := toleranceFloat(tb.High)
	xlo, xhi := math.Log(lo), math.Log(hi)
	xs := make([]float64, grid+1)
	picks := make([]int, grid+1)
	for k := range xs {
		xs[k] = xlo + (xhi-xlo)*float64(k)/float64(grid)
		if k == grid {
			xs[k] = xhi
		}
		if picks[k], err = choose(xs[k]); err != nil {
			return nil, err
		}
	}
	from := tb.Low
	for k := 1; k <= grid; k++ {
		if picks[k] == picks[k-1] {
			continue
		}
		a, b := xs[k-1], xs[k]
		pa := picks[k-1]
		for b-a > 1e-13*math.Max(1, math.Abs(a)) {
			mid := (a + b) / 2
			p, err := choose(mid)
			if err != nil {
				return nil, err
			}
			if p == pa {
				a = mid
			} else {
				b = mid
			}
		}
		at := math.Exp((a + b) / 2)
		l.fold(at, ce, policy)
		sw := ToleranceSwitch{At: roundDigits(at, 12), Below: pa, Above: picks[k]}
		rs := &RiskSolution{EMV: sol, ce: ce, layout: l, figures: c.Objective()}
		for j := range tb.Options {
			sw.CE = append(sw.CE, rs.BranchValue(dn, j))
		}
		tb.Switches = append(tb.Switches, sw)
		tb.Segments = append(tb.Segments, Segment{From: from, To: sw.At, Best: pa})
		from = sw.At
	}
	tb.Segments = append(tb.Segments, Segment{From: from, To: tb.High, Best: picks[grid]})
	tb.Notes = append(tb.Notes, fmt.Sprintf("sampled at %d tolerances evenly spaced in ln R (a factor of %.3g apart); a switch and back again between two of them would be missed", grid+1, math.Exp((xhi-xlo)/float64(grid))))
	switch top := picks[grid]; {
	case top == tb.Neutral:
	case d.IsBest(top):
		// Tied by expected value with the expected-value choice: the CEs
		// of the two need never cross, so no switch is promised.
		tb.Notes = append(tb.Notes, fmt.Sprintf("at the top of the range the choice is %q, which has the same expected value as the expected-value choice %q (ties go to the first option in the model)", tb.Options[top], tb.Options[tb.Neutral]))
	default:
		tb.Notes = append(tb.Notes, fmt.Sprintf("at the top of the range the choice is still %q; at some larger tolerance it becomes the expected-value choice, %q", tb.Options[top], tb.Options[tb.Neutral]))
	}
	return tb, nil
}
