package graphviz_test

import (
	"bytes"
	"context"
	"fmt"
	"log"
	"regexp"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/render"
	"github.com/forkcast/forkcast/render/graphviz"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// umbrella is a small invented model: take an umbrella or not.
func umbrella() *eval.Solution {
	d := decimal.RequireFromString
	m := &tree.Model{
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
	return sol
}

// Draw a solved tree as SVG. Everything the optimal policy reaches carries
// the class "optimal", so a page can restyle it.
func ExampleRenderer_Draw() {
	ctx := context.Background()
	r, err := graphviz.NewRenderer(ctx) // once per program
	if err != nil {
		log.Fatal(err)
	}
	defer r.Close()

	var svg bytes.Buffer
	if err := r.Draw(ctx, umbrella(), render.Options{}, graphviz.SVG, &svg); err != nil {
		log.Fatal(err)
	}
	groups := regexp.MustCompile(`<g id="(n\d+)" class="node ([a-z ]+)">`)
	for _, m := range groups.FindAllStringSubmatch(svg.String(), -1) {
		fmt.Println(m[1], m[2])
	}
	// Output:
	// n0 decision optimal
	// n1 chance optimal
	// n2 end optimal
	// n3 end optimal
	// n4 chance
	// n5 end
	// n6 end
}
