package chart

import (
	"io"
	"testing"
)

// Drawing cost of the largest charts the sensitivity commands make: a
// 50 × 50 strategy map, and a histogram and cumulative chart of 100,000
// simulated values.
func BenchmarkStrategyMap50(b *testing.B) {
	m := demoMap(50, 50)
	for _, f := range []Format{SVG, PNG} {
		b.Run(f.String(), func(b *testing.B) {
			for b.Loop() {
				if err := WriteStrategyMap(io.Discard, m, Options{Format: f}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

func BenchmarkSimulated100k(b *testing.B) {
	s := demoSimulated(100_000)
	b.Run("histogram", func(b *testing.B) {
		for b.Loop() {
			if err := WriteHistogram(io.Discard, s, Options{}); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("cumulative", func(b *testing.B) {
		for b.Loop() {
			if err := WriteCumulative(io.Discard, s, Options{}); err != nil {
				b.Fatal(err)
			}
		}
	})
}
