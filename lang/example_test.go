package lang_test

import (
	"fmt"
	"os"

	"github.com/forkcast/forkcast/lang"
	"github.com/forkcast/forkcast/tree"
)

func ExampleLoad() {
	src := []byte(`title "Ship or fix first"
currency EUR
let fix = 30_000   in 20_000 .. 45_000

decision "Release"
  "Ship now"
    chance "In the field"
      "Works"  90%
      "Fails"  rest  cost 250_000
  "Fix first"  cost fix
`)
	m, ds := lang.Load(src, lang.Options{})
	if ds.HasErrors() {
		ds.Print(os.Stdout, "release.fork", src)
		return
	}
	fmt.Println(m.Title, "in", m.Currency)
	fmt.Println(tree.Count(m.Root), "nodes")
	fmt.Println("fix =", m.Param("fix").Value, "from", m.Param("fix").LowValue, "to", m.Param("fix").HighValue)
	fails := m.Root.Branches[0].Node.Branches[1]
	fmt.Println("P(Fails) =", fails.P, "cash", fails.C)
	// Output:
	// Ship or fix first in EUR
	// 5 nodes
	// fix = 30000 from 20000 to 45000
	// P(Fails) = 0.1 cash -250000
}

func ExampleLoad_diagnostics() {
	src := []byte(`decision "Release"
  "Ship now"
    chance "In the field"
      "Works"  90%
      "Fails"  5%
  "Fix first"  cost 30_000
`)
	_, ds := lang.Load(src, lang.Options{})
	ds.Print(os.Stdout, "release.fork", src)
	// Output:
	// release.fork:3:5: probabilities under "In the field" sum to 0.95, not 1
	//         chance "In the field"
	//         ^^^^^^
	//     hint: add a `rest` branch or fix one of them
}
