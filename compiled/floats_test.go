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

// TestInexactMeanThenAnother: a lognormal's mean is irrational (rounded),
// and a distribution written after it gets a slot of its own; reading
// both must work (the inexact marks cover every slot).
func TestInexactMeanThenAnother(t *testing.T) {
	src := "let a = lognormal(10, 40)\nlet b = pert(1, 2, 3)\nlet c = a + b\ndecision \"D\"\n  \"x\"  gain c\n  \"y\"\n"
	m := load(t, src)
	in, _ := m.InputNamed("c")
	if in.Exact {
		t.Errorf("c = %s counted exact; it reads a rounded lognormal mean", in.Value)
	}
	if us := m.Uncertain(); len(us) != 2 || us[0].Exact || !us[1].Exact {
		t.Errorf("uncertain: %+v", us)
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

// TestFloatsNamedAgree: drawn priors and likelihoods of a named
// uncertainty and its test (with a rest state and a rest reading taken
// again after each draw) give, with Bayes' rule done on masses, what the
// model with the drawn values written in gives exactly.
func TestFloatsNamedAgree(t *testing.T) {
	src := `let prior = uniform(10%, 40%)
let hit   = pert(70%, 85%, 95%)
let loss  = triangular(100, 200, 400)
uncertainty defect "Defect"
  "Bad"   prior
  "Good"  rest
test probe "Probe" on defect cost 5
  "Alarm"  hit if "Bad", 10% if "Good"
  "Clear"  rest
decision "Release"
  "Ship"
    chance defect
      "Bad"   cost loss
      "Good"  gain 50
  "Probe first"
    test probe
      "Alarm"
        decision "After alarm"
          "Fix"  cost 30
          "Ship anyway"
            chance defect
              "Bad"   cost loss
              "Good"  gain 50
      "Clear"
        chance defect
          "Bad"   cost loss
          "Good"  gain 50
`
	m := load(t, src)
	f := m.NewFloats()
	rng := rand.New(rand.NewSource(8))
	for i := 0; i < 100; i++ {
		x := []float64{0.1 + rng.Float64()*0.3, 0.7 + rng.Float64()*0.25, 100 + rng.Float64()*300}
		if err := f.Draw(x); err != nil {
			t.Fatal(err)
		}
		got := f.Rollback()
		fixed := strings.NewReplacer("uniform(10%, 40%)", decimal.NewFromFloat(x[0]).String(),
			"pert(70%, 85%, 95%)", decimal.NewFromFloat(x[1]).String(),
			"triangular(100, 200, 400)", decimal.NewFromFloat(x[2]).String()).Replace(src)
		em := load(t, fixed)
		r := em.Rollback()
		e, _ := r.Value(0)
		ef, _ := e.Float64()
		if math.Abs(got-ef) > 1e-9*math.Max(1, math.Abs(ef)) {
			t.Fatalf("draw %d %v: %v, exact %v", i, x, got, ef)
		}
		// Every branch probability, Bayes' rule included.
		for k := 1; k < em.Len(); k++ {
			want, _ := em.Prob(k).Float64()
			if math.Abs(f.Prob(k)-want) > 1e-12 {
				t.Fatalf("draw %d node %d: probability %v, exact %v", i, k, f.Prob(k), want)
			}
		}
	}
}

// TestFloatsDrawRefused: draws that make probabilities unusable are
// errors that say where, never silently wrong figures.
func TestFloatsDrawRefused(t *testing.T) {
	for _, c := range []struct {
		src  string
		x    []float64
		want string
	}{
		{"let p = uniform(20%, 40%)\ndecision \"D\"\n  \"a\"\n    chance \"M\"\n      \"u\"  p  gain 1\n      \"d\"  rest\n  \"b\"\n",
			[]float64{1.2}, `a probability under "M" at 4:5 is drawn as 1.2, outside [0, 1]`},
		{"let p = uniform(20%, 40%)\ndecision \"D\"\n  \"a\"\n    chance \"M\"\n      \"u\"  p  gain 1\n      \"d\"  70%\n  \"b\"\n",
			[]float64{0.35}, `probabilities under "M" at 4:5 sum to 1.05, not 1`},
		{"let p = uniform(20%, 40%)\nuncertainty u\n  \"x\"  p\n  \"y\"  rest\ndecision \"D\"\n  \"a\"\n    chance u\n      \"x\"  gain 1\n      \"y\"\n  \"b\"\n",
			[]float64{-0.1}, `a probability under uncertainty u at 2:13 is drawn as -0.1, outside [0, 1]`},
	} {
		f := load(t, c.src).NewFloats()
		err := f.Draw(c.x)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%v: %v, want %q", c.x, err, c.want)
		}
	}
}

// TestDistributionRange: an input written as a distribution, with no `in`
// range of its own, takes the distribution's range for sensitivity and
// breakeven: LOW and HIGH as written (pert, triangular, uniform), the
// extreme values (discrete), P10 and P90 (lognormal as written; normal
// MEAN ∓ 1.2815515655446004·SD, z(0.9) from a standard normal table). An
// `in` range wins.
func TestDistributionRange(t *testing.T) {
	for _, c := range []struct{ expr, lo, hi string }{
		{"pert(380_000, 420_000, 610_000)", "380000", "610000"},
		{"triangular(10, 40, 100)", "10", "100"},
		{"uniform(2, 5)", "2", "5"},
		{"discrete(300, 30%, 100, 50%, 200, 20%)", "100", "300"},
		{"lognormal(12, 40)", "12", "40"},
		{"normal(100, 15)", "80.77672651683099", "119.22327348316901"},
		{"pert(1, 2, 3) in 0 .. 10", "0", "10"},
	} {
		src := "let x = " + c.expr + "\ndecision \"D\"\n  \"a\"  gain x\n  \"b\"\n"
		in, _ := load(t, src).InputNamed("x")
		if !in.HasRange || in.Low.String() != c.lo || in.High.String() != c.hi || in.RangeOfDist == strings.Contains(c.expr, " in ") {
			t.Errorf("%s: range %v %s .. %s (of the distribution: %v), want %s .. %s", c.expr, in.HasRange, in.Low, in.High, in.RangeOfDist, c.lo, c.hi)
		}
	}
}
