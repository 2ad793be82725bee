package tree_test

import (
	"fmt"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/tree"
)

// Read a model in the JSON interchange format and check it.
func ExampleReadJSON() {
	src := []byte(`{"root": {"type": "chance", "label": "Weather", "branches": [
	  {"label": "Dry", "probability": 0.7, "cash": 120},
	  {"label": "Wet", "probability": 0.2, "cash": -40}]}}`)
	m, ds := tree.ReadJSON(src, 0)
	if !ds.HasErrors() {
		_, ds = compiled.Compile(m) // checks the model
	}
	for _, d := range ds {
		fmt.Println(d.Error())
	}
	// Output:
	// 1:10: probabilities under "Weather" sum to 0.9, not 1
}
