package report

import (
	"bytes"
	"fmt"
	"io"
	"strings"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/render"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// ProfileOptions say what the risk profile report shows.
type ProfileOptions struct {
	// Risk, when set, adds each option's certainty equivalent and risk
	// premium; the profiles should then follow Risk's policy (profile
	// Risk.Averse).
	Risk *eval.RiskSolution
	// Outcomes is the most payoffs listed per option in the text (0: the
	// default, DefaultOutcomes; negative: all); NoOutcomes leaves the lists
	// out. The JSON lists them all.
	Outcomes   int
	NoOutcomes bool
	// Names renames the library options that notes mention.
	Names OptionNames
}

// DefaultOutcomes is how many payoffs the text lists per option unless
// told otherwise.
const DefaultOutcomes = 25

// ProfileReport is the report of risk profiles: a table of each option's
// summary figures (expected value, standard deviation, range, percentiles,
// chance of a loss), each option's payoffs with their probabilities, and
// the stochastic dominance between options.
//
// Its JSON shape (exact decimal strings, except "sd" when "sd_exact" is
// false and the risk figures, which are rounded):
//
//	{"title", "objective", "currency", "decision" (absent for a tree with
//	 no decision), "path": [...], "threshold", "exact",
//	 "risk_tolerance"?, "risk_note"?,
//	 "options": [{"label", "taken", "mean", "sd", "sd_exact", "variance",
//	              "min", "max", "p_loss",
//	              "percentiles": {"P5", "P10", "P50", "P90", "P95"},
//	              "certainty_equivalent"?, "risk_premium"?,
//	              "distribution": [{"value", "probability"}]}],
//	 "dominance": [{"better", "worse", "order", "sentence"}],
//	 "notes": [...]}
type ProfileReport struct {
	Model   *compiled.Model
	Result  *eval.Profiles
	Options ProfileOptions
}

// Profile is the report of ps, risk profiles of c (eval.RiskProfiles).
func Profile(c *compiled.Model, ps *eval.Profiles, opts ProfileOptions) *ProfileReport {
	return &ProfileReport{Model: c, Result: ps, Options: opts}
}

// riskNote says how certainty equivalents are computed; tolerance is the
// risk tolerance as it is to be shown.
func riskNote(tolerance string) string {
	return fmt.Sprintf("certainty equivalents of an exponential utility with risk tolerance %s, computed with exp and ln in float64 and rounded to %d significant digits", tolerance, eval.RiskDigits)
}

// toleranceText is a risk tolerance as money, except that one the minor
// unit would round by more than a thousandth of itself (0.000001 shown as
// 0.00, which reads as no tolerance at all) is shown as given.
func toleranceText(d decimal.Decimal, cur string) string {
	unit := render.MinorUnit(cur)
	if r := d.Round(unit); r.Sub(d).Abs().Mul(decimal.NewFromInt(1000)).GreaterThan(d.Abs()) {
		// Money is Amount and the code after it, as safe to print.
		return render.Grouped(d.String()) + strings.TrimPrefix(render.Money(d, cur), render.Amount(d, cur))
	}
	return render.Money(d, cur)
}

// probText is a probability as a percentage to two decimals, never
// rounded to 0% or 100% when it is neither.
func probText(p decimal.Decimal) string {
	s := render.Percent(p, 2)
	switch {
	case s == "0%" && p.IsPositive():
		return "<0.01%"
	case s == "100%" && p.LessThan(decimal.NewFromInt(1)):
		return ">99.99%"
	}
	return s
}

// WriteText writes the summary table, the payoffs of each option and the
// dominance between them.
func (r *ProfileReport) WriteText(out io.Writer) error {
	w := newTextOut(out)
	m, ps := r.Model.Source(), r.Result
	cur := m.Currency
	amount := func(d decimal.Decimal) string { return render.Amount(d, cur) }
	if m.Title != "" {
		w.ln(m.Title)
	}
	what := "payoff"
	if ps.Objective == tree.Min {
		what = "cost"
	}
	unit := ""
	if cur != "" {
		unit = " in " + strings.TrimSpace(strings.TrimPrefix(render.Money(decimal.Zero, cur), render.Amount(decimal.Zero, cur)))
	}
	if ps.Decision == nil {
		w.f("risk profile of the whole tree (it has no decision)\n")
	} else {
		w.f("risk profiles of decision %s%s", quoted(ps.Decision.Display()), afterPath(ps.Path))
		w.ln()
		after := "the best choices made after it"
		if r.Options.Risk != nil {
			after = "the risk-averse choices made after it"
		}
		w.f("each option taken, %s; %ss%s counted from the decision on\n", after, what, unit)
	}
	loss := "below"
	if ps.Objective == tree.Min {
		loss = "above"
	}
	w.f("a loss is a %s %s %s\n", what, loss, render.Money(ps.Threshold, cur))
	if !ps.Exact {
		w.f("note: some figures went through a rounded division (%d decimal places)\n", compiled.DivisionScale)
	}
	if rs := r.Options.Risk; rs != nil {
		w.f("note: %s\n", riskNote(toleranceText(rs.Tolerance, cur)))
	}
	for _, n := range ps.Notes {
		w.f("note: %s\n", r.Options.Names.Apply(n))
	}
	writeMeans(w, r.Model)
	w.ln()
	// The summary: one column per option.
	head := []string{""}
	for _, p := range ps.Options {
		label := p.Label
		if ps.Decision == nil {
			label = "whole tree"
		}
		if p.Taken {
			label = "* " + label
		}
		head = append(head, label)
	}
	rows := [][]string{head}
	row := func(name string, f func(p eval.Profile) string) {
		cells := []string{name}
		for _, p := range ps.Options {
			cells = append(cells, f(p))
		}
		rows = append(rows, cells)
	}
	row("expected "+what, func(p eval.Profile) string { return amount(p.Mean) })
	row("standard deviation", func(p eval.Profile) string { return amount(p.SD) })
	row("minimum", func(p eval.Profile) string { return amount(p.Min) })
	for k, pc := range eval.ProfilePercents() {
		name := fmt.Sprintf("P%d", pc)
		if pc == 50 {
			name += " (median)"
		}
		row(name, func(p eval.Profile) string { return amount(p.Percentiles[k].Value) })
	}
	row("maximum", func(p eval.Profile) string { return amount(p.Max) })
	row("chance of a loss", func(p eval.Profile) string { return probText(p.Loss) })
	if rs := r.Options.Risk; rs != nil && ps.Node >= 0 {
		row("certainty equivalent", func(p eval.Profile) string { return amount(rs.BranchValue(ps.Node, p.Branch)) })
		row("risk premium", func(p eval.Profile) string { return amount(rs.Premium(ps.Node, p.Branch)) })
	}
	right := make([]bool, len(head))
	for i := 1; i < len(right); i++ {
		right[i] = true
	}
	textTable(w, "  ", 3, right, rows)
	switch {
	case ps.Decision != nil && r.Options.Risk != nil:
		w.ln("  (* the option the risk-averse policy takes)")
	case ps.Decision != nil:
		w.ln("  (* the option the policy takes)")
	}
	// The payoffs of each option.
	limit := r.Options.Outcomes
	if limit == 0 {
		limit = DefaultOutcomes
	}
	for _, p := range ps.Options {
		if r.Options.NoOutcomes {
			break
		}
		w.ln()
		if ps.Decision == nil {
			w.f("Outcomes of the whole tree (%d)\n", len(p.Outcomes))
		} else {
			w.f("Outcomes of %s (%d)\n", quoted(p.Label), len(p.Outcomes))
		}
		rows := [][]string{{what, "probability", "cumulative"}}
		cum := decimal.Zero
		for k, o := range p.Outcomes {
			cum = cum.Add(o.Probability)
			if limit >= 0 && k >= limit {
				continue
			}
			rows = append(rows, []string{amount(o.Value), probText(o.Probability), probText(cum)})
		}
		textTable(w, "  ", 3, []bool{true, true, true}, rows)
		if left := len(p.Outcomes) - limit; limit >= 0 && left > 0 {
			w.f("  … %d more (--outcomes -1 lists them all; --json has them all)\n", left)
		}
	}
	if ps.Decision != nil && len(ps.Options) > 1 {
		w.ln()
		w.ln("Dominance")
		switch {
		case ps.Drawn:
			w.ln("  Not judged: figures under the decision are drawn from distributions and stand")
			w.ln("  at their means here; `forkcast simulate` shows how the options spread.")
		case len(ps.Dominance) == 0:
			w.ln("  No option dominates another: each is better for some decision maker.")
		}
		for _, d := range ps.Dominance {
			w.f("  %s\n", ps.Sentence(d))
		}
	}
	return w.Flush()
}

type profileJSON struct {
	Title         string              `json:"title,omitempty"`
	Objective     string              `json:"objective"`
	Currency      string              `json:"currency,omitempty"`
	Decision      *string             `json:"decision,omitempty"`
	Path          []string            `json:"path"`
	Threshold     string              `json:"threshold"`
	Exact         bool                `json:"exact"`
	RiskTolerance string              `json:"risk_tolerance,omitempty"`
	RiskNote      string              `json:"risk_note,omitempty"`
	Options       []profileOptionJSON `json:"options"`
	Dominance     []dominanceJSON     `json:"dominance"`
	Means         []meanJSON          `json:"means,omitempty"`
	Notes         []string            `json:"notes"`
}

type profileOptionJSON struct {
	Label        string          `json:"label"`
	Taken        bool            `json:"taken"`
	Mean         string          `json:"mean"`
	SD           string          `json:"sd"`
	SDExact      bool            `json:"sd_exact"`
	Variance     string          `json:"variance"`
	Min          string          `json:"min"`
	Max          string          `json:"max"`
	PLoss        string          `json:"p_loss"`
	Percentiles  percentilesJSON `json:"percentiles"`
	CE           string          `json:"certainty_equivalent,omitempty"`
	Premium      string          `json:"risk_premium,omitempty"`
	Distribution []outcomeJSON   `json:"distribution"`
}

// percentilesJSON is an object {"P5": …, "P10": …} in ascending order.
type percentilesJSON []eval.Percentile

func (ps percentilesJSON) MarshalJSON() ([]byte, error) {
	var b bytes.Buffer
	b.WriteByte('{')
	for i, p := range ps {
		if i > 0 {
			b.WriteByte(',')
		}
		fmt.Fprintf(&b, `"P%d":%q`, p.P, p.Value.String())
	}
	b.WriteByte('}')
	return b.Bytes(), nil
}

type outcomeJSON struct {
	Value       string `json:"value"`
	Probability string `json:"probability"`
}

type dominanceJSON struct {
	Better   string `json:"better"`
	Worse    string `json:"worse"`
	Order    int    `json:"order"`
	Sentence string `json:"sentence"`
}

// WriteJSON writes the profiles in the shape described on ProfileReport.
func (r *ProfileReport) WriteJSON(w io.Writer) error { return writeJSON(w, r.shape()) }

// MarshalJSON is WriteJSON's document, compact.
func (r *ProfileReport) MarshalJSON() ([]byte, error) { return marshalJSON(r.WriteJSON) }

func (r *ProfileReport) shape() profileJSON {
	m, ps := r.Model.Source(), r.Result
	out := profileJSON{Title: m.Title, Objective: m.Objective.String(), Currency: m.Currency,
		Path: append([]string{}, ps.Path...), Threshold: ps.Threshold.String(), Exact: ps.Exact,
		Options: []profileOptionJSON{}, Dominance: []dominanceJSON{}, Notes: []string{}}
	out.Means = meansNonEmpty(r.Model)
	if ps.Decision != nil {
		d := ps.Decision.Display()
		out.Decision = &d
	}
	rs := r.Options.Risk
	if rs != nil {
		out.RiskTolerance = rs.Tolerance.String()
		out.RiskNote = riskNote(rs.Tolerance.String())
	}
	for _, p := range ps.Options {
		o := profileOptionJSON{Label: p.Label, Taken: p.Taken, Mean: p.Mean.String(), SD: p.SD.String(), SDExact: p.SDExact,
			Variance: p.Variance.String(), Min: p.Min.String(), Max: p.Max.String(), PLoss: p.Loss.String(),
			Percentiles: percentilesJSON(p.Percentiles), Distribution: make([]outcomeJSON, len(p.Outcomes))}
		if rs != nil && ps.Node >= 0 {
			o.CE = rs.BranchValue(ps.Node, p.Branch).String()
			o.Premium = rs.Premium(ps.Node, p.Branch).String()
		}
		for k, oc := range p.Outcomes {
			o.Distribution[k] = outcomeJSON{Value: oc.Value.String(), Probability: oc.Probability.String()}
		}
		out.Options = append(out.Options, o)
	}
	for _, d := range ps.Dominance {
		out.Dominance = append(out.Dominance, dominanceJSON{Better: ps.Options[d.Better].Label, Worse: ps.Options[d.Worse].Label,
			Order: d.Order, Sentence: ps.Sentence(d)})
	}
	if ps.Drawn {
		out.Notes = append(out.Notes, "dominance not judged: figures under the decision are drawn from distributions and stand at their means here")
	}
	for _, n := range ps.Notes {
		out.Notes = append(out.Notes, r.Options.Names.Apply(n))
	}
	return out
}
