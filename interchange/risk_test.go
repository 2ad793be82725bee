package interchange_test

import (
	"bytes"
	"strings"
	"testing"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/interchange"
	"github.com/shopspring/decimal"
)

// A model's risk tolerance is read and written; the figures a solve under
// a risk tolerance adds at the top level read back as the same model.
func TestRiskTolerance(t *testing.T) {
	src := `{"risk_tolerance": "250000", "root": {"type": "decision", "label": "Go", "branches": [
	  {"label": "Gamble", "node": {"type": "chance", "branches": [
	    {"label": "Win", "probability": 0.5, "cash": 1000000}, {"label": "Lose", "probability": 0.5, "cash": -400000}]}},
	  {"label": "Sure", "cash": 100000}]}}`
	m, ds := interchange.ReadBytes([]byte(src), interchange.Options{})
	if ds.HasErrors() {
		t.Fatal(ds)
	}
	if m.RiskTolerance == nil || !m.RiskTolerance.Value().Equal(decimal.NewFromInt(250000)) {
		t.Fatalf("risk tolerance %v", m.RiskTolerance)
	}
	c, ds := compiled.Compile(m)
	if ds.HasErrors() {
		t.Fatal(ds)
	}
	sol, _ := eval.Solve(c)
	rs, err := eval.SolveRiskAverse(sol, m.RiskTolerance.Value())
	if err != nil {
		t.Fatal(err)
	}
	var out bytes.Buffer
	err = interchange.Write(&out, m, interchange.WriteOptions{Compiled: c, Solved: solvedOf{rs.Averse},
		Risk: &interchange.RiskSummary{Tolerance: rs.Tolerance, CertaintyEquivalent: rs.CE(), RiskPremium: rs.RootPremium(),
			EVPolicyValue: sol.Value(), CostOfCaution: rs.Cost(), Note: "rounded"}})
	if err != nil {
		t.Fatal(err)
	}
	for _, key := range []string{`"risk_tolerance": 250000`, `"certainty_equivalent": "`, `"cost_of_caution": "`, `"risk_note": "rounded"`} {
		if !strings.Contains(out.String(), key) {
			t.Errorf("no %s in\n%s", key, out.String())
		}
	}
	back, ds := interchange.ReadBytes(out.Bytes(), interchange.Options{})
	if ds.HasErrors() || back.RiskTolerance == nil || !back.RiskTolerance.Value().Equal(m.RiskTolerance.Value()) {
		t.Fatalf("read back: %v, %v", ds, back.RiskTolerance)
	}
	for _, bad := range []string{`"risk_tolerance": "k * 2"`, `"risk_tolerance": true`} {
		_, ds := interchange.ReadBytes([]byte(`{`+bad+`, "root": {"type": "end"}}`), interchange.Options{})
		if !ds.HasErrors() {
			t.Errorf("%s read without an error", bad)
		}
	}
	// A negative tolerance reads, and compiling says what is wrong.
	m, _ = interchange.ReadBytes([]byte(`{"risk_tolerance": -5, "root": {"type": "end"}}`), interchange.Options{})
	if _, ds := compiled.Compile(m); !ds.HasErrors() || !strings.Contains(ds.Error(), "positive amount") {
		t.Errorf("a negative risk tolerance: %v", ds)
	}
}

// solvedOf is what Write needs of a solution.
type solvedOf struct{ sol *eval.Solution }

func (s solvedOf) Value(i int) decimal.Decimal { return s.sol.At(i).Value() }
func (s solvedOf) Best(i int) []int            { return s.sol.At(i).Best() }
