package report

import (
	"fmt"
	"io"
	"strings"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/render"
	"github.com/forkcast/forkcast/render/chart"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// SensitivityOptions say how the sensitivity report is worded.
type SensitivityOptions struct {
	// Names renames the library options that the analysis's notes
	// mention.
	Names OptionNames
}

// SensitivityReport is the report of a one-way sensitivity analysis: for
// every input varied, largest swing first, its range, the expected value
// at each end with every decision re-optimised, the swing, where the best
// option changes, and the value of the base case's policy held fixed.
// Tornado and Spider give its charts.
//
// Its JSON shape (every figure an exact decimal string):
//
//	{"title", "objective", "currency",
//	 "base",                         the expected value, every input at base
//	 "at",                           the decision whose value it is, or null for the root
//	 "decision", "path": [...], "options": [...], "base_best",
//	                                 the decision watched for changes (null without one)
//	 "exact",
//	 "inputs": [{"name", "kind" ("parameter", "state" or "branch"), "what",
//	             "range" ("own", "given", "percent" or "full"), "narrowed", "adjust",
//	             "low", "base", "high",
//	             "value_low", "value_high", "swing",
//	             "fixed_low", "fixed_high",   the base policy held fixed
//	             "best_low", "best_high",     the best option at each end, or null
//	             "switches": [{"at", "exact", "fraction", "below", "above"}],
//	             "curve": [{"x", "value"}],
//	             "notes": [...]}],
//	 "samples", "notes": [...]}
type SensitivityReport struct {
	// Model is the compiled model analysed.
	Model   *compiled.Model
	Result  *eval.Sensitivity
	Options SensitivityOptions
}

// Sensitivity is the report of s, a sensitivity analysis of c
// (eval.AnalyseSensitivity).
func Sensitivity(c *compiled.Model, s *eval.Sensitivity, opts SensitivityOptions) *SensitivityReport {
	return &SensitivityReport{Model: c, Result: s, Options: opts}
}

// valueWords name the figure for the objective.
type valueWords struct {
	value string // "expected value" or "expected cost"
	short string // "EV" or "cost", in table headings
}

func wordsOf(obj tree.Objective) valueWords {
	if obj == tree.Min {
		return valueWords{value: "expected cost", short: "cost"}
	}
	return valueWords{value: "expected value", short: "EV"}
}

// showInput writes a value of an input: a probability as a percentage,
// anything else grouped; one that the display rounds gets ≈.
func showInput(x decimal.Decimal, prob bool) string {
	if prob {
		p := x.Shift(2)
		s := render.Percent(x, 4)
		if !p.Round(4).Equal(p) {
			return "≈" + s
		}
		return s
	}
	r := x.Round(6)
	s := render.Grouped(r.String())
	if !r.Equal(x) {
		return "≈" + s
	}
	return s
}

// gain is how much better value is than fixed, in the objective's terms.
func gain(obj tree.Objective, value, fixed decimal.Decimal) decimal.Decimal {
	return obj.Net(value).Sub(obj.Net(fixed))
}

// WriteText writes the analysis: a table of the inputs by swing, where the
// best option changes, and what re-deciding is worth.
func (r *SensitivityReport) WriteText(out io.Writer) error {
	w := newTextOut(out)
	m, s := r.Model.Source(), r.Result
	note := r.Options.Names.Apply
	cur := m.Currency
	words := wordsOf(s.Objective)
	if m.Title != "" {
		w.ln(m.Title)
	}
	of := ""
	if s.At {
		of = " of decision " + quoted(s.Decision.Display())
	}
	w.f("one-way sensitivity of the %s%s: %s with every input at its base value\n", words.value, of, render.Money(s.Base, cur))
	if s.Decision != nil {
		w.f("watching decision %s%s", quoted(s.Decision.Display()), afterPath(s.Path))
		w.f(" for changes of the best option, now %s\n", quoted(s.Options[s.BaseBest]))
	}
	if !s.Exact {
		w.f("note: a fraction was rounded at %d decimal places; the figures are exact to that precision\n", compiled.DivisionScale)
	}
	for _, n := range s.Notes {
		w.f("note: %s\n", note(n))
	}
	writeMeans(w, r.Model)
	w.ln()
	if s.Decision != nil {
		w.f("Inputs by swing, largest first (%s at each end, every decision re-optimised)\n", words.value)
	} else {
		w.f("Inputs by swing, largest first (%s at each end)\n", words.value)
	}
	rows := [][]string{{"input", "low", "base", "high", words.short + " at low", words.short + " at high", "swing"}}
	for _, in := range s.Inputs {
		rows = append(rows, []string{in.Vary.String(), showInput(in.Low, in.Probability), showInput(in.Base, in.Probability), showInput(in.High, in.Probability),
			render.Amount(in.ValueLow, cur), render.Amount(in.ValueHigh, cur), render.Amount(in.Swing, cur)})
	}
	textTable(w, "  ", 3, []bool{false, true, true, true, true, true, true}, rows)
	for _, in := range s.Inputs {
		for _, n := range in.Notes {
			w.f("note: %s: %s\n", in.Vary, note(n))
		}
	}
	if s.Decision != nil {
		w.ln()
		w.f("Where the best option at %s changes\n", quoted(s.Decision.Display()))
		var still []string
		for _, in := range s.Inputs {
			if len(in.Switches) == 0 {
				still = append(still, in.Vary.String())
				continue
			}
			for _, sw := range in.Switches {
				exact := "exact"
				if !sw.Exact {
					exact = fmt.Sprintf("approximate, to %d decimal places", compiled.DivisionScale)
				} else if !sw.IsDecimal() {
					exact = "exact: " + sw.Fraction.RatString()
				}
				w.f("  %s = %s (%s): %s below, %s above\n", in.Vary, showInput(sw.At, in.Probability), exact,
					quoted(s.Options[sw.Below]), quoted(s.Options[sw.Above]))
			}
		}
		if len(still) > 0 {
			w.f("  no change over the range: %s\n", strings.Join(still, ", "))
		}
		w.ln()
		w.f("The base case's policy held fixed (at %s: %s)\n", quoted(s.Decision.Display()), quoted(s.Options[s.BaseBest]))
		rows := [][]string{{"input", words.short + " at low", words.short + " at high", "re-deciding gains at low", "at high"}}
		for _, in := range s.Inputs {
			gl, gh := gain(s.Objective, in.ValueLow, in.FixedLow), gain(s.Objective, in.ValueHigh, in.FixedHigh)
			if gl.IsZero() && gh.IsZero() {
				continue
			}
			rows = append(rows, []string{in.Vary.String(), render.Amount(in.FixedLow, cur), render.Amount(in.FixedHigh, cur),
				render.Amount(gl, cur), render.Amount(gh, cur)})
		}
		if len(rows) == 1 {
			w.ln("  re-deciding gains nothing at either end of any range: the base policy stays best there")
		} else {
			textTable(w, "  ", 3, []bool{false, true, true, true, true}, rows)
			w.ln("  (inputs not listed: the base policy stays best at both ends)")
		}
	}
	return w.Flush()
}

type sensitivityJSON struct {
	Title     string      `json:"title,omitempty"`
	Objective string      `json:"objective"`
	Currency  string      `json:"currency,omitempty"`
	Base      string      `json:"base"`
	At        *string     `json:"at"`
	Decision  *string     `json:"decision"`
	Path      []string    `json:"path"`
	Options   []string    `json:"options"`
	BaseBest  *string     `json:"base_best"`
	Exact     bool        `json:"exact"`
	Inputs    []inputJSON `json:"inputs"`
	Samples   int         `json:"samples"`
	Means     []meanJSON  `json:"means,omitempty"`
	Notes     []string    `json:"notes"`
}

type inputJSON struct {
	Name      string           `json:"name"`
	Kind      string           `json:"kind"`
	What      string           `json:"what"`
	Range     string           `json:"range"`
	Narrowed  bool             `json:"narrowed"`
	Adjust    string           `json:"adjust,omitempty"`
	Low       string           `json:"low"`
	Base      string           `json:"base"`
	High      string           `json:"high"`
	ValueLow  string           `json:"value_low"`
	ValueHigh string           `json:"value_high"`
	Swing     string           `json:"swing"`
	FixedLow  string           `json:"fixed_low"`
	FixedHigh string           `json:"fixed_high"`
	BestLow   *string          `json:"best_low"`
	BestHigh  *string          `json:"best_high"`
	Switches  []sensSwitchJSON `json:"switches"`
	Curve     []curveJSON      `json:"curve"`
	Notes     []string         `json:"notes"`
}

type sensSwitchJSON struct {
	At       string `json:"at"`
	Exact    bool   `json:"exact"`
	Fraction string `json:"fraction,omitempty"`
	Below    string `json:"below"`
	Above    string `json:"above"`
}

type curveJSON struct {
	X     string `json:"x"`
	Value string `json:"value"`
}

// varyKind names the kind of input in JSON.
func varyKind(v eval.Vary) string {
	return map[eval.VaryKind]string{eval.VaryParam: "parameter", eval.VaryState: "state", eval.VaryBranch: "branch"}[v.Kind]
}

func rangeName(r eval.RangeFrom) string {
	return map[eval.RangeFrom]string{eval.RangeOwn: "own", eval.RangeGiven: "given", eval.RangePercent: "percent", eval.RangeFull: "full"}[r]
}

// option is the label of option i, or nil when i < 0.
func option(opts []string, i int) *string {
	if i < 0 || i >= len(opts) {
		return nil
	}
	return &opts[i]
}

// WriteJSON writes the analysis in the shape described on
// SensitivityReport.
func (r *SensitivityReport) WriteJSON(w io.Writer) error { return writeJSON(w, r.shape()) }

// MarshalJSON is WriteJSON's document, compact.
func (r *SensitivityReport) MarshalJSON() ([]byte, error) { return marshalJSON(r.WriteJSON) }

func (r *SensitivityReport) shape() sensitivityJSON {
	m, s := r.Model.Source(), r.Result
	note := r.Options.Names.Apply
	out := sensitivityJSON{Title: m.Title, Objective: m.Objective.String(), Currency: m.Currency, Base: s.Base.String(),
		Path: append([]string{}, s.Path...), Options: append([]string{}, s.Options...), BaseBest: option(s.Options, s.BaseBest),
		Exact: s.Exact, Inputs: []inputJSON{}, Samples: s.Samples, Notes: []string{}}
	out.Means = meansNonEmpty(r.Model)
	if s.Decision != nil {
		d := s.Decision.Display()
		out.Decision = &d
		if s.At {
			out.At = &d
		}
	}
	for _, n := range s.Notes {
		out.Notes = append(out.Notes, note(n))
	}
	for _, in := range s.Inputs {
		ij := inputJSON{Name: in.Vary.String(), Kind: varyKind(in.Vary), What: in.What, Range: rangeName(in.From), Narrowed: in.Narrowed, Adjust: in.Adjust,
			Low: in.Low.String(), Base: in.Base.String(), High: in.High.String(),
			ValueLow: in.ValueLow.String(), ValueHigh: in.ValueHigh.String(), Swing: in.Swing.String(),
			FixedLow: in.FixedLow.String(), FixedHigh: in.FixedHigh.String(),
			BestLow: option(s.Options, in.BestLow), BestHigh: option(s.Options, in.BestHigh),
			Switches: []sensSwitchJSON{}, Curve: []curveJSON{}, Notes: []string{}}
		ij.Switches = switchesShape(s.Options, in.Switches)
		for _, p := range in.Curve {
			ij.Curve = append(ij.Curve, curveJSON{X: p.X.String(), Value: p.Value.String()})
		}
		for _, n := range in.Notes {
			ij.Notes = append(ij.Notes, note(n))
		}
		out.Inputs = append(out.Inputs, ij)
	}
	return out
}

// valueAxis is the axis of the expected value (or cost) in a chart.
func valueAxis(m *tree.Model, obj tree.Objective) chart.Axis {
	label := "Expected value"
	if obj == tree.Min {
		label = "Expected cost"
	}
	if m.Currency != "" {
		label += " (" + m.Currency + ")"
	}
	return chart.Axis{Label: label}
}

// f64 is a decimal as a chart's float64.
func f64(d decimal.Decimal) float64 { return d.InexactFloat64() }

// Tornado is the analysis as a tornado diagram: one bar per input from its
// value at low to its value at high, largest swing on top, its ends
// labelled with the input's low and high values, a mark where the best
// option changes (labelled with the input's value there). At most
// chart.MaxBars inputs, the largest swings, are drawn.
func (r *SensitivityReport) Tornado() chart.Tornado {
	m, s := r.Model.Source(), r.Result
	t := chart.Tornado{Title: chartTitle(m, "What the "+wordsOf(s.Objective).value+" hangs on"), Value: valueAxis(m, s.Objective), Base: f64(s.Base), KeepOrder: true}
	for k, in := range s.Inputs {
		if k == chart.MaxBars {
			break
		}
		b := chart.Bar{Label: in.Vary.String(), Start: f64(in.ValueLow), End: f64(in.ValueHigh),
			StartLabel: showInput(in.Low, in.Probability), EndLabel: showInput(in.High, in.Probability)}
		for _, sw := range in.Switches {
			if v, ok := curveAt(in.Curve, sw.At); ok {
				b.Marks = append(b.Marks, chart.Mark{At: f64(v), Label: showInput(sw.At, in.Probability)})
			}
		}
		t.Bars = append(t.Bars, b)
	}
	return t
}

// Spider is the analysis as a spider diagram: the expected value against
// each input's change from its base value, one line per input (at most
// chart.MaxSeries, the largest swings, in swing order; an input whose
// range is a single value has no line), switches marked. The change is in
// percent of base, or in percent of the range when some input's base is 0.
func (r *SensitivityReport) Spider() chart.Spider {
	m, s := r.Model.Source(), r.Result
	sp := chart.Spider{Title: chartTitle(m, "How the "+wordsOf(s.Objective).value+" moves with each input"), Value: valueAxis(m, s.Objective), Base: f64(s.Base)}
	for _, in := range s.Inputs {
		if in.Base.IsZero() {
			sp.Change = chart.PercentOfRange
		}
	}
	for _, in := range s.Inputs {
		if len(sp.Lines) == chart.MaxSeries {
			break
		}
		if !in.High.GreaterThan(in.Low) || len(in.Curve) < 2 {
			continue
		}
		l := chart.SpiderLine{Label: in.Vary.String(), Base: f64(in.Base), Low: f64(in.Low), High: f64(in.High)}
		for _, p := range in.Curve {
			l.Points = append(l.Points, chart.Point{X: f64(p.X), Y: f64(p.Value)})
		}
		for _, sw := range in.Switches {
			l.Switches = append(l.Switches, f64(sw.At))
		}
		sp.Lines = append(sp.Lines, l)
	}
	return sp
}

// curveAt is the value on a curve at x, when x is one of its points.
func curveAt(c []eval.CurvePoint, x decimal.Decimal) (decimal.Decimal, bool) {
	for _, p := range c {
		if p.X.Equal(x) {
			return p.Value, true
		}
	}
	return decimal.Zero, false
}

// chartTitle is the model's title, or what the chart shows when it has
// none.
func chartTitle(m *tree.Model, what string) string {
	if m.Title != "" {
		return m.Title + ": " + lowerFirst(what)
	}
	return what
}

func lowerFirst(s string) string {
	if s == "" {
		return s
	}
	return strings.ToLower(s[:1]) + s[1:]
}
