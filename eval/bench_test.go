package eval

import (
	"math/rand"
	"sync"
	"testing"
	"time"

	"github.com/forkcast/forkcast/compiled"
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
				tree.Outcome("a", tree.Num(decimal.New(p1, -2)), tree.Gain(tree.Num(decimal.New(rng.Int63n(10000), 0))), build(depth+1)),
				tree.Outcome("b", tree.Num(decimal.New(p2, -2)), tree.Gain(tree.Num(decimal.New(-rng.Int63n(10000), 0))), build(depth+1)),
				tree.Outcome("c", tree.Num(decimal.New(p3, -2)), tree.Gain(tree.Num(decimal.New(rng.Int63n(100000), -2))), build(depth+1)),
				tree.RestOutcome("d", tree.Gain(tree.Num(decimal.New(rng.Int63n(1000), -2))), build(depth+1)),
			}
			return tree.Chance("c", bs...)
		}
		for i := 0; i < 3; i++ {
			bs = append(bs, tree.Choice(string(rune('x'+i)), tree.Gain(tree.Num(decimal.New(rng.Int63n(5000)-2500, 0))), build(depth+1)))
		}
		return tree.Decision("d", bs...)
	}
	return &tree.Model{Root: build(0)}
})

// benchCompiled is benchTree compiled, once per process.
var benchCompiled = sync.OnceValue(func() *compiled.Model {
	c, ds := compiled.Compile(benchTree())
	if ds.HasErrors() {
		panic(ds.Error())
	}
	return c
})

// BenchmarkCompile is the cost of compiling the tree: checking it,
// evaluating every figure, laying it out and deriving the masses.
func BenchmarkCompile(b *testing.B) {
	m := benchTree()
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, ds := compiled.Compile(m); ds.HasErrors() {
			b.Fatal(ds)
		}
	}
	b.ReportMetric(float64(m.Size()), "nodes")
}

// BenchmarkRollbackExact is the exact rollback of the compiled tree (the
// kernel on 128-bit integers), the form built before the timer starts and
// the result arrays reused, as the float64 twin's are.
func BenchmarkRollbackExact(b *testing.B) {
	c := benchCompiled()
	r := c.Rollback() // the result arrays are made once, as for the float64 twin
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		r = c.RollbackInto(r)
	}
	b.ReportMetric(float64(c.Len()), "nodes")
}

// BenchmarkRollbackFloat64 is the same kernel on the float64 twin of the
// same compiled tree: the practical floor.
func BenchmarkRollbackFloat64(b *testing.B) {
	c := benchCompiled()
	t, best := make([]float64, c.Len()), make([]int32, c.Len())
	c.RollbackFloat(t, best) // the float twin is made once, before timing
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		c.RollbackFloat(t, best)
	}
}

// BenchmarkRollbackRatio times both rollbacks of the same tree in turn, in
// one run, and reports exact/float64: the figure BENCHMARKS.md quotes, as
// the machines are shared and noisy.
func BenchmarkRollbackRatio(b *testing.B) {
	c := benchCompiled()
	t, best := make([]float64, c.Len()), make([]int32, c.Len())
	c.RollbackFloat(t, best)
	r := c.Rollback()
	var ex, fl time.Duration
	for i := 0; i < b.N; i++ {
		t0 := time.Now()
		r = c.RollbackInto(r)
		t1 := time.Now()
		c.RollbackFloat(t, best)
		t2 := time.Now()
		ex += t1.Sub(t0)
		fl += t2.Sub(t1)
	}
	b.ReportMetric(float64(ex)/float64(fl), "exact/float64")
	b.ReportMetric(float64(ex.Microseconds())/1000/float64(b.N), "exact-ms/op")
	b.ReportMetric(float64(fl.Microseconds())/1000/float64(b.N), "float-ms/op")
}

func TestBenchTreeAgrees(t *testing.T) {
	if testing.Short() {
		t.Skip("builds a million-node tree")
	}
	// The float64 twin must agree with the exact rollback to float
	// precision, or the benchmark compares different work.
	c := benchCompiled()
	sol, err := Solve(c)
	if err != nil {
		t.Fatal(err)
	}
	ex := sol.Value().InexactFloat64()
	fl := c.RollbackFloat(make([]float64, c.Len()), make([]int32, c.Len()))
	if diff := ex - fl; diff > 1e-9*abs(ex) || -diff > 1e-9*abs(ex) {
		t.Fatalf("exact %v vs float64 %v", ex, fl)
	}
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}
