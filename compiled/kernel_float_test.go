package compiled

import (
	"fmt"
	"math/rand"
	"slices"
	"testing"

	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// TestFloatKernelAgrees: the float64 kernel written out for simulation
// (rollbackFloat64) gives bit for bit the values and choices of the
// generic kernel on float64, with and without a policy to follow and with
// frames of their own, on random shapes and random E (ties included: the
// values are drawn from a small set).
func TestFloatKernelAgrees(t *testing.T) {
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
			t1, b1 := make([]float64, n), make([]int32, n)
			t2, b2 := make([]float64, n), make([]int32, n)
			rollback[float64, float64, floatOps](floatOps{}, c.sh, restart, nil, e, t1, b1, policy)
			rollbackFloat64(c.sh, restart, e, t2, b2, policy)
			if !slices.Equal(t1, t2) || !slices.Equal(b1, b2) {
				t.Fatalf("trial %d (policy %v): generic %v %v, float64 %v %v", trial, followed, t1, b1, t2, b2)
			}
		}
	}
}
