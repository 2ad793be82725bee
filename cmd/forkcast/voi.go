package main

import (
	"bufio"
	"encoding/json"
	"fmt"
	"io"
	"strings"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/render"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
	"github.com/urfave/cli/v2"
)

func voiCommand() *cli.Command {
	return &cli.Command{
		Name:      "voi",
		Usage:     "value of information: what it is worth to know more before deciding (EVPI, EVSI)",
		ArgsUsage: "FILE",
		UsageText: "forkcast voi [--json] FILE\n\n" +
			"   forkcast voi examples/release.fork\n" +
			"   forkcast voi example:release --json",
		Description: "Prints what information is worth before the first decision, in the model's\n" +
			"money (a saving under `objective min`):\n\n" +
			"EVPI, the expected value of perfect information: for everything uncertain\n" +
			"together and for each named uncertainty, how much better the tree would be if\n" +
			"the uncertainty were known before the first decision, over the best plan in\n" +
			"the tree. It is an upper bound: no test, survey or study of that uncertainty\n" +
			"can be worth more. (\"Everything\" is every named uncertainty and every plain\n" +
			"chance node, each its own event; when that is too much work, the named\n" +
			"uncertainties only, and the output says so.)\n\n" +
			"For each `test` declared in the model: Bayes' rule at the prior (likelihoods\n" +
			"P(reading | state), joint and marginal probabilities, posteriors), and at each\n" +
			"decision with a branch that runs the test: EVSI, the expected value of the\n" +
			"test's information (the branch as if the test were free, over the best other\n" +
			"branch); the expected net gain of testing (EVSI minus the cost); the most worth\n" +
			"paying for it; its efficiency (EVSI / EVPI of the tested uncertainty at that\n" +
			"decision); and the recommendation: test or not.\n\n" +
			"The figures are exact; money is shown rounded to the currency's minor unit and\n" +
			"--json carries every value in full.",
		Flags: []cli.Flag{
			&cli.BoolFlag{Name: "json", Usage: "print the analysis as JSON: \"evpi\" (the total), \"uncertainties\" and \"tests\", values as exact decimal strings"},
			&cli.IntFlag{Name: "max-scenarios", Value: eval.DefaultMaxScenarios, Usage: "enumerate at most `N` joint states of the named uncertainties for the total EVPI"},
			maxNodesFlag,
		},
		Action: func(c *cli.Context) error {
			_, sol, err := loadAndSolve(c)
			if err != nil {
				return err
			}
			info, err := eval.ValueOfInformation(c.Context, sol, eval.VOIOptions{MaxScenarios: c.Int("max-scenarios")})
			if err != nil {
				return modelErr("%v", err)
			}
			if c.Bool("json") {
				return writeVOIJSON(c.App.Writer, sol.Model, info)
			}
			w := bufio.NewWriter(c.App.Writer)
			printVOI(w, sol.Model, info)
			return w.Flush()
		},
	}
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

func printVOI(w io.Writer, m *tree.Model, info *eval.Information) {
	cur := m.Currency
	money := func(d decimal.Decimal) string { return render.Money(d, cur) }
	words := wordsFor(m)
	if m.Title != "" {
		fmt.Fprintln(w, m.Title)
	}
	fmt.Fprintf(w, "objective:  %s\n", objectiveText(m))
	fmt.Fprintf(w, "%s of the best plan in the tree:  %s\n\n", words.value, money(info.Value))

	fmt.Fprintln(w, "Expected value of perfect information (EVPI)")
	fmt.Fprintf(w, "  the %s if it were known before the first decision, over the best plan in the\n", words.gain)
	fmt.Fprintln(w, "  tree. An upper bound: no test or study of it can be worth more.")
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
		fmt.Fprintf(w, "  note: %s\n", t.Note)
	}
	if info.TotalNote != "" {
		fmt.Fprintf(w, "  note: %s\n", info.TotalNote)
	}
	for _, pi := range info.Uncertainties {
		if pi.Note != "" {
			fmt.Fprintf(w, "  note: %s: %s\n", pi.Uncertainty.Name, pi.Note)
		}
	}
	if len(info.Uncertainties) == 0 {
		fmt.Fprintln(w, "  (the model declares no named uncertainty)")
	}
	for _, tv := range info.Tests {
		for _, s := range tv.Sites {
			if s.OnPolicy && s.Decision.Chosen() == s.Branch {
				fmt.Fprintf(w, "  note: the best plan already runs test %s; the EVPI above is what perfect information\n", tv.Test.Name)
				fmt.Fprintln(w, "  would add to it. The test's own section compares both with deciding without it.")
				break
			}
		}
	}
	for _, tv := range info.Tests {
		fmt.Fprintln(w)
		printTestValue(w, m, tv, words)
	}
	if len(info.Tests) == 0 {
		fmt.Fprintln(w, "\nThe model declares no `test`: add one (`test NAME \"Label\" on UNCERTAINTY cost N`)\nto see what an imperfect test is worth.")
	}
}

func printTestValue(w io.Writer, m *tree.Model, tv *eval.TestValue, words voiWords) {
	cur := m.Currency
	money := func(d decimal.Decimal) string { return render.Money(d, cur) }
	t, tb := tv.Test, tv.Table
	u := tb.Uncertainty
	title := "Test " + t.Name
	if t.Label != "" {
		title += "  " + quoted(t.Label)
	}
	fmt.Fprintf(w, "%s, on %s, costs %s\n", title, u.Name, money(tv.Cost))
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
		fmt.Fprintf(w, "    (posteriors shown rounded; computed to %d decimal places)\n", compiled.DivisionScale)
	}
	for _, s := range tv.Sites {
		d := s.Decision
		fmt.Fprintf(w, "  At decision %s, branch %s (the alternative: %s)", quoted(d.Node.Display()), quoted(d.Node.Branches[s.Branch].Label), quoted(d.Node.Branches[s.Alternative].Label))
		if cond := conditions(d.Solution(), nearestChance(d.Solution()), d); cond != "" {
			fmt.Fprintf(w, ", if %s", cond)
		}
		if !s.OnPolicy {
			fmt.Fprint(w, " (not reached by the best plan)")
		}
		fmt.Fprintln(w, ":")
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
			fmt.Fprintf(w, "    note: %s\n", s.Note)
		}
		switch s.Advice {
		case eval.RunTest:
			fmt.Fprintf(w, "  Recommendation: run the test: it is expected to %s %s after its cost.\n", words.more, money(s.NetGain))
		case eval.Indifferent:
			fmt.Fprintln(w, "  Recommendation: either way: the test is expected to pay exactly its cost.")
		default:
			fmt.Fprintf(w, "  Recommendation: decide without the test: its information is worth %s, less than its cost of %s.\n", money(s.MostToPay), money(tv.Cost))
		}
	}
	for _, msg := range tv.Warnings {
		fmt.Fprintf(w, "  warning: %s\n", msg)
	}
}

// JSON shapes of `voi --json`.
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

func decStrings(ds []decimal.Decimal) []string {
	out := make([]string, len(ds))
	for i, d := range ds {
		out[i] = d.String()
	}
	return out
}

func writeVOIJSON(w io.Writer, m *tree.Model, info *eval.Information) error {
	out := voiJSON{Title: m.Title, Objective: m.Objective.String(), Currency: m.Currency, Value: info.Value.String(),
		EVPINote: info.TotalNote, Uncertainties: []uncJSON{}, Tests: []testVOIJSON{}}
	if t := info.Total; t != nil {
		e, with := t.EVPI.String(), t.With.String()
		out.EVPI, out.EVPIWith, out.EVPIScope, out.EVPIExact = &e, &with, t.Scope.String(), t.Exact
		if t.Note != "" {
			out.EVPINote = t.Note
		}
	}
	for _, pi := range info.Uncertainties {
		out.Uncertainties = append(out.Uncertainties, uncJSON{Name: pi.Uncertainty.Name, Label: pi.Uncertainty.Label,
			EVPI: pi.EVPI.String(), With: pi.With.String(), Note: pi.Note})
	}
	for _, tv := range info.Tests {
		tb := tv.Table
		tj := testVOIJSON{Name: tv.Test.Name, Label: tv.Test.Label, On: tv.Test.On, Cost: tv.Cost.String(),
			Exact: tb.Exact, Sites: []siteJSON{}, Warnings: append([]string{}, tv.Warnings...)}
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
				Recommendation: s.Advice.String(), Note: s.Note}
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
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	enc.SetEscapeHTML(false)
	return enc.Encode(out)
}

// textTable lays out rows in columns: each column as wide as its widest
// cell, cells left-aligned except in the columns marked right, columns
// gapped by gap spaces, no trailing blanks. A row of one cell (a heading)
// takes no part in the widths.
func textTable(w io.Writer, indent string, gap int, right []bool, rows [][]string) {
	var width []int
	for _, r := range rows {
		if len(r) < 2 {
			continue
		}
		for i, c := range r {
			if i >= len(width) {
				width = append(width, 0)
			}
			width[i] = max(width[i], len([]rune(c)))
		}
	}
	for _, r := range rows {
		var b strings.Builder
		b.WriteString(indent)
		for i, c := range r {
			if i > 0 {
				b.WriteString(strings.Repeat(" ", gap))
			}
			pad := 0
			if len(r) > 1 {
				pad = width[i] - len([]rune(c))
			}
			if i < len(right) && right[i] {
				b.WriteString(strings.Repeat(" ", pad))
				b.WriteString(c)
			} else {
				b.WriteString(c)
				b.WriteString(strings.Repeat(" ", pad))
			}
		}
		fmt.Fprintln(w, strings.TrimRight(b.String(), " "))
	}
}
