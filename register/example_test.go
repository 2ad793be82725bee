package register_test

import (
	"context"
	"fmt"
	"strings"

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
