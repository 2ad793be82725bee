package eval

import (
	"math/rand"
	"sync"
	"testing"
	"time"

	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// benchTree is a generated tree of a little over a million nodes: chance
// (four branches) and decision (three) levels alternating, probabilities in
// hundredths, cash in whole units with some cents. Built once per process.
var benchTree = sync.OnceValue(func() *tree.Model {
	rng := rand.New(rand.NewSource(7))
	var build func(depth int) *tree.Node
	build = func(depth int) *tree.Node {
		if depth == 11 {
			return &tree.Node{Kind: tree.KindEnd, Payoff: tree.Num(decimal.New(rng.Int63n(100000), -int32(rng.Intn(2))))}
		}
		var bs []*tree.Branch
		if depth%2 == 0 {
			p1 := rng.Int63n(40) + 10
			p2 := rng.Int63n(90 - p1)
			p3 := rng.Int63n(100 - p1 - p2)
			bs = []*tree.Branch{
				tree.Outcome("a", decimal.New(p1, -2), decimal.New(rng.Int63n(10000), 0), build(depth+1)),
				tree.Outcome("b", decimal.New(p2, -2), decimal.New(-rng.Int63n(10000), 0), build(depth+1)),
				tree.Outcome("c", decimal.New(p3, -2), decimal.New(rng.Int63n(100000), -2), build(depth+1)),
				tree.RestOutcome("d", decimal.New(rng.Int63n(1000), -2), build(depth+1)),
			}
			return tree.Chance("c", bs...)
		}
		for i := 0; i < 3; i++ {
			bs = append(bs, tree.Choice(string(rune('x'+i)), decimal.New(rng.Int63n(5000)-2500, 0), build(depth+1)))
		}
		return tree.Decision("d", bs...)
	}
	m := &tree.Model{Root: build(0)}
	if ds := m.Resolve(nil); ds.HasErrors() {
		panic(ds.Error())
	}
	return m
})

// floatNode is the same tree in float64, for the reference rollback.
type floatNode struct {
	kind  tree.Kind
	value float64
	p, c  []float64
	kids  []*floatNode
}

func toFloat(n *tree.Node) *floatNode {
	f := &floatNode{kind: n.Kind, value: n.Value.InexactFloat64()}
	for _, b := range n.Branches {
		f.p = append(f.p, b.P.InexactFloat64())
		f.c = append(f.c, b.C.InexactFloat64())
		f.kids = append(f.kids, toFloat(b.Node))
	}
	return f
}

// floatRollback is a plain float64 rollback: the practical floor for any
// rollback of this tree.
func floatRollback(n *floatNode) float64 {
	switch n.kind {
	case tree.KindEnd:
		return n.value
	case tree.KindChance:
		v := 0.0
		for i, k := range n.kids {
			v += n.p[i] * (n.c[i] + floatRollback(k))
		}
		return v
	}
	best := 0.0
	for i, k := range n.kids {
		v := n.c[i] + floatRollback(k)
		if i == 0 || v > best {
			best = v
		}
	}
	return best
}

var floatTree = sync.OnceValue(func() *floatNode { return toFloat(benchTree().Root) })

func BenchmarkRollbackExact(b *testing.B) {
	m := benchTree()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := Solve(m); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(m.Size()), "nodes")
}

func BenchmarkRollbackFloat64(b *testing.B) {
	f := floatTree()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		floatRollback(f)
	}
}

// BenchmarkRollbackRatio times both rollbacks of the same tree in turn, in
// one run, and reports exact/float64: the figure BENCHMARKS.md quotes, as
// the machines are shared and noisy.
func BenchmarkRollbackRatio(b *testing.B) {
	m, f := benchTree(), floatTree()
	var exact, fl time.Duration
	for i := 0; i < b.N; i++ {
		t0 := time.Now()
		if _, err := Solve(m); err != nil {
			b.Fatal(err)
		}
		t1 := time.Now()
		floatRollback(f)
		t2 := time.Now()
		exact += t1.Sub(t0)
		fl += t2.Sub(t1)
	}
	b.ReportMetric(float64(exact)/float64(fl), "exact/float64")
	b.ReportMetric(float64(exact.Milliseconds())/float64(b.N), "exact-ms/op")
	b.ReportMetric(float64(fl.Microseconds())/1000/float64(b.N), "float-ms/op")
}

func TestBenchTreeAgrees(t *testing.T) {
	if testing.Short() {
		t.Skip("builds a million-node tree")
	}
	// The float64 reference must agree with the exact rollback to float
	// precision, or the benchmark compares different work.
	sol, err := Solve(benchTree())
	if err != nil {
		t.Fatal(err)
	}
	exact := sol.Value().InexactFloat64()
	fl := floatRollback(floatTree())
	if diff := exact - fl; diff > 1e-6*abs(exact) || -diff > 1e-6*abs(exact) {
		t.Fatalf("exact %v vs float64 %v", exact, fl)
	}
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}
