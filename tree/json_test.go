package tree_test

import (
	"bytes"
	"strings"
	"testing"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// oilJSON is the oil-drilling prototype of Hillier & Lieberman,
// Introduction to Operations Research, chapter "Decision Analysis": drill
// (+700 oil / −100 dry, prior P(oil) = 0.25) or sell (+90); EMV 100, drill.
const oilJSON = `{
  "title": "Oil drilling",
  "objective": "max",
  "root": {"type": "decision", "label": "Drill or sell", "branches": [
    {"label": "Drill", "node": {"type": "chance", "label": "Oil?", "branches": [
      {"label": "Oil", "probability": 0.25, "cash": 700},
      {"label": "Dry", "probability": "0.75", "cash": -100}]}},
    {"label": "Sell", "cash": 90}]}
}`

func load(t *testing.T, src string) *compiled.Model {
	t.Helper()
	m, ds := tree.ReadJSON([]byte(src), 0)
	if ds.HasErrors() {
		t.Fatalf("read: %v", ds)
	}
	c, ds := compiled.Compile(m)
	if ds.HasErrors() {
		t.Fatalf("compile: %v", ds)
	}
	return c
}

func TestReadJSONOilDrilling(t *testing.T) {
	sol, err := eval.Solve(load(t, oilJSON))
	if err != nil {
		t.Fatal(err)
	}
	// Hillier & Lieberman: EMV(drill) = 0.25×700 − 0.75×100 = 100 > 90.
	if !sol.Value().Equal(decimal.NewFromInt(100)) || sol.Root.Chosen() != 0 {
		t.Fatalf("value %s, chosen %d; want 100 and Drill", sol.Value(), sol.Root.Chosen())
	}
}

func TestReadJSONExact(t *testing.T) {
	// 0.1 + 0.2 + 0.7 is exactly 1 in decimal but not in float64
	// (0.1 + 0.2 = 0.30000000000000004): a reader through float64 would
	// either reject this or carry an error into every figure.
	src := `{"root": {"type": "chance", "label": "c", "branches": [
	  {"label": "a", "probability": 0.1, "cash": "123456789012345678901234567890.123"},
	  {"label": "b", "probability": 0.2},
	  {"label": "c", "probability": 0.7}]}}`
	sol, err := eval.Solve(load(t, src))
	if err != nil {
		t.Fatal(err)
	}
	want := decimal.RequireFromString("12345678901234567890123456789.0123")
	if !sol.Value().Equal(want) {
		t.Fatalf("value %s, want %s", sol.Value(), want)
	}
}

func TestReadJSONErrors(t *testing.T) {
	cases := []struct{ name, src, want string }{
		{"empty", "  ", "1:1: the JSON input is empty"},
		{"syntax", "{\n  \"root\": {\"type\": \"end\",}\n}", "2:26: JSON syntax: invalid character '}' looking for beginning of object key string"},
		{"truncated", `{"root": {"type": "end"`, "JSON syntax: the JSON ends too early"},
		{"no root", `{"title": "x"}`, `1:1: the model has no "root"`},
		{"unknown key", `{"root": {"type": "end", "colour": "red"}}`, `1:36: unknown key "colour" in a node`},
		{"bad type", `{"root": {"type": "choice"}}`, `1:19: unknown node type "choice"`},
		{"bad number", `{"root": {"type": "chance", "branches": [{"label": "a", "probability": "half"}]}}`, `1:72: "probability" of a branch is not a decimal number: "half"`},
		{"number as bool", `{"root": {"type": "end", "value": true}}`, `1:35: "value" of an end node must be a number, not true or false`},
		{"duplicate key", `{"root": {"type": "end"}, "root": {"type": "end"}}`, `1:27: key "root" appears twice in one object`},
		{"objective", `{"objective": "most", "root": {"type": "end"}}`, `1:15: unknown objective "most"`},
		{"trailing", `{"root": {"type": "end"}} {}`, "JSON syntax: unexpected data after the model object"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, ds := tree.ReadJSON([]byte(c.src), 0)
			if !ds.HasErrors() {
				t.Fatalf("no error for %s", c.src)
			}
			if got := ds[0].Error(); !strings.Contains(got, c.want) {
				t.Fatalf("got %q, want %q", got, c.want)
			}
		})
	}
}

func TestReadJSONResolveErrorsHavePositions(t *testing.T) {
	src := "{\"root\": {\"type\": \"chance\", \"label\": \"c\", \"branches\": [\n" +
		"  {\"label\": \"a\", \"probability\": 0.5},\n" +
		"  {\"label\": \"b\", \"probability\": 0.4}]}}"
	m, ds := tree.ReadJSON([]byte(src), 0)
	if ds.HasErrors() {
		t.Fatal(ds)
	}
	_, ds = compiled.Compile(m)
	if len(ds) != 1 || ds[0].Error() != `1:10: probabilities under "c" sum to 0.9, not 1` {
		t.Fatalf("got %v", ds)
	}
}

func TestReadJSONNodeLimit(t *testing.T) {
	_, ds := tree.ReadJSON([]byte(oilJSON), 1)
	if !ds.HasErrors() || !strings.Contains(ds.Error(), "more than 1 nodes") {
		t.Fatalf("got %v", ds)
	}
}

func TestWriteJSONRoundTrip(t *testing.T) {
	m := load(t, oilJSON)
	var buf bytes.Buffer
	if err := tree.WriteJSON(&buf, m.Source(), m, tree.JSONOptions{}); err != nil {
		t.Fatal(err)
	}
	m2 := load(t, buf.String())
	var buf2 bytes.Buffer
	if err := tree.WriteJSON(&buf2, m2.Source(), m2, tree.JSONOptions{}); err != nil {
		t.Fatal(err)
	}
	if buf.String() != buf2.String() {
		t.Fatalf("second write differs:\n%s\n---\n%s", buf.String(), buf2.String())
	}
	s1, _ := eval.Solve(m)
	s2, _ := eval.Solve(m2)
	if !s1.Value().Equal(s2.Value()) {
		t.Fatalf("values differ: %s vs %s", s1.Value(), s2.Value())
	}
}

func FuzzReadJSON(f *testing.F) {
	f.Add([]byte(oilJSON))
	f.Add([]byte(`{"root": {"type": "end", "value": "1e400"}}`))
	f.Add([]byte(`{"objective": "min", "uncertainties": [{"name": "u", "states": [{"label": "a", "probability": 0.5}, {"label": "b", "probability": 0.5}]}],
	  "tests": [{"name": "t", "on": "u", "cost": 1, "readings": [{"label": "x", "likelihoods": [{"state": "a", "probability": 0.9}, {"state": "b", "probability": 0.2}]},
	  {"label": "y", "likelihoods": [{"state": "a", "probability": 0.1}, {"state": "b", "probability": 0.8}]}]}],
	  "root": {"type": "chance", "test": "t", "branches": [{"label": "x", "node": {"type": "chance", "uncertainty": "u", "branches": [{"label": "a", "cash": 5}, {"label": "b"}]}}, {"label": "y"}]}}`))
	f.Add([]byte(`{"root": [1, 2, {"a": null}]}`))
	f.Add([]byte(`{"root": {"type": "decision", "branches": [{"label": "a", "node": {"type": "decision", "branches": []}}]}}`))
	f.Fuzz(func(t *testing.T, src []byte) {
		m, ds := tree.ReadJSON(src, 10_000)
		if ds.HasErrors() {
			return
		}
		if m == nil {
			t.Fatal("no model and no error")
		}
		c, cs := compiled.Compile(m)
		if cs.HasErrors() {
			return
		}
		if _, err := eval.Solve(c); err != nil {
			t.Fatalf("compiled model does not solve: %v", err)
		}
	})
}

func TestReadJSONByteOrderMark(t *testing.T) {
	m := load(t, "\ufeff"+oilJSON)
	sol, err := eval.Solve(m)
	if err != nil || !sol.Value().Equal(decimal.NewFromInt(100)) {
		t.Fatalf("with a byte-order mark: %v %v", sol, err)
	}
}
