package main

import (
	"encoding/json"
	"strings"
	"testing"

	"github.com/forkcast/forkcast/examples"
)

// TestSolvedJSONBreakeven: the solved JSON of the sourcing example, read
// back as a model, finds the same switch in the licence fee as the text:
// JSON models carry their inputs and ranges.
func TestSolvedJSONBreakeven(t *testing.T) {
	_, solved, _ := forkcast(t, "", "solve", "--json", "../../examples/sourcing.fork")
	path := writeFile(t, "sourcing.json", solved)
	code, fromText, errs := forkcast(t, "", "breakeven", "--vary", "licence", "../../examples/sourcing.fork")
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	code, fromJSON, errs := forkcast(t, "", "breakeven", "--vary", "licence", path)
	if code != 0 {
		t.Fatalf("exit %d on the solved JSON: %s", code, errs)
	}
	if fromJSON != fromText {
		t.Fatalf("breakeven on the solved JSON:\n%s\non the text:\n%s", fromJSON, fromText)
	}
	// The switch itself, worked out by hand from the example: "Buy a
	// licence" is worth 0.7 × 1,310,000 + 0.3 × 1,160,000 − licence =
	// 1,265,000 − licence against 964,000 for the lease, so the two break
	// even at a licence of 301,000.
	if !strings.Contains(fromText, "301,000") {
		t.Fatalf("no switch at 301,000:\n%s", fromText)
	}
}

// TestJSONRoundTripCommands writes every bundled example as solved JSON and
// runs every analysis on the JSON and on the text: each prints the same,
// so the JSON kept every input, range, uncertainty, test and calculation.
func TestJSONRoundTripCommands(t *testing.T) {
	for _, name := range examples.Names() {
		t.Run(name, func(t *testing.T) {
			text := "example:" + name
			code, solved, errs := forkcast(t, "", "solve", "--json", text)
			if code != 0 {
				t.Fatalf("exit %d: %s", code, errs)
			}
			if strings.Contains(solved, `"register `) {
				t.Skip("the JSON holds no registers: a model that takes inputs from one is read from its text")
			}
			path := writeFile(t, name+".json", solved)
			runs := [][]string{{"solve"}, {"solve", "--json"}, {"voi"}, {"voi", "--json"}, {"draw", "--format", "dot", "-o", "-"}}
			for _, v := range varied(t, solved) {
				runs = append(runs, []string{"breakeven", "--vary", v}, []string{"breakeven", "--json", "--vary", v})
			}
			for _, args := range runs {
				c1, want, e1 := forkcast(t, "", append(args, text)...)
				c2, got, e2 := forkcast(t, "", append(args, path)...)
				if c1 != c2 || got != want {
					t.Errorf("%s: on the text (exit %d) %s%s\non the JSON (exit %d) %s%s", strings.Join(args, " "), c1, want, e1, c2, got, e2)
				}
			}
		})
	}
}

// varied lists what breakeven can vary in a solved model: every input with
// a range and every state of every uncertainty.
func varied(t *testing.T, solved string) []string {
	var m struct {
		Inputs []struct {
			Name string
			Low  any
		}
		Uncertainties []struct {
			Name   string
			States []struct{ Label string }
		}
	}
	if err := json.Unmarshal([]byte(solved), &m); err != nil {
		t.Fatal(err)
	}
	var out []string
	for _, in := range m.Inputs {
		if in.Low != nil {
			out = append(out, in.Name)
		}
	}
	for _, u := range m.Uncertainties {
		for _, s := range u.States {
			out = append(out, u.Name+":"+s.Label)
		}
	}
	if len(out) == 0 {
		t.Fatal("nothing to vary")
	}
	return out
}

// TestStdinJSONDetection: standard input is read as JSON when its first
// character other than white space (and a byte-order mark) is a brace,
// however much white space comes first (70 spaces were once read as text).
func TestStdinJSONDetection(t *testing.T) {
	model := `{"root": {"type": "decision", "label": "d", "branches": [{"label": "a", "gain": 7}]}}`
	for _, lead := range []string{"", strings.Repeat(" ", 70), "\ufeff" + strings.Repeat("\r\n\t ", 5000)} {
		code, out, errs := forkcast(t, lead+model, "solve", "--json", "-")
		if code != 0 || !strings.Contains(out, `"value": "7"`) {
			t.Errorf("%d characters of white space: exit %d, %s%s", len(lead), code, out, errs)
		}
	}
	// Text after white space is still text.
	code, out, errs := forkcast(t, strings.Repeat("\n", 100)+"decision \"d\"\n  \"a\" gain 7\n", "solve", "-")
	if code != 0 || !strings.Contains(out, "7.00") {
		t.Errorf("text after blank lines: exit %d, %s%s", code, out, errs)
	}
}
