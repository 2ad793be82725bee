package report_test

import (
	"bytes"
	"strings"
	"testing"

	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/lang"
	"github.com/forkcast/forkcast/report"
)

// Every figure in the text tree says what it counts: a node's value from
// there on, an option's value with its own cash, an end's path total with
// the path's probability.
func TestSolveTreeFigures(t *testing.T) {
	sol := load()
	var b bytes.Buffer
	if err := report.Solve(sol, report.SolveOptions{}).WriteText(&b); err != nil {
		t.Fatal(err)
	}
	out := b.String()
	// By hand, from the kiln model (see ExampleSolve): buying now costs
	// 18,000 and leads to demand worth 0.4 × 60,000 + 0.6 × 5,000 =
	// 27,000 from there on, so the option is worth 9,000; the busy end's
	// path total is 60,000 − 18,000 = 42,000 with probability 40%. After
	// the trial (cost 1,000) reads "Queue" (probability 0.5), P(Busy) is
	// 0.32 / 0.5 = 64%: demand is worth 0.64 × 60,000 + 0.36 × 5,000 =
	// 40,200 from there, and the busy end totals 60,000 − 18,000 − 1,000 =
	// 41,000 with path probability 0.5 × 0.64 = 32%. Not buying after the
	// trial totals −1,000 (the trial's cost) with probability 50%.
	for _, want := range []string{
		"  EV from here   what follows a node, not the cash on the branch into it\n",
		"decision \"First\"  EV from here 10,100.00 EUR  take \"Run a trial week\"\n",
		"      * \"Buy\"  cost 18,000.00  option EV 9,000.00 EUR\n        chance demand  EV from here 27,000.00 EUR\n",
		"\"Busy\"  40%  gain 60,000.00  path total 42,000.00 EUR  path probability 40%\n",
		"            chance demand  EV from here 40,200.00 EUR\n              \"Busy\"  64%  gain 60,000.00  path total 41,000.00 EUR  path probability 32%\n",
		"* \"Do not buy\"  option EV 0.00 EUR  path total -1,000.00 EUR  path probability 50%\n",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("the tree lacks %q:\n%s", want, out)
		}
	}
	if strings.Contains(out, "->") {
		t.Errorf("a bare arrow, which says nothing of what it counts:\n%s", out)
	}
	b.Reset()
	report.Solve(sol, report.SolveOptions{OmitTree: true}).WriteText(&b)
	if strings.Contains(b.String(), "Tree") || strings.Contains(b.String(), "path total") {
		t.Errorf("OmitTree still writes the tree:\n%s", b.String())
	}
}

// Under objective min the same figures are costs and say so.
func TestSolveTreeFiguresMin(t *testing.T) {
	src := `objective min
decision "Repair"
  "Patch"  cost 4_000
    chance "Holds"
      "Yes"  75%
      "No"   rest  cost 20_000
  "Replace"  cost 8_500
`
	c, ds := lang.Load([]byte(src), lang.Options{})
	if ds.HasErrors() {
		t.Fatal(ds)
	}
	sol, err := eval.Solve(c)
	if err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	report.Solve(sol, report.SolveOptions{}).WriteText(&b)
	// By hand: patching costs 4,000 + 0.25 × 20,000 = 9,000 against 8,500
	// for replacing; the failed patch's path totals 24,000 (25%).
	for _, want := range []string{
		"decision \"Repair\"  expected cost from here 8,500.00  take \"Replace\"\n",
		"  x \"Patch\"  cost 4,000.00  option expected cost 9,000.00\n",
		"    chance \"Holds\"  expected cost from here 5,000.00\n",
		"      \"No\"  25%  cost 20,000.00  path total cost 24,000.00  path probability 25%\n",
		"  * \"Replace\"  cost 8,500.00  option expected cost 8,500.00  path total cost 8,500.00  path probability 100%\n",
	} {
		if !strings.Contains(b.String(), want) {
			t.Errorf("the tree lacks %q:\n%s", want, b.String())
		}
	}
}
