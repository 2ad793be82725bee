package dist_test

import (
	"fmt"
	"math/rand/v2"

	"github.com/forkcast/forkcast/dist"
	"github.com/shopspring/decimal"
)

// A three-point estimate as a PERT distribution: its exact mean for the
// exact analyses, its spread for simulation.
func ExampleNewPERTExact() {
	d := decimal.RequireFromString
	build, err := dist.NewPERTExact(d("380000"), d("420000"), d("610000"))
	if err != nil {
		fmt.Println(err)
		return
	}
	mean, _ := build.MeanExact()
	fmt.Println(build, "mean", mean.RatString())
	fmt.Printf("P10 %.0f  P50 %.0f  P90 %.0f\n", build.Quantile(0.1), build.Quantile(0.5), build.Quantile(0.9))
	// Output:
	// pert(380000, 420000, 610000) mean 445000
	// P10 398158  P50 439185  P90 500632
}

// A bad estimate is reported in plain words, with the argument to blame.
func ExampleArgError() {
	_, err := dist.NewTriangular(500, 450, 900)
	fmt.Println(err)
	if ae, ok := err.(*dist.ArgError); ok {
		fmt.Println("argument", ae.Arg)
	}
	// Output:
	// triangular: LOW (500) is above LIKELY (450); LOW must not exceed LIKELY
	// argument 1
}

// A lognormal elicited as P10 and P90.
func ExampleNewLogNormalPercentiles() {
	repair, _ := dist.NewLogNormalPercentiles(0.1, 20_000, 0.9, 90_000)
	fmt.Printf("median %.0f, mean %.0f\n", repair.Quantile(0.5), repair.Mean())
	// Output:
	// median 42426, mean 50398
}

// Replace a distribution by three branches for exact rollback.
func ExampleDiscretise() {
	labour, _ := dist.NewTriangular(60, 75, 120)
	tp, _ := dist.Discretise(labour, dist.PearsonTukey)
	for i := range tp.Values {
		fmt.Printf("P%-2.0f %6.2f  weight %s\n", 100*tp.Levels[i], tp.Values[i], tp.Weights[i])
	}
	// Output:
	// P5   66.71  weight 0.185
	// P50  83.26  weight 0.63
	// P95 108.38  weight 0.185
}

// A risk that occurs with probability 0.3 and then costs a triangular amount.
func ExampleNewEvent() {
	impact, _ := dist.NewTriangular(100, 150, 400)
	risk, _ := dist.NewEvent(0.3, impact)
	fmt.Printf("expected impact %.0f, P90 %.0f\n", risk.Mean(), risk.Quantile(0.9))
	src := rand.NewPCG(1, 2)
	occurred := 0
	for range 10_000 {
		if risk.Rand(src) != 0 {
			occurred++
		}
	}
	fmt.Printf("occurred in %d of 10000 draws\n", occurred)
	// Output:
	// expected impact 65, P90 242
	// occurred in 2977 of 10000 draws
}
