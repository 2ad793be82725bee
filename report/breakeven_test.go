package report

import (
	"fmt"
	"math/big"
	"testing"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/eval"
	"github.com/shopspring/decimal"
)

// A switch is exact or it is not, and says which once: an exact one that
// is no finite decimal shows its fraction beside the rounded decimal.
func TestSwitchPoint(t *testing.T) {
	rat := func(s string) *big.Rat { r, _ := new(big.Rat).SetString(s); return r }
	// at is the fraction rounded at DivisionScale places, as eval gives it.
	at := func(r *big.Rat) decimal.Decimal {
		return decimal.RequireFromString(r.FloatString(int(compiled.DivisionScale)))
	}
	long := rat("123456789012345678901234567/987654321098765432109876543")
	for _, c := range []struct {
		name string
		f    beFormat
		sw   eval.Switch
		want string
	}{
		{"whole number", beFormat{}, eval.Switch{At: decimal.NewFromInt(301000), Exact: true, Fraction: rat("301000")}, "= 301,000 (exact)"},
		{"decimal with many places, every digit shown", beFormat{}, eval.Switch{At: decimal.RequireFromString("16000.000000125"), Exact: true, Fraction: rat("16000000000125/1000000000")}, "= 16,000.000000125 (exact)"},
		{"probability, decimal", beFormat{prob: true}, eval.Switch{At: decimal.RequireFromString("0.8125"), Exact: true, Fraction: rat("13/16")}, "= 81.25% (exact)"},
		{"probability, fraction", beFormat{prob: true}, eval.Switch{At: at(rat("19/120")), Exact: true, Fraction: rat("19/120")}, "= 19/120 (exact; ≈ 15.8333%)"},
		{"number, fraction", beFormat{}, eval.Switch{At: at(rat("41/380")), Exact: true, Fraction: rat("41/380")}, "= 41/380 (exact; ≈ 0.107895)"},
		{"fraction too long to show", beFormat{}, eval.Switch{At: at(long), Exact: true, Fraction: long}, "≈ 0.125 (exact as a fraction too long to show: see the JSON report)"},
		{"approximate", beFormat{prob: true}, eval.Switch{At: decimal.RequireFromString("0.5477225575051661134569697828008021339527446949979832"), Exact: false}, fmt.Sprintf("≈ 54.7723%% (approximate, to %d decimal places)", compiled.DivisionScale)},
	} {
		if got := c.f.point(c.sw); got != c.want {
			t.Errorf("%s: %q, want %q", c.name, got, c.want)
		}
	}
}
