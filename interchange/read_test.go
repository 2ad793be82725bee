package interchange_test

import (
	"context"
	"fmt"
	"math/big"
	"os"
	"strings"
	"testing"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/interchange"
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

// oilSurveyJSON is the same prototype with the seismic survey, written
// with an input, a named uncertainty, a test and calculations: the survey
// costs 30, P(favourable | oil) = 0.6, P(favourable | dry) = 0.2.
const oilSurveyJSON = `{
  "title": "Oil drilling with a seismic survey",
  "inputs": [
    {"name": "p_oil", "value": "25%", "low": 0, "high": 1},
    {"name": "drill", "value": 100},
    {"name": "revenue", "value": "8 * drill"}
  ],
  "uncertainties": [
    {"name": "oil", "states": [{"label": "Oil", "probability": "p_oil"}, {"label": "Dry", "probability": "rest"}]}
  ],
  "tests": [
    {"name": "seismic", "label": "Seismic survey", "on": "oil", "cost": "3 * 10",
     "readings": [{"label": "Favourable", "likelihoods": [{"state": "Oil", "probability": "60%"}, {"state": "Dry", "probability": 0.2}]},
                  {"label": "Unfavourable", "likelihoods": [], "rest": true}]}
  ],
  "root": {"type": "decision", "label": "Survey first?", "branches": [
    {"label": "No survey", "node": {"type": "decision", "label": "Drill or sell", "branches": [
      {"label": "Drill", "cost": "drill", "node": {"type": "chance", "uncertainty": "oil", "branches": [
        {"label": "Oil", "gain": "revenue"}, {"label": "Dry"}]}},
      {"label": "Sell", "gain": 90}]}},
    {"label": "Seismic survey", "node": {"type": "chance", "test": "seismic", "branches": [
      {"label": "Favourable", "node": {"type": "decision", "label": "Drill or sell", "branches": [
        {"label": "Drill", "cost": "drill", "node": {"type": "chance", "uncertainty": "oil", "branches": [
          {"label": "Oil", "gain": "revenue"}, {"label": "Dry"}]}},
        {"label": "Sell", "gain": 90}]}},
      {"label": "Unfavourable", "node": {"type": "decision", "label": "Drill or sell", "branches": [
        {"label": "Drill", "cost": "drill", "node": {"type": "chance", "uncertainty": "oil", "branches": [
          {"label": "Oil", "gain": "revenue"}, {"label": "Dry"}]}},
        {"label": "Sell", "gain": 90}]}}]}}]}
}`

func read(t *testing.T, src string) *tree.Model {
	t.Helper()
	m, ds := interchange.ReadBytes([]byte(src), interchange.Options{})
	if ds.HasErrors() {
		t.Fatalf("read: %v", ds)
	}
	return m
}

func load(t *testing.T, src string) *compiled.Model {
	t.Helper()
	c, ds := compiled.Compile(read(t, src))
	if ds.HasErrors() {
		t.Fatalf("compile: %v", ds)
	}
	return c
}

func solve(t *testing.T, src string) *eval.Solution {
	t.Helper()
	sol, err := eval.Solve(load(t, src))
	if err != nil {
		t.Fatal(err)
	}
	return sol
}

func TestReadOilDrilling(t *testing.T) {
	sol := solve(t, oilJSON)
	// Hillier & Lieberman: EMV(drill) = 0.25×700 − 0.75×100 = 100 > 90.
	if !sol.Value().Equal(decimal.NewFromInt(100)) || sol.Root.Chosen() != 0 {
		t.Fatalf("value %s, chosen %d; want 100 and Drill", sol.Value(), sol.Root.Chosen())
	}
}

func TestReadOilDrillingSurvey(t *testing.T) {
	sol := solve(t, oilSurveyJSON)
	// Hillier & Lieberman, with the seismic survey: expected value with the
	// survey 123 after its cost of 30, so the survey is worth doing (123 >
	// 100); EVSI 53.
	v, _ := sol.Value().Float64()
	if d := v - 123; d > 1e-9 || d < -1e-9 || sol.Root.Chosen() != 1 {
		t.Fatalf("value %s, chosen %d; want 123 and the survey", sol.Value(), sol.Root.Chosen())
	}
	tv, err := eval.EVSI(context.Background(), sol, "seismic")
	if err != nil {
		t.Fatal(err)
	}
	evsi, _ := new(big.Rat).SetString(tv.Sites[0].EVSI.String())
	if diff := new(big.Rat).Sub(evsi, big.NewRat(53, 1)); diff.Abs(diff).Cmp(big.NewRat(1, 1e15)) > 0 {
		t.Fatalf("EVSI %s, want 53 (Hillier & Lieberman)", tv.Sites[0].EVSI)
	}
	// Breakeven on the prior: drill and sell break even at P(oil) = 0.2375
	// without the survey (Hillier & Lieberman); the input and its range
	// came from the JSON.
	c := sol.Compiled
	in, ok := c.InputNamed("p_oil")
	if !ok || !in.HasRange || !in.High.Equal(decimal.NewFromInt(1)) || !in.Value.Equal(decimal.RequireFromString("0.25")) {
		t.Fatalf("input p_oil: %+v", in)
	}
}

func TestReadExact(t *testing.T) {
	// 0.1 + 0.2 + 0.7 is exactly 1 in decimal but not in float64
	// (0.1 + 0.2 = 0.30000000000000004): a reader through float64 would
	// either reject this or carry an error into every figure.
	src := `{"root": {"type": "chance", "label": "c", "branches": [
	  {"label": "a", "probability": 0.1, "cash": "123456789012345678901234567890.123"},
	  {"label": "b", "probability": 0.2},
	  {"label": "c", "probability": 0.7}]}}`
	want := decimal.RequireFromString("12345678901234567890123456789.0123")
	if v := solve(t, src).Value(); !v.Equal(want) {
		t.Fatalf("value %s, want %s", v, want)
	}
}

// TestReadFigures checks how each way of writing a figure is read: the
// value is worked out by hand (common practice: gain − cost is the net
// value of a branch).
func TestReadFigures(t *testing.T) {
	cases := []struct {
		name, objective, branch, want string
	}{
		{"json number", "max", `"gain": 12.5`, "12.5"},
		{"exponent", "max", `"gain": 1.25E3`, "1250"},
		{"decimal string", "max", `"gain": "-0.5"`, "-0.5"},
		{"calculation", "max", `"gain": "12 * 61_000 - fee"`, "731960"},
		{"percent", "max", `"gain": "150% * fee"`, "60"},
		{"gain and cost", "max", `"gain": 100, "cost": "fee"`, "60"},
		{"cash under max is a gain", "max", `"cash": 7`, "7"},
		{"cash under min is a cost", "min", `"cash": 7`, "7"},
		{"cash adds to gain", "max", `"gain": 100, "cash": 5, "cost": 1`, "104"},
		{"cash adds to cost", "min", `"cost": 100, "cash": 5, "gain": 1`, "104"},
		{"cost under min", "min", `"cost": "fee * 2"`, "80"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			src := `{"objective": "` + c.objective + `", "inputs": [{"name": "fee", "value": 40}],
			  "root": {"type": "decision", "label": "d", "branches": [{"label": "x", ` + c.branch + `}]}}`
			sol := solve(t, src)
			if !sol.Value().Equal(decimal.RequireFromString(c.want)) {
				t.Fatalf("value %s, want %s", sol.Value(), c.want)
			}
		})
	}
}

// TestReadPayoff checks an end node's own value: "payoff" in the
// objective's terms, "value" standing for it when there is none (an older
// file), and the solved annotation "value" ignored beside a "payoff".
func TestReadPayoff(t *testing.T) {
	cases := []struct{ name, objective, end, want string }{
		{"payoff", "max", `"payoff": "2 * 21"`, "42"},
		{"payoff under min", "min", `"payoff": 42`, "42"},
		{"value", "max", `"value": 42`, "42"},
		{"value under min", "min", `"value": "42"`, "42"},
		{"value beside payoff", "max", `"value": "999", "payoff": 42`, "42"},
		{"payoff after value", "min", `"payoff": 42, "value": "-1"`, "42"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			src := `{"objective": "` + c.objective + `", "root": {"type": "decision", "label": "d", "branches": [
			  {"label": "x", "node": {"type": "end", ` + c.end + `}}]}}`
			if v := solve(t, src).Value(); !v.Equal(decimal.RequireFromString(c.want)) {
				t.Fatalf("value %s, want %s", v, c.want)
			}
		})
	}
}

// TestReadKeysInAnyOrder puts the objective after the tree and a node's
// type after its branches and value: JSON objects are unordered.
func TestReadKeysInAnyOrder(t *testing.T) {
	src := `{"root": {"branches": [{"node": {"value": 10, "type": "end"}, "cash": 3, "label": "x"}], "label": "d", "type": "decision"},
	  "inputs": [{"value": 1, "name": "unused"}], "objective": "min"}`
	m := read(t, src)
	c, _ := compiled.Compile(m)
	sol, err := eval.Solve(c)
	if err != nil {
		t.Fatal(err)
	}
	// Under min: a cash of 3 is a cost and an end value of 10 a cost:
	// total cost 13.
	if !sol.Value().Equal(decimal.NewFromInt(13)) {
		t.Fatalf("value %s, want 13", sol.Value())
	}
}

func TestReadErrors(t *testing.T) {
	cases := []struct{ name, src, want string }{
		{"empty", "  ", "1:1: the JSON input is empty"},
		{"not an object", "[1, 2]", "1:1: the model must be a JSON object, not an array"},
		{"syntax", "{\n  \"root\": {\"type\": \"end\",}\n}", "2:26: JSON syntax: expected a key in double quotes, found `}`"},
		{"truncated", `{"root": {"type": "end"`, "JSON syntax: the JSON ends too early"},
		{"no root", `{"title": "x"}`, `1:1: the model has no "root"`},
		{"unknown key", `{"root": {"type": "end", "colour": "red"}}`, `1:26: unknown key "colour" in a node`},
		{"bad type", `{"root": {"type": "choice"}}`, `1:19: unknown node type "choice"`},
		{"no type", `{"root": {"label": "x"}}`, `1:10: a node has no "type"`},
		{"bad number", `{"root": {"type": "chance", "branches": [{"label": "a", "probability": "half"}]}}`, `1:73: unknown name "half"`},
		{"number as bool", `{"root": {"type": "end", "value": true}}`, `1:35: "value" of a node must be a number, not true or false`},
		{"duplicate key", `{"root": {"type": "end"}, "root": {"type": "end"}}`, `1:27: key "root" appears twice in one object`},
		{"objective", `{"objective": "most", "root": {"type": "end"}}`, `1:15: unknown objective "most"`},
		{"trailing", `{"root": {"type": "end"}} {}`, "1:27: JSON syntax: unexpected data after the model object"},
		{"leading zero", `{"root": {"type": "end", "value": 012}}`, "1:35: JSON syntax: a JSON number cannot start with 0 followed by digits"},
		{"nan", `{"root": {"type": "end", "value": NaN}}`, "1:35: JSON syntax: unexpected character 'N' in the JSON"},
		{"too many digits", `{"root": {"type": "end", "value": 1` + strings.Repeat("0", 100) + `}}`, "1:35: the number 100000000000000000000000000000000000000… has 101 digits; a number may have at most 100"},
		{"exponent too big", `{"root": {"type": "end", "value": 1e400}}`, "1:35: the number 1e400 has 401 digits written out in full; a number may have at most 100"},
		{"exponent string", `{"root": {"type": "end", "value": "1e400"}}`, "1:36: 1e400 is not a number"},
		{"bad escape", `{"title": "a\qb", "root": {"type": "end"}}`, `1:13: JSON syntax: unknown escape \q in a string`},
		{"raw newline", "{\"title\": \"a\nb\", \"root\": {\"type\": \"end\"}}", "1:13: JSON syntax: control character U+000A inside a string"},
		{"control in label", `{"title": "a\u001b[2J", "root": {"type": "end"}}`, `1:13: the control character U+001B in "title" of the model`},
		{"rest as amount", `{"root": {"type": "decision", "label": "d", "branches": [{"label": "a", "gain": "rest"}]}}`, "1:82: `rest` cannot be part of a calculation"},
		{"range with one end", `{"inputs": [{"name": "x", "value": 1, "low": 0}], "root": {"type": "end"}}`, `1:39: the range of input "x" needs both ends`},
		{"bad input name", `{"inputs": [{"name": "my fee", "value": 1}], "root": {"type": "end"}}`, `1:22: the input name "my fee" cannot be used in a calculation`},
		{"input without value", `{"inputs": [{"name": "x"}], "root": {"type": "end"}}`, `1:13: input "x" has no "value"`},
		{"branch without label", `{"root": {"type": "decision", "branches": [{"gain": 1}]}}`, `1:44: a branch has no "label"`},
		{"payoff on a decision", `{"root": {"type": "decision", "payoff": 3, "branches": [{"label": "a"}]}}`, `1:41: decision node has a "payoff"; only an end node has one`},
		{"unknown name", `{"inputs": [{"name": "fee", "value": 1}], "root": {"type": "decision", "branches": [{"label": "a", "cost": "2 * fees"}]}}`, `1:113: unknown name "fees"`},
		{"register input", `{"inputs": [{"name": "r", "value": "register works total"}], "root": {"type": "end"}}`, `1:36: register works total: the interchange JSON holds no risk registers`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, ds := interchange.ReadBytes([]byte(c.src), interchange.Options{})
			if !ds.HasErrors() {
				t.Fatalf("no error for %s", c.src)
			}
			if got := ds[0].Error(); !strings.Contains(got, c.want) {
				t.Fatalf("got %q, want %q", got, c.want)
			}
		})
	}
}

// TestReadCalculationPositions checks that an error inside a calculation
// points at its character in the JSON text, escapes counted as written.
func TestReadCalculationPositions(t *testing.T) {
	cases := []struct{ name, fig, want string }{
		{"plain", `"1 + * 2"`, "1:72: expected a number, a name or a calculation, found `*`"},
		{"after escapes", `"\u0031 + \t* 2"`, "1:79: expected a number, a name or a calculation, found `*`"},
		{"division by zero", `"5 / (2 - 2)"`, "1:72: division by zero"},
		{"bad number", `"3 * 1__0"`, "1:72: 1__0 has two _ in a row"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			src := `{"root": {"type": "decision", "branches": [{"label": "a", "gain": ` + c.fig + `}]}}`
			m, ds := interchange.ReadBytes([]byte(src), interchange.Options{})
			if !ds.HasErrors() {
				_, ds = compiled.Compile(m)
			}
			if len(ds) == 0 || ds[0].Error() != c.want {
				t.Fatalf("got %v, want %q", ds, c.want)
			}
		})
	}
}

func TestReadCompileErrorsHavePositions(t *testing.T) {
	src := "{\"root\": {\"type\": \"chance\", \"label\": \"c\", \"branches\": [\n" +
		"  {\"label\": \"a\", \"probability\": 0.5},\n" +
		"  {\"label\": \"b\", \"probability\": 0.4}]}}"
	_, ds := compiled.Compile(read(t, src))
	if len(ds) != 1 || ds[0].Error() != `1:10: probabilities under "c" sum to 0.9, not 1` {
		t.Fatalf("got %v", ds)
	}
}

func TestReadNodeLimit(t *testing.T) {
	_, ds := interchange.ReadBytes([]byte(oilJSON), interchange.Options{NodeLimit: 1})
	if !ds.HasErrors() || !strings.Contains(ds.Error(), "more than 1 nodes") {
		t.Fatalf("got %v", ds)
	}
	// The oil tree has 1 + 2 + 2 nodes, the end of every path counted.
	if _, ds := interchange.ReadBytes([]byte(oilJSON), interchange.Options{NodeLimit: 5}); ds.HasErrors() {
		t.Fatalf("5 nodes refused at a limit of 5: %v", ds)
	}
	if _, ds := interchange.ReadBytes([]byte(oilJSON), interchange.Options{NodeLimit: 4}); !ds.HasErrors() {
		t.Fatal("5 nodes accepted at a limit of 4")
	}
}

func TestReadByteOrderMark(t *testing.T) {
	sol := solve(t, "\ufeff"+oilJSON)
	if !sol.Value().Equal(decimal.NewFromInt(100)) {
		t.Fatalf("with a byte-order mark: %s", sol.Value())
	}
	_, ds := interchange.ReadBytes([]byte("\ufeff{\"root\": 1}"), interchange.Options{})
	if !ds.HasErrors() || ds[0].Pos != (tree.Pos{Line: 1, Col: 10}) {
		t.Fatalf("positions after a byte-order mark: %v", ds)
	}
}

// TestReadLineEnds counts lines at LF, CRLF and a lone CR, as the text
// language does.
func TestReadLineEnds(t *testing.T) {
	for _, nl := range []string{"\n", "\r\n", "\r"} {
		src := "{" + nl + "\"root\":" + nl + nl + "  {\"type\": 5}}"
		_, ds := interchange.ReadBytes([]byte(src), interchange.Options{})
		if !ds.HasErrors() || ds[0].Pos != (tree.Pos{Line: 4, Col: 12}) {
			t.Errorf("%q: got %v, want an error at 4:12", nl, ds)
		}
	}
}

// TestReadStream reads through an io.Reader that hands out one byte at a
// time: tokens, characters and escapes cut anywhere read the same.
func TestReadStream(t *testing.T) {
	src := strings.Replace(oilSurveyJSON, `"Oil drilling with a seismic survey"`, `"Oil \u00e9 \ud83d\ude00 — drilling"`, 1)
	m, ds := interchange.Read(oneByte{strings.NewReader(src)}, interchange.Options{})
	if ds.HasErrors() {
		t.Fatal(ds)
	}
	if m.Title != "Oil é 😀 — drilling" {
		t.Fatalf("title %q", m.Title)
	}
	c, _ := compiled.Compile(m)
	sol, _ := eval.Solve(c)
	if want := solve(t, oilSurveyJSON).Value(); !sol.Value().Equal(want) {
		t.Fatalf("value %s, want %s", sol.Value(), want)
	}
}

type oneByte struct{ r *strings.Reader }

func (o oneByte) Read(p []byte) (int, error) {
	if len(p) == 0 {
		return 0, nil
	}
	return o.r.Read(p[:1])
}

func TestReadMinifiedPositions(t *testing.T) {
	src := minified(3)
	src = []byte(strings.Replace(string(src), `"probability":0.5,"cash":1}`, `"probability":0.5,"cash":true}`, 1))
	_, ds := interchange.ReadBytes(src, interchange.Options{})
	if !ds.HasErrors() || ds[0].Error() != `1:88: "cash" of a branch must be a number, not true or false` {
		t.Fatalf("got %v", ds)
	}
}

// TestReadDocsExample reads the example of docs/json.md: the holiday-oven
// model of the language guide. Worked by hand: renting is worth
// 0.4 × 14,000 + 0.45 × 8,000 + 0.15 × 3,000 − 4,500 = 5,150, one oven
// 0.4 × 7,000 + 0.45 × 6,000 + 0.15 × 3,000 = 5,950.
func TestReadDocsExample(t *testing.T) {
	doc, err := os.ReadFile("../docs/json.md")
	if err != nil {
		t.Fatal(err)
	}
	_, block, ok := strings.Cut(string(doc), "```json\n")
	block, _, _ = strings.Cut(block, "```")
	if !ok {
		t.Fatal("no JSON example in docs/json.md")
	}
	sol := solve(t, block)
	if !sol.Value().Equal(decimal.NewFromInt(5950)) || sol.Root.Chosen() != 1 {
		t.Fatalf("value %s, chosen %d; want 5950 and one oven", sol.Value(), sol.Root.Chosen())
	}
	if v := sol.Root.BranchValue(0); !v.Equal(decimal.NewFromInt(5150)) {
		t.Fatalf("renting is worth %s, want 5150", v)
	}
}

// TestReadOneErrorEach: a figure given but wrong is reported once, not
// also as missing, and the caret spans what is wrong.
func TestReadOneErrorEach(t *testing.T) {
	cases := []struct{ src, want string }{
		{`{"inputs": [{"name": "x", "value": "1e3"}], "root": {"type": "end"}}`, `1:37: 1e3 is not a number (3 wide)`},
		{`{"uncertainties": [{"name": "u", "states": [{"label": "a", "probability": true}]}], "root": {"type": "end"}}`, `1:75: "probability" of a state must be a number, not true or false (0 wide)`},
		{`{"tests": [{"name": 5, "on": "u", "readings": []}], "root": {"type": "end"}}`, `1:21: "name" of a test must be a string, not a number (0 wide)`},
		{`{"root": {"type": "decision", "branches": [{"label": "a", "gain": "2 * feee"}]}}`, `1:72: unknown name "feee" (4 wide)`},
		{`{"root": {"type": "end", "colour": 1}}`, `1:26: unknown key "colour" in a node (8 wide)`},
	}
	for _, c := range cases {
		_, ds := interchange.ReadBytes([]byte(c.src), interchange.Options{})
		if len(ds) != 1 || fmt.Sprintf("%s (%d wide)", ds[0].Error(), ds[0].Len) != c.want {
			t.Errorf("%s: got %v, want %s", c.src, ds, c.want)
		}
	}
}
