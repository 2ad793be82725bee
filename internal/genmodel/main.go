// Command genmodel writes a generated decision model in the .fork
// language for timing the sensitivity analyses (BENCHMARKS.md): decision
// and chance levels in turn, three branches a node, about N nodes, and K
// ranged inputs (`let … in LOW .. HIGH`) that many figures read: half of
// them amounts on branches, half the probability of the first outcome of
// a chance node (each on one level of the tree, so that it enters a
// path at most once). The figures are invented and depend only on the
// flags.
//
//	go run ./internal/genmodel -n 100000 -inputs 10 > big.fork
package main

import (
	"bufio"
	"flag"
	"fmt"
	"os"
)

func main() {
	n := flag.Int("n", 100_000, "about this many nodes")
	k := flag.Int("inputs", 10, "number of ranged inputs (at least 2)")
	flag.Parse()
	if *n < 10 || *k < 2 {
		fmt.Fprintln(os.Stderr, "genmodel: -n must be at least 10 and -inputs at least 2")
		os.Exit(2)
	}
	w := bufio.NewWriter(os.Stdout)
	defer w.Flush()
	g := &gen{w: w, seed: uint64(*n)*31 + uint64(*k)}
	g.money = (*k + 1) / 2
	g.probs = *k - g.money
	fmt.Fprintf(w, "# A generated model of about %d nodes with %d ranged inputs (invented figures)\n", *n, *k)
	fmt.Fprintf(w, "title \"Generated sourcing model\"\ncurrency EUR\n\n")
	for i := 0; i < g.money; i++ {
		v := 20_000 + 5_000*g.rnd(20)
		fmt.Fprintf(w, "let amount_%d = %d  in %d .. %d\n", i+1, v, v*7/10, v*13/10)
	}
	for i := 0; i < g.probs; i++ {
		v := 15 + g.rnd(20)
		fmt.Fprintf(w, "let p_%d = %d%%  in %d%% .. %d%%\n", i+1, v, v-10, v+10)
	}
	w.WriteString("\n")
	g.node(0, *n, "")
}

type gen struct {
	w            *bufio.Writer
	seed         uint64
	money, probs int
	labels       int
}

func (g *gen) rnd(k int) int {
	g.seed = g.seed*6364136223846793005 + 1442695040888963407
	return int((g.seed >> 33) % uint64(k))
}

// next numbers the nodes with branches, for their labels.
func (g *gen) next() int {
	g.labels++
	return g.labels
}

// amount is a cash figure: a number, or an input times a small factor.
func (g *gen) amount() string {
	if g.rnd(3) == 0 {
		return fmt.Sprintf("amount_%d * %d", 1+g.rnd(g.money), 1+g.rnd(4))
	}
	return fmt.Sprintf("%d", 1_000*(5+g.rnd(120)))
}

// node writes a node at depth d and a subtree of at most budget nodes
// under and including it, and returns how many it wrote: three branches
// (two when only three nodes are left) sharing the rest, what one leaves
// passed on to the next; an end when fewer than three are left.
func (g *gen) node(d, budget int, indent string) int {
	if budget < 3 {
		return 1
	}
	k := min(3, budget-1)
	left := budget - 1
	share := func(j int) int { return left / (k - j) }
	in := indent + "  "
	if d%2 == 0 {
		fmt.Fprintf(g.w, "%sdecision \"Choice %d\"\n", indent, g.next())
		for j := 0; j < k; j++ {
			fmt.Fprintf(g.w, "%s\"Option %d\"  cost %s\n", in, j+1, g.amount())
			left -= g.node(d+1, share(j), in+"  ")
		}
		return budget - left
	}
	fmt.Fprintf(g.w, "%schance \"Outcome %d\"\n", indent, g.next())
	// Half the chance nodes of one level read that level's probability
	// input, so that an input enters each path at most once and the
	// values stay linear in it.
	first := fmt.Sprintf("%d%%", 10+g.rnd(25))
	if g.rnd(2) == 0 && d/2 < g.probs {
		first = fmt.Sprintf("p_%d", 1+d/2)
	}
	probs := []string{first, fmt.Sprintf("%d%%", 5+g.rnd(30)), "rest"}
	labels := []string{"High", "Middle", "Low"}
	if k == 2 {
		probs, labels = []string{first, "rest"}, []string{"High", "Low"}
	}
	for j := 0; j < k; j++ {
		fmt.Fprintf(g.w, "%s\"%s\"  %s  gain %s\n", in, labels[j], probs[j], g.amount())
		left -= g.node(d+1, share(j), in+"  ")
	}
	return budget - left
}
