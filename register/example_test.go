package register_test

import (
	"context"
	"fmt"
	"strings"

	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/lang"
	"github.com/forkcast/forkcast/register"
)

// A register read from a spreadsheet and quantified: the EMV reserve is
// exact; the reserve at 80% comes from the simulation (the same seed
// gives the same figure).
func ExampleAnalyse() {
	sheet := `id,title,type,probability,low,likely,high,response,response_cost,residual_probability
R1,Flooded basement,threat,20%,"40,000","60,000","110,000",Pumps on standby,"3,000",5%
R2,Cheaper cladding supplier,opportunity,50%,,"12,000",,,,
R3,Late steel delivery,threat,30%,"5,000","10,000","30,000",,,
`
	t, err := register.ReadCSV(strings.NewReader(sheet))
	if err != nil {
		fmt.Println(err)
		return
	}
	a, err := register.Analyse(context.Background(), t.Register, register.Options{Runs: 20_000, Seed: 1})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, r := range a.Risks {
		fmt.Printf("%s  EMV %9s\n", r.Risk.ID, r.EMV.Decimal().StringFixed(2))
	}
	fmt.Println("EMV reserve:", a.Total.Decimal().StringFixed(2))
	fmt.Println("reserve at 80% above the EMV reserve:", a.Reserve > a.Total.Float64())
	r1 := a.Risks[0].Response
	fmt.Println("R1's response saves", r1.Net.Decimal().StringFixed(2), "net; take it:", r1.Take)
	// Output:
	// R1  EMV  13000.00
	// R2  EMV  -6000.00
	// R3  EMV   3750.00
	// EMV reserve: 10750.00
	// reserve at 80% above the EMV reserve: true
	// R1's response saves 6750.00 net; take it: true
}

// A register written in a model, read with lang.Load: FromModel evaluates
// its figures at the model's inputs, here a probability given by a let.
func ExampleFromModel() {
	src := `currency EUR
let p_flood = 20%

register basement "Basement works"
  threat R1 "Flooded basement"
    probability p_flood
    impact pert(40_000, 60_000, 110_000)
    response "Pumps on standby" cost 3_000
      residual probability 5%
  opportunity R2 "Cheaper cladding supplier"
    probability 50%
    impact 12_000
`
	c, ds := lang.Load([]byte(src), lang.Options{})
	if ds.HasErrors() {
		fmt.Println(ds)
		return
	}
	reg, err := register.FromModel(c, "basement")
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, k := range reg.Risks {
		fmt.Printf("%s %s, probability %s, impact %s\n", k.ID, k.Kind, k.P, k.Impact)
	}
	a, err := register.Analyse(context.Background(), reg, register.Options{Runs: 1_000, Seed: 1})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("EMV reserve:", a.Total.Decimal().StringFixed(2), reg.Currency)
	// Output:
	// R1 threat, probability 0.2, impact pert(40000, 60000, 110000)
	// R2 opportunity, probability 0.5, impact 12000
	// EMV reserve: 7000.00 EUR
}

// A tree that takes a register's total as an input: solving uses the
// total's exact expected value, the register's EMV reserve.
func ExampleResolver() {
	src := `objective min
decision "Route"
  "Build"  cost 400_000 + risks
  "Buy"    cost 470_000
let risks = register works total
register works
  threat W1 "Ground worse than surveyed"
    probability 30%
    impact 60_000
  threat W2 "Wet winter"
    probability 50%
    impact 20_000
`
	c, ds := lang.Load([]byte(src), lang.Options{})
	if ds.HasErrors() {
		fmt.Println(ds)
		return
	}
	sol, err := eval.Solve(c)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("Build:", sol.Root.BranchValue(0), "Buy:", sol.Root.BranchValue(1))
	// Output:
	// Build: 428000 Buy: 470000
}
