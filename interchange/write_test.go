package interchange_test

import (
	"bytes"
	"strings"
	"testing"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/examples"
	"github.com/forkcast/forkcast/interchange"
	"github.com/forkcast/forkcast/lang"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// squeeze removes white space, to compare JSON however it is laid out.
func squeeze(s string) string { return strings.Join(strings.Fields(s), "") }

func write(t *testing.T, m *tree.Model, opts interchange.WriteOptions) string {
	t.Helper()
	var buf bytes.Buffer
	if err := interchange.Write(&buf, m, opts); err != nil {
		t.Fatal(err)
	}
	return buf.String()
}

// sameValues checks that two solutions of one model agree at every node.
func sameValues(t *testing.T, a, b *eval.Solution) {
	t.Helper()
	x, y := a.Nodes(), b.Nodes()
	if len(x) != len(y) {
		t.Fatalf("%d nodes, %d after the round trip", len(x), len(y))
	}
	for i := range x {
		if !x[i].Value().Equal(y[i].Value()) || x[i].Chosen() != y[i].Chosen() {
			t.Fatalf("node %d (%s): %s/%d vs %s/%d", i, x[i].Node.Display(), x[i].Value(), x[i].Chosen(), y[i].Value(), y[i].Chosen())
		}
	}
}

func TestWriteRoundTrip(t *testing.T) {
	for _, src := range []string{oilJSON, oilSurveyJSON} {
		m := read(t, src)
		first := write(t, m, interchange.WriteOptions{})
		second := write(t, read(t, first), interchange.WriteOptions{})
		if first != second {
			t.Fatalf("second write differs:\n%s\n---\n%s", first, second)
		}
		sameValues(t, solve(t, src), solve(t, first))
	}
}

// TestWriteKeepsCalculations checks that inputs, ranges, rests and
// calculations are written as written, not as their values.
func TestWriteKeepsCalculations(t *testing.T) {
	out := write(t, read(t, oilSurveyJSON), interchange.WriteOptions{})
	for _, want := range []string{
		`{"name": "p_oil", "value": 0.25, "low": 0, "high": 1}`,
		`"value": "8 * drill"`,
		`{"label": "Dry", "probability": "rest"}`,
		`"cost": "3 * 10"`,
		`{"label": "Unfavourable", "likelihoods": [], "rest": true}`,
		`"gain": "revenue"`,
	} {
		if !strings.Contains(squeeze(out), squeeze(want)) {
			t.Errorf("output lacks %s:\n%s", want, out)
		}
	}
}

// TestWriteSettings writes a model whose compiled form had an input fixed
// and a prior pinned by With: what is written reads back as that model,
// the calculations that were not set kept as written.
func TestWriteSettings(t *testing.T) {
	c := load(t, oilSurveyJSON)
	drill, _ := c.Set("drill", decimal.NewFromInt(110))
	c2, err := c.With(drill, compiled.Setting{Target: c.StateTarget(0, 0), Value: decimal.RequireFromString("0.3")})
	if err != nil {
		t.Fatal(err)
	}
	want, err := eval.Solve(c2)
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := want.WriteJSON(&buf); err != nil {
		t.Fatal(err)
	}
	out := buf.String()
	for _, s := range []string{`{"name": "drill", "value": 110}`, `"value": "8 * drill"`, `{"label": "Oil", "probability": 0.3}`, `{"label": "Dry", "probability": "rest"}`} {
		if !strings.Contains(squeeze(out), squeeze(s)) {
			t.Errorf("output lacks %s:\n%s", s, out)
		}
	}
	sameValues(t, want, solve(t, out))
}

func TestWriteRefusesMisuse(t *testing.T) {
	m := read(t, oilJSON)
	var buf bytes.Buffer
	if err := interchange.Write(&buf, m, interchange.WriteOptions{Probabilities: true}); err == nil {
		t.Error("Probabilities without a compiled model accepted")
	}
	other := load(t, oilJSON)
	if err := interchange.Write(&buf, m, interchange.WriteOptions{Compiled: other}); err == nil {
		t.Error("a compiled model of another tree accepted")
	}
}

// chain is a tree of n chance nodes, one under the other.
func chain(n int) *tree.Model {
	half := tree.Num(decimal.RequireFromString("0.5"))
	var next *tree.Node
	for i := 0; i < n; i++ {
		next = tree.Chance("c", tree.Outcome("a", half, tree.Gain(tree.Num(decimal.NewFromInt(2))), nil), tree.RestOutcome("b", tree.NoCash, next))
	}
	return &tree.Model{Root: next}
}

// TestWriteDeepTree writes and reads back a chain 30,000 nodes deep
// (neither recurses on the depth), and refuses a tree deeper than the
// reader would accept.
func TestWriteDeepTree(t *testing.T) {
	m := chain(30_000)
	out := write(t, m, interchange.WriteOptions{})
	m2, ds := interchange.ReadBytes([]byte(out), interchange.Options{})
	if ds.HasErrors() {
		t.Fatal(ds)
	}
	if m2.Size() != m.Size() {
		t.Fatalf("%d nodes read back, %d written", m2.Size(), m.Size())
	}
	err := interchange.Write(&bytes.Buffer{}, chain(interchange.MaxNesting/3), interchange.WriteOptions{})
	if err == nil || !strings.Contains(err.Error(), "deep") {
		t.Fatalf("a tree past the nesting limit: %v", err)
	}
}

// TestWriteEscapes writes labels that must be escaped (possible in a
// model built in Go): the output is valid JSON that carries no control
// character, and a label the reader accepts reads back unchanged.
func TestWriteEscapes(t *testing.T) {
	m := &tree.Model{Title: "a \"quoted\" \\ é 😀 < & \u2028", Root: tree.Decision("d", tree.Choice("x", tree.NoCash, nil))}
	out := write(t, m, interchange.WriteOptions{})
	if !strings.Contains(out, `\u2028`) {
		t.Errorf("line separator written raw: %s", out)
	}
	if back := read(t, out); back.Title != m.Title {
		t.Fatalf("title %q read back as %q", m.Title, back.Title)
	}
	m.Title = "bell \a, escape \x1b[2J, C1 \u009b, override \u202e"
	out = write(t, m, interchange.WriteOptions{})
	for _, r := range out {
		if r < 0x20 && r != '\n' || r >= 0x7f && r < 0xa0 || r == 0x202e {
			t.Fatalf("control character %U written raw: %q", r, out)
		}
	}
	if !strings.Contains(out, `\u001b[2J`) {
		t.Fatalf("escape not written as \\u001b: %s", out)
	}
}

func examplesSources(t *testing.T) [][]byte {
	var out [][]byte
	for _, name := range examples.Names() {
		ex, _ := examples.Get(name)
		out = append(out, ex.Source)
	}
	if len(out) < 3 {
		t.Fatalf("only %d examples", len(out))
	}
	return out
}

// TestWriteExamples writes every bundled example, solved and not, and
// reads each back as the same model with the same value at every node.
func TestWriteExamples(t *testing.T) {
	for _, src := range examplesSources(t) {
		c, ds := lang.Load(src, lang.Options{})
		if ds.HasErrors() {
			t.Fatal(ds)
		}
		if len(c.Source().Registers) > 0 {
			continue // registers stay in the text (the JSON holds none)
		}
		sol, err := eval.Solve(c)
		if err != nil {
			t.Fatal(err)
		}
		var solved bytes.Buffer
		if err := sol.WriteJSON(&solved); err != nil {
			t.Fatal(err)
		}
		plain := write(t, c.Source(), interchange.WriteOptions{})
		sameValues(t, sol, solve(t, solved.String()))
		sameValues(t, sol, solve(t, plain))
		// The solved output read back and written plain is the model
		// written plain: nothing but the annotations differs.
		back := read(t, solved.String())
		tree.Walk(back.Root, func(n *tree.Node, _ int) bool {
			if n.Uncertainty != "" || n.Test != "" {
				for _, b := range n.Branches {
					b.Prob = nil // the probabilities solved output adds
				}
			}
			return true
		})
		if again := write(t, back, interchange.WriteOptions{}); again != plain {
			t.Fatalf("solved output reads back as another model:\n%s\n---\n%s", again, plain)
		}
	}
}
