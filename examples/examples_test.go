package examples_test

import (
	"bytes"
	"testing"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/examples"
	"github.com/forkcast/forkcast/interchange"
	"github.com/forkcast/forkcast/lang"
)

// Every bundled example parses without errors or warnings, solves, and
// survives text → tree → JSON → tree with the same value at every node.
func TestExamplesRoundTrip(t *testing.T) {
	if len(examples.Names()) < 3 {
		t.Fatalf("only %d examples", len(examples.Names()))
	}
	for _, name := range examples.Names() {
		t.Run(name, func(t *testing.T) {
			ex, _ := examples.Get(name)
			if ex.Summary() == "" {
				t.Error("no summary comment on the first line")
			}
			m, ds := lang.Load(ex.Source, lang.Options{})
			if len(ds) > 0 {
				var buf bytes.Buffer
				ds.Print(&buf, name+".fork", ex.Source)
				t.Fatalf("diagnostics:\n%s", buf.String())
			}
			sol, err := eval.Solve(m)
			if err != nil {
				t.Fatal(err)
			}
			var js bytes.Buffer
			if err := interchange.Write(&js, m.Source(), interchange.WriteOptions{}); err != nil {
				t.Fatal(err)
			}
			m2, ds := interchange.ReadBytes(js.Bytes(), interchange.Options{})
			if ds.HasErrors() {
				t.Fatalf("reading back: %v\n%s", ds, js.String())
			}
			c2, ds := compiled.Compile(m2)
			if ds.HasErrors() {
				t.Fatalf("compiling back: %v\n%s", ds, js.String())
			}
			sol2, err := eval.Solve(c2)
			if err != nil {
				t.Fatal(err)
			}
			a, b := sol.Nodes(), sol2.Nodes()
			if len(a) != len(b) {
				t.Fatalf("%d nodes, %d after the round trip", len(a), len(b))
			}
			for i := range a {
				if !a[i].Value().Equal(b[i].Value()) || a[i].Chosen() != b[i].Chosen() {
					t.Fatalf("node %d (%s): %s/%d vs %s/%d", i, a[i].Node.Display(), a[i].Value(), a[i].Chosen(), b[i].Value(), b[i].Chosen())
				}
			}
		})
	}
}
