package report

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/forkcast/forkcast/dist"
	"github.com/forkcast/forkcast/register"
	"github.com/forkcast/forkcast/render"
	"github.com/forkcast/forkcast/render/chart"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// RegisterOptions say how the register report is worded.
type RegisterOptions struct {
	// Rerun is the command that reproduces the simulation, shown beside
	// the seed (empty: none is shown).
	Rerun string
	// Names renames the library options the notes mention.
	Names OptionNames
}

// RegisterReport is the report of a risk register's analysis: every
// risk's expected impact before and after its response, threats,
// opportunities and the net; the total EMV (the contingency reserve by the
// expected-value method) beside the simulated distribution of the total
// and the reserve at the chosen confidence; the chance of staying within
// a budget; the risks ranked by what they add to that percentile; the
// responses appraised and the best set of them; the schedule impact.
// Tornado gives the ranking's chart.
//
// Its JSON shape (exact figures are decimal strings, simulated ones JSON
// numbers; money is cost, an opportunity's EMV negative):
//
//	{"title", "register", "currency",
//	 "runs", "asked", "stopped", "seed", "confidence",
//	 "risks": [{"id", "title", "type", "owner", "category",
//	            "probability", "impact" (as written), "mean_impact",
//	            "emv", "emv_after", "sd", "share", "contribution", "rank",
//	            "expected_days" (null: no schedule impact),
//	            "response": null or {"action", "cost", "residual_probability",
//	                                 "residual_impact", "reduction", "net",
//	                                 "pays", "take"},
//	            "fields": {column: value, …}}],
//	 "emv_threats", "emv_opportunities", "emv_total",
//	 "emv_planned", "emv_best", "sd_exact",
//	 "mean", "stderr", "sd", "min", "max",
//	 "percentiles": {"P50", "P80", "P90", "P95"},
//	 "reserve", "p_within_emv", "budget", "p_within_budget",
//	 "with_responses": {"mean", "percentiles", "reserve"},
//	 "with_best_responses": null or the same,
//	 "days": null or {"expected", "mean", "percentiles"},
//	 "notes": [...]}
//
// A figure that is no finite decimal (a PERT mean of (a + 4m + b)/6, say)
// is written rounded to 34 significant digits, with the exact fraction
// beside it under the same key and "_fraction" ("emv_fraction":
// "215000/3"); "budget" and "p_within_budget" are null without a budget;
// "contribution" and "rank" are 0 when the simulation was stopped before
// the ranking.
type RegisterReport struct {
	Result  *register.Analysis
	Options RegisterOptions
}

// Register is the report of a.
func Register(a *register.Analysis, opts RegisterOptions) *RegisterReport {
	return &RegisterReport{Result: a, Options: opts}
}

// regMoney formats an exact figure rounded to the currency's minor unit.
func regMoney(f register.Figure, cur string) string { return render.Amount(f.Decimal(), cur) }

// pctText formats a probability (a decimal) as a percentage.
func pctText(p decimal.Decimal) string {
	return p.Mul(decimal.NewFromInt(100)).String() + "%"
}

// levelText formats a confidence level as a percentage: 0.8 → "80%".
func levelText(p float64) string {
	return strconv.FormatFloat(100*p, 'f', -1, 64) + "%"
}

// shortTitle cuts a title to n characters for a table.
func shortTitle(s string, n int) string {
	r := []rune(tree.Printable(s))
	if len(r) <= n {
		return string(r)
	}
	return string(r[:n-1]) + "…"
}

// WhyDiffer is the sentence that says why the reserve at the confidence
// and the EMV reserve differ.
func (r *RegisterReport) WhyDiffer() string {
	a := r.Result
	cur := a.Register.Currency
	emv, res := a.Total.Float64(), a.Reserve
	lv := levelText(a.Confidence)
	within := share(a.WithinEMV)
	switch {
	case res > emv:
		return fmt.Sprintf("They differ because the EMV reserve is an average over many projects like this one, while this project "+
			"has one outcome: each risk happens in full or not at all, so the total stays within the EMV reserve in only %s of runs, "+
			"and covering %s of them takes %s.", within, lv, simFigure(res, cur))
	case res < emv:
		return fmt.Sprintf("They differ because the EMV reserve is an average, pulled up by risks too unlikely to reach the %s level: "+
			"the total stays within it in %s of runs, so covering %s of them takes less, %s.", ordinal(a.Confidence), within, lv, simFigure(res, cur))
	}
	return "Here the two coincide: the total stays within the EMV reserve in " + within + " of runs."
}

// ordinal is a confidence as a percentile's name: 0.8 → "80th percentile".
func ordinal(p float64) string {
	n := strconv.FormatFloat(100*p, 'f', -1, 64)
	suffix := "th"
	if !strings.Contains(n, ".") {
		switch v, _ := strconv.Atoi(n); {
		case v%100 >= 11 && v%100 <= 13:
		case v%10 == 1:
			suffix = "st"
		case v%10 == 2:
			suffix = "nd"
		case v%10 == 3:
			suffix = "rd"
		}
	}
	return n + suffix + " percentile"
}

// WriteText writes the report for people.
func (r *RegisterReport) WriteText(out io.Writer) error {
	w := newTextOut(out)
	a := r.Result
	reg := a.Register
	cur := reg.Currency
	unit := ""
	if cur != "" {
		unit = " (" + cur + ")"
	}
	switch {
	case reg.Title != "" && reg.Name != "":
		w.f("Risk register %s: %s\n", reg.Name, tree.Printable(reg.Title))
	case reg.Title != "":
		w.ln(tree.Printable(reg.Title))
	case reg.Name != "":
		w.f("Risk register %s\n", reg.Name)
	default:
		w.ln("Risk register")
	}
	nt, no := count(reg, register.Threat), count(reg, register.Opportunity)
	w.f("risks:      %d (%s, %s)\n", len(reg.Risks), counted(nt, "threat", "threats"), counted(no, "opportunity", "opportunities"))
	w.f("simulated:  %s runs, seed %d", render.Grouped(strconv.Itoa(a.Runs)), a.Seed)
	if a.Stopped && a.Runs < a.Asked {
		w.f(" (stopped early: %s were asked for)", render.Grouped(strconv.Itoa(a.Asked)))
	}
	if r.Options.Rerun != "" {
		w.f("; %s gives the same figures", r.Options.Rerun)
	}
	w.ln()
	w.ln("money:      costs; threats add to the total, opportunities (negative figures) save")
	for _, n := range a.Notes {
		w.f("note: %s\n", r.Options.Names.Apply(n))
	}

	w.ln()
	w.f("Expected impact of each risk%s: EMV = probability × mean impact\n", unit)
	rows := [][]string{{"id", "title", "type", "probability", "mean impact", "EMV", "share", "EMV after response"}}
	for _, x := range a.Risks {
		k := x.Risk
		after := "no response"
		if x.Response != nil {
			after = regMoney(x.EMVAfter, cur)
		}
		rows = append(rows, []string{tree.Printable(k.ID), shortTitle(k.Title, 36), k.Kind.String(), pctText(k.P),
			regMoney(x.MeanImpact, cur), regMoney(x.EMV, cur), share(x.Share), after})
	}
	textTable(w, "  ", 2, []bool{false, false, false, true, true, true, true, true}, rows)
	w.ln()
	sums := [][]string{
		{"threats", regMoney(a.Threats, cur)},
		{"opportunities", regMoney(a.Opportunities, cur)},
		{"net: the EMV reserve", regMoney(a.Total, cur)},
	}
	textTable(w, "  ", 3, []bool{false, true}, sums)
	if !a.Total.Exact() {
		w.ln("  (a lognormal's mean entered these sums, rounded)")
	}

	w.ln()
	w.f("Total impact%s, simulated\n", unit)
	lv := levelText(a.Confidence)
	rows = [][]string{
		{"EMV reserve", regMoney(a.Total, cur), "exact: the sum of the risks' EMVs"},
		{"mean", simFigure(a.AsIs.Mean(), cur), "± " + simFigure(a.AsIs.StdErr(), cur) + " (standard error)"},
		{"standard deviation", simFigure(a.AsIs.SD(), cur), simFigure(a.SD, cur) + " by the formulas"},
	}
	for _, lvl := range register.Percentiles {
		rows = append(rows, []string{fmt.Sprintf("P%d", lvl), simFigure(a.AsIs.Percentile(float64(lvl)/100), cur)})
	}
	rows = append(rows, []string{"reserve at " + lv + " confidence", simFigure(a.Reserve, cur), "P" + strconv.FormatFloat(100*a.Confidence, 'f', -1, 64)})
	textTable(w, "  ", 3, []bool{false, true, false}, rows)
	for _, line := range wrap(r.WhyDiffer(), 76) {
		w.f("  %s\n", line)
	}
	if a.Budget != nil {
		// "every run" and "no run" only when exactly so: 100.0% may
		// be a rounded 99.96%.
		runs := share(a.WithinBudget) + " of runs"
		switch a.WithinBudget {
		case 1:
			runs = "every run"
		case 0:
			runs = "no run"
		}
		w.f("  The total stays within the budget of %s in %s.\n", render.Amount(*a.Budget, cur), runs)
	}

	if a.Runs > 0 && !a.Stopped && len(a.Risks) > 0 {
		w.ln()
		w.f("Risks ranked by what they add to the total's P%s (with the risk − without it)\n", strconv.FormatFloat(100*a.Confidence, 'f', -1, 64))
		rows = [][]string{{"rank", "id", "title", "adds", "EMV"}}
		for _, x := range a.Ranked() {
			rows = append(rows, []string{strconv.Itoa(x.Rank), tree.Printable(x.Risk.ID), shortTitle(x.Risk.Title, 36),
				simFigure(x.Contribution, cur), regMoney(x.EMV, cur)})
		}
		textTable(w, "  ", 2, []bool{true, false, false, true, true}, rows)
	}

	r.writeResponses(w)

	if a.HasDays {
		w.ln()
		w.ln("Schedule impact (days), every delay added as if it fell on the critical path")
		rows = [][]string{{"expected (exact)", a.Days.Decimal().Round(1).String()}}
		if s := a.DaysSample; s != nil {
			for _, lvl := range register.Percentiles {
				rows = append(rows, []string{fmt.Sprintf("P%d", lvl), strconv.FormatFloat(s.Percentile(float64(lvl)/100), 'f', 1, 64)})
			}
		}
		textTable(w, "  ", 3, []bool{false, true}, rows)
	}

	w.ln()
	w.ln("Expected values are exact; simulated figures are float64 and carry sampling error.")
	return w.Flush()
}

func count(reg *register.Register, k register.Kind) int {
	n := 0
	for _, r := range reg.Risks {
		if r.Kind == k {
			n++
		}
	}
	return n
}

// writeResponses writes the appraisal of the responses and the best set.
func (r *RegisterReport) writeResponses(w textOut) {
	a := r.Result
	cur := a.Register.Currency
	var rows [][]string
	var take, leave []string
	for _, x := range a.Risks {
		ap := x.Response
		if ap == nil {
			continue
		}
		verdict := "does not pay"
		if ap.Pays() {
			verdict = "pays"
			take = append(take, tree.Printable(x.Risk.ID))
		} else {
			leave = append(leave, tree.Printable(x.Risk.ID))
		}
		rows = append(rows, []string{tree.Printable(x.Risk.ID), shortTitle(x.Risk.Response.Action, 36), regMoney(ap.Cost, cur),
			regMoney(ap.Reduction, cur), regMoney(ap.Net, cur), verdict})
	}
	if len(rows) == 0 {
		return
	}
	w.ln()
	w.ln("Responses: what each takes off the expected impact, against its cost")
	textTable(w, "  ", 2, []bool{false, false, true, true, true, false},
		append([][]string{{"id", "response", "cost", "reduces EMV by", "net saving", ""}}, rows...))
	w.ln()
	w.ln("Best set of responses (by expected value, exact: each response changes only its")
	w.ln("own risk's expected impact, so each is decided on its own)")
	if len(take) > 0 {
		w.f("  take:   %s\n", strings.Join(take, ", "))
	}
	if len(leave) > 0 {
		w.f("  leave:  %s\n", strings.Join(leave, ", "))
	}
	lv := levelText(a.Confidence)
	rows = [][]string{{"", "expected total", "reserve at " + lv},
		{"as it stands", regMoney(a.Total, cur), simFigure(a.Reserve, cur)},
		{"every planned response", regMoney(a.Planned, cur), simFigure(a.WithPlanned.Percentile(a.Confidence), cur)}}
	if a.WithBest != nil {
		rows = append(rows, []string{"the best set", regMoney(a.Best, cur), simFigure(a.WithBest.Percentile(a.Confidence), cur)})
	} else {
		rows[2][0] = "every planned response (the best set)"
	}
	textTable(w, "  ", 3, []bool{false, true, true}, rows)
	w.ln("  (a response's cost counts in full; what remains of its risk, by its residual")
	w.ln("  probability and impact)")
}

// wrap breaks text into lines of at most n characters at spaces.
func wrap(text string, n int) []string {
	var lines []string
	var cur []string
	width := 0
	for _, word := range strings.Fields(text) {
		l := len([]rune(word))
		if width > 0 && width+1+l > n {
			lines = append(lines, strings.Join(cur, " "))
			cur, width = nil, 0
		}
		if width > 0 {
			width++
		}
		cur = append(cur, word)
		width += l
	}
	if len(cur) > 0 {
		lines = append(lines, strings.Join(cur, " "))
	}
	return lines
}

// regPercentilesJSON writes P50 … P95 in ascending order.
type regPercentilesJSON []float64

func (p regPercentilesJSON) MarshalJSON() ([]byte, error) {
	var b bytes.Buffer
	b.WriteByte('{')
	for i, v := range p {
		if i > 0 {
			b.WriteByte(',')
		}
		fmt.Fprintf(&b, "\"P%d\":", register.Percentiles[i])
		f, err := jsonFloat(v)
		if err != nil {
			return nil, err
		}
		b.WriteString(f)
	}
	b.WriteByte('}')
	return b.Bytes(), nil
}

func regPercentiles(s dist.Sample) regPercentilesJSON {
	out := make(regPercentilesJSON, len(register.Percentiles))
	for i, lv := range register.Percentiles {
		out[i] = s.Percentile(float64(lv) / 100)
	}
	return out
}

// fraction is a figure's exact fraction when it is no finite decimal,
// else "".
func fraction(f register.Figure) string {
	if f.Finite() {
		return ""
	}
	return f.Fraction()
}

type regResponseJSON struct {
	Action      string `json:"action"`
	Cost        string `json:"cost"`
	ResidualP   string `json:"residual_probability"`
	ResidualImp string `json:"residual_impact"`
	Reduction   string `json:"reduction"`
	RedFrac     string `json:"reduction_fraction,omitempty"`
	Net         string `json:"net"`
	NetFrac     string `json:"net_fraction,omitempty"`
	Pays        bool   `json:"pays"`
	Take        bool   `json:"take"`
}

type regRiskJSON struct {
	ID           string            `json:"id"`
	Title        string            `json:"title"`
	Type         string            `json:"type"`
	Owner        string            `json:"owner"`
	Category     string            `json:"category"`
	Probability  string            `json:"probability"`
	Impact       string            `json:"impact"`
	MeanImpact   string            `json:"mean_impact"`
	MeanFrac     string            `json:"mean_impact_fraction,omitempty"`
	EMV          string            `json:"emv"`
	EMVFrac      string            `json:"emv_fraction,omitempty"`
	EMVAfter     string            `json:"emv_after"`
	EMVAfterFrac string            `json:"emv_after_fraction,omitempty"`
	SD           float64           `json:"sd"`
	Share        float64           `json:"share"`
	Contribution float64           `json:"contribution"`
	Rank         int               `json:"rank"`
	Days         *string           `json:"expected_days"`
	Response     *regResponseJSON  `json:"response"`
	Fields       map[string]string `json:"fields"`
}

type regTotalJSON struct {
	Mean        float64            `json:"mean"`
	Percentiles regPercentilesJSON `json:"percentiles"`
	Reserve     float64            `json:"reserve"`
}

type regDaysJSON struct {
	Expected    string             `json:"expected"`
	Mean        float64            `json:"mean"`
	Percentiles regPercentilesJSON `json:"percentiles"`
}

type registerJSON struct {
	Title         string             `json:"title,omitempty"`
	Register      string             `json:"register,omitempty"`
	Currency      string             `json:"currency,omitempty"`
	Runs          int                `json:"runs"`
	Asked         int                `json:"asked"`
	Stopped       bool               `json:"stopped"`
	Seed          uint64             `json:"seed"`
	Confidence    float64            `json:"confidence"`
	Risks         []regRiskJSON      `json:"risks"`
	Threats       string             `json:"emv_threats"`
	ThreatsFrac   string             `json:"emv_threats_fraction,omitempty"`
	Opps          string             `json:"emv_opportunities"`
	OppsFrac      string             `json:"emv_opportunities_fraction,omitempty"`
	Total         string             `json:"emv_total"`
	TotalFrac     string             `json:"emv_total_fraction,omitempty"`
	Planned       string             `json:"emv_planned"`
	PlannedFrac   string             `json:"emv_planned_fraction,omitempty"`
	Best          string             `json:"emv_best"`
	BestFrac      string             `json:"emv_best_fraction,omitempty"`
	SDExact       float64            `json:"sd_exact"`
	Mean          float64            `json:"mean"`
	StdErr        float64            `json:"stderr"`
	SD            float64            `json:"sd"`
	Min           float64            `json:"min"`
	Max           float64            `json:"max"`
	Percentiles   regPercentilesJSON `json:"percentiles"`
	Reserve       float64            `json:"reserve"`
	WithinEMV     float64            `json:"p_within_emv"`
	Budget        *string            `json:"budget"`
	WithinBudget  *float64           `json:"p_within_budget"`
	WithResponses regTotalJSON       `json:"with_responses"`
	WithBest      *regTotalJSON      `json:"with_best_responses"`
	Days          *regDaysJSON       `json:"days"`
	Notes         []string           `json:"notes"`
}

func (r *RegisterReport) shape() (registerJSON, error) {
	a := r.Result
	reg := a.Register
	out := registerJSON{Title: reg.Title, Register: reg.Name, Currency: reg.Currency, Runs: a.Runs, Asked: a.Asked,
		Stopped: a.Stopped, Seed: a.Seed, Confidence: a.Confidence, Risks: []regRiskJSON{},
		Threats: a.Threats.String(), ThreatsFrac: fraction(a.Threats),
		Opps: a.Opportunities.String(), OppsFrac: fraction(a.Opportunities),
		Total: a.Total.String(), TotalFrac: fraction(a.Total),
		Planned: a.Planned.String(), PlannedFrac: fraction(a.Planned),
		Best: a.Best.String(), BestFrac: fraction(a.Best),
		SDExact: a.SD, Mean: a.AsIs.Mean(), StdErr: a.AsIs.StdErr(), SD: a.AsIs.SD(), Min: a.AsIs.Min(), Max: a.AsIs.Max(),
		Percentiles: regPercentiles(a.AsIs), Reserve: a.Reserve, WithinEMV: a.WithinEMV,
		WithResponses: regTotalJSON{Mean: a.WithPlanned.Mean(), Percentiles: regPercentiles(a.WithPlanned), Reserve: a.WithPlanned.Percentile(a.Confidence)},
		Notes:         []string{}}
	for _, x := range []float64{out.Mean, out.SD, out.SDExact, out.Reserve} {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return out, fmt.Errorf("report: a simulated figure is not a number")
		}
	}
	if a.Budget != nil {
		b, p := a.Budget.String(), a.WithinBudget
		out.Budget, out.WithinBudget = &b, &p
	}
	if s := a.WithBest; s != nil {
		out.WithBest = &regTotalJSON{Mean: s.Mean(), Percentiles: regPercentiles(*s), Reserve: s.Percentile(a.Confidence)}
	}
	if a.HasDays && a.DaysSample != nil {
		out.Days = &regDaysJSON{Expected: a.Days.String(), Mean: a.DaysSample.Mean(), Percentiles: regPercentiles(*a.DaysSample)}
	}
	for _, x := range a.Risks {
		k := x.Risk
		rj := regRiskJSON{ID: k.ID, Title: k.Title, Type: k.Kind.String(), Owner: k.Owner, Category: k.Category,
			Probability: k.P.String(), Impact: k.Impact.String(), MeanImpact: x.MeanImpact.String(), MeanFrac: fraction(x.MeanImpact),
			EMV: x.EMV.String(), EMVFrac: fraction(x.EMV), EMVAfter: x.EMVAfter.String(), EMVAfterFrac: fraction(x.EMVAfter),
			SD: x.SD, Share: x.Share, Contribution: x.Contribution, Rank: x.Rank, Fields: map[string]string{}}
		if k.Delay != nil {
			d := x.Days.String()
			rj.Days = &d
		}
		if ap := x.Response; ap != nil {
			rs := k.Response
			rj.Response = &regResponseJSON{Action: rs.Action, Cost: ap.Cost.String(), ResidualP: rs.P.String(), ResidualImp: rs.Impact.String(),
				Reduction: ap.Reduction.String(), RedFrac: fraction(ap.Reduction), Net: ap.Net.String(), NetFrac: fraction(ap.Net),
				Pays: ap.Pays(), Take: ap.Take}
		}
		for _, f := range k.Fields {
			rj.Fields[f.Name] = f.Value
		}
		out.Risks = append(out.Risks, rj)
	}
	for _, n := range a.Notes {
		out.Notes = append(out.Notes, r.Options.Names.Apply(n))
	}
	return out, nil
}

// WriteJSON writes the analysis in the shape described on
// RegisterReport.
func (r *RegisterReport) WriteJSON(w io.Writer) error {
	s, err := r.shape()
	if err != nil {
		return err
	}
	return writeJSON(w, s)
}

// MarshalJSON is WriteJSON's document, compact.
func (r *RegisterReport) MarshalJSON() ([]byte, error) { return marshalJSON(r.WriteJSON) }

// Tornado is the data of the ranking's tornado diagram: one bar a risk,
// from the total's percentile at the confidence without the risk to the
// percentile with it, the largest on top (at most chart.MaxBars risks:
// the largest).
func (r *RegisterReport) Tornado() chart.Tornado {
	a := r.Result
	lv := strconv.FormatFloat(100*a.Confidence, 'f', -1, 64)
	label := "P" + lv + " of the total impact"
	if cur := a.Register.Currency; cur != "" {
		label += " (" + cur + ")"
	}
	t := chart.Tornado{
		Title:     "What each risk adds to the reserve at " + lv + "%",
		Value:     chart.Axis{Label: label},
		Base:      a.Reserve,
		BaseLabel: "P" + lv + " " + simFigure(a.Reserve, a.Register.Currency),
		StartName: "P" + lv + " without the risk",
		EndName:   "P" + lv + " with it",
	}
	for _, x := range a.Ranked() {
		if len(t.Bars) == chart.MaxBars {
			break
		}
		t.Bars = append(t.Bars, chart.Bar{Label: shortTitle(x.Risk.ID+" "+x.Risk.Title, 40), Start: a.Reserve - x.Contribution, End: a.Reserve})
	}
	return t
}

// counted is "1 threat", "2 threats".
func counted(n int, one, many string) string {
	if n == 1 {
		return "1 " + one
	}
	return strconv.Itoa(n) + " " + many
}
