package compiled_test

import (
	"math/big"
	"testing"

	"github.com/forkcast/forkcast/tree"
)

// TestDeepChainBounded: a chain of chance nodes of 30% / rest, each "a"
// branch gaining 1, so deep that exact masses would need thousands of
// digits (0.3^5000). The masses are kept within MaxMassPlaces by frames of
// their own; the value is the geometric sum Σ_{k=1..n} 0.3^k =
// 0.3 (1 − 0.3^n) / 0.7 (by hand), the model says it is not exact, and no
// mass grows past the limit.
func TestDeepChainBounded(t *testing.T) {
	const depth = 5000
	var n *tree.Node = tree.Decision("End", tree.Choice("x", tree.NoCash, nil))
	for i := 0; i < depth; i++ {
		n = tree.Chance("L", tree.Outcome("a", num("0.3"), tree.Gain(num("1")), n), tree.RestOutcome("b", tree.NoCash, nil))
	}
	c := mustCompile(t, &tree.Model{Root: n})
	if c.Exact() {
		t.Error("a model rolled back in frames says it is exact")
	}
	v, _ := c.Rollback().Value(0)
	// 0.3 (1 − 0.3^n) / 0.7 on big.Rat.
	p := new(big.Rat).SetFrac64(3, 10)
	pn := new(big.Rat).SetInt64(1)
	for i := 0; i < depth; i++ {
		pn.Mul(pn, p)
	}
	want := new(big.Rat).Mul(p, new(big.Rat).Sub(big.NewRat(1, 1), pn))
	want.Quo(want, big.NewRat(7, 10))
	diff := new(big.Rat).Sub(v.Rat(), want)
	if diff.Abs(diff).Cmp(big.NewRat(1, 1_000_000_000_000_000_000)) > 0 {
		t.Errorf("value %s, want %s", v, want.FloatString(40))
	}
	for i := 0; i < c.Len(); i++ {
		if m := c.Mass(i); -m.Exponent() > 2*300 {
			t.Fatalf("node %d: mass with %d places", i, -m.Exponent())
		}
	}
	// The path probability of the deepest end is 0.3^depth, within the
	// rounding of the frames (relative 1e-40).
	ends := 0
	for i := 0; i < c.Len(); i++ {
		if c.Kind(i) == tree.KindEnd {
			ends++
		}
	}
	if ends != depth+1 {
		t.Errorf("%d ends", ends)
	}
}
