package report

import (
	"io"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/render"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// VOIOptions say how the value-of-information report is worded.
type VOIOptions struct {
	// Names renames the library options that the analysis's notes mention
	// (for example, a work budget reached: "raise VOIOptions.MaxWork").
	Names OptionNames
}

// VOIReport is the report of a value-of-information analysis: the EVPI of
// everything uncertain and of each named uncertainty, and for each
// declared test its Bayes table and its worth at every decision that can
// run it.
//
// Its JSON shape (every figure an exact decimal string, in the model's
// money: a saving under objective min):
//
//	{"title", "objective", "currency", "value",
//	 "evpi", "evpi_scope", "value_with_perfect_information", "evpi_exact", "evpi_note",
//	 "uncertainties": [{"name", "label", "evpi", "value_with_perfect_information", "note"}],
//	 "tests": [{"name", "label", "on", "cost", "posteriors_exact",
//	            "states": [{"label", "prior"}],
//	            "readings": [{"label", "probability", "likelihood": [...], "joint": [...], "posterior": [...]}],
//	            "sites": [Site], "warnings": [...]}]}
//
// "evpi" and "value_with_perfect_information" are null when the total is
// over the work budget ("evpi_note" says so); likelihood, joint and
// posterior are aligned with "states". A Site is one decision branch that
// runs the test; see siteJSON for its fields.
type VOIReport struct {
	Solution *eval.Solution
	Info     *eval.Information
	Options  VOIOptions
}

// VOI is the report of info, the value-of-information analysis of sol
// (eval.ValueOfInformation).
func VOI(sol *eval.Solution, info *eval.Information, opts VOIOptions) *VOIReport {
	return &VOIReport{Solution: sol, Info: info, Options: opts}
}

// voiWords are the words for the objective: a value and a gain, or a cost
// and a saving.
type voiWords struct {
	value, gain, more string
}

func wordsFor(m *tree.Model) voiWords {
	if m.Objective == tree.Min {
		return voiWords{value: "expected cost", gain: "saving", more: "save"}
	}
	return voiWords{value: "expected value", gain: "gain", more: "gain"}
}

// WriteText writes the EVPI table, then each test's Bayes table and worth.
func (r *VOIReport) WriteText(out io.Writer) error {
	w := newTextOut(out)
	m, info := r.Solution.Model, r.Info
	note := r.Options.Names.Apply
	cur := m.Currency
	money := func(d decimal.Decimal) string { return render.Money(d, cur) }
	words := wordsFor(m)
	if m.Title != "" {
		w.ln(m.Title)
	}
	w.f("objective:  %s\n", objectiveText(m))
	w.f("%s of the best plan in the tree:  %s\n\n", words.value, money(info.Value))

	w.ln("Expected value of perfect information (EVPI)")
	w.f("  the %s if it were known before the first decision, over the best plan in the\n", words.gain)
	w.ln("  tree. An upper bound: no test or study of it can be worth more.")
	var rows [][]string
	if t := info.Total; t != nil {
		what := "everything uncertain, together"
		if t.Scope == eval.ScopeNamed {
			what = "the named uncertainties, together"
		}
		rows = append(rows, []string{what, money(t.EVPI)})
	}
	for _, pi := range info.Uncertainties {
		label := pi.Uncertainty.Name
		if pi.Uncertainty.Label != "" {
			label += "  " + quoted(pi.Uncertainty.Label)
		}
		rows = append(rows, []string{label, money(pi.EVPI)})
	}
	textTable(w, "  ", 3, []bool{false, true}, rows)
	if t := info.Total; t != nil && t.Note != "" {
		w.f("  note: %s\n", note(t.Note))
	}
	if info.TotalNote != "" {
		w.f("  note: %s\n", note(info.TotalNote))
	}
	for _, pi := range info.Uncertainties {
		if pi.Note != "" {
			w.f("  note: %s: %s\n", pi.Uncertainty.Name, note(pi.Note))
		}
	}
	if len(info.Uncertainties) == 0 {
		w.ln("  (the model declares no named uncertainty)")
	}
	for _, tv := range info.Tests {
		for _, s := range tv.Sites {
			if s.OnPolicy && s.Decision.Chosen() == s.Branch {
				w.f("  note: the best plan already runs test %s; the EVPI above is what perfect information\n", tv.Test.Name)
				w.ln("  would add to it. The test's own section compares both with deciding without it.")
				break
			}
		}
	}
	for _, tv := range info.Tests {
		w.ln()
		r.writeTest(w, tv, words)
	}
	if len(info.Tests) == 0 {
		w.ln("\nThe model declares no `test`: add one (`test NAME \"Label\" on UNCERTAINTY cost N`)\nto see what an imperfect test is worth.")
	}
	return w.Flush()
}

func (r *VOIReport) writeTest(w textOut, tv *eval.TestValue, words voiWords) {
	cur := r.Solution.Model.Currency
	money := func(d decimal.Decimal) string { return render.Money(d, cur) }
	t, tb := tv.Test, tv.Table
	u := tb.Uncertainty
	title := "Test " + t.Name
	if t.Label != "" {
		title += "  " + quoted(t.Label)
	}
	w.f("%s, on %s, costs %s\n", title, u.Name, money(tv.Cost))
	pct := func(p decimal.Decimal) string { return render.Percent(p, 2) }
	head := []string{"likelihood P(reading | state)", "prior"}
	for _, rd := range t.Readings {
		head = append(head, rd.Label)
	}
	rows := [][]string{head}
	row := func(label string, first string, cells []decimal.Decimal, zeroDash bool) {
		line := []string{"  " + label, first}
		for r, c := range cells {
			if zeroDash && tb.Marginal[r].IsZero() {
				line = append(line, "-")
				continue
			}
			line = append(line, pct(c))
		}
		rows = append(rows, line)
	}
	for s, st := range u.States {
		row(st.Label, pct(tb.Prior[s]), tb.Likelihood[s], false)
	}
	rows = append(rows, []string{"joint P(state and reading)"})
	for s, st := range u.States {
		row(st.Label, "", tb.Joint[s], false)
	}
	row("P(reading)", "", tb.Marginal, false)
	rows = append(rows, []string{"posterior P(state | reading)"})
	for s, st := range u.States {
		row(st.Label, "", tb.Posterior[s], true)
	}
	right := make([]bool, len(head))
	for i := 1; i < len(right); i++ {
		right[i] = true
	}
	textTable(w, "    ", 3, right, rows)
	if !tb.Exact {
		w.f("    (posteriors shown rounded; computed to %d decimal places)\n", compiled.DivisionScale)
	}
	for _, s := range tv.Sites {
		d := s.Decision
		w.f("  At decision %s, branch %s (the alternative: %s)", quoted(d.Node.Display()), quoted(d.Node.Branches[s.Branch].Label), quoted(d.Node.Branches[s.Alternative].Label))
		if cond := conditions(d.Solution(), nearestChance(d.Solution()), d); cond != "" {
			w.f(", if %s", cond)
		}
		if !s.OnPolicy {
			w.f(" (not reached by the best plan)")
		}
		w.ln(":")
		var rows [][]string
		line := func(label string, v string) { rows = append(rows, []string{label, v}) }
		line(words.value+" deciding without the test", money(s.Without))
		line(words.value+" with the test, before its cost", money(s.WithBeforeCost))
		line("EVSI: what the test's information is worth", money(s.EVSI))
		line("the test's cost", money(tv.Cost))
		line("expected net "+words.gain+" of testing (EVSI − cost)", money(s.NetGain))
		line("the most worth paying for the test", money(s.MostToPay))
		line("EVPI of "+u.Name+" against deciding without the test", money(s.EVPI))
		if s.HasEfficiency {
			line("efficiency of the test (EVSI / EVPI)", render.Percent(s.Efficiency, 1))
		}
		textTable(w, "    ", 3, []bool{false, true}, rows)
		if s.Note != "" {
			w.f("    note: %s\n", r.Options.Names.Apply(s.Note))
		}
		switch s.Advice {
		case eval.RunTest:
			w.f("  Recommendation: run the test: it is expected to %s %s after its cost.\n", words.more, money(s.NetGain))
		case eval.Indifferent:
			w.ln("  Recommendation: either way: the test is expected to pay exactly its cost.")
		default:
			w.f("  Recommendation: decide without the test: its information is worth %s, less than its cost of %s.\n", money(s.MostToPay), money(tv.Cost))
		}
	}
	for _, msg := range tv.Warnings {
		w.f("  warning: %s\n", r.Options.Names.Apply(msg))
	}
}

// JSON shapes of the value-of-information report.
type voiJSON struct {
	Title         string        `json:"title,omitempty"`
	Objective     string        `json:"objective"`
	Currency      string        `json:"currency,omitempty"`
	Value         string        `json:"value"`
	EVPI          *string       `json:"evpi"`
	EVPIScope     string        `json:"evpi_scope,omitempty"`
	EVPIWith      *string       `json:"value_with_perfect_information"`
	EVPIExact     bool          `json:"evpi_exact"`
	EVPINote      string        `json:"evpi_note,omitempty"`
	Uncertainties []uncJSON     `json:"uncertainties"`
	Tests         []testVOIJSON `json:"tests"`
}

type uncJSON struct {
	Name  string `json:"name"`
	Label string `json:"label,omitempty"`
	EVPI  string `json:"evpi"`
	With  string `json:"value_with_perfect_information"`
	Note  string `json:"note,omitempty"`
}

type testVOIJSON struct {
	Name     string        `json:"name"`
	Label    string        `json:"label,omitempty"`
	On       string        `json:"on"`
	Cost     string        `json:"cost"`
	States   []stateJSON   `json:"states"`
	Readings []readingJSON `json:"readings"`
	Exact    bool          `json:"posteriors_exact"`
	Sites    []siteJSON    `json:"sites"`
	Warnings []string      `json:"warnings"`
}

type stateJSON struct {
	Label string `json:"label"`
	Prior string `json:"prior"`
}

// readingJSON: likelihood, joint and posterior are aligned with "states".
type readingJSON struct {
	Label      string   `json:"label"`
	Marginal   string   `json:"probability"`
	Likelihood []string `json:"likelihood"`
	Joint      []string `json:"joint"`
	Posterior  []string `json:"posterior"`
}

// siteJSON is one decision branch that runs a test: the decision, the
// labels of the branches from the root to it, the testing branch and its
// best alternative, and the figures of eval.TestSite.
type siteJSON struct {
	Decision       string   `json:"decision"`
	Path           []string `json:"path"`
	Branch         string   `json:"branch"`
	Alternative    string   `json:"alternative"`
	OnPolicy       bool     `json:"on_policy"`
	Without        string   `json:"value_without"`
	WithBeforeCost string   `json:"value_with_before_cost"`
	WithAfterCost  string   `json:"value_with_after_cost"`
	EVSI           string   `json:"evsi"`
	NetGain        string   `json:"net_gain"`
	MostToPay      string   `json:"most_to_pay"`
	EVPI           string   `json:"evpi"`
	Efficiency     *string  `json:"efficiency"`
	Recommendation string   `json:"recommendation"`
	Note           string   `json:"note,omitempty"`
}

// WriteJSON writes the analysis in the shape described on VOIReport.
func (r *VOIReport) WriteJSON(w io.Writer) error { return writeJSON(w, r.shape()) }

// MarshalJSON is WriteJSON's document, compact.
func (r *VOIReport) MarshalJSON() ([]byte, error) { return marshalJSON(r.WriteJSON) }

func (r *VOIReport) shape() voiJSON {
	m, info := r.Solution.Model, r.Info
	note := r.Options.Names.Apply
	out := voiJSON{Title: m.Title, Objective: m.Objective.String(), Currency: m.Currency, Value: info.Value.String(),
		EVPINote: note(info.TotalNote), Uncertainties: []uncJSON{}, Tests: []testVOIJSON{}}
	if t := info.Total; t != nil {
		e, with := t.EVPI.String(), t.With.String()
		out.EVPI, out.EVPIWith, out.EVPIScope, out.EVPIExact = &e, &with, t.Scope.String(), t.Exact
		if t.Note != "" {
			out.EVPINote = note(t.Note)
		}
	}
	for _, pi := range info.Uncertainties {
		out.Uncertainties = append(out.Uncertainties, uncJSON{Name: pi.Uncertainty.Name, Label: pi.Uncertainty.Label,
			EVPI: pi.EVPI.String(), With: pi.With.String(), Note: note(pi.Note)})
	}
	for _, tv := range info.Tests {
		tb := tv.Table
		tj := testVOIJSON{Name: tv.Test.Name, Label: tv.Test.Label, On: tv.Test.On, Cost: tv.Cost.String(),
			Exact: tb.Exact, Sites: []siteJSON{}, Warnings: []string{}}
		for _, msg := range tv.Warnings {
			tj.Warnings = append(tj.Warnings, note(msg))
		}
		for s, st := range tb.Uncertainty.States {
			tj.States = append(tj.States, stateJSON{Label: st.Label, Prior: tb.Prior[s].String()})
		}
		for r, rd := range tv.Test.Readings {
			rj := readingJSON{Label: rd.Label, Marginal: tb.Marginal[r].String()}
			for s := range tb.Uncertainty.States {
				rj.Likelihood = append(rj.Likelihood, tb.Likelihood[s][r].String())
				rj.Joint = append(rj.Joint, tb.Joint[s][r].String())
				rj.Posterior = append(rj.Posterior, tb.Posterior[s][r].String())
			}
			tj.Readings = append(tj.Readings, rj)
		}
		for _, s := range tv.Sites {
			d := s.Decision
			sj := siteJSON{Decision: d.Node.Display(), Path: []string{}, Branch: d.Node.Branches[s.Branch].Label,
				Alternative: d.Node.Branches[s.Alternative].Label, OnPolicy: s.OnPolicy,
				Without: s.Without.String(), WithBeforeCost: s.WithBeforeCost.String(), WithAfterCost: s.WithAfterCost.String(),
				EVSI: s.EVSI.String(), NetGain: s.NetGain.String(), MostToPay: s.MostToPay.String(), EVPI: s.EVPI.String(),
				Recommendation: s.Advice.String(), Note: note(s.Note)}
			for _, b := range d.Path() {
				sj.Path = append(sj.Path, b.Label)
			}
			if s.HasEfficiency {
				e := s.Efficiency.String()
				sj.Efficiency = &e
			}
			tj.Sites = append(tj.Sites, sj)
		}
		out.Tests = append(out.Tests, tj)
	}
	return out
}
