package compiled_test

import (
	"strings"
	"testing"

	"github.com/forkcast/forkcast/dist"
	"github.com/forkcast/forkcast/lang"
	"github.com/shopspring/decimal"
)

// TestSplitValues: a split's branches have the rule's probabilities
// (extended Swanson–Megill 0.3/0.4/0.3 on P10/P50/P90, extended
// Pearson–Tukey 0.185/0.63/0.185 on P5/P50/P95: Keefer & Bodily, 1983,
// Management Science 29(5)), the input takes the distribution's
// percentiles under them (dist.Discretise) and so does every input
// computed from it; the rollback is then exactly that of the same tree
// with the three values written in.
func TestSplitValues(t *testing.T) {
	for _, c := range []struct {
		rule   string
		method dist.ThreePointMethod
		probs  [3]string
	}{{"swanson", dist.SwansonMegill, [3]string{"0.3", "0.4", "0.3"}}, {"pearson", dist.PearsonTukey, [3]string{"0.185", "0.63", "0.185"}}} {
		src := `let labour = pert(90_000, 110_000, 170_000)
let total  = labour + 20_000
let twice  = total * 2
decision "Bid"
  "Bid"  gain 400_000
    chance labour by ` + c.rule + `
      decision "Overtime?"
        "Pay overtime"  cost twice + 5_000
        "Accept delay"  cost 300_000
  "Pass"  cost labour / 100
`
		m := load(t, src)
		d, err := dist.NewPERT(90_000, 110_000, 170_000)
		if err != nil {
			t.Fatal(err)
		}
		tp, _ := dist.Discretise(d, c.method)
		// The same tree written out by hand: three branches, the values in.
		var b strings.Builder
		b.WriteString("let labour = pert(90_000, 110_000, 170_000)\ndecision \"Bid\"\n  \"Bid\"  gain 400_000\n    chance \"Three points\"\n")
		for j, v := range tp.Values {
			x := decimal.NewFromFloat(v)
			b.WriteString("      \"p" + string(rune('0'+j)) + "\"  " + c.probs[j] + "\n        decision \"Overtime?\"\n")
			b.WriteString("          \"Pay overtime\"  cost (" + x.String() + " + 20_000) * 2 + 5_000\n          \"Accept delay\"  cost 300_000\n")
		}
		b.WriteString("  \"Pass\"  cost labour / 100\n")
		hand := load(t, b.String())
		got, _ := m.Rollback().Value(0)
		want, _ := hand.Rollback().Value(0)
		if !got.Equal(want) {
			t.Errorf("%s: %s, by hand %s", c.rule, got, want)
		}
		// Every node agrees, the branch probabilities are the rule's, and
		// elsewhere the input keeps its mean.
		r, rh := m.Rollback(), hand.Rollback()
		for i := 0; i < m.Len(); i++ {
			a, _ := r.Value(i)
			h, _ := rh.Value(i)
			if !a.Equal(h) || !m.Prob(i).Equal(hand.Prob(i)) {
				t.Errorf("%s node %d: %s (p %s), by hand %s (p %s)", c.rule, i, a, m.Prob(i), h, hand.Prob(i))
			}
		}
	}
}

// TestSplitErrors: a split names an input written as a distribution, by
// a rule there is, with a node (not branches) under it; each mistake is
// reported at its position.
func TestSplitErrors(t *testing.T) {
	for _, c := range []struct{ src, want string }{
		{"let x = 5\ndecision \"D\"\n  \"a\"\n    chance x by swanson\n      decision \"E\"\n        \"b\" gain x\n", `4:12: "x" is not written as a distribution`},
		{"let x = pert(1, 2, 3)\ndecision \"D\"\n  \"a\"\n    chance y by swanson\n      decision \"E\"\n        \"b\" gain x\n", `4:12: unknown input "y"`},
		{"let x = pert(1, 2, 3)\ndecision \"D\"\n  \"a\"\n    chance x by median\n      decision \"E\"\n        \"b\" gain x\n", `4:17: unknown three-point rule "median"`},
		{"let x = pert(1, 2, 3)\ndecision \"D\"\n  \"a\"\n    chance x by swanson\n      \"Low\" 30%\n", `5:7: a three-point chance node takes a node under it, not branches`},
	} {
		_, ds := lang.Load([]byte(c.src), lang.Options{})
		if !ds.HasErrors() || !strings.Contains(ds.Error(), c.want) {
			t.Errorf("%q: %v, want %q", c.src, ds, c.want)
		}
	}
}

// TestSplitLimit: the node limit counts the three copies of what is under
// a split.
func TestSplitLimit(t *testing.T) {
	src := "let x = pert(1, 2, 3)\ndecision \"D\"\n  \"a\"\n    chance x by swanson\n      decision \"E\"\n        \"b\" gain x\n        \"c\"\n"
	// The root, the split, 3 × (decision + 2 ends) = 11 nodes.
	if _, ds := lang.Load([]byte(src), lang.Options{NodeLimit: 11}); ds.HasErrors() {
		t.Errorf("11 nodes refused: %v", ds)
	}
	if _, ds := lang.Load([]byte(src), lang.Options{NodeLimit: 10}); !ds.HasErrors() || !strings.Contains(ds.Error(), "more than 10 nodes") {
		t.Errorf("11 nodes under a limit of 10: %v", ds)
	}
}
