package compiled_test

import (
	"math"
	"math/rand"
	"strings"
	"testing"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/lang"
	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
)

func load(t *testing.T, src string) *compiled.Model {
	t.Helper()
	c, ds := lang.Load([]byte(src), lang.Options{})
	if ds.HasErrors() {
		var b strings.Builder
		ds.Print(&b, "t.fork", []byte(src))
		t.Fatal(b.String())
	}
	return c
}

// TestDistributionMeans: a distribution stands for its mean in exact
// analyses. PERT mean (a + 4m + b)/6 (Malcolm, Roseboom, Clark & Fazar,
// 1959); triangular (a + m + b)/3; uniform (a + b)/2; discrete Σ p·x.
func TestDistributionMeans(t *testing.T) {
	for _, c := range []struct{ expr, mean string }{
		{"pert(380_000, 420_000, 610_000)", "445000"},                                 // (380 + 1680 + 610)/6 thousand
		{"triangular(10, 40, 100)", "50"},                                             // 150/3
		{"uniform(2, 5)", "3.5"},                                                      // 7/2
		{"normal(120, 15)", "120"},                                                    // the mean as given
		{"discrete(100, 30%, 200, 70%)", "170"},                                       // 30 + 140
		{"pert(1, 2, 4) + 1", "3.16666666666666666666666666666666666666666666666667"}, // 13/6 + 1 = 19/6, rounded at 50 places
	} {
		src := "let x = " + c.expr + "\ndecision \"D\"\n  \"a\"  gain x\n  \"b\"\n"
		m := load(t, src)
		in, _ := m.InputNamed("x")
		if in.Value.String() != c.mean {
			t.Errorf("%s: %s, want %s", c.expr, in.Value, c.mean)
		}
		us := m.Uncertain()
		if len(us) != 1 || us[0].Dist == nil {
			t.Fatalf("%s: uncertain %+v", c.expr, us)
		}
	}
}

// TestDistributionErrors: bad arguments are errors at the argument.
func TestDistributionErrors(t *testing.T) {
	for _, c := range []struct{ expr, want string }{
		{"pert(500, 400, 600)", "1:19: LOW (500) is above LIKELY (400)"},
		{"normal(10, 0)", "1:20: "},
		{"pert(1, 2)", "1:9: pert takes 3 arguments, not 2"},
		{"gamma(1, 2)", `1:9: unknown function "gamma"`},
		{"pert(1, pert(1, 2, 3), 4)", "1:17: a distribution inside pert(...)"},
	} {
		src := "let x = " + c.expr + "\ndecision \"D\"\n  \"a\"  gain x\n  \"b\"\n"
		_, ds := lang.Load([]byte(src), lang.Options{})
		if !ds.HasErrors() || !strings.Contains(ds.Errors()[0].Error(), c.want) {
			t.Errorf("%s: %v, want %q", c.expr, ds, c.want)
		}
	}
}

// TestFloatsAgree: the float64 copy at the means gives the exact rollback's
// value, and with drawn values it gives what the model with those values
// written in would (compiled exactly), to float precision.
func TestFloatsAgree(t *testing.T) {
	src := `let build = pert(100, 150, 260)
let p     = uniform(20%, 40%)
let scale = normal(1, 0.1)
decision "Go?"
  "Go"  cost build
    chance "Market"
      "Up"    p     gain 400 * scale
      "Down"  rest  gain 90
  "Stay"  gain triangular(40, 50, 90)
`
	m := load(t, src)
	f := m.NewFloats()
	v, _ := m.Rollback().Value(0)
	want, _ := v.Float64()
	if got := f.Rollback(); math.Abs(got-want) > 1e-9*math.Abs(want) {
		t.Fatalf("at the means: %v, exact %v", got, want)
	}
	us := m.Uncertain()
	if len(us) != 4 || us[0].Input != "build" || us[3].Input != "" {
		t.Fatalf("uncertain: %+v", us)
	}
	rng := rand.New(rand.NewSource(3))
	for i := 0; i < 200; i++ {
		x := []float64{100 + rng.Float64()*160, 0.2 + rng.Float64()*0.2, 0.8 + rng.Float64()*0.4, 40 + rng.Float64()*50}
		if err := f.Draw(x); err != nil {
			t.Fatal(err)
		}
		got := f.Rollback()
		// The same values written into the model, compiled exactly.
		fixed := strings.NewReplacer("pert(100, 150, 260)", decimal.NewFromFloat(x[0]).String(),
			"uniform(20%, 40%)", decimal.NewFromFloat(x[1]).String(),
			"normal(1, 0.1)", decimal.NewFromFloat(x[2]).String(),
			"triangular(40, 50, 90)", decimal.NewFromFloat(x[3]).String()).Replace(src)
		e, _ := load(t, fixed).Rollback().Value(0)
		ef, _ := e.Float64()
		if math.Abs(got-ef) > 1e-9*math.Max(1, math.Abs(ef)) {
			t.Fatalf("draw %d %v: %v, exact %v", i, x, got, ef)
		}
	}
	// A draw that puts a probability outside [0, 1] is an error.
	if err := f.Draw([]float64{150, 1.5, 1, 50}); err == nil {
		t.Error("a probability of 1.5 accepted")
	}
	_ = tree.Max
}
