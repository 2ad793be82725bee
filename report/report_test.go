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

func TestOptionNamesApply(t *testing.T) {
	for _, c := range []struct {
		names    report.OptionNames
		msg, out string
	}{
		{nil, "raise VOIOptions.MaxWork", "raise VOIOptions.MaxWork"},
		{report.OptionNames{"VOIOptions.MaxWork": "--max-work"}, "raise VOIOptions.MaxWork to allow more", "raise --max-work to allow more"},
		// The longer name wins where one holds the other.
		{report.OptionNames{"Low": "LOW", "BreakevenOptions.Low and High": "--in LOW..HIGH"}, "give BreakevenOptions.Low and High", "give --in LOW..HIGH"},
		{report.OptionNames{"A": "B", "B": "C"}, "A B", "B C"}, // one pass: no chains
		{report.OptionNames{"": "x"}, "abc", "abc"},
	} {
		if got := c.names.Apply(c.msg); got != c.out {
			t.Errorf("%v.Apply(%q) = %q, want %q", c.names, c.msg, got, c.out)
		}
	}
}

// Every report marshals (encoding/json) to the compact form of what
// WriteJSON writes, and writes the same bytes every time.
func TestReportsJSON(t *testing.T) {
	sol := load()
	ctx := context.Background()
	info, err := eval.ValueOfInformation(ctx, sol, eval.VOIOptions{})
	if err != nil {
		t.Fatal(err)
	}
	be, err := eval.FindBreakeven(ctx, sol.Compiled, eval.BreakevenOptions{Vary: eval.Vary{Kind: eval.VaryState, Name: "demand", Label: "Busy"}})
	if err != nil {
		t.Fatal(err)
	}
	for name, r := range map[string]report.Report{
		"solve":     report.Solve(sol, report.SolveOptions{}),
		"voi":       report.VOI(sol, info, report.VOIOptions{}),
		"breakeven": report.Breakeven(sol.Compiled, be, report.BreakevenOptions{}),
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
		if !strings.HasSuffix(w1.String(), "}\n") || text1.Len() == 0 {
			t.Errorf("%s: JSON %q, text %q", name, w1.String(), text1.String())
		}
	}
}

// A note that names a library option reads, in a report made with Names,
// under the reader's name for it, in the text and in the JSON alike.
func TestVOINotesRenamed(t *testing.T) {
	sol := load()
	info, err := eval.ValueOfInformation(context.Background(), sol, eval.VOIOptions{MaxScenarios: 1})
	if err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(info.TotalNote, "VOIOptions.MaxScenarios") {
		t.Fatalf("the analysis's note does not name its option: %q", info.TotalNote)
	}
	plain := report.VOI(sol, info, report.VOIOptions{})
	renamed := report.VOI(sol, info, report.VOIOptions{Names: report.OptionNames{"VOIOptions.MaxScenarios": "--max-scenarios"}})
	var pt, rt, rj bytes.Buffer
	plain.WriteText(&pt)
	renamed.WriteText(&rt)
	renamed.WriteJSON(&rj)
	if !strings.Contains(pt.String(), "raise VOIOptions.MaxScenarios") {
		t.Errorf("without names the option is not named as it is:\n%s", pt.String())
	}
	for what, out := range map[string]string{"text": rt.String(), "JSON": rj.String()} {
		if strings.Contains(out, "VOIOptions") || !strings.Contains(out, "raise --max-scenarios to allow more") {
			t.Errorf("%s:\n%s", what, out)
		}
	}
}
