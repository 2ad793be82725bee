package compiled

import (
	"math"
	"strings"
	"testing"

	"github.com/shopspring/decimal"
)

// A discrete distribution's probabilities may be written as fractions,
// as a chance node's may: three (1/3) are rounded at DivisionScale places
// and sum to 1 − 1e-50, which counts as 1 there and must here too. Sums
// that are really off are still refused.
func TestDiscreteRoundedProbabilities(t *testing.T) {
	third := decimal.NewFromInt(1).DivRound(decimal.NewFromInt(3), DivisionScale)
	one, two, three := decimal.NewFromInt(1), decimal.NewFromInt(2), decimal.NewFromInt(3)
	d, err := Distribution("discrete", []decimal.Decimal{one, third, two, third, three, third})
	if err != nil {
		t.Fatalf("discrete(1, 1/3, 2, 1/3, 3, 1/3): %v", err)
	}
	// The mean of 1, 2, 3 at equal chances is 2 (common practice).
	if m := d.Mean(); math.Abs(m-2) > 1e-12 {
		t.Errorf("mean %v, want 2", m)
	}
	_, mean, exact, err := meanOf(functions["discrete"], []decimal.Decimal{one, third, two, third, three, third})
	if err != nil || exact || math.Abs(mean.InexactFloat64()-2) > 1e-12 {
		t.Errorf("meanOf: %s exact %v, %v; want about 2, not exact (the probabilities were rounded)", mean, exact, err)
	}
	tenth := decimal.New(1, -1)
	if _, err := Distribution("discrete", []decimal.Decimal{one, tenth.Mul(decimal.NewFromInt(5)), two, tenth.Mul(decimal.NewFromInt(4))}); err == nil || !strings.Contains(err.Error(), "sum to 0.9, not 1") {
		t.Errorf("discrete(1, 0.5, 2, 0.4): %v, want the sum refused", err)
	}
}
