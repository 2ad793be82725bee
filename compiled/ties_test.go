package compiled_test

import (
	"testing"

	"github.com/forkcast/forkcast/lang"
)

// In a model with rounded figures (a mean from float64, a division
// rounded at DivisionScale places) two options count as tied when they are
// closer than the rounding could move them, 10^-45 or a relative 10^-40,
// and no further: options a whole unit apart are not tied because every
// figure in the model happens to be a whole number.
func TestRoundedModelTies(t *testing.T) {
	cases := []struct {
		name string
		src  string
		tied bool
	}{
		// The mean of 1, 2, 3 at (1/3) each is 2 (rounded: the fractions
		// were), against a sure 1.
		{"discrete of thirds against 1", "let z = discrete(1, (1/3), 2, (1/3), 3, (1/3))\ndecision \"d\"\n  \"a\"  gain z\n  \"b\"  gain 1\n", false},
		// A lognormal's mean is irrational, taken from float64: near 1.9e20,
		// a whole number as a decimal; one less is one less.
		{"a large lognormal mean and one less", "let z = lognormal(100_000_000_000_000_000_000, 300_000_000_000_000_000_000)\ndecision \"d\"\n  \"a\"  gain z\n  \"b\"  gain z - 1\n", false},
		// 3 × (1/3) rounded at 50 places is 1 − 10^-50: tied with 1.
		{"three thirds against 1", "let q = 1/3\ndecision \"d\"\n  \"a\"  gain q * 3\n  \"b\"  gain 1\n", true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			m, ds := lang.Load([]byte(c.src), lang.Options{})
			if ds.HasErrors() {
				t.Fatal(ds)
			}
			if m.Exact() {
				t.Fatal("the model is exact: the case tests nothing")
			}
			r := m.Rollback()
			if got := r.Tied(0); got != c.tied {
				t.Errorf("tied %v, want %v (a − b compares %d)", got, c.tied, r.Compare(0, 0, 1))
			}
			if !c.tied && r.Best(0) != 0 {
				t.Errorf("best %d, want a", r.Best(0))
			}
		})
	}
}
