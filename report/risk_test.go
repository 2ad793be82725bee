package report_test

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"strings"
	"testing"

	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/lang"
	"github.com/forkcast/forkcast/report"
	"github.com/shopspring/decimal"
)

// The reports of risk profiles, of a solve on certainty equivalents and of
// a breakeven risk tolerance marshal (encoding/json) to the compact form
// of what WriteJSON writes, and write the same bytes every time.
func TestRiskReportsJSON(t *testing.T) {
	sol := load()
	ctx := context.Background()
	ps, err := eval.RiskProfiles(ctx, sol, eval.ProfileOptions{})
	if err != nil {
		t.Fatal(err)
	}
	rs, err := eval.SolveRiskAverse(sol, decimal.NewFromInt(20_000))
	if err != nil {
		t.Fatal(err)
	}
	tb, err := eval.FindToleranceBreakeven(ctx, sol, eval.ToleranceOptions{})
	if err != nil {
		t.Fatal(err)
	}
	for name, r := range map[string]report.Report{
		"profile":      report.Profile(sol.Compiled, ps, report.ProfileOptions{}),
		"profile risk": report.Profile(sol.Compiled, ps, report.ProfileOptions{Risk: rs}),
		"solve risk":   report.Solve(sol, report.SolveOptions{Risk: rs}),
		"tolerance":    report.Tolerance(sol.Compiled, tb, report.BreakevenOptions{}),
	} {
		var w1, w2, compact, text1, text2 bytes.Buffer
		if err := r.WriteJSON(&w1); err != nil {
			t.Fatal(err)
		}
		r.WriteJSON(&w2)
		r.WriteText(&text1)
		r.WriteText(&text2)
		if w1.String() != w2.String() || text1.String() != text2.String() {
			t.Errorf("%s: two writes differ", name)
		}
		if err := json.Compact(&compact, w1.Bytes()); err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		m, err := json.Marshal(r)
		if err != nil || string(m) != compact.String() {
			t.Errorf("%s: json.Marshal gives %s (%v), WriteJSON %s", name, m, err, compact.String())
		}
	}
}

// A probability too small to show at two decimals is not shown as 0%,
// nor one just short of 1 as 100%.
func TestProfileTinyProbabilities(t *testing.T) {
	sol := solveText(t, `decision "D"
  "Risky"
    chance "Disaster"
      "Yes"  0.000001  cost 1_000_000_000
      "No"   rest      gain 10
  "Safe"`)
	ps, err := eval.RiskProfiles(context.Background(), sol, eval.ProfileOptions{})
	if err != nil {
		t.Fatal(err)
	}
	var out bytes.Buffer
	report.Profile(sol.Compiled, ps, report.ProfileOptions{}).WriteText(&out)
	for _, want := range []string{"<0.01%", ">99.99%"} {
		if !strings.Contains(out.String(), want) {
			t.Errorf("no %s in\n%s", want, out.String())
		}
	}
}

// The profiles of the kiln decision as `forkcast profile --outcomes 2`
// prints them. Deciding now, buying ends at 60,000 − 18,000 with the
// chance of a busy year, 40%, else at 5,000 − 18,000; the standard
// deviation is 55,000 · √(0.4 · 0.6) = 26,944.39.
func ExampleProfile() {
	sol := load()
	ps, err := eval.RiskProfiles(context.Background(), sol, eval.ProfileOptions{At: "Decide now/Kiln"})
	if err != nil {
		fmt.Println(err)
		return
	}
	report.Profile(sol.Compiled, ps, report.ProfileOptions{Outcomes: 2}).WriteText(os.Stdout)
	// Output:
	// Second kiln
	// risk profiles of decision "Kiln" (after "Decide now")
	// each option taken, the best choices made after it; payoffs in EUR counted from the decision on
	// a loss is a payoff below 0.00 EUR
	//
	//                             * Buy   Do not buy
	//   expected payoff        9,000.00         0.00
	//   standard deviation    26,944.39         0.00
	//   minimum              -13,000.00         0.00
	//   P5                   -13,000.00         0.00
	//   P10                  -13,000.00         0.00
	//   P50 (median)         -13,000.00         0.00
	//   P90                   42,000.00         0.00
	//   P95                   42,000.00         0.00
	//   maximum               42,000.00         0.00
	//   chance of a loss            60%           0%
	//   (* the option the policy takes)
	//
	// Outcomes of "Buy" (2)
	//       payoff   probability   cumulative
	//   -13,000.00           60%          60%
	//    42,000.00           40%         100%
	//
	// Outcomes of "Do not buy" (1)
	//   payoff   probability   cumulative
	//     0.00          100%         100%
	//
	// Dominance
	//   No option dominates another: each is better for some decision maker.
}

// solveText loads and solves a model written in the language.
func solveText(t *testing.T, src string) *eval.Solution {
	t.Helper()
	c, ds := lang.Load([]byte(src), lang.Options{})
	if ds.HasErrors() {
		t.Fatal(ds)
	}
	sol, err := eval.Solve(c)
	if err != nil {
		t.Fatal(err)
	}
	return sol
}

// Under objective min the figures are costs and a certainty equivalent is
// a certain cost, the smaller the better: the tolerance search must not
// speak of payoffs or of the largest certainty equivalent.
func TestToleranceTextUnderMin(t *testing.T) {
	sol := solveText(t, `objective min
decision "Approach"
  "Patch"  cost 5_000
    chance "Leak returns"
      "No"   60%
      "Yes"  rest  cost 40_000
  "Replace"  cost 19_000`)
	tb, err := eval.FindToleranceBreakeven(context.Background(), sol, eval.ToleranceOptions{})
	if err != nil {
		t.Fatal(err)
	}
	var out bytes.Buffer
	if err := report.Tolerance(sol.Compiled, tb, report.BreakevenOptions{}).WriteText(&out); err != nil {
		t.Fatal(err)
	}
	text := out.String()
	for _, bad := range []string{"payoffs", "largest certainty equivalent"} {
		if strings.Contains(text, bad) {
			t.Errorf("%q under objective min:\n%s", bad, text)
		}
	}
	for _, want := range []string{"the costs after the decision span 40,000.00", `No switch: "Replace" has the best certainty equivalent`} {
		if !strings.Contains(text, want) {
			t.Errorf("no %q in\n%s", want, text)
		}
	}
}

// A risk tolerance below the currency's minor unit is shown as given, not
// rounded to "0.00 EUR", which reads as no tolerance at all.
func TestSmallRiskToleranceShown(t *testing.T) {
	sol := solveText(t, `currency EUR
decision "D"
  "Gamble"
    chance "Coin"
      "Heads"  50%  gain 10
      "Tails"  rest cost 5
  "Pass"`)
	rs, err := eval.SolveRiskAverse(sol, decimal.RequireFromString("0.000001"))
	if err != nil {
		t.Fatal(err)
	}
	ps, err := eval.RiskProfiles(context.Background(), rs.Averse, eval.ProfileOptions{})
	if err != nil {
		t.Fatal(err)
	}
	for name, r := range map[string]interface{ WriteText(io.Writer) error }{
		"solve":   report.Solve(sol, report.SolveOptions{Risk: rs}),
		"profile": report.Profile(sol.Compiled, ps, report.ProfileOptions{Risk: rs}),
	} {
		var out bytes.Buffer
		if err := r.WriteText(&out); err != nil {
			t.Fatal(err)
		}
		if !strings.Contains(out.String(), "risk tolerance 0.000001 EUR") || strings.Contains(out.String(), "risk tolerance 0.00 EUR") {
			t.Errorf("%s:\n%s", name, out.String())
		}
	}
}
