package report

import (
	"strings"

	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/render"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// The solve report under a risk tolerance: the tree rolled back on
// certainty equivalents (SolveOptions.Risk).

// writeRiskText writes the certainty equivalent, what the caution costs,
// the risk-averse policy with every option's expected value, certainty
// equivalent and risk premium, and the tree of that policy.
func (r *SolveReport) writeRiskText(t textOut) {
	rs := r.Options.Risk
	sol := rs.Averse
	m := sol.Model
	p := printer{t: t, m: m, cur: m.Currency}
	if m.Title != "" {
		t.ln(m.Title)
	}
	ev, sure := "expected value:", ""
	if m.Objective == tree.Min {
		ev, sure = "expected cost: ", " (a certain cost)"
	}
	t.f("objective:             %s\n", objectiveText(m))
	t.f("risk attitude:         risk averse, exponential utility with risk tolerance %s\n", toleranceText(rs.Tolerance, p.cur))
	t.f("certainty equivalent:  %s%s\n", p.money(rs.CE()), sure)
	t.f("%s        %s  (of the risk-averse policy)\n", ev, p.money(sol.Value()))
	t.f("risk premium:          %s\n", p.money(rs.RootPremium()))
	t.f("note:                  certainty equivalents need exp and ln: they are computed in\n"+
		"                       float64 and rounded to %d significant digits; expected values\n"+
		"                       are exact\n", eval.RiskDigits)
	for _, n := range rs.Notes {
		t.f("note:                  %s\n", n)
	}
	t.ln()
	diffs := rs.Differences()
	if len(diffs) == 0 {
		t.ln("The risk-averse policy is the expected-value policy: caution costs nothing here.")
	} else {
		names := make([]string, len(diffs))
		for k, s := range diffs {
			names[k] = quoted(s.Node.Display())
		}
		t.f("The risk-averse policy differs from the expected-value policy at %s.\n", strings.Join(names, ", "))
		t.f("The expected-value policy expects %s: caution costs %s in expected value.\n", p.money(rs.EMV.Value()), p.money(rs.Cost()))
	}
	t.ln()
	t.ln("Recommended policy (risk averse: the largest certainty equivalent at every decision;")
	t.ln("EMV is each option's expected value with the risk-averse choices after it)")
	p.riskPolicy(rs)
	if !r.Options.OmitTree {
		t.ln()
		t.f("%s", strings.Replace(treeKey(figuresFor(m)), "Tree\n", "Tree, the risk-averse choices taken\n", 1))
		p.tree(sol)
	}
}

// riskPolicy lists the decisions the risk-averse policy reaches, each
// option with its expected value (the risk-averse choices made after it),
// certainty equivalent and risk premium.
func (p printer) riskPolicy(rs *eval.RiskSolution) {
	w := p.t
	sol := rs.Averse
	amount := func(d decimal.Decimal) string { return render.Amount(d, p.cur) }
	chanceAbove := nearestChance(sol)
	ds, averse := rs.Decisions()
	for n, s := range ds {
		i := s.Number()
		w.f("  %d. %s", n+1, quoted(s.Node.Display()))
		if cond := conditions(sol, chanceAbove, s); cond != "" {
			w.f("  (if %s)", cond)
		}
		if !averse[n] {
			w.f("  (reached only by the expected-value policy)")
		}
		w.ln()
		chosen := rs.Chosen(i)
		rows := [][]string{{"", "EMV", "CE", "risk premium"}}
		for j, b := range s.Node.Branches {
			mark := "  "
			if j == chosen {
				mark = "* "
			}
			rows = append(rows, []string{mark + b.Label, amount(s.BranchValue(j)), amount(rs.BranchValue(i, j)), amount(rs.Premium(i, j))})
		}
		textTable(w, "     ", 3, []bool{false, true, true, true}, rows)
		c := quoted(s.Node.Branches[chosen].Label)
		if len(s.Node.Branches) < 2 {
			w.f("     take %s (the only option)\n", c)
		} else {
			ru := -1
			for j := range s.Node.Branches {
				if j != chosen && (ru < 0 || rs.BranchValue(i, j).GreaterThan(rs.BranchValue(i, ru)) == (sol.Model.Objective == tree.Max)) {
					ru = j
				}
			}
			gap := rs.BranchValue(i, chosen).Sub(rs.BranchValue(i, ru)).Abs()
			w.f("     take %s: its certainty equivalent is better by %s than that of %s\n", c, p.money(gap), quoted(s.Node.Branches[ru].Label))
		}
		if e := rs.EMV.At(i); !e.IsBest(chosen) {
			best := e.Chosen()
			what := "expected value"
			if sol.Model.Objective == tree.Min {
				what = "expected cost"
			}
			w.f("     the expected-value policy takes %s here (%s %s, against %s)\n",
				quoted(s.Node.Branches[best].Label), what, p.money(e.BranchValue(best)), p.money(e.BranchValue(chosen)))
		}
	}
	if len(ds) == 0 {
		w.ln("  (the tree has no decision: nothing to choose)")
	}
}
