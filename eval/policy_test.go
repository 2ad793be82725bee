package eval

import (
	"math/rand"
	"testing"

	"github.com/forkcast/forkcast/tree"
)

// PolicyDecisions is checked against the definitions it shortens: the
// decisions that Reachable marks, in the order of Nodes, each with the
// chance nodes found by walking up Parent from it.
func TestPolicyDecisionsMatchesTheWholeTable(t *testing.T) {
	rng := rand.New(rand.NewSource(3))
	for n := 0; n < 400; n++ {
		m := objectiveModel(rng, n, 2+rng.Intn(300))
		sol := mustSolve(t, m)
		got := sol.PolicyDecisions() // before anything fills the table
		var want []*Solved
		reach := sol.Reachable()
		for i := range sol.Nodes() {
			if s := &sol.Nodes()[i]; s.Node.Kind == tree.KindDecision && reach[i] {
				want = append(want, s)
			}
		}
		if len(got) != len(want) {
			t.Fatalf("tree %d: %d decisions, want %d", n, len(got), len(want))
		}
		for k, w := range want {
			g := got[k]
			if g.Number() != w.Number() || g.Index() != w.Index() || g.Size() != w.Size() || g.Node != w.Node ||
				(g.Parent() == nil) != (w.Parent() == nil) || g.Parent() != nil && g.Parent() != w.Parent() {
				t.Fatalf("tree %d, decision %d: node %d (index %d, size %d), want node %d (index %d, size %d)",
					n, k, g.Number(), g.Index(), g.Size(), w.Number(), w.Index(), w.Size())
			}
			c := g.Above
			for up := w; up.Parent() != nil; up = up.Parent() {
				p := up.Parent()
				if p.Node.Kind != tree.KindChance {
					continue
				}
				if c == nil || c.Chance.Number() != p.Number() || c.Chance.Index() != p.Index() || c.Via != up.Via() {
					t.Fatalf("tree %d, decision %d: the conditions differ at chance node %d", n, k, p.Number())
				}
				c = c.Up
			}
			if c != nil {
				t.Fatalf("tree %d, decision %d: a condition more than the path has", n, k)
			}
		}
	}
}

// The table a Solution fills on first use may be asked for from several
// goroutines at once, while others read the root (run with -race).
func TestTableFilledOnceUnderConcurrency(t *testing.T) {
	rng := rand.New(rand.NewSource(4))
	m := &tree.Model{Root: randomTree(rng, 400, tree.Gain)}
	sol := mustSolve(t, m)
	done := make(chan int, 4)
	for g := range 4 {
		go func() {
			if g%2 == 0 {
				_ = sol.Root.Size() + sol.Root.Index()
				done <- len(sol.PolicyDecisions())
				return
			}
			n := 0
			for i := range sol.Nodes() {
				if sol.At(sol.Nodes()[i].Number()).Index() == i {
					n++
				}
			}
			done <- n
		}()
	}
	for range 4 {
		<-done
	}
	if n := len(sol.Nodes()); n != sol.Root.Size() {
		t.Fatalf("%d nodes in the table, the root's size is %d", n, sol.Root.Size())
	}
	for i, s := range sol.Nodes() {
		if sol.At(s.Number()) != &sol.Nodes()[i] {
			t.Fatalf("At(%d) is not the table's node %d", s.Number(), i)
		}
	}
}
