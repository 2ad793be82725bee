package eval_test

import (
	"context"
	"fmt"

	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/lang"
)

// Simulate a choice between a three-point estimate and a fixed price: the
// exact analysis uses the PERT mean (380 + 4·420 + 610)/6 = 445; the
// simulation shows how often the estimate beats the quote (exactly 67.7%
// by the beta-PERT's CDF at 460) and its P80 (exactly 478.6). The same seed
// gives the same figures, whatever the number of workers.
func ExampleSimulate() {
	src := `objective min
let build = pert(380, 420, 610)
decision "Route"
  "Build"  cost build
  "Quote"  cost 460
`
	c, ds := lang.Load([]byte(src), lang.Options{})
	if ds.HasErrors() {
		fmt.Println(ds)
		return
	}
	s, err := eval.Simulate(context.Background(), c, eval.SimulateOptions{Runs: 20_000, Seed: 7})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, o := range s.Options {
		fmt.Printf("%s: at the means %s, P(best) %.0f%%, P80 %.0f\n", o.Label, o.AtMeans, 100*o.PBest, o.Sample.Percentile(0.8))
	}
	// Output:
	// Build: at the means 445, P(best) 68%, P80 478
	// Quote: at the means 460, P(best) 32%, P80 460
}
