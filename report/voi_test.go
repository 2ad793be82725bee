package report

import (
	"testing"

	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

// Other money on a testing branch is named a cost or a gain by its effect
// on the objective, and shown as a positive amount.
func TestOtherMoney(t *testing.T) {
	d := decimal.RequireFromString
	for _, c := range []struct {
		obj    tree.Objective
		other  string // in the objective's terms
		amount string
		word   string
	}{
		{tree.Max, "-15000", "15000", "cost"},
		{tree.Max, "2500", "2500", "gain"},
		{tree.Min, "15000", "15000", "cost"}, // under min a figure is a cost
		{tree.Min, "-2500", "2500", "gain"},
		{tree.Max, "0", "0", ""},
		{tree.Min, "0", "0", ""},
	} {
		amount, word := otherMoney(c.obj, d(c.other))
		if !amount.Equal(d(c.amount)) || word != c.word {
			t.Errorf("%v %s: %s %q, want %s %q", c.obj, c.other, amount, word, c.amount, c.word)
		}
	}
}
