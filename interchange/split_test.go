package interchange_test

import (
	"bytes"
	"strings"
	"testing"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/interchange"
	"github.com/forkcast/forkcast/lang"
)

// A model with a three-point split and correlations reads back from its
// JSON with both: the same rollback at every node, the same split and the
// same correlation target. Unknown rules and incomplete objects are
// reported at their positions.
func TestSplitAndCorrelationsRoundTrip(t *testing.T) {
	src := `let labour = pert(90_000, 110_000, 170_000)
let build  = triangular(300_000, 340_000, 420_000)
let total  = labour + 20_000
correlate labour build 0.5
decision "Bid"
  "Bid"  gain 600_000  cost build
    chance labour by pearson
      decision "Overtime?"
        "Pay overtime"  cost total + 5_000
        "Accept delay"  cost 150_000
  "Pass"
`
	c, ds := lang.Load([]byte(src), lang.Options{})
	if ds.HasErrors() {
		t.Fatal(ds)
	}
	var js bytes.Buffer
	if err := interchange.Write(&js, c.Source(), interchange.WriteOptions{}); err != nil {
		t.Fatal(err)
	}
	m2, ds := interchange.ReadBytes(js.Bytes(), interchange.Options{})
	if ds.HasErrors() {
		t.Fatalf("%v\n%s", ds, js.String())
	}
	c2, ds := compiled.Compile(m2)
	if ds.HasErrors() {
		t.Fatalf("%v\n%s", ds, js.String())
	}
	r1, r2 := c.Rollback(), c2.Rollback()
	for i := 0; i < c.Len(); i++ {
		a, _ := r1.Value(i)
		b, _ := r2.Value(i)
		if !a.Equal(b) {
			t.Fatalf("node %d: %s, read back %s", i, a, b)
		}
	}
	if sp := m2.Root.Branches[0].Node.Split; sp == nil || sp.Input != "labour" || sp.Rule.String() != "pearson" {
		t.Errorf("split read back as %+v", sp)
	}
	t1, cols1 := c.Correlation()
	t2, cols2 := c2.Correlation()
	if len(cols1) != 2 || len(cols2) != 2 || t1.At(0, 1) != 0.5 || t2.At(0, 1) != 0.5 {
		t.Errorf("correlations %v %v, read back %v %v", cols1, t1.Dim(), cols2, t2.Dim())
	}
	bad := strings.Replace(js.String(), `"rule": "pearson"`, `"rule": "median"`, 1)
	if _, ds := interchange.ReadBytes([]byte(bad), interchange.Options{}); !ds.HasErrors() || !strings.Contains(ds.Error(), `unknown three-point rule "median"`) {
		t.Errorf("an unknown rule: %v", ds)
	}
	bad = strings.Replace(js.String(), `"rho": 0.5`, `"r": 0.5`, 1)
	if _, ds := interchange.ReadBytes([]byte(bad), interchange.Options{}); !ds.HasErrors() || !strings.Contains(ds.Error(), `a correlation has no "rho"`) {
		t.Errorf("a correlation with a wrong key: %v", ds)
	}
}
