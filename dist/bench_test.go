package dist

import (
	"context"
	"math/rand/v2"
	"testing"
)

// BenchmarkRand reports the cost of one draw (ns/op) of each distribution.
func BenchmarkRand(b *testing.B) {
	for _, d := range testDistributions(b) {
		b.Run(d.String(), func(b *testing.B) {
			src := rand.NewPCG(1, 2)
			var sink float64
			for b.Loop() {
				sink += d.Rand(src)
			}
			_ = sink
		})
	}
}

// BenchmarkQuantile reports the cost of one draw by inversion (ns/op), as
// stratified and rank-based sampling uses it.
func BenchmarkQuantile(b *testing.B) {
	for _, d := range testDistributions(b) {
		b.Run(d.String(), func(b *testing.B) {
			r := rand.New(rand.NewPCG(1, 2))
			var sink float64
			for b.Loop() {
				sink += d.Quantile(r.Float64())
			}
			_ = sink
		})
	}
}

// BenchmarkImanConover rearranges 4 columns of 10,000 draws.
func BenchmarkImanConover(b *testing.B) {
	target, err := NewCorrelation(nil, [][]float64{
		{1, -0.4, 0.3, 0.1}, {-0.4, 1, -0.5, 0.6}, {0.3, -0.5, 1, 0}, {0.1, 0.6, 0, 1}})
	if err != nil {
		b.Fatal(err)
	}
	src := rand.New(rand.NewPCG(1, 2))
	cols := make([][]float64, 4)
	for j := range cols {
		cols[j] = make([]float64, 10_000)
		for i := range cols[j] {
			cols[j][i] = src.NormFloat64()
		}
	}
	for b.Loop() {
		if err := ImanConover(cols, target, src); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkForEachRun is the scheduling cost per run (ns/op is per run):
// reseeding the run's source and one draw.
func BenchmarkForEachRun(b *testing.B) {
	out := make([]float64, b.N)
	b.ResetTimer()
	_, err := ForEachRun(context.Background(), NewStreams(1), b.N, 0, func(_, run int, r *rand.Rand) error {
		out[run] = r.Float64()
		return nil
	})
	if err != nil {
		b.Fatal(err)
	}
}
