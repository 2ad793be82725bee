package report_test

import (
	"bytes"
	"context"
	"encoding/json"
	"strings"
	"testing"

	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/report"
)

// An input split into a three-point chance node stands at its P10, P50
// and P90 below that node, not at its mean: the note on the means says so
// rather than listing it as if it stood at its mean everywhere.
func TestMeansNoteSplitInput(t *testing.T) {
	sol := solveText(t, `let labour = triangular(90_000, 110_000, 170_000)
let build  = pert(380_000, 420_000, 610_000)
decision "Bid"
  "Bid"  gain 700_000  cost build
    chance labour by swanson
      decision "Overtime?"
        "Pay overtime"  cost labour + 25_000
        "Accept delay"  cost 150_000
  "Pass"
`)
	var out bytes.Buffer
	r := report.Solve(sol, report.SolveOptions{})
	if err := r.WriteText(&out); err != nil {
		t.Fatal(err)
	}
	text := out.String()
	for _, want := range []string{
		`labour = triangular(90_000, 110_000, 170_000): mean ≈123,333.333333, but at its P10, P50 and P90 below "labour at P10, P50, P90"`,
		"build = pert(380_000, 420_000, 610_000): mean 445,000\n",
	} {
		if !strings.Contains(text, want) {
			t.Errorf("no %q in\n%s", want, text)
		}
	}
	ps, err := eval.RiskProfiles(context.Background(), sol, eval.ProfileOptions{})
	if err != nil {
		t.Fatal(err)
	}
	var js bytes.Buffer
	if err := report.Profile(sol.Compiled, ps, report.ProfileOptions{}).WriteJSON(&js); err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Means []struct {
			Input   string   `json:"input"`
			SplitAt []string `json:"split_at"`
		} `json:"means"`
	}
	if err := json.Unmarshal(js.Bytes(), &doc); err != nil {
		t.Fatal(err)
	}
	got := map[string][]string{}
	for _, m := range doc.Means {
		got[m.Input] = m.SplitAt
	}
	if len(got["labour"]) != 1 || got["labour"][0] != "labour at P10, P50, P90" || got["build"] != nil {
		t.Errorf("means in the JSON: %+v", doc.Means)
	}
}
