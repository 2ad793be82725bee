package interchange_test

import (
	"bytes"
	"fmt"
	"testing"
	"testing/iotest"
	"time"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/interchange"
	"github.com/forkcast/forkcast/internal/fuzzkit"
	"github.com/forkcast/forkcast/tree"
)

// fuzzNodes is the node limit of every fuzzed reading: it bounds the work a
// model can ask for, so a slow input fails the run instead of stalling it.
const fuzzNodes = 10_000

// FuzzReadJSON reads any input, streamed one byte at a time and in place
// (the two must agree), and checks what it reads: a model read without
// errors is written, read again and written again to the same text, and
// compiles and solves (written solved, too) to the same value at every
// node as the model first read. Each input runs under a time and memory
// budget of its own.
func FuzzReadJSON(f *testing.F) {
	f.Add([]byte(oilJSON))
	f.Add([]byte(oilSurveyJSON))
	f.Add([]byte(`{"root": {"type": "end", "value": "1e400"}}`))
	f.Add([]byte(`{"objective": "min", "uncertainties": [{"name": "u", "states": [{"label": "a", "probability": 0.5}, {"label": "b", "probability": 0.5}]}],
	  "tests": [{"name": "t", "on": "u", "cost": 1, "readings": [{"label": "x", "likelihoods": [{"state": "a", "probability": 0.9}, {"state": "b", "probability": 0.2}]},
	  {"label": "y", "likelihoods": [{"state": "a", "probability": 0.1}, {"state": "b", "probability": 0.8}]}]}],
	  "root": {"type": "chance", "test": "t", "branches": [{"label": "x", "node": {"type": "chance", "uncertainty": "u", "branches": [{"label": "a", "cash": 5}, {"label": "b"}]}}, {"label": "y"}]}}`))
	f.Add([]byte(`{"root": [1, 2, {"a": null}]}`))
	f.Add([]byte(`{"risk_tolerance": "2.5e5", "certainty_equivalent": "1", "risk_note": 3, "root": {"type": "end"}}`))
	f.Add([]byte(`{"root": {"type": "decision", "branches": [{"label": "a", "node": {"type": "decision", "branches": []}}]}}`))
	f.Add([]byte(`{"objective": "min", "inputs": [{"name": "k", "value": "(1/3)", "low": "-k0", "high": 2}, {"name": "k0", "value": 1}],
	  "root": {"type": "chance", "branches": [{"label": "a", "probability": "k", "cost": "k * 3 - -2", "cash": "5%"},
	  {"label": "b", "probability": "rest", "node": {"type": "end", "payoff": "-(k + 1)", "value": "\u0031"}}]}}`))
	f.Add([]byte("\ufeff{\"title\": \"t\\u00e9\\ud83d\\ude00\", \"x\": [[[{}]]], \"root\": {\"type\": \"end\"}}\r\n"))
	f.Add(minified(3))
	f.Add([]byte(`{"inputs": [{"name": "a", "value": "pert(1, 2, 4)"}, {"name": "b", "value": "uniform(0, 1)"}],
	  "correlations": [{"a": "a", "b": "b", "rho": -0.3}],
	  "root": {"type": "chance", "split": {"input": "a", "rule": "swanson"}, "branches": [{"label": "P10", "probability": 0.3, "cash": "a"},
	  {"label": "P50", "probability": 0.4, "cash": "b"}, {"label": "P90", "probability": 0.3}]}}`))
	f.Fuzz(func(t *testing.T, src []byte) {
		if msg := fuzzkit.Within(10*time.Second, 256<<20+uint64(64*len(src)), func() string { return roundTrip(src) }); msg != "" {
			t.Fatalf("%s\ninput: %q", msg, src)
		}
	})
}

// roundTrip checks one input (see FuzzReadJSON); it returns what is wrong,
// or "".
func roundTrip(src []byte) string {
	opts := interchange.Options{NodeLimit: fuzzNodes}
	m1, ds := interchange.ReadBytes(src, opts)
	_, streamed := interchange.Read(iotest.OneByteReader(bytes.NewReader(src)), opts)
	if ds.Error() != streamed.Error() {
		return fmt.Sprintf("read in place:\n%v\nstreamed:\n%v", ds, streamed)
	}
	if ds.HasErrors() {
		return ""
	}
	if m1 == nil {
		return "no model and no error"
	}
	var j1, j2 bytes.Buffer
	if err := interchange.Write(&j1, m1, interchange.WriteOptions{}); err != nil {
		return fmt.Sprintf("write: %v", err)
	}
	m2, ds := interchange.ReadBytes(j1.Bytes(), opts)
	if ds.HasErrors() {
		return fmt.Sprintf("what was written does not read back: %v\n%s", ds, j1.String())
	}
	if err := interchange.Write(&j2, m2, interchange.WriteOptions{}); err != nil {
		return fmt.Sprintf("second write: %v", err)
	}
	if j1.String() != j2.String() {
		return fmt.Sprintf("written, read and written again differs:\n%s\n---\n%s", j1.String(), j2.String())
	}
	c1, e1 := compiled.Compile(m1)
	c2, e2 := compiled.Compile(m2)
	if e1.HasErrors() != e2.HasErrors() {
		return fmt.Sprintf("compiling as read: %v\ncompiling as written: %v", e1, e2)
	}
	if e1.HasErrors() {
		return ""
	}
	s1, err := eval.Solve(c1)
	if err != nil {
		return fmt.Sprintf("compiled model does not solve: %v", err)
	}
	s2, err := eval.Solve(c2)
	if err != nil {
		return fmt.Sprintf("written model does not solve: %v", err)
	}
	if msg := compareValues(s1, s2); msg != "" {
		return "written: " + msg
	}
	var solved bytes.Buffer
	if err := s1.WriteJSON(&solved); err != nil {
		return fmt.Sprintf("write solved: %v", err)
	}
	m3, ds := interchange.ReadBytes(solved.Bytes(), opts)
	if ds.HasErrors() {
		return fmt.Sprintf("solved output does not read back: %v\n%s", ds, solved.String())
	}
	c3, ds := compiled.Compile(m3)
	if ds.HasErrors() {
		return fmt.Sprintf("solved output does not compile: %v\n%s", ds, solved.String())
	}
	s3, err := eval.Solve(c3)
	if err != nil {
		return fmt.Sprintf("solved output does not solve: %v", err)
	}
	if msg := compareValues(s1, s3); msg != "" {
		return "solved: " + msg
	}
	return ""
}

func compareValues(a, b *eval.Solution) string {
	x, y := a.Nodes(), b.Nodes()
	if len(x) != len(y) {
		return fmt.Sprintf("%d nodes, %d after the round trip", len(x), len(y))
	}
	for i := range x {
		if !x[i].Value().Equal(y[i].Value()) || x[i].Chosen() != y[i].Chosen() {
			return fmt.Sprintf("node %d (%s): %s/%d vs %s/%d", i, tree.Printable(x[i].Node.Display()), x[i].Value(), x[i].Chosen(), y[i].Value(), y[i].Chosen())
		}
	}
	return ""
}
