package tree

import (
	"testing"

	"github.com/shopspring/decimal"
)

// TestWrittenNumber checks that a number keeps the text it was written as,
// whether the text is made again from the value and its flags or kept
// whole, and that its value is the decimal the text stands for
// (shopspring/decimal reads the digits; a percent is divided by 100).
func TestWrittenNumber(t *testing.T) {
	tests := []struct {
		text  string
		c     int64
		e     int32
		value string
		kept  bool // the text cannot be made from the value and flags
	}{
		{"0", 0, 0, "0", false},
		{"55%", 55, -2, "0.55", false},
		{"12.5%", 125, -3, "0.125", false},
		{"0.5%", 5, -3, "0.005", false},
		{"0.50", 50, -2, "0.5", false},
		{"0.05", 5, -2, "0.05", false},
		{"0.0", 0, -1, "0", false},
		{"1_150_000", 1150000, 0, "1150000", false},
		{"1_150_000.25", 115000025, -2, "1150000.25", false},
		{"100%", 100, -2, "1", false},
		{"1_000%", 1000, -2, "10", false},
		{"007", 7, 0, "7", true},
		{"1_0", 10, 0, "10", true},
		{"0.000_1", 1, -4, "0.0001", true},
		{"rest", 0, 0, "0", true},
	}
	for _, tt := range tests {
		n := WrittenNumber(Pos{Line: 3, Col: 4}, tt.c, tt.e, []byte(tt.text))
		if got := n.Text(); got != tt.text {
			t.Errorf("%q: text %q", tt.text, got)
		}
		if got := n.String(); got != tt.text {
			t.Errorf("%q: String %q", tt.text, got)
		}
		if !n.Value().Equal(decimal.RequireFromString(tt.value)) {
			t.Errorf("%q: value %s, want %s", tt.text, n.Value(), tt.value)
		}
		if kept := n.ext != nil; kept != tt.kept {
			t.Errorf("%q: text kept apart %v, want %v", tt.text, kept, tt.kept)
		}
		if n.At != (Pos{Line: 3, Col: 4}) {
			t.Errorf("%q: at %v", tt.text, n.At)
		}
	}
}

// TestNumberOfAnySize checks numbers made from decimals: no text, the value
// itself as String, and coefficients past 18 digits kept whole.
func TestNumberOfAnySize(t *testing.T) {
	for _, s := range []string{"0", "-12.5", "999999999999999999", "1000000000000000000", "-123456789012345678901234567890.123", "1e-40"} {
		d := decimal.RequireFromString(s)
		n := NumberOf(Pos{}, d)
		if !n.Value().Equal(d) || n.Text() != "" || n.String() != d.String() {
			t.Errorf("%s: value %s, text %q, String %q", s, n.Value(), n.Text(), n.String())
		}
		c, e, ok := n.Small()
		if small := d.NumDigits() <= 18; ok != small {
			t.Errorf("%s: small %v", s, ok)
		} else if ok && !decimal.New(c, e).Equal(d) {
			t.Errorf("%s: small %d × 10^%d", s, c, e)
		}
	}
	// A written coefficient of 19 digits is held as a decimal.
	n := WrittenNumber(Pos{}, 1_000_000_000_000_000_001, -2, []byte("10_000_000_000_000_000.01"))
	if _, _, ok := n.Small(); ok || n.Text() != "10_000_000_000_000_000.01" || n.Value().String() != "10000000000000000.01" {
		t.Errorf("19 digits: %s %q", n.Value(), n.Text())
	}
}
