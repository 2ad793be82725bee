package eval_test

import (
	"fmt"
	"strings"
	"sync"
	"testing"

	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/lang"
)

// bigModel is a generated text model of about 128 000 nodes: decision and
// chance levels alternating, three options (four at the root) and a "walk
// away" at each decision, three outcomes at each chance node, percent
// probabilities with a `rest`, and gains and costs.
var bigModel = sync.OnceValue(func() []byte {
	var b strings.Builder
	b.WriteString("title \"generated\"\ncurrency EUR\nlet base = 1_000\n")
	var node func(depth int, indent string)
	n := 0
	node = func(depth int, indent string) {
		n++
		if depth == 10 {
			return
		}
		if depth%2 == 0 {
			fmt.Fprintf(&b, "%sdecision \"d%d\"\n", indent, n)
			options := 3
			if depth == 0 {
				options = 4
			}
			for i := 0; i < options; i++ {
				fmt.Fprintf(&b, "%s  \"option %d\"  cost %d\n", indent, i, (n*7+i)%500)
				node(depth+1, indent+"    ")
			}
			fmt.Fprintf(&b, "%s  \"walk away\"\n", indent)
			n++
			return
		}
		fmt.Fprintf(&b, "%schance \"c%d\"\n", indent, n)
		fmt.Fprintf(&b, "%s  \"high\"  %d%%  gain base * %d\n", indent, 20+n%30, 1+n%9)
		node(depth+1, indent+"    ")
		fmt.Fprintf(&b, "%s  \"mid\"   25%%  gain %d\n", indent, (n*13)%2000)
		node(depth+1, indent+"    ")
		fmt.Fprintf(&b, "%s  \"low\"   rest\n", indent)
		node(depth+1, indent+"    ")
	}
	node(0, "")
	return []byte(b.String())
})

func BenchmarkParseAndSolve100k(b *testing.B) {
	src := bigModel()
	b.SetBytes(int64(len(src)))
	var nodes int
	for i := 0; i < b.N; i++ {
		m, ds := lang.Load(src, lang.Options{})
		if ds.HasErrors() {
			b.Fatal(ds)
		}
		sol, err := eval.Solve(m)
		if err != nil {
			b.Fatal(err)
		}
		nodes = len(sol.Nodes())
	}
	b.ReportMetric(float64(nodes), "nodes")
}

func TestBigModelSize(t *testing.T) {
	if testing.Short() {
		t.Skip("generates a large model")
	}
	m, ds := lang.Load(bigModel(), lang.Options{})
	if ds.HasErrors() {
		t.Fatal(ds)
	}
	if n := m.Len(); n < 100_000 {
		t.Fatalf("generated model has %d nodes, want at least 100 000", n)
	}
}
