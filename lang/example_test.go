package lang_test

import (
	"fmt"
	"os"

	"github.com/forkcast/forkcast/lang"
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
	c, ds := lang.Load(src, lang.Options{})
	if ds.HasErrors() {
		ds.Print(os.Stdout, "release.fork", src)
		return
	}
	m := c.Source() // the model as written
	fmt.Println(m.Title, "in", m.Currency)
	fmt.Println(c.Len(), "nodes")
	fix, _ := c.InputNamed("fix")
	fmt.Println("fix =", fix.Value, "from", fix.Low, "to", fix.High)
	fails := c.Child(c.Child(0, 0), 1) // "Ship now", then "Fails"
	fmt.Println("P(Fails) =", c.Prob(fails), "net cash", c.Cash(fails))
	// Output:
	// Ship or fix first in EUR
	// 5 nodes
	// fix = 30000 from 20000 to 45000
	// P(Fails) = 0.1 net cash -250000
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
