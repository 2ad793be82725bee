package report

import (
	"encoding/csv"
	"fmt"
	"io"
	"strings"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/render"
	"github.com/forkcast/forkcast/render/chart"
	"github.com/forkcast/forkcast/tree"
)

// SweepOptions say how the reports of sweeps and strategy maps are
// worded.
type SweepOptions struct {
	// Names renames the library options that the notes mention.
	Names OptionNames
}

// SweepReport is the report of a one-way sweep: every option's value at
// the watched decision over a grid of the input, the best option at each
// point, and where the best option changes. WriteCSV gives the grid as a
// table for a spreadsheet, Chart its chart.
//
// Its JSON shape (every figure an exact decimal string):
//
//	{"title", "objective", "currency",
//	 "input": {"name", "kind", "what", "range", "current", "low", "high", "narrowed", "adjust"},
//	 "decision", "path": [...], "options": [...],
//	 "points": [{"x", "values": [...], "best": [...]}],   values in the order of options;
//	                                                       best: the optimal options (several on a tie)
//	 "switches": [{"at", "exact", "fraction", "below", "above"}],
//	 "segments": [{"from", "to", "best"}],
//	 "exact", "samples", "notes": [...]}
type SweepReport struct {
	// Model is the compiled model swept.
	Model   *compiled.Model
	Result  *eval.Sweep
	Options SweepOptions
}

// Sweep is the report of sw, a sweep of c (eval.SweepInput).
func Sweep(c *compiled.Model, sw *eval.Sweep, opts SweepOptions) *SweepReport {
	return &SweepReport{Model: c, Result: sw, Options: opts}
}

// axisHeading says what an input is, its value and its range.
func axisHeading(ax eval.SweepAxis) string {
	return fmt.Sprintf("%s, now %s, over %s .. %s", ax.What, showInput(ax.Current, ax.Probability), showInput(ax.Low, ax.Probability), showInput(ax.High, ax.Probability))
}

// watching writes which decision is watched.
func watching(w textOut, d *tree.Node, path []string) {
	w.f("watching decision %s%s", quoted(d.Display()), afterPath(path))
	w.ln()
}

// bestText names the optimal options, tied ones joined by " = ".
func bestText(opts []string, best []int) string {
	names := make([]string, len(best))
	for i, b := range best {
		names[i] = opts[b]
	}
	return strings.Join(names, " = ")
}

// WriteText writes the grid as a table, then the switches.
func (r *SweepReport) WriteText(out io.Writer) error {
	w := newTextOut(out)
	m, sw := r.Model.Source(), r.Result
	note := r.Options.Names.Apply
	cur := m.Currency
	if m.Title != "" {
		w.ln(m.Title)
	}
	w.f("sweep of %s in %d steps\n", axisHeading(sw.Input), len(sw.Input.Values)-1)
	watching(w, sw.Decision, sw.Path)
	if sw.Input.Adjust != "" {
		w.f("as it moves, %s\n", sw.Input.Adjust)
	}
	if !sw.Exact {
		w.f("note: a fraction was rounded at %d decimal places; the figures are exact to that precision\n", compiled.DivisionScale)
	}
	for _, n := range sw.Notes {
		w.f("note: %s\n", note(n))
	}
	writeMeans(w, r.Model)
	w.ln()
	w.f("Each option's %s, its own cash included (%s), and the best\n", wordsOf(sw.Objective).value, cur)
	head := append(append([]string{sw.Input.Vary.String()}, sw.Options...), "best")
	rows := [][]string{head}
	right := []bool{true}
	for range sw.Options {
		right = append(right, true)
	}
	for k, x := range sw.Input.Values {
		row := []string{showInput(x, sw.Input.Probability)}
		for _, v := range sw.Values[k] {
			row = append(row, render.Amount(v, cur))
		}
		rows = append(rows, append(row, bestText(sw.Options, sw.Best[k])))
	}
	textTable(w, "  ", 3, right, rows)
	w.ln()
	writeSwitches(w, sw.Input, sw.Options, sw.Switches)
	return w.Flush()
}

// writeSwitches lists where the best option changes.
func writeSwitches(w textOut, ax eval.SweepAxis, options []string, sws []eval.Switch) {
	if len(sws) == 0 {
		w.ln("The best option does not change over the range.")
		return
	}
	w.ln("Where the best option changes")
	for _, sw := range sws {
		exact := "exact"
		if !sw.Exact {
			exact = fmt.Sprintf("approximate, to %d decimal places", compiled.DivisionScale)
		} else if !sw.IsDecimal() {
			exact = "exact: " + sw.Fraction.RatString()
		}
		w.f("  %s = %s (%s): %s below, %s above\n", ax.Vary, showInput(sw.At, ax.Probability), exact, quoted(options[sw.Below]), quoted(options[sw.Above]))
	}
}

// WriteCSV writes the grid as comma-separated values: a heading row (the
// input, each option, "best"), then one row per grid point with exact
// decimal strings and the best option (tied ones joined by " = ").
func (r *SweepReport) WriteCSV(w io.Writer) error {
	sw := r.Result
	cw := csv.NewWriter(w)
	_ = cw.Write(append(append([]string{sw.Input.Vary.String()}, sw.Options...), "best"))
	for k, x := range sw.Input.Values {
		row := []string{x.String()}
		for _, v := range sw.Values[k] {
			row = append(row, v.String())
		}
		_ = cw.Write(append(row, bestText(sw.Options, sw.Best[k])))
	}
	cw.Flush()
	return cw.Error()
}

type axisJSON struct {
	Name     string   `json:"name"`
	Kind     string   `json:"kind"`
	What     string   `json:"what"`
	Range    string   `json:"range"`
	Current  string   `json:"current"`
	Low      string   `json:"low"`
	High     string   `json:"high"`
	Narrowed bool     `json:"narrowed"`
	Adjust   string   `json:"adjust,omitempty"`
	Values   []string `json:"values,omitempty"`
}

func axisShape(ax eval.SweepAxis, values bool) axisJSON {
	a := axisJSON{Name: ax.Vary.String(), Kind: varyKind(ax.Vary), What: ax.What, Range: rangeName(ax.From),
		Current: ax.Current.String(), Low: ax.Low.String(), High: ax.High.String(), Narrowed: ax.Narrowed, Adjust: ax.Adjust}
	if values {
		for _, v := range ax.Values {
			a.Values = append(a.Values, v.String())
		}
	}
	return a
}

type sweepJSON struct {
	Title     string           `json:"title,omitempty"`
	Objective string           `json:"objective"`
	Currency  string           `json:"currency,omitempty"`
	Input     axisJSON         `json:"input"`
	Decision  string           `json:"decision"`
	Path      []string         `json:"path"`
	Options   []string         `json:"options"`
	Points    []sweepPointJSON `json:"points"`
	Switches  []sensSwitchJSON `json:"switches"`
	Segments  []segmentJSON    `json:"segments"`
	Exact     bool             `json:"exact"`
	Samples   int              `json:"samples"`
	Means     []meanJSON       `json:"means,omitempty"`
	Notes     []string         `json:"notes"`
}

type sweepPointJSON struct {
	X      string   `json:"x"`
	Values []string `json:"values"`
	Best   []string `json:"best"`
}

// WriteJSON writes the sweep in the shape described on SweepReport.
func (r *SweepReport) WriteJSON(w io.Writer) error { return writeJSON(w, r.shape()) }

// MarshalJSON is WriteJSON's document, compact.
func (r *SweepReport) MarshalJSON() ([]byte, error) { return marshalJSON(r.WriteJSON) }

func (r *SweepReport) shape() sweepJSON {
	m, sw := r.Model.Source(), r.Result
	out := sweepJSON{Title: m.Title, Objective: m.Objective.String(), Currency: m.Currency, Input: axisShape(sw.Input, false),
		Decision: sw.Decision.Display(), Path: append([]string{}, sw.Path...), Options: sw.Options,
		Points: []sweepPointJSON{}, Switches: switchesShape(sw.Options, sw.Switches), Segments: []segmentJSON{},
		Exact: sw.Exact, Samples: sw.Samples, Notes: []string{}}
	out.Means = meansNonEmpty(r.Model)
	for k, x := range sw.Input.Values {
		p := sweepPointJSON{X: x.String(), Best: []string{}}
		for _, v := range sw.Values[k] {
			p.Values = append(p.Values, v.String())
		}
		for _, b := range sw.Best[k] {
			p.Best = append(p.Best, sw.Options[b])
		}
		out.Points = append(out.Points, p)
	}
	for _, sg := range sw.Segments {
		out.Segments = append(out.Segments, segmentJSON{From: sg.From.String(), To: sg.To.String(), Best: sw.Options[sg.Best]})
	}
	for _, n := range sw.Notes {
		out.Notes = append(out.Notes, r.Options.Names.Apply(n))
	}
	return out
}

func switchesShape(options []string, sws []eval.Switch) []sensSwitchJSON {
	out := []sensSwitchJSON{}
	for _, sw := range sws {
		sj := sensSwitchJSON{At: sw.At.String(), Exact: sw.Exact, Below: options[sw.Below], Above: options[sw.Above]}
		if sw.Exact {
			sj.Fraction = sw.Fraction.RatString()
		}
		out = append(out, sj)
	}
	return out
}

// inputAxis is a chart axis for an input.
func inputAxis(ax eval.SweepAxis) chart.Axis {
	return chart.Axis{Label: ax.Vary.String(), Percent: ax.Probability}
}

// Chart is the sweep as a chart: one line per option, the best option's
// envelope, each switch marked with the input's value there.
func (r *SweepReport) Chart() chart.Sweep {
	m, sw := r.Model.Source(), r.Result
	c := chart.Sweep{Title: chartTitle(m, "Each option's "+wordsOf(sw.Objective).value+" at "+quoted(sw.Decision.Display())),
		Input: inputAxis(sw.Input), Value: valueAxis(m, sw.Objective), Minimise: sw.Objective == tree.Min}
	for _, x := range sw.Input.Values {
		c.X = append(c.X, f64(x))
	}
	for j, o := range sw.Options {
		cv := chart.Curve{Label: o}
		for k := range sw.Input.Values {
			cv.Values = append(cv.Values, f64(sw.Values[k][j]))
		}
		c.Options = append(c.Options, cv)
	}
	for _, s := range sw.Switches {
		c.Switches = append(c.Switches, chart.Mark{At: f64(s.At), Label: showInput(s.At, sw.Input.Probability)})
	}
	return c
}
