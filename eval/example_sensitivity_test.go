package eval_test

import (
	"context"
	"fmt"

	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/lang"
)

// drilling is an invented drill-or-sell decision with three ranged
// inputs.
const drilling = `
let p_oil    = 25%  in 15% .. 35%
let oil_gain = 700  in 500 .. 900
let sale     = 90   in 60 .. 120

uncertainty oil "Oil in the ground"
  "Oil"  p_oil
  "Dry"  rest

decision "Drill or sell"
  "Drill"
    chance oil
      "Oil"  gain oil_gain
      "Dry"  cost 100
  "Sell"  gain sale
`

// One-way sensitivity: every input with a range moved from its low to its
// high value, largest swing first, with the switches of the best option.
func ExampleAnalyseSensitivity() {
	c, ds := lang.Load([]byte(drilling), lang.Options{})
	if ds.HasErrors() {
		fmt.Println(ds)
		return
	}
	s, err := eval.AnalyseSensitivity(context.Background(), c, eval.SensitivityOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("base:", s.Base)
	for _, in := range s.Inputs {
		fmt.Printf("%-8s %s .. %s: %s .. %s (swing %s; drilling held: %s .. %s)", in.Vary, in.Low, in.High, in.ValueLow, in.ValueHigh, in.Swing, in.FixedLow, in.FixedHigh)
		for _, sw := range in.Switches {
			fmt.Printf("; %s → %s at %s", s.Options[sw.Below], s.Options[sw.Above], sw.At)
		}
		fmt.Println()
	}
	// Output:
	// base: 100
	// p_oil    0.15 .. 0.35: 90 .. 180 (swing 90; drilling held: 20 .. 180); Sell → Drill at 0.2375
	// oil_gain 500 .. 900: 90 .. 150 (swing 60; drilling held: 50 .. 150); Sell → Drill at 660
	// sale     60 .. 120: 100 .. 120 (swing 20; drilling held: 100 .. 100); Drill → Sell at 100
}

// A sweep: every option's value over a grid of one input.
func ExampleSweepInput() {
	c, _ := lang.Load([]byte(drilling), lang.Options{})
	v, _ := eval.ParseVary("sale")
	sw, err := eval.SweepInput(context.Background(), c, eval.SweepOptions{Vary: eval.VaryRange{Vary: v}, Steps: 3})
	if err != nil {
		fmt.Println(err)
		return
	}
	for k, x := range sw.Input.Values {
		fmt.Println(x, sw.Values[k], sw.Options[sw.Best[k][0]])
	}
	fmt.Println("switch at", sw.Switches[0].At)
	// Output:
	// 60 [100 60] Drill
	// 80 [100 80] Drill
	// 100 [100 100] Drill
	// 120 [100 120] Sell
	// switch at 100
}

// A two-way strategy map: the best option over a grid of two inputs, and
// the boundary between the regions.
func ExampleMapStrategies() {
	c, _ := lang.Load([]byte(drilling), lang.Options{})
	x, _ := eval.ParseVary("sale")
	y, _ := eval.ParseVary("oil_gain")
	m, err := eval.MapStrategies(context.Background(), c, eval.MapOptions{X: eval.VaryRange{Vary: x}, Y: eval.VaryRange{Vary: y}, Steps: 2})
	if err != nil {
		fmt.Println(err)
		return
	}
	for j := len(m.Best) - 1; j >= 0; j-- {
		fmt.Print(m.Y.Values[j], ":")
		for _, b := range m.Best[j] {
			fmt.Print(" ", m.Options[b])
		}
		fmt.Println()
	}
	for _, b := range m.Boundaries {
		fmt.Printf("(%s, %s) – (%s, %s) exact: %v\n", b.From.X, b.From.Y, b.To.X, b.To.Y, b.Exact)
	}
	// Output:
	// 900: Drill Drill Drill
	// 700: Drill Drill Sell
	// 500: Sell Sell Sell
	// (90, 660) – (60, 540) exact: true
	// (100, 700) – (90, 660) exact: true
	// (100, 700) – (120, 780) exact: true
}
