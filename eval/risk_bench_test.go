package eval

import (
	"context"
	"testing"
	"time"

	"github.com/shopspring/decimal"
)

// BenchmarkRiskRatios times, on the million-node bench tree, in one run:
// the certainty-equivalent fold (the layout made once, as breakeven of the
// risk tolerance reuses it) against the float64 rollback of expected
// values, and the exact risk profiles of the root's options against the
// exact rollback. Reported as ratios, as the machines are shared and
// noisy.
func BenchmarkRiskRatios(b *testing.B) {
	c := benchCompiled()
	sol, err := Solve(c)
	if err != nil {
		b.Fatal(err)
	}
	l := newCELayout(c)
	ce, policy := make([]float64, c.Len()), make([]int32, c.Len())
	t, best := make([]float64, c.Len()), make([]int32, c.Len())
	c.RollbackFloat(t, best)
	r := c.Rollback()
	r0 := 1e5
	var fold, flt, prof, ex time.Duration
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		t0 := time.Now()
		l.fold(r0, ce, policy)
		t1 := time.Now()
		c.RollbackFloat(t, best)
		t2 := time.Now()
		if _, err := RiskProfiles(context.Background(), sol, ProfileOptions{}); err != nil {
			b.Fatal(err)
		}
		t3 := time.Now()
		r = c.RollbackInto(r)
		t4 := time.Now()
		fold, flt, prof, ex = fold+t1.Sub(t0), flt+t2.Sub(t1), prof+t3.Sub(t2), ex+t4.Sub(t3)
	}
	b.ReportMetric(float64(fold)/float64(flt), "ce-fold/float-rollback")
	b.ReportMetric(float64(prof)/float64(ex), "profiles/exact-rollback")
	b.ReportMetric(float64(fold.Microseconds())/1000/float64(b.N), "ce-fold-ms/op")
	b.ReportMetric(float64(prof.Microseconds())/1000/float64(b.N), "profiles-ms/op")
}

// BenchmarkSolveRiskAverse is a whole solve on certainty equivalents of
// the bench tree: the float64 layout, the fold and the exact follow-up
// rollback of the risk-averse policy.
func BenchmarkSolveRiskAverse(b *testing.B) {
	c := benchCompiled()
	sol, err := Solve(c)
	if err != nil {
		b.Fatal(err)
	}
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := SolveRiskAverse(sol, decimal.NewFromInt(100_000)); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(c.Len()), "nodes")
}
