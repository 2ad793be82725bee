// Command gen writes a generated decision model of exactly N nodes (ends
// included, as the compiled model counts them) in the .fork language, for
// timing the reader on big models (BENCHMARKS.md). The tree is filled
// breadth first, decision and chance levels in turn, two to four branches a
// node; the lines take the shapes large models are made of: percent and
// decimal probabilities with a `rest`, gains and costs written with `_`
// between digit groups, costs that name an input or multiply one, and
// labels of a few words. The figures are invented and depend only on N.
//
//	go run ./lang/internal/gen -n 864000 > big.fork
//	go run ./lang/internal/gen -doubling 19 > bomb.fork
package main

import (
	"bufio"
	"flag"
	"fmt"
	"os"
	"strings"
)

// node is a node of the generated tree; kids are the nodes under its
// branches (nil: the branch ends the path).
type node struct {
	decision bool
	id       int
	kids     []*node
}

func main() {
	n := flag.Int("n", 1000, "number of nodes, ends included (at least 3)")
	doubling := flag.Int("doubling", 0, "instead, write a doubling model of `L` levels of subtrees, each used twice by the one above: 2^(L+2)+1 nodes in a few hundred bytes")
	flag.Parse()
	w := bufio.NewWriterSize(os.Stdout, 1<<16)
	defer w.Flush()
	switch {
	case *doubling > 0:
		writeDoubling(w, *doubling)
	case *n < 3:
		fmt.Fprintln(os.Stderr, "gen: -n must be at least 3")
		w.Flush()
		os.Exit(2)
	default:
		write(w, build(*n))
	}
}

// writeDoubling writes a model whose subtrees double the tree at each of
// levels levels: subtree i is a decision whose two options both use
// subtree i+1; the last has two ends, and the root adds itself and one
// end.
func writeDoubling(w *bufio.Writer, levels int) {
	for i := 0; i < levels; i++ {
		fmt.Fprintf(w, "subtree l%d\n  decision \"L%d\"\n    \"a\"\n      use l%d\n    \"b\"\n      use l%d\n", i, i, i+1, i+1)
	}
	fmt.Fprintf(w, "subtree l%d\n  decision \"End\"\n    \"a\"\n    \"b\"\n", levels)
	w.WriteString("decision \"Top\"\n  \"go\"\n    use l0\n  \"stop\"\n")
}

// rng is a small linear congruential generator: the output depends on N
// alone, on every platform.
type rng uint64

func (r *rng) intn(k int) int {
	*r = *r*6364136223846793005 + 1442695040888963407
	return int((uint64(*r) >> 33) % uint64(k))
}

// build makes a tree of exactly n nodes. Every node starts as an end; a
// node taken from the queue becomes decision or chance by its depth and
// gets two to four branches, each adding an end, until the count is
// reached (the last node may get fewer, but never fewer than two).
func build(n int) *node {
	r := rng(n)
	root := &node{decision: true}
	count, ids := 1, 1
	queue := []*node{root}
	for len(queue) > 0 && count < n {
		p := queue[0]
		queue = queue[1:]
		k := min(2+r.intn(3), n-count)
		if k < 2 {
			break
		}
		for range k {
			c := &node{decision: !p.decision, id: ids}
			ids++
			p.kids = append(p.kids, c)
			queue = append(queue, c)
		}
		count += k
	}
	return root
}

var (
	options  = []string{"Build", "Buy", "Lease", "Wait", "Partner"}
	outcomes = []string{"High sales", "Mid sales", "Low sales", "No sales"}
)

// write prints the model, depth first, with an explicit stack of things
// to print: a node (its line, then its branches) or a branch line already
// made.
func write(w *bufio.Writer, root *node) {
	r := rng(7)
	w.WriteString("title \"Generated model\"\ncurrency EUR\nobjective max\n\n")
	w.WriteString("let fee = 2_500 in 1_000 .. 4_000\nlet unit = 1_200\n\n")
	type item struct {
		n      *node // nil: print line
		indent int
		line   string
	}
	stack := []item{{n: root}}
	for len(stack) > 0 {
		it := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		if it.n == nil {
			w.WriteString(it.line)
			w.WriteByte('\n')
			continue
		}
		pad := strings.Repeat("  ", it.indent)
		if it.n.decision {
			fmt.Fprintf(w, "%sdecision \"Choice %d\"\n", pad, it.n.id)
		} else {
			fmt.Fprintf(w, "%schance \"Market %d\"\n", pad, it.n.id)
		}
		k := len(it.n.kids)
		left := 100
		todo := make([]item, 0, 2*k)
		for j, c := range it.n.kids {
			todo = append(todo, item{line: branchLine(&r, pad, it.n.decision, j, k, &left)})
			if len(c.kids) > 0 {
				todo = append(todo, item{n: c, indent: it.indent + 2})
			}
		}
		for i := len(todo) - 1; i >= 0; i-- {
			stack = append(stack, todo[i])
		}
	}
}

// branchLine makes branch j of k; left is the percentage the chance
// node's branches have not taken yet.
func branchLine(r *rng, pad string, decision bool, j, k int, left *int) string {
	var b strings.Builder
	b.WriteString(pad)
	b.WriteString("  ")
	if decision {
		fmt.Fprintf(&b, "%q", options[j%len(options)])
	} else {
		fmt.Fprintf(&b, "%q", outcomes[j%len(outcomes)])
		p := 1 + r.intn(*left/(k-j))
		switch {
		case j == k-1:
			b.WriteString("  rest")
		case r.intn(4) == 0:
			*left -= p
			fmt.Fprintf(&b, "  0.%02d", p)
		default:
			*left -= p
			fmt.Fprintf(&b, "  %d%%", p)
		}
	}
	switch x := r.intn(10); {
	case x < 4:
		fmt.Fprintf(&b, "  gain %s", money(r.intn(200)*500))
	case x < 6:
		fmt.Fprintf(&b, "  cost %s", money(r.intn(80)*250))
	case x == 6:
		b.WriteString("  cost fee")
	case x == 7:
		fmt.Fprintf(&b, "  gain unit * %d", 1+r.intn(9))
	case x == 8:
		fmt.Fprintf(&b, "  gain %s  cost fee", money(r.intn(200)*500))
	}
	return b.String()
}

// money writes an amount with _ between groups of three digits.
func money(v int) string {
	s := fmt.Sprint(v)
	for i := len(s) - 3; i > 0; i -= 3 {
		s = s[:i] + "_" + s[i:]
	}
	return s
}
