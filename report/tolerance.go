package report

import (
	"io"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/render"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// ToleranceReport is the report of a breakeven search over the risk
// tolerance: every tolerance at which the choice at the watched decision
// changes when the tree is rolled back on certainty equivalents, every
// option's certainty equivalent there, and the choice over the range.
//
// Its JSON shape (tolerances to 12 significant digits, certainty
// equivalents rounded to eval.RiskDigits):
//
//	{"title", "objective", "currency", "vary": "risk-tolerance",
//	 "low", "high", "decision", "path": [...], "options": [...],
//	 "expected_value_choice",
//	 "switches": [{"at", "exact": false, "below", "above",
//	               "certainty_equivalents": [{"option", "value"}]}],
//	 "segments": [{"from", "to", "best"}],
//	 "notes": [...]}
type ToleranceReport struct {
	Model   *compiled.Model
	Result  *eval.ToleranceBreakeven
	Options BreakevenOptions
}

// Tolerance is the report of tb, a search of c
// (eval.FindToleranceBreakeven).
func Tolerance(c *compiled.Model, tb *eval.ToleranceBreakeven, opts BreakevenOptions) *ToleranceReport {
	return &ToleranceReport{Model: c, Result: tb, Options: opts}
}

// WriteText writes each switch with every option's certainty equivalent
// there, and the choice over the range.
func (r *ToleranceReport) WriteText(out io.Writer) error {
	w := newTextOut(out)
	m, tb := r.Model.Source(), r.Result
	cur := m.Currency
	money := func(d decimal.Decimal) string { return render.Money(d, cur) }
	tol := func(d decimal.Decimal) string { return render.Grouped(significant(d, 6).String()) }
	if m.Title != "" {
		w.ln(m.Title)
	}
	w.f("breakeven of the risk tolerance, over %s .. %s\n", money(tb.Low), money(tb.High))
	w.f("watching decision %s%s", quoted(tb.Decision.Display()), afterPath(tb.Path))
	w.ln()
	if tb.Default {
		what := "payoffs"
		if m.Objective == tree.Min {
			what = "costs"
		}
		w.f("the %s after the decision span %s; the range runs from a thousandth of that\n"+
			"to a thousand times it (--in LOW..HIGH for another)\n", what, money(tb.Spread))
	}
	w.f("each option judged by its certainty equivalent (exponential utility), the\n"+
		"risk-averse choices made after it; by expected value it is %s\n", quoted(tb.Options[tb.Neutral]))
	for _, n := range tb.Notes {
		w.f("note: %s\n", r.Options.Names.Apply(n))
	}
	w.ln()
	if len(tb.Switches) == 0 {
		w.f("No switch: %s has the best certainty equivalent over the whole range.\n", quoted(tb.Options[tb.Segments[0].Best]))
	}
	for _, sw := range tb.Switches {
		w.f("Switch at a risk tolerance of ≈%s (approximate): %s below, %s above\n", tol(sw.At), quoted(tb.Options[sw.Below]), quoted(tb.Options[sw.Above]))
		var rows [][]string
		for j, o := range tb.Options {
			rows = append(rows, []string{o, money(sw.CE[j])})
		}
		textTable(w, "    ", 3, []bool{false, true}, rows)
	}
	w.ln()
	w.ln("Choice over the range of risk tolerances")
	var rows [][]string
	for k, sg := range tb.Segments {
		from, to := tol(sg.From), tol(sg.To)
		if k > 0 {
			from = "≈" + from
		}
		if k < len(tb.Segments)-1 {
			to = "≈" + to
		}
		rows = append(rows, []string{from, "..", to, "  " + tb.Options[sg.Best]})
	}
	textTable(w, "  ", 1, []bool{true, false, true, false}, rows)
	w.ln("(a smaller risk tolerance is more averse to risk; certainty equivalents are")
	w.ln("rounded: exp and ln in float64)")
	return w.Flush()
}

type toleranceJSON struct {
	Title     string                `json:"title,omitempty"`
	Objective string                `json:"objective"`
	Currency  string                `json:"currency,omitempty"`
	Vary      string                `json:"vary"`
	Low       string                `json:"low"`
	High      string                `json:"high"`
	Decision  string                `json:"decision"`
	Path      []string              `json:"path"`
	Options   []string              `json:"options"`
	EVChoice  string                `json:"expected_value_choice"`
	Switches  []toleranceSwitchJSON `json:"switches"`
	Segments  []segmentJSON         `json:"segments"`
	Notes     []string              `json:"notes"`
}

type toleranceSwitchJSON struct {
	At     string        `json:"at"`
	Exact  bool          `json:"exact"`
	Below  string        `json:"below"`
	Above  string        `json:"above"`
	Values []optionValue `json:"certainty_equivalents"`
}

// WriteJSON writes the search in the shape described on ToleranceReport.
func (r *ToleranceReport) WriteJSON(w io.Writer) error { return writeJSON(w, r.shape()) }

// MarshalJSON is WriteJSON's document, compact.
func (r *ToleranceReport) MarshalJSON() ([]byte, error) { return marshalJSON(r.WriteJSON) }

func (r *ToleranceReport) shape() toleranceJSON {
	m, tb := r.Model.Source(), r.Result
	out := toleranceJSON{Title: m.Title, Objective: m.Objective.String(), Currency: m.Currency, Vary: "risk-tolerance",
		Low: tb.Low.String(), High: tb.High.String(), Decision: tb.Decision.Display(), Path: append([]string{}, tb.Path...),
		Options: tb.Options, EVChoice: tb.Options[tb.Neutral], Switches: []toleranceSwitchJSON{}, Segments: []segmentJSON{}, Notes: []string{}}
	for _, n := range tb.Notes {
		out.Notes = append(out.Notes, r.Options.Names.Apply(n))
	}
	for _, sw := range tb.Switches {
		sj := toleranceSwitchJSON{At: sw.At.String(), Below: tb.Options[sw.Below], Above: tb.Options[sw.Above]}
		for j, o := range tb.Options {
			sj.Values = append(sj.Values, optionValue{Option: o, Value: sw.CE[j].String()})
		}
		out.Switches = append(out.Switches, sj)
	}
	for _, sg := range tb.Segments {
		out.Segments = append(out.Segments, segmentJSON{From: sg.From.String(), To: sg.To.String(), Best: tb.Options[sg.Best]})
	}
	return out
}

// significant is d rounded to n significant digits.
func significant(d decimal.Decimal, n int32) decimal.Decimal {
	if d.IsZero() {
		return d
	}
	// The position of the leading digit: 10^e ≤ |d| < 10^(e+1).
	e := int32(len(d.Abs().Truncate(0).String())) - 1
	if d.Abs().LessThan(decimal.NewFromInt(1)) {
		e = -1
		for x := d.Abs().Shift(1); x.LessThan(decimal.NewFromInt(1)); x = x.Shift(1) {
			e--
		}
	}
	return d.Round(n - 1 - e)
}
