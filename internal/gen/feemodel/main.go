// Command feemodel writes a generated .fork model for the breakeven speed
// figure in BENCHMARKS.md: decision and chance levels in turn (3 options,
// 3 outcomes), an input `fee` in the cash of nearly every branch. Invented
// figures from a fixed seed, so the file is the same every time.
//
//	go run ./internal/gen/feemodel -levels 10 > fee100k.fork   # 88,573 nodes
package main

import (
	"bufio"
	"flag"
	"fmt"
	"math/rand"
	"os"
	"strings"
)

func main() {
	levels := flag.Int("levels", 10, "levels of decisions and chance nodes")
	flag.Parse()
	rng := rand.New(rand.NewSource(4))
	w := bufio.NewWriter(os.Stdout)
	defer w.Flush()
	fmt.Fprintln(w, "title \"generated: fee in every branch\"\nlet fee = 100 in 0 .. 400")
	n := 0
	var node func(depth int, ind string)
	node = func(depth int, ind string) {
		n++
		if depth == *levels {
			return
		}
		more := ind + strings.Repeat(" ", 4)
		if depth%2 == 0 {
			fmt.Fprintf(w, "%sdecision \"d%d\"\n", ind, n)
			for i := 0; i < 3; i++ {
				fmt.Fprintf(w, "%s  \"o%d\"  cost fee * %d + %d\n", ind, i, 1+rng.Intn(9), rng.Intn(501))
				node(depth+1, more)
			}
			return
		}
		fmt.Fprintf(w, "%schance \"c%d\"\n", ind, n)
		fmt.Fprintf(w, "%s  \"hi\"  %d%%  gain fee * %d + %d\n", ind, 10+rng.Intn(41), 1+rng.Intn(5), rng.Intn(3001))
		node(depth+1, more)
		fmt.Fprintf(w, "%s  \"mid\" 20%%  gain %d - fee\n", ind, rng.Intn(3001))
		node(depth+1, more)
		fmt.Fprintf(w, "%s  \"lo\"  rest\n", ind)
		node(depth+1, more)
	}
	node(0, "")
}
