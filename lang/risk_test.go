package lang

import (
	"strings"
	"testing"
)

// The risk line sets the model's risk tolerance, written as any other
// amount; a model without one decides by expected value. Mistakes in the
// line are in testdata/bad/risk_*.fork.
func TestRiskLine(t *testing.T) {
	for _, c := range []struct {
		src, want string // want "" for no risk tolerance
	}{
		{"decision \"D\"\n  \"a\"\n", ""},
		{"risk tolerance 250_000\ndecision \"D\"\n  \"a\"\n", "250000"},
		{"decision \"D\"\n  \"a\"\nrisk tolerance 0.5   # at the end, with a comment\n", "0.5"},
	} {
		m := load(t, c.src)
		switch {
		case c.want == "" && m.RiskTolerance != nil:
			t.Errorf("%q: risk tolerance %v, want none", c.src, m.RiskTolerance.Value())
		case c.want != "" && (m.RiskTolerance == nil || !m.RiskTolerance.Value().Equal(dec(c.want))):
			t.Errorf("%q: risk tolerance %v, want %s", c.src, m.RiskTolerance, c.want)
		}
	}
	// Indented, it is a header out of place; a zero tolerance is refused.
	for _, c := range []struct{ src, msg string }{
		{"decision \"D\"\n  risk tolerance 5\n  \"a\"\n", "stands at the left edge"},
		{"risk tolerance 0\ndecision \"D\"\n  \"a\"\n", "no gamble is ever worth taking"},
		{"risk tolerance 1 2\ndecision \"D\"\n  \"a\"\n", "after the risk tolerance"},
		{"risk tolerance\ndecision \"D\"\n  \"a\"\n", "has no amount"},
	} {
		_, ds := Load([]byte(c.src), Options{})
		if !ds.HasErrors() || !strings.Contains(ds.Error()+ds.Errors()[0].Hint, c.msg) {
			t.Errorf("%q: diagnostics %v, want one saying %q", c.src, ds, c.msg)
		}
	}
}
