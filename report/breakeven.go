package report

import (
	"fmt"
	"io"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/render"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// BreakevenOptions say how the breakeven report is worded.
type BreakevenOptions struct {
	// Names renames the library options that the search's notes mention.
	Names OptionNames
}

// BreakevenReport is the report of a breakeven search: every value of the
// input at which the best option of the watched decision changes, every
// option's value there, and which option is best on each stretch of the
// range.
//
// Its JSON shape (every figure an exact decimal string):
//
//	{"title", "objective", "currency",
//	 "vary", "kind" ("parameter", "state" or "branch"), "what",
//	 "current", "low", "high", "narrowed", "adjust",
//	 "decision", "path": [...], "options": [...],
//	 "switches": [{"at", "exact", "fraction", "below", "above",
//	               "values": [{"option", "value"}]}],
//	 "segments": [{"from", "to", "best"}],
//	 "notes": [...]}
//
// A switch's "at" is where the best option changes; "exact" says whether
// the options' values are equal there exactly. An exact switch has
// "fraction", the point as a fraction ("41/380", or "301000" for a
// whole number); "at" is then that number, rounded at
// compiled.DivisionScale places when it is no finite decimal. An
// approximate switch has no "fraction" and "at" is within
// 10^-compiled.DivisionScale of the switch.
type BreakevenReport struct {
	// Model is the compiled model searched (its values, not the file's,
	// when inputs were set).
	Model   *compiled.Model
	Result  *eval.Breakeven
	Options BreakevenOptions
}

// Breakeven is the report of be, a breakeven search of c
// (eval.FindBreakeven).
func Breakeven(c *compiled.Model, be *eval.Breakeven, opts BreakevenOptions) *BreakevenReport {
	return &BreakevenReport{Model: c, Result: be, Options: opts}
}

// beFormat shows values of the varied input: a probability as a percent,
// anything else as a plain number; an approximate one rounded, with ≈.
type beFormat struct {
	prob bool
}

func inputFormat(m *tree.Model, be *eval.Breakeven) beFormat {
	return beFormat{prob: be.Vary.IsProbability(m)}
}

func (f beFormat) show(x decimal.Decimal, exact bool) string {
	var s string
	if f.prob {
		s = render.Percent(x, 4)
		if !x.Mul(decimal.NewFromInt(100)).Round(4).Equal(x.Mul(decimal.NewFromInt(100))) {
			exact = false
		}
	} else {
		r := x.Round(6)
		if !r.Equal(x) {
			exact = false
		}
		s = render.Grouped(r.String())
	}
	if !exact {
		return "≈" + s
	}
	return s
}

// maxFraction is the longest fraction a switch line shows; a longer one
// (the ratio of two long exact figures) is only in the JSON.
const maxFraction = 32

// point is where a switch is, with the words that say how exactly: "=
// 61,000 (exact)"; a switch that is exact but no finite decimal as its
// fraction beside the rounded decimal, "= 41/380 (exact; ≈ 0.107895)"; an
// approximate one rounded, "≈ 0.107895 (approximate, to 34 decimal
// places)".
func (f beFormat) point(sw eval.Switch) string {
	switch {
	case !sw.Exact:
		return fmt.Sprintf("≈ %s (approximate, to %d decimal places)", f.rounded(sw.At), compiled.DivisionScale)
	case sw.IsDecimal() || sw.Fraction == nil:
		return "= " + f.full(sw.At) + " (exact)"
	}
	if fr := sw.Fraction.RatString(); len(fr) <= maxFraction {
		return fmt.Sprintf("= %s (exact; ≈ %s)", fr, f.rounded(sw.At))
	}
	return fmt.Sprintf("≈ %s (exact as a fraction too long to show: see the JSON report)", f.rounded(sw.At))
}

// rounded is x as the report rounds it: a percent to 4 decimals, a number
// to 6.
func (f beFormat) rounded(x decimal.Decimal) string {
	if f.prob {
		return render.Percent(x, 4)
	}
	return render.Grouped(x.Round(6).String())
}

// full is x with every digit it has.
func (f beFormat) full(x decimal.Decimal) string {
	if f.prob {
		return x.Shift(2).String() + "%"
	}
	return render.Grouped(x.String())
}

// WriteText writes the search, each switch with every option's value
// there, and the best option over the range.
func (r *BreakevenReport) WriteText(out io.Writer) error {
	w := newTextOut(out)
	m, be := r.Model.Source(), r.Result
	note := r.Options.Names.Apply
	cur := m.Currency
	money := func(d decimal.Decimal) string { return render.Money(d, cur) }
	f := inputFormat(m, be)
	if m.Title != "" {
		w.ln(m.Title)
	}
	w.f("breakeven of %s, now %s, over %s .. %s\n", be.What, f.show(be.Current, true), f.show(be.Low, true), f.show(be.High, true))
	w.f("watching decision %s%s", quoted(be.Decision.Display()), afterPath(be.Path))
	w.ln()
	if be.Adjust != "" {
		w.f("as it moves, %s\n", be.Adjust)
	}
	for _, n := range be.Notes {
		w.f("note: %s\n", note(n))
	}
	writeMeans(w, r.Model)
	w.ln()
	name := be.Vary.String()
	if len(be.Switches) == 0 {
		w.f("No switch: %s is best over the whole range.\n", quoted(be.Options[be.Segments[0].Best]))
	}
	for _, sw := range be.Switches {
		w.f("Switch at %s %s: %s below, %s above\n", name, f.point(sw), quoted(be.Options[sw.Below]), quoted(be.Options[sw.Above]))
		var rows [][]string
		for j, o := range be.Options {
			rows = append(rows, []string{o, money(sw.Values[j])})
		}
		textTable(w, "    ", 3, []bool{false, true}, rows)
	}
	w.ln()
	w.ln("Best option over the range")
	var rows [][]string
	for _, sg := range be.Segments {
		rows = append(rows, []string{f.show(sg.From, true), "..", f.show(sg.To, true), "  " + be.Options[sg.Best]})
	}
	textTable(w, "  ", 1, []bool{true, false, true, false}, rows)
	if len(be.Switches) > 0 {
		w.ln("(at a switch the options tie; ties go to the first option in the model)")
	}
	return w.Flush()
}

type breakevenJSON struct {
	Title     string        `json:"title,omitempty"`
	Objective string        `json:"objective"`
	Currency  string        `json:"currency,omitempty"`
	Vary      string        `json:"vary"`
	Kind      string        `json:"kind"`
	What      string        `json:"what"`
	Current   string        `json:"current"`
	Low       string        `json:"low"`
	High      string        `json:"high"`
	Narrowed  bool          `json:"narrowed"`
	Adjust    string        `json:"adjust,omitempty"`
	Decision  string        `json:"decision"`
	Path      []string      `json:"path"`
	Options   []string      `json:"options"`
	Switches  []switchJSON  `json:"switches"`
	Segments  []segmentJSON `json:"segments"`
	Means     []meanJSON    `json:"means,omitempty"`
	Notes     []string      `json:"notes"`
}

type switchJSON struct {
	At       string        `json:"at"`
	Exact    bool          `json:"exact"`
	Fraction string        `json:"fraction,omitempty"`
	Below    string        `json:"below"`
	Above    string        `json:"above"`
	Values   []optionValue `json:"values"`
}

type optionValue struct {
	Option string `json:"option"`
	Value  string `json:"value"`
}

type segmentJSON struct {
	From string `json:"from"`
	To   string `json:"to"`
	Best string `json:"best"`
}

// WriteJSON writes the search in the shape described on BreakevenReport.
func (r *BreakevenReport) WriteJSON(w io.Writer) error { return writeJSON(w, r.shape()) }

// MarshalJSON is WriteJSON's document, compact.
func (r *BreakevenReport) MarshalJSON() ([]byte, error) { return marshalJSON(r.WriteJSON) }

func (r *BreakevenReport) shape() breakevenJSON {
	m, be := r.Model.Source(), r.Result
	kind := map[eval.VaryKind]string{eval.VaryParam: "parameter", eval.VaryState: "state", eval.VaryBranch: "branch"}[be.Vary.Kind]
	out := breakevenJSON{Title: m.Title, Objective: m.Objective.String(), Currency: m.Currency,
		Vary: be.Vary.String(), Kind: kind, What: be.What, Current: be.Current.String(),
		Low: be.Low.String(), High: be.High.String(), Narrowed: be.Narrowed, Adjust: be.Adjust,
		Decision: be.Decision.Display(), Path: append([]string{}, be.Path...), Options: be.Options,
		Switches: []switchJSON{}, Segments: []segmentJSON{}, Notes: []string{}}
	out.Means = meansNonEmpty(r.Model)
	for _, n := range be.Notes {
		out.Notes = append(out.Notes, r.Options.Names.Apply(n))
	}
	for _, sw := range be.Switches {
		sj := switchJSON{At: sw.At.String(), Exact: sw.Exact, Below: be.Options[sw.Below], Above: be.Options[sw.Above]}
		if sw.Exact && sw.Fraction != nil {
			sj.Fraction = sw.Fraction.RatString()
		}
		for j, o := range be.Options {
			sj.Values = append(sj.Values, optionValue{Option: o, Value: sw.Values[j].String()})
		}
		out.Switches = append(out.Switches, sj)
	}
	for _, sg := range be.Segments {
		out.Segments = append(out.Segments, segmentJSON{From: sg.From.String(), To: sg.To.String(), Best: be.Options[sg.Best]})
	}
	return out
}
