package report_test

import (
	"context"
	"encoding/json"
	"fmt"
	"os"

	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/lang"
	"github.com/forkcast/forkcast/report"
)

// A small invented model: a workshop deciding whether to buy a second
// kiln, with demand uncertain and a trial week that reads it imperfectly.
const kiln = `title "Second kiln"
currency EUR

let price = 18_000  in 10_000 .. 30_000
let p_busy = 40%

uncertainty demand "Demand next year"
  "Busy"   p_busy
  "Quiet"  rest

test trial "Trial week" on demand cost 1_000
  "Queue"    80% if "Busy", 30% if "Quiet"
  "No queue" rest

subtree buy
  decision "Kiln"
    "Buy"  cost price
      chance demand
        "Busy"   gain 60_000
        "Quiet"  gain 5_000
    "Do not buy"

decision "First"
  "Decide now"
    use buy
  "Run a trial week"
    test trial
      "Queue"
        use buy
      "No queue"
        use buy
`

// load compiles the kiln model and solves it.
func load() *eval.Solution {
	c, ds := lang.Load([]byte(kiln), lang.Options{})
	if ds.HasErrors() {
		ds.Print(os.Stderr, "kiln.fork", []byte(kiln))
		return nil
	}
	sol, err := eval.Solve(c)
	if err != nil {
		fmt.Println(err)
		return nil
	}
	return sol
}

// The text `forkcast solve --no-tree` prints. By hand: deciding now, buying
// is worth 0.4 × 60,000 + 0.6 × 5,000 − 18,000 = 9,000. The trial reads
// "Queue" with probability 0.4 × 0.8 + 0.6 × 0.3 = 0.5; after it buying is
// worth (0.32 × 60,000 + 0.18 × 5,000) / 0.5 − 18,000 = 22,200, after "No
// queue" (0.08 × 60,000 + 0.42 × 5,000) / 0.5 − 18,000 = −4,200 (so not
// buying, 0): 0.5 × 22,200 − 1,000 = 10,100 with the trial.
func ExampleSolve() {
	sol := load()
	report.Solve(sol, report.SolveOptions{OmitTree: true}).WriteText(os.Stdout)
	// Output:
	// Second kiln
	// objective:       maximise expected net value
	// expected value:  10,100.00 EUR
	//
	// Recommended policy
	//   1. "First"
	//        Decide now        9,000.00 EUR
	//      * Run a trial week  10,100.00 EUR
	//      take "Run a trial week": better by 1,100.00 EUR than "Decide now"
	//   2. "Kiln"  (if trial = "Queue")
	//      * Buy         22,200.00 EUR
	//        Do not buy  0.00 EUR
	//      take "Buy": better by 22,200.00 EUR than "Do not buy"
	//   3. "Kiln"  (if trial = "No queue")
	//        Buy         -4,200.00 EUR
	//      * Do not buy  0.00 EUR
	//      take "Do not buy": better by 4,200.00 EUR than "Buy"
}

// The figures of the trial week, as `forkcast voi --json` gives them. By
// hand: knowing the demand first, buying only when busy is worth
// 0.4 × (60,000 − 18,000) = 16,800, so EVPI = 16,800 − 10,100 = 6,700. The
// trial's information alone: 0.5 × 22,200 = 11,100 against 9,000 deciding
// now, EVSI 2,100; less its cost of 1,000, a net gain of 1,100.
func ExampleVOI() {
	sol := load()
	info, err := eval.ValueOfInformation(context.Background(), sol, eval.VOIOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	r := report.VOI(sol, info, report.VOIOptions{})
	b, _ := json.Marshal(r)
	var v struct {
		EVPI  string
		Tests []struct {
			Sites []struct {
				EVSI      string `json:"evsi"`
				NetGain   string `json:"net_gain"`
				MostToPay string `json:"most_to_pay"`
			}
		}
	}
	json.Unmarshal(b, &v)
	fmt.Println("EVPI", v.EVPI)
	fmt.Printf("%+v\n", v.Tests[0].Sites[0])
	// Output:
	// EVPI 6700
	// {EVSI:2100 NetGain:1100 MostToPay:2100}
}

// Where the best first step changes with the kiln's price. By hand: below
// a price of 13,800 the trial changes nothing and costs 1,000; above it,
// deciding now is worth 27,000 − price and trying first 19,100 − price / 2,
// equal at 15,800.
func ExampleBreakeven() {
	sol := load()
	be, err := eval.FindBreakeven(context.Background(), sol.Compiled, eval.BreakevenOptions{Vary: eval.Vary{Kind: eval.VaryParam, Name: "price"}})
	if err != nil {
		fmt.Println(err)
		return
	}
	report.Breakeven(sol.Compiled, be, report.BreakevenOptions{}).WriteText(os.Stdout)
	// Output:
	// Second kiln
	// breakeven of parameter price, now 18,000, over 10,000 .. 30,000
	// watching decision "First"
	//
	// Switch at price = 15,800 (exact): "Decide now" below, "Run a trial week" above
	//     Decide now         11,200.00 EUR
	//     Run a trial week   11,200.00 EUR
	//
	// Best option over the range
	//   10,000 .. 15,800   Decide now
	//   15,800 .. 30,000   Run a trial week
	// (at a switch the options tie; ties go to the first option in the model)
}

// A program that shows reports to its users under its own names for the
// library's options.
func ExampleOptionNames() {
	names := report.OptionNames{"VOIOptions.MaxScenarios": "the scenario limit in Settings"}
	fmt.Println(names.Apply("more than 100000 joint states (raise VOIOptions.MaxScenarios to allow more)"))
	// Output:
	// more than 100000 joint states (raise the scenario limit in Settings to allow more)
}
