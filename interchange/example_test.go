package interchange_test

import (
	"fmt"
	"os"
	"strings"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/interchange"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// Read a model in the JSON interchange format and check it.
func ExampleRead() {
	src := `{"root": {"type": "chance", "label": "Weather", "branches": [
	  {"label": "Dry", "probability": 0.7, "gain": 120},
	  {"label": "Wet", "probability": 0.2, "cost": 40}]}}`
	m, ds := interchange.Read(strings.NewReader(src), interchange.Options{})
	if !ds.HasErrors() {
		_, ds = compiled.Compile(m) // checks the model
	}
	for _, d := range ds {
		fmt.Println(d.Error())
	}
	// Output:
	// 1:10: probabilities under "Weather" sum to 0.9, not 1
}

// Write a model built in Go: inputs and calculations are written as
// written, so a program reading the JSON can vary the fee.
func ExampleWrite() {
	n := func(s string) tree.Expr { return tree.Num(decimal.RequireFromString(s)) }
	m := &tree.Model{
		Title:  "Courier contract",
		Params: []*tree.Param{tree.Input("fee", n("40")).Within(n("30"), n("60"))},
		Root: tree.Decision("Supply",
			tree.Choice("Own van", tree.Cost(n("55")), nil),
			tree.Choice("Courier", tree.Cost(&tree.Binary{Op: '*', X: tree.Ref("fee"), Y: n("1.2")}), nil)),
	}
	if err := interchange.Write(os.Stdout, m, interchange.WriteOptions{}); err != nil {
		fmt.Println(err)
	}
	// Output:
	// {
	//   "title": "Courier contract",
	//   "objective": "max",
	//   "inputs": [
	//     {
	//       "name": "fee",
	//       "value": 40,
	//       "low": 30,
	//       "high": 60
	//     }
	//   ],
	//   "root": {
	//     "type": "decision",
	//     "label": "Supply",
	//     "branches": [
	//       {
	//         "label": "Own van",
	//         "cost": 55
	//       },
	//       {
	//         "label": "Courier",
	//         "cost": "fee * 1.2"
	//       }
	//     ]
	//   }
	// }
}
