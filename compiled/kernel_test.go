package compiled

import (
	"fmt"
	"math/big"
	"math/rand"
	"slices"
	"testing"

	"github.com/forkcast/forkcast/internal/exact"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// TestKernelsAgree: the kernel's three generated copies (128-bit, big and
// float64) give the same values and choices on integer figures, with and
// without a policy to follow and with frames of their own, on random
// shapes and random E (ties included: the values are drawn from a small
// set). Integers this small are exact in every type, so any difference
// is a fault in a copy's operations.
func TestKernelsAgree(t *testing.T) {
	rng := rand.New(rand.NewSource(4))
	var build func(depth int) *tree.Node
	build = func(depth int) *tree.Node {
		if depth > 5 || rng.Intn(4) == 0 {
			return nil
		}
		n := 2 + rng.Intn(3)
		if rng.Intn(2) == 0 {
			d := tree.Decision("d")
			for j := range n {
				d.Branches = append(d.Branches, tree.Choice(fmt.Sprint(j), tree.NoCash, build(depth+1)))
			}
			return d
		}
		c := tree.Chance("c")
		for j := range n - 1 {
			c.Branches = append(c.Branches, tree.Outcome(fmt.Sprint(j), tree.Num(decimal.New(1, -1)), tree.NoCash, build(depth+1)))
		}
		c.Branches = append(c.Branches, tree.RestOutcome("r", tree.NoCash, build(depth+1)))
		return c
	}
	for trial := range 200 {
		root := tree.Decision("root", tree.Choice("a", tree.NoCash, build(1)), tree.Choice("b", tree.NoCash, build(1)))
		c, ds := Compile(&tree.Model{Root: root})
		if ds.HasErrors() {
			t.Fatal(ds)
		}
		n := c.Len()
		e := make([]float64, n)
		for i := range e {
			e[i] = float64(rng.Intn(5)) - 2
		}
		var restart []bool
		if trial%2 == 1 {
			restart = make([]bool, n)
			for i := 1; i < n; i++ {
				restart[i] = rng.Intn(5) == 0
			}
		}
		for _, followed := range []bool{false, true} {
			var policy []int32
			if followed {
				policy = make([]int32, n)
				for i := range policy {
					if from, to := c.Kids(i); to > from {
						policy[i] = int32(rng.Intn(to - from))
					}
				}
			}
			tf, bf := make([]float64, n), make([]int32, n)
			tw, bw := make([]exact.Wide, n), make([]int32, n)
			tb, bb := make([]*big.Int, n), make([]int32, n)
			ew, eb := make([]exact.Wide, n), make([]*big.Int, n)
			for i, v := range e {
				eb[i] = big.NewInt(int64(v))
				ew[i], _ = exact.WideFromBig(eb[i])
			}
			rollbackFloat(c.sh, restart, nil, e, tf, bf, policy)
			if !rollbackWide(c.sh, restart, ew, tw, bw, policy) {
				t.Fatalf("trial %d: 128-bit overflow on small integers", trial)
			}
			rollbackBig(bigOps{}, c.sh, restart, nil, eb, tb, bb, policy)
			if !slices.Equal(bf, bw) || !slices.Equal(bf, bb) {
				t.Fatalf("trial %d (policy %v): choices float64 %v, 128-bit %v, big %v", trial, followed, bf, bw, bb)
			}
			for i := range tf {
				if w := tw[i].Big(); w.Cmp(tb[i]) != 0 || float64(w.Int64()) != tf[i] {
					t.Fatalf("trial %d (policy %v) node %d: float64 %v, 128-bit %v, big %v", trial, followed, i, tf[i], w, tb[i])
				}
			}
		}
	}
}
