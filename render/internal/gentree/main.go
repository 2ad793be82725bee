// Command gentree writes a generated decision model of about N nodes in
// the .fork language, for timing the drawing of big trees (BENCHMARKS.md):
// decision and chance levels in turn, filled breadth first, two or three
// branches a node (one more than N when the last node needs its second),
// invented figures that depend only on N.
//
//	go run ./render/internal/gentree -n 5000 > gen5000.fork
package main

import (
	"bufio"
	"flag"
	"fmt"
	"os"
	"strings"
)

type node struct {
	decision bool
	label    string
	branches []branch
}

type branch struct {
	label string
	cash  int
	next  *node
}

func main() {
	n := flag.Int("n", 200, "number of nodes")
	flag.Parse()
	if *n < 1 {
		fmt.Fprintln(os.Stderr, "gentree: -n must be at least 1")
		os.Exit(2)
	}
	seed := uint64(*n)
	rnd := func(k int) int {
		seed = seed*6364136223846793005 + 1442695040888963407
		return int((seed >> 33) % uint64(k))
	}
	root := &node{decision: true, label: "Root choice"}
	count := 1
	queue := []*node{root}
	depth := map[*node]int{root: 0}
	for len(queue) > 0 && count < *n {
		p := queue[0]
		queue = queue[1:]
		k := 2 + rnd(2)
		for j := 0; j < k; j++ {
			if count >= *n && j != 1 {
				break // a node started gets its second branch
			}
			kind := "Chance"
			if !p.decision {
				kind = "Decision"
			}
			c := &node{decision: !p.decision, label: fmt.Sprintf("%s %d", kind, count)}
			depth[c] = depth[p] + 1
			p.branches = append(p.branches, branch{fmt.Sprintf("Option %d at level %d", j+1, depth[c]), (rnd(170) - 50) * 1000, c})
			count++
			queue = append(queue, c)
		}
	}
	w := bufio.NewWriter(os.Stdout)
	defer w.Flush()
	fmt.Fprintf(w, "title \"Generated tree of %d nodes\"\ncurrency EUR\nobjective max\n\n", *n)
	type item struct {
		n      *node
		indent int
		line   string
	}
	stack := []item{{n: root}}
	for len(stack) > 0 {
		it := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		if it.n == nil {
			fmt.Fprintln(w, it.line)
			continue
		}
		if len(it.n.branches) == 0 {
			continue // an end node: the branch above says all
		}
		kind := "chance"
		if it.n.decision {
			kind = "decision"
		}
		fmt.Fprintf(w, "%s%s %q\n", strings.Repeat("  ", it.indent), kind, it.n.label)
		var todo []item
		for j, b := range it.n.branches {
			prob := ""
			if !it.n.decision {
				prob = fmt.Sprintf("%d%%", 100/len(it.n.branches))
				if j == len(it.n.branches)-1 {
					prob = "rest"
				}
			}
			money := ""
			switch {
			case b.cash > 0:
				money = fmt.Sprintf("gain %d", b.cash)
			case b.cash < 0:
				money = fmt.Sprintf("cost %d", -b.cash)
			}
			line := strings.TrimRight(fmt.Sprintf("%s%q  %s  %s", strings.Repeat("  ", it.indent+1), b.label, prob, money), " ")
			todo = append(todo, item{line: line}, item{n: b.next, indent: it.indent + 2})
		}
		for k := len(todo) - 1; k >= 0; k-- {
			stack = append(stack, todo[k])
		}
	}
}
