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
// runs the test:
//
//	{"decision", "path": [...], "branch", "alternative", "on_policy",
//	 "value_without", "value_with_information", "other_cash",
//	 "value_with_before_cost", "value_with_after_cost",
//	 "evsi", "test_cost", "net_gain", "most_to_pay", "evpi", "efficiency",
//	 "recommendation" ("test", "do not test" or "indifferent"), "note"}
//
// The value_* figures and other_cash are in the objective's terms (a
// payoff under max, a cost under min), as eval.TestSite holds them:
// value_with_information is the testing branch's value with the test's
// information before any cost, other_cash the other money on that branch
// (a delay, a set-up cost), value_with_before_cost the two together. evsi
// (the information alone), test_cost, net_gain (after every cost),
// most_to_pay and evpi are amounts: a gain under max, a saving under min.
// "efficiency" is evsi / evpi, or null when it has no meaning.
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
	writeMeans(w, r.Solution.Compiled)
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
		fig := money(pi.EVPI)
		if pi.Skipped {
			fig = "not computed"
		}
		rows = append(rows, []string{label, fig})
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
	var up []chanceLink // every site's decision is of one solution: one sweep serves them all
	for _, s := range tv.Sites {
		d := s.Decision
		w.f("  At decision %s, branch %s (the alternative: %s)", quoted(d.Node.Display()), quoted(d.Node.Branches[s.Branch].Label), quoted(d.Node.Branches[s.Alternative].Label))
		if up == nil {
			up = nearestChance(d.Solution())
		}
		if cond := conditions(d.Solution(), up, d); cond != "" {
			w.f(", if %s", cond)
		}
		if !s.OnPolicy {
			w.f(" (not reached by the best plan)")
		}
		w.ln(":")
		var rows [][]string
		line := func(label string, v string) { rows = append(rows, []string{label, v}) }
		other, otherWord := otherMoney(r.Solution.Model.Objective, s.OtherCash)
		line(words.value+" deciding without the test", money(s.Without))
		if otherWord == "" {
			line(words.value+" with the test, before its cost", money(s.WithInfo))
		} else {
			line(words.value+" with the test's information, before any cost", money(s.WithInfo))
		}
		line("EVSI: what the test's information is worth", money(s.EVSI))
		if otherWord != "" {
			line("other "+otherWord+" on the testing branch (not the test's)", money(other))
		}
		line("the test's cost", money(s.TestCost))
		switch otherWord {
		case "":
			line("expected net "+words.gain+" of testing (EVSI − cost)", money(s.NetGain))
			line("the most worth paying for the test", money(s.MostToPay))
		case "cost":
			line("expected net "+words.gain+" of testing (EVSI − test's cost − other cost)", money(s.NetGain))
			line("the most worth paying for the test, given the other cost", money(s.MostToPay))
		default:
			line("expected net "+words.gain+" of testing (EVSI − test's cost + other gain)", money(s.NetGain))
			line("the most worth paying for the test, given the other gain", money(s.MostToPay))
		}
		line("EVPI of "+u.Name+" against deciding without the test", money(s.EVPI))
		if s.HasEfficiency {
			line("efficiency of the test (EVSI / EVPI)", render.Percent(s.Efficiency, 1))
		}
		textTable(w, "    ", 3, []bool{false, true}, rows)
		if s.Note != "" {
			w.f("    note: %s\n", r.Options.Names.Apply(s.Note))
		}
		costs := "its cost"
		if otherWord != "" {
			costs = "its cost and the other " + otherWord + " on its branch"
		}
		switch s.Advice {
		case eval.RunTest:
			w.f("  Recommendation: run the test: it is expected to %s %s after %s.\n", words.more, money(s.NetGain), costs)
		case eval.Indifferent:
			w.f("  Recommendation: either way: the test is expected to pay exactly %s.\n", costs)
		default:
			if otherWord == "" {
				w.f("  Recommendation: decide without the test: its information is worth %s, less than its cost of %s.\n", money(s.MostToPay), money(s.TestCost))
			} else {
				w.f("  Recommendation: decide without the test: its information is worth %s; with the other %s on its branch, the test is worth paying at most %s, less than its cost of %s.\n",
					money(s.EVSI), otherWord, money(s.MostToPay), money(s.TestCost))
			}
		}
	}
	for _, msg := range tv.Warnings {
		w.f("  warning: %s\n", r.Options.Names.Apply(msg))
	}
}

// otherMoney is the other money on a testing branch as an amount and
// whether it is a "cost" or a "gain" ("" when there is none); other is in
// the objective's terms.
func otherMoney(obj tree.Objective, other decimal.Decimal) (decimal.Decimal, string) {
	switch net := obj.Net(other); {
	case net.IsZero():
		return net, ""
	case net.IsNegative():
		return net.Neg(), "cost"
	default:
		return net, "gain"
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
	Means         []meanJSON    `json:"means,omitempty"`
}

type uncJSON struct {
	Name  string  `json:"name"`
	Label string  `json:"label,omitempty"`
	EVPI  *string `json:"evpi"`                           // null when not computed (the note says why)
	With  *string `json:"value_with_perfect_information"` // null when not computed
	Note  string  `json:"note,omitempty"`
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

// siteJSON is one decision branch that runs a test (see VOIReport).
type siteJSON struct {
	Decision       string   `json:"decision"`
	Path           []string `json:"path"`
	Branch         string   `json:"branch"`
	Alternative    string   `json:"alternative"`
	OnPolicy       bool     `json:"on_policy"`
	Without        string   `json:"value_without"`
	WithInfo       string   `json:"value_with_information"`
	OtherCash      string   `json:"other_cash"`
	WithBeforeCost string   `json:"value_with_before_cost"`
	WithAfterCost  string   `json:"value_with_after_cost"`
	EVSI           string   `json:"evsi"`
	TestCost       string   `json:"test_cost"`
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
	out.Means = meansNonEmpty(r.Solution.Compiled)
	if t := info.Total; t != nil {
		e, with := t.EVPI.String(), t.With.String()
		out.EVPI, out.EVPIWith, out.EVPIScope, out.EVPIExact = &e, &with, t.Scope.String(), t.Exact
		if t.Note != "" {
			out.EVPINote = note(t.Note)
		}
	}
	for _, pi := range info.Uncertainties {
		u := uncJSON{Name: pi.Uncertainty.Name, Label: pi.Uncertainty.Label, Note: note(pi.Note)}
		if !pi.Skipped {
			e, with := pi.EVPI.String(), pi.With.String()
			u.EVPI, u.With = &e, &with
		}
		out.Uncertainties = append(out.Uncertainties, u)
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
				Without: s.Without.String(), WithInfo: s.WithInfo.String(), OtherCash: s.OtherCash.String(),
				WithBeforeCost: s.WithBeforeCost.String(), WithAfterCost: s.WithAfterCost.String(),
				EVSI: s.EVSI.String(), TestCost: s.TestCost.String(), NetGain: s.NetGain.String(), MostToPay: s.MostToPay.String(), EVPI: s.EVPI.String(),
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
