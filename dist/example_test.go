package dist_test

import (
	"context"
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

// A reproducible simulation: run i draws from its own stream, so the
// result is the same with 1 worker or 4.
func ExampleForEachRun() {
	build, _ := dist.NewPERT(380_000, 420_000, 610_000)
	overrun, _ := dist.NewTriangular(0, 20_000, 90_000)
	const runs = 10_000
	total := make([]float64, runs)
	streams := dist.NewStreams(2026)
	done, err := dist.ForEachRun(context.Background(), streams, runs, 4, func(_, run int, r *rand.Rand) error {
		total[run] = build.Rand(r) + overrun.Rand(r)
		return nil
	})
	if err != nil {
		fmt.Println(err, "after", done, "runs")
		return
	}
	s, _ := dist.NewSample(total)
	fmt.Printf("mean %.0f ± %.0f\n", s.Mean(), s.StdErr())
	fmt.Printf("P50 %.0f  P80 %.0f  P90 %.0f\n", s.Percentile(0.5), s.Percentile(0.8), s.Percentile(0.9))
	fmt.Printf("P(total ≤ 500,000) = %.3f\n", s.ProbAtMost(500_000))
	// Output:
	// mean 481723 ± 434
	// P50 477208  P80 519463  P90 541501
	// P(total ≤ 500,000) = 0.677
}

// Impose a rank correlation of 0.7 between two independently drawn inputs.
func ExampleImanConover() {
	labour, _ := dist.NewPERT(60, 75, 120)
	materials, _ := dist.NewLogNormalPercentiles(0.1, 40, 0.9, 90)
	target, err := dist.CorrelationFromPairs([]string{"labour", "materials"}, []dist.Pair{{A: 0, B: 1, Rho: 0.7}})
	if err != nil {
		fmt.Println(err)
		return
	}
	src := rand.NewPCG(1, 2)
	cols := [][]float64{make([]float64, 5000), make([]float64, 5000)}
	for i := range 5000 {
		cols[0][i], cols[1][i] = labour.Rand(src), materials.Rand(src)
	}
	fmt.Printf("before: %.2f\n", dist.Spearman(cols[0], cols[1]))
	if err := dist.ImanConover(cols, target, src); err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("after:  %.2f\n", dist.Spearman(cols[0], cols[1]))
	// Output:
	// before: 0.00
	// after:  0.70
}

// Correlations that cannot hold together are refused with the inputs named.
func ExampleCorrelationFromPairs() {
	_, err := dist.CorrelationFromPairs([]string{"labour", "materials", "delay"}, []dist.Pair{
		{A: 0, B: 1, Rho: 0.9}, {A: 0, B: 2, Rho: 0.9}, {A: 1, B: 2, Rho: -0.9},
	})
	fmt.Println(err)
	// Output:
	// the correlations among labour, materials and delay cannot all hold at once (the matrix is not positive definite); weaken one of those involving delay
}

// Percentiles are the smallest value whose cumulative proportion reaches p.
func ExampleSample_Percentile() {
	s, _ := dist.NewSample([]float64{40, 10, 30, 20})
	for _, p := range []float64{0.25, 0.26, 0.5, 0.8} {
		fmt.Printf("P%.0f = %.0f\n", 100*p, s.Percentile(p))
	}
	// Output:
	// P25 = 10
	// P26 = 20
	// P50 = 20
	// P80 = 40
}

// A histogram with round bin edges.
func ExampleSample_Histogram() {
	s, _ := dist.NewSample([]float64{12, 18, 25, 31, 33, 47, 52, 58, 61, 99})
	h, _ := s.Histogram(4)
	for i, n := range h.Counts {
		fmt.Printf("[%g, %g) %d\n", h.Edges[i], h.Edges[i+1], n)
	}
	// Output:
	// [0, 25) 2
	// [25, 50) 4
	// [50, 75) 3
	// [75, 100) 1
}
