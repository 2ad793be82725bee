package examples_test

import (
	"bytes"
	"context"
	"os"
	"strings"
	"testing"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/examples"
	"github.com/forkcast/forkcast/interchange"
	"github.com/forkcast/forkcast/lang"
	"github.com/forkcast/forkcast/register"
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
			for _, r := range m.Source().Registers {
				if _, err := register.FromModel(m, r.Name); err != nil {
					t.Fatalf("register %s: %v", r.Name, err)
				}
			}
			if !m.HasTree() {
				return // a register alone: TestRegisterTwin analyses it
			}
			sol, err := eval.Solve(m)
			if err != nil {
				t.Fatal(err)
			}
			if len(m.Source().Registers) > 0 {
				// The interchange JSON holds no registers (docs/json.md):
				// a model that takes inputs from one stays in the text.
				return
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

// TestRegisterTwin: the bundled register as text (library-register.fork)
// and as a spreadsheet (library-register.csv) are one register: the same
// risks with the same figures, so the same exact EMVs and, for a seed,
// the same simulated percentiles.
func TestRegisterTwin(t *testing.T) {
	ex, ok := examples.Get("library-register")
	if !ok {
		t.Fatal("no example library-register")
	}
	c, ds := lang.Load(ex.Source, lang.Options{})
	if ds.HasErrors() {
		t.Fatal(ds)
	}
	fromText, err := register.FromModel(c, "")
	if err != nil {
		t.Fatal(err)
	}
	f, err := os.Open("library-register.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	tab, err := register.ReadCSV(f)
	if err != nil {
		t.Fatal(err)
	}
	opts := register.Options{Runs: 4_000, Seed: 11}
	a, err := register.Analyse(context.Background(), fromText, opts)
	if err != nil {
		t.Fatal(err)
	}
	b, err := register.Analyse(context.Background(), tab.Register, opts)
	if err != nil {
		t.Fatal(err)
	}
	if len(a.Risks) != 10 || len(b.Risks) != len(a.Risks) {
		t.Fatalf("%d risks in the text, %d in the sheet", len(a.Risks), len(b.Risks))
	}
	for i := range a.Risks {
		x, y := a.Risks[i], b.Risks[i]
		if x.Risk.ID != y.Risk.ID || x.EMV.Cmp(y.EMV) != 0 || x.EMVAfter.Cmp(y.EMVAfter) != 0 || x.Days.Cmp(y.Days) != 0 ||
			x.Risk.Owner != y.Risk.Owner || x.Risk.Category != y.Risk.Category || len(x.Risk.Fields) != len(y.Risk.Fields) {
			t.Errorf("risk %d: text %s EMV %s/%s, sheet %s EMV %s/%s", i+1, x.Risk.ID, x.EMV, x.EMVAfter, y.Risk.ID, y.EMV, y.EMVAfter)
		}
	}
	if a.Total.Cmp(b.Total) != 0 || a.Best.Cmp(b.Best) != 0 || a.Planned.Cmp(b.Planned) != 0 {
		t.Errorf("totals: text %s %s %s, sheet %s %s %s", a.Total, a.Planned, a.Best, b.Total, b.Planned, b.Best)
	}
	for _, p := range []float64{0.5, 0.8, 0.9, 0.95} {
		if x, y := a.Percentile(p), b.Percentile(p); x != y {
			t.Errorf("P%.0f: text %v, sheet %v", p*100, x, y)
		}
	}
}

// TestRegisterExamples: the examples named *-register hold a register and
// no tree (Registers), every other one a tree (Names).
func TestRegisterExamples(t *testing.T) {
	if len(examples.Registers()) == 0 {
		t.Fatal("no register example")
	}
	for _, name := range append(examples.Names(), examples.Registers()...) {
		ex, _ := examples.Get(name)
		c, ds := lang.Load(ex.Source, lang.Options{})
		if ds.HasErrors() {
			t.Fatalf("%s: %v", name, ds)
		}
		alone := strings.HasSuffix(name, "-register")
		if c.HasTree() == alone || alone && len(c.Source().Registers) == 0 {
			t.Errorf("%s: tree %v, %d registers", name, c.HasTree(), len(c.Source().Registers))
		}
	}
}
