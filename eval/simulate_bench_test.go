package eval

import (
	"context"
	"fmt"
	"math/rand"
	"os"
	"strings"
	"testing"
	"time"
)

// simBenchModel writes a model of about 1,000 nodes for BenchmarkSimulate:
// a decision of three options, each over alternating chance (three
// outcomes) and decision (two options) levels, its cash read from twenty
// inputs written as distributions, and some chance nodes with a drawn
// probability.
func simBenchModel() string {
	rng := rand.New(rand.NewSource(3))
	var b strings.Builder
	const inputs = 20
	for i := range inputs {
		lo := 1000 + rng.Intn(5000)
		switch i % 4 {
		case 0:
			fmt.Fprintf(&b, "let x%d = pert(%d, %d, %d)\n", i, lo, lo+rng.Intn(2000), lo+2000+rng.Intn(4000))
		case 1:
			fmt.Fprintf(&b, "let x%d = triangular(%d, %d, %d)\n", i, lo, lo+rng.Intn(2000), lo+2000+rng.Intn(4000))
		case 2:
			fmt.Fprintf(&b, "let x%d = normal(%d, %d)\n", i, lo, 100+rng.Intn(500))
		default:
			fmt.Fprintf(&b, "let x%d = uniform(%d, %d)\n", i, lo, lo+1+rng.Intn(3000))
		}
	}
	b.WriteString("let p = uniform(20%, 40%)\nlet q = pert(10%, 25%, 45%)\n")
	var node func(depth int, indent string)
	node = func(depth int, indent string) {
		if depth%2 == 1 {
			fmt.Fprintf(&b, "%schance \"c%d\"\n", indent, depth)
			probs := []string{"p", "35%", "rest"}
			if depth == 3 {
				probs = []string{"q", "30%", "rest"}
			}
			for j, pr := range probs {
				fmt.Fprintf(&b, "%s  \"s%d\"  %s  gain x%d\n", indent, j, pr, rng.Intn(inputs))
				if depth < 6 {
					node(depth+1, indent+"    ")
				}
			}
			return
		}
		fmt.Fprintf(&b, "%sdecision \"d%d\"\n", indent, depth)
		n := 2
		if depth == 0 {
			n = 3
		}
		for j := range n {
			fmt.Fprintf(&b, "%s  \"o%d\"  cost x%d - %d\n", indent, j, rng.Intn(inputs), rng.Intn(1000))
			if depth < 6 {
				node(depth+1, indent+"    ")
			}
		}
	}
	node(0, "")
	return b.String()
}

// BenchmarkSimulate is a simulation of a model of about 1,000 nodes, 20
// inputs written as distributions and drawn probabilities: each op is
// 10,000 runs on every CPU, walking a path for every option. It reports
// node evaluations per second (nodes × runs / time): the figure the
// simulation's speed target is stated in.
func BenchmarkSimulate(b *testing.B) {
	c := loadText(b, simBenchModel())
	const runs = 10_000
	for _, mode := range []struct {
		name       string
		inputsOnly bool
	}{{"paths", false}, {"inputs-only", true}} {
		b.Run(mode.name, func(b *testing.B) {
			var spent, cpu time.Duration
			for b.Loop() {
				t0, c0 := time.Now(), cpuTime()
				if _, err := Simulate(context.Background(), c, SimulateOptions{Runs: runs, Seed: 1, InputsOnly: mode.inputsOnly}); err != nil {
					b.Fatal(err)
				}
				spent += time.Since(t0)
				cpu += cpuTime() - c0
			}
			evals := float64(c.Len()) * runs * float64(b.N)
			b.ReportMetric(float64(c.Len()), "nodes")
			b.ReportMetric(evals/spent.Seconds()/1e6, "Mnodes/s")
			// The machines are shared: per CPU-second of the process (all
			// its threads, the collector's included) is the steadier figure.
			if cpu > 0 { // 0 where the process's CPU time is not read
				b.ReportMetric(evals/cpu.Seconds()/1e6, "Mnodes/cpu-s")
			}
		})
	}
}

// TestWriteSimBenchModel writes BenchmarkSimulate's model to the file named
// by FORKCAST_SIMBENCH_MODEL, for timing `forkcast simulate` as a whole
// process (BENCHMARKS.md); without it the test checks the model's size.
func TestWriteSimBenchModel(t *testing.T) {
	src := simBenchModel()
	if path := os.Getenv("FORKCAST_SIMBENCH_MODEL"); path != "" {
		if err := os.WriteFile(path, []byte(src), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	if n := loadText(t, src).Len(); n < 1000 || n > 1300 {
		t.Errorf("the benchmark model has %d nodes; it should have about 1,000", n)
	}
}
