package render_test

import (
	"fmt"
	"log"
	"regexp"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/render"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// DOT gives the Graphviz text of a solved tree; package render/graphviz
// lays it out as SVG or PNG. Here only the optimal policy is drawn, with
// the rejected option folded into a stub (b0x).
func ExampleDOT() {
	d := decimal.RequireFromString
	m := &tree.Model{ // an invented model
		Title:    "Umbrella",
		Currency: "EUR",
		Root: tree.Decision("Take an umbrella?",
			tree.Choice("Take it", tree.Gain(tree.Num(d("-2"))), tree.Chance("Weather",
				tree.Outcome("Rain", tree.Num(d("0.3")), tree.Gain(tree.Num(d("10"))), nil),
				tree.RestOutcome("Dry", tree.Gain(tree.Num(d("5"))), nil))),
			tree.Choice("Leave it", tree.NoCash, tree.Chance("Weather",
				tree.Outcome("Rain", tree.Num(d("0.3")), tree.Gain(tree.Num(d("-20"))), nil),
				tree.RestOutcome("Dry", tree.Gain(tree.Num(d("10"))), nil))),
		),
	}
	c, ds := compiled.Compile(m)
	if ds.HasErrors() {
		log.Fatal(ds)
	}
	sol, err := eval.Solve(c)
	if err != nil {
		log.Fatal(err)
	}
	dot, err := render.DOT(sol, render.Options{PolicyOnly: true})
	if err != nil {
		log.Fatal(err)
	}
	ids := regexp.MustCompile(`(?m)^\t(\S+) \[id="[^"]+" class="([^"]+)"`)
	for _, m := range ids.FindAllStringSubmatch(string(dot), -1) {
		fmt.Println(m[1], m[2])
	}
	// Output:
	// n0 decision optimal
	// b1 branch optimal
	// n1 chance optimal
	// b2 branch optimal
	// n2 end optimal
	// b3 branch optimal
	// n3 end optimal
	// b0x branch pruned others
}
