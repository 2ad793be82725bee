package report

import (
	"bytes"
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/render"
	"github.com/forkcast/forkcast/render/chart"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// SimulateOptions say how the simulation report is worded.
type SimulateOptions struct {
	// Names renames the library options that the simulation's notes
	// mention.
	Names OptionNames
	// Rerun is the command that reproduces the simulation, shown beside
	// the seed (empty: none is shown).
	Rerun string
}

// SimulateReport is the report of a Monte Carlo simulation: the
// distributions drawn, and for each option of the watched decision its
// payoff's mean with the standard error, SD, percentiles, the share of
// runs with a loss and the share in which it is best with the inputs
// known; then the expected value of knowing the inputs before deciding.
// Histogram and Cumulative give its charts; WriteDraws every run's draws
// as CSV.
//
// Its JSON shape (simulated figures are JSON numbers, float64; exact
// figures decimal strings):
//
//	{"title", "objective", "currency",
//	 "runs", "asked", "stopped", "seed",
//	 "drawn": "paths" or "inputs",  paths walked, or inputs only
//	 "decision" (absent when the tree has no decision), "path": [...],
//	 "inputs": [{"name" ("" inside a calculation), "written" (as in the model),
//	             "distribution" (its arguments evaluated), "mean", "mean_exact"}],
//	 "options": [{"label", "base", "at_means",
//	              "mean", "stderr", "sd", "min", "max",
//	              "percentiles": {"P5", "P10", "P20", …, "P80", "P90", "P95"},
//	              "p_loss", "p_best"}],   one option, "label" "", and no "p_best" with no decision
//	 "value_of_knowing_inputs": {"mean", "stderr"},   absent with no decision
//	 "notes": [...]}
//
// Figures are in the objective's terms (a payoff under max, a cost under
// min); "p_loss" is the share of runs whose net value is below zero.
type SimulateReport struct {
	Result  *eval.Simulation
	Options SimulateOptions
}

// Simulate is the report of s.
func Simulate(s *eval.Simulation, opts SimulateOptions) *SimulateReport {
	return &SimulateReport{Result: s, Options: opts}
}

// simFigure formats a simulated amount for text: rounded to the
// currency's minor unit, grouped.
func simFigure(x float64, cur string) string {
	return render.Amount(decimal.NewFromFloat(x), cur)
}

// share formats a proportion of runs as a percentage with one decimal.
func share(p float64) string {
	return strconv.FormatFloat(100*p, 'f', 1, 64) + "%"
}

// WriteText writes the inputs drawn, the options' figures and
// percentiles, and the value of knowing the inputs.
func (r *SimulateReport) WriteText(out io.Writer) error {
	w := newTextOut(out)
	s := r.Result
	m := s.Model
	cur := m.Currency
	min := s.Objective == tree.Min
	if m.Title != "" {
		w.ln(m.Title)
	}
	w.f("objective:  %s\n", objectiveText(m))
	w.f("simulated:  %s runs, seed %d", render.Grouped(strconv.Itoa(s.Runs)), s.Seed)
	if s.Stopped {
		w.f(" (stopped early: %s were asked for)", render.Grouped(strconv.Itoa(s.Asked)))
	}
	if r.Options.Rerun != "" {
		w.f("; %s gives the same figures", r.Options.Rerun)
	}
	w.ln()
	switch {
	case s.InputsOnly && s.Decision == nil:
		w.ln("drawn:      the distributions only; the tree's payoff is its expected value")
		w.ln("            over the chance outcomes")
	case s.InputsOnly:
		w.ln("drawn:      the distributions only; each option's payoff is its expected value")
		w.ln("            over the chance outcomes, the base-case policy followed after it")
	case s.Decision == nil:
		w.ln("drawn:      the distributions and every chance outcome, one path a run")
	default:
		w.ln("drawn:      the distributions and every chance outcome, one path a run, the")
		w.ln("            base-case policy followed after each option")
	}
	if s.Decision == nil {
		w.ln("watching:   the whole tree (it has no decision)")
	} else {
		w.f("watching:   decision %s%s", quoted(s.Decision.Display()), afterPath(s.Path))
		w.ln()
	}
	for _, n := range s.Notes {
		w.f("note: %s\n", r.Options.Names.Apply(n))
	}
	if len(s.Inputs) > 0 {
		w.ln()
		w.ln("Distributions drawn (exact analyses use their means)")
		var rows [][]string
		for _, in := range s.Inputs {
			name := in.Name
			if name == "" {
				name = "(unnamed)" // written inside a calculation
			}
			mean := render.Grouped(in.Mean.String())
			if !in.MeanExact {
				mean = "≈" + render.Grouped(in.Mean.Round(6).String())
			}
			rows = append(rows, []string{name, in.Written, "mean " + mean})
		}
		textTable(w, "  ", 3, []bool{false, false, false}, rows)
	}

	w.ln()
	what := "Payoff"
	if min {
		what = "Cost"
	}
	unit := ""
	if cur != "" {
		unit = " (" + cur + ")"
	}
	whole := s.Decision == nil
	if whole {
		w.f("%s of the whole tree%s\n", what, unit)
	} else {
		w.f("%s of each option%s; * the base-case choice\n", what, unit)
	}
	head := []string{"", "at the means", "mean", "± s.e.", "SD"}
	right := []bool{false, true, true, true, true}
	if !min {
		head, right = append(head, "P(loss)"), append(right, true)
	}
	if !whole {
		head, right = append(head, "P(best)"), append(right, true)
	}
	rows := [][]string{head}
	for _, o := range s.Options {
		mark := "  "
		if o.Base && !whole {
			mark = "* "
		}
		row := []string{mark + r.optionName(o), render.Amount(o.AtMeans, cur), simFigure(o.Sample.Mean(), cur),
			simFigure(o.Sample.StdErr(), cur), simFigure(o.Sample.SD(), cur)}
		if !min {
			row = append(row, share(o.PLoss))
		}
		if !whole {
			row = append(row, share(o.PBest))
		}
		rows = append(rows, row)
	}
	textTable(w, "  ", 3, right, rows)
	if whole {
		w.ln("  No P(best) and no value of knowing the inputs: the tree has no decision for")
		w.ln("  them to inform.")
	} else {
		w.ln("  P(best): the share of runs in which the option is best when the decision")
		w.ln("  is made knowing that run's inputs (ties go to the first option)")
	}

	w.ln()
	w.f("Percentiles: the %s at or below which that share of runs fell\n", strings.ToLower(what))
	head = []string{""}
	right = []bool{false}
	for _, o := range s.Options {
		head, right = append(head, r.optionName(o)), append(right, true)
	}
	rows = [][]string{head}
	for _, lv := range eval.Percentiles {
		row := []string{fmt.Sprintf("P%d", lv)}
		for _, o := range s.Options {
			row = append(row, simFigure(o.Sample.Percentile(float64(lv)/100), cur))
		}
		rows = append(rows, row)
	}
	textTable(w, "  ", 3, right, rows)

	if !whole {
		w.ln()
		w.f("Value of knowing the inputs before deciding: %s ± %s (s.e.)\n",
			simFigure(s.KnowInputs.Mean, cur), simFigure(s.KnowInputs.StdErr, cur))
		w.ln("  the mean gain of choosing with each run's inputs known over the base-case choice")
	}
	w.ln()
	w.ln("Simulated figures are float64 and carry sampling error; \"at the means\" is the")
	w.ln("exact expected value with every distribution at its mean, as solve reports it.")
	return w.Flush()
}

// simPercentilesJSON writes P5 … P95 in ascending order (a map would sort
// its keys as text, P10 before P5).
type simPercentilesJSON []float64

func (p simPercentilesJSON) MarshalJSON() ([]byte, error) {
	var b bytes.Buffer
	b.WriteByte('{')
	for i, v := range p {
		if i > 0 {
			b.WriteByte(',')
		}
		fmt.Fprintf(&b, "\"P%d\":", eval.Percentiles[i])
		f, err := jsonFloat(v)
		if err != nil {
			return nil, err
		}
		b.WriteString(f)
	}
	b.WriteByte('}')
	return b.Bytes(), nil
}

// jsonFloat writes x as encoding/json does.
func jsonFloat(x float64) (string, error) {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return "", fmt.Errorf("report: %v is not a JSON number", x)
	}
	return strconv.FormatFloat(x, 'g', -1, 64), nil
}

type simInputJSON struct {
	Name         string `json:"name"`
	Written      string `json:"written"`
	Distribution string `json:"distribution"`
	Mean         string `json:"mean"`
	MeanExact    bool   `json:"mean_exact"`
}

type simOptionJSON struct {
	Label       string             `json:"label"`
	Base        bool               `json:"base"`
	AtMeans     string             `json:"at_means"`
	Mean        float64            `json:"mean"`
	StdErr      float64            `json:"stderr"`
	SD          float64            `json:"sd"`
	Min         float64            `json:"min"`
	Max         float64            `json:"max"`
	Percentiles simPercentilesJSON `json:"percentiles"`
	PLoss       float64            `json:"p_loss"`
	PBest       *float64           `json:"p_best,omitempty"` // none for the whole tree
}

type estimateJSON struct {
	Mean   float64 `json:"mean"`
	StdErr float64 `json:"stderr"`
}

type simulateJSON struct {
	Title      string          `json:"title,omitempty"`
	Objective  string          `json:"objective"`
	Currency   string          `json:"currency,omitempty"`
	Runs       int             `json:"runs"`
	Asked      int             `json:"asked"`
	Stopped    bool            `json:"stopped"`
	Seed       uint64          `json:"seed"`
	Drawn      string          `json:"drawn"`
	Decision   *string         `json:"decision,omitempty"` // none when the tree has no decision
	Path       []string        `json:"path"`
	Inputs     []simInputJSON  `json:"inputs"`
	Options    []simOptionJSON `json:"options"`
	KnowInputs *estimateJSON   `json:"value_of_knowing_inputs,omitempty"`
	Notes      []string        `json:"notes"`
}

func (r *SimulateReport) shape() simulateJSON {
	s := r.Result
	m := s.Model
	out := simulateJSON{Title: m.Title, Objective: s.Objective.String(), Currency: m.Currency,
		Runs: s.Runs, Asked: s.Asked, Stopped: s.Stopped, Seed: s.Seed, Drawn: "paths",
		Path: append([]string{}, s.Path...), Inputs: []simInputJSON{}, Options: []simOptionJSON{}, Notes: []string{}}
	if s.Decision != nil {
		d := s.Decision.Display()
		out.Decision = &d
		out.KnowInputs = &estimateJSON{s.KnowInputs.Mean, s.KnowInputs.StdErr}
	}
	if s.InputsOnly {
		out.Drawn = "inputs"
	}
	for _, in := range s.Inputs {
		out.Inputs = append(out.Inputs, simInputJSON{Name: in.Name, Written: in.Written, Distribution: in.Dist.String(), Mean: in.Mean.String(), MeanExact: in.MeanExact})
	}
	for _, o := range s.Options {
		ps := make(simPercentilesJSON, len(eval.Percentiles))
		for i, lv := range eval.Percentiles {
			ps[i] = o.Sample.Percentile(float64(lv) / 100)
		}
		opt := simOptionJSON{Label: o.Label, Base: o.Base, AtMeans: o.AtMeans.String(),
			Mean: o.Sample.Mean(), StdErr: o.Sample.StdErr(), SD: o.Sample.SD(), Min: o.Sample.Min(), Max: o.Sample.Max(),
			Percentiles: ps, PLoss: o.PLoss}
		if s.Decision != nil {
			pb := o.PBest
			opt.PBest = &pb
		}
		out.Options = append(out.Options, opt)
	}
	for _, n := range s.Notes {
		out.Notes = append(out.Notes, r.Options.Names.Apply(n))
	}
	return out
}

// WriteJSON writes the simulation in the shape described on
// SimulateReport.
func (r *SimulateReport) WriteJSON(w io.Writer) error { return writeJSON(w, r.shape()) }

// MarshalJSON is WriteJSON's document, compact.
func (r *SimulateReport) MarshalJSON() ([]byte, error) { return marshalJSON(r.WriteJSON) }

// charts is the data of both charts: one series an option, with its mean
// and P80 marked when marks is set (in the histogram's panels; on the
// cumulative chart's shared axis they could not be told apart).
func (r *SimulateReport) charts(title string, marks bool) chart.Simulated {
	s := r.Result
	label := "Payoff"
	if s.Objective == tree.Min {
		label = "Cost"
	}
	if cur := s.Model.Currency; cur != "" {
		label += " (" + cur + ")"
	}
	out := chart.Simulated{Title: title, Value: chart.Axis{Label: label}}
	for _, o := range s.Options {
		name := r.optionName(o)
		if o.Base && s.Decision != nil {
			name += " (base case)"
		}
		set := chart.SampleSet{Label: name, Samples: o.Sample.Sorted()}
		if marks {
			set.Markers = []chart.Mark{{At: o.Sample.Mean(), Label: "mean"}, {At: o.Sample.Percentile(0.8), Label: "P80"}}
		}
		out.Series = append(out.Series, set)
	}
	return out
}

// Histogram is the data of the histogram of every option's simulated
// payoff (chart.WriteHistogram), each option a panel on a shared scale.
func (r *SimulateReport) Histogram() chart.Simulated {
	return r.charts(fmt.Sprintf("Simulated %s, %s runs", r.what(), render.Grouped(strconv.Itoa(r.Result.Runs))), true)
}

// Cumulative is the data of the cumulative chart of every option's
// simulated payoff (chart.WriteCumulative).
func (r *SimulateReport) Cumulative() chart.Simulated {
	return r.charts(fmt.Sprintf("Chance of a %s at or below, %s runs", r.what(), render.Grouped(strconv.Itoa(r.Result.Runs))), false)
}

// optionName is how an option is named in the text, the charts and the
// CSV: its label, or "whole tree" when the tree has no decision.
func (r *SimulateReport) optionName(o eval.SimOption) string {
	if r.Result.Decision == nil {
		return "whole tree"
	}
	return o.Label
}

func (r *SimulateReport) what() string {
	if r.Result.Objective == tree.Min {
		return "cost"
	}
	return "payoff"
}

// WriteDraws writes every run as a CSV row: the run's number (from 1),
// each input's draw, each option's payoff in the objective's terms and
// the option best with the run's inputs known (a tree with no decision:
// its payoff, and no best option). The simulation must have
// kept its draws (eval.SimulateOptions.KeepDraws).
func (r *SimulateReport) WriteDraws(w io.Writer) error {
	s := r.Result
	if s.Draws == nil && len(s.Inputs) > 0 || s.Values == nil {
		return fmt.Errorf("report: the simulation kept no draws (set SimulateOptions.KeepDraws)")
	}
	cw := csv.NewWriter(w)
	head := []string{"run"}
	for _, in := range s.Inputs {
		head = append(head, in.Label())
	}
	what := r.what()
	for _, o := range s.Options {
		head = append(head, what+": "+r.optionName(o))
	}
	whole := s.Decision == nil
	if !whole {
		head = append(head, "best with inputs known")
	}
	if err := cw.Write(head); err != nil {
		return err
	}
	row := make([]string, len(head))
	for run := range s.Runs {
		row[0] = strconv.Itoa(run + 1)
		k := 1
		for j := range s.Inputs {
			row[k] = strconv.FormatFloat(s.Draws[j][run], 'g', -1, 64)
			k++
		}
		for j := range s.Options {
			row[k] = strconv.FormatFloat(s.Values[j][run], 'g', -1, 64)
			k++
		}
		if !whole {
			row[k] = s.Options[s.BestKnown[run]].Label
		}
		if err := cw.Write(row); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}
