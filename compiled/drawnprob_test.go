package compiled_test

import (
	"strings"
	"testing"

	"github.com/forkcast/forkcast/lang"
	"github.com/forkcast/forkcast/tree"
)

// TestDrawnProbRange: a probability drawn from a distribution is checked
// against 0 .. 1 over the distribution's range when the model is
// compiled. Bounded distributions are checked exactly from their bounds
// (their supports: pert, triangular and uniform on [LOW, HIGH], discrete
// on its values — the distributions' definitions); interval arithmetic is
// exact when each random input enters once, so an input entering twice is
// not judged; unbounded ones (normal, lognormal) are warned about with the
// share of draws outside, from the normal table (P(Z > 1.25) = 0.1056, so
// normal(50%, 40%) has 21.1% outside).
func TestDrawnProbRange(t *testing.T) {
	for _, c := range []struct {
		name, lets, prob string
		none             bool          // no diagnostic at all
		sev              tree.Severity // else of the one diagnostic
		want             string
	}{
		{"pert within", "let p = pert(10%, 50%, 90%)", "p", true, 0, ""},
		{"pert at the ends", "let p = pert(0%, 50%, 100%)", "p", true, 0, ""},
		{"pert above", "let p = pert(10%, 50%, 120%)", "p", false, tree.Error, `1:9: pert(10%, 50%, 120%) can draw up to 120%, outside 0 .. 1, and "p" is the probability of "u" under "M"`},
		{"triangular below", "let p = triangular(-5%, 10%, 30%)", "p", false, tree.Error, "can draw down to -5%"},
		{"uniform in place", "", "(uniform(70%, 110%))", false, tree.Error, `uniform(70%, 110%) can draw up to 110%, outside 0 .. 1, and it is the probability of "u"`},
		{"discrete values", "let p = discrete(20%, 50%, 130%, 50%)", "p", false, tree.Error, "can draw up to 130%"},
		{"discrete within", "let p = discrete(20%, 50%, 80%, 50%)", "p", true, 0, ""},
		{"calculation", "let r = uniform(20%, 60%)\nlet p = r * 2", "p", false, tree.Error, `2:9: "p" can reach up to 120% with the draws it reads`},
		{"calculation within", "let r = uniform(20%, 60%)\nlet p = 1 - r", "p", true, 0, ""},
		{"calculation on the branch", "let r = pert(10%, 50%, 90%)", "(r * 2 - 30%)", false, tree.Error, `the probability of "u" under "M" can reach up to 150%`},
		// r + r reaches 1.2, but r enters twice: the interval is not exact
		// in general (r * (1 - r) would be judged wrongly), so nothing
		// is said; simulation checks each draw.
		{"input twice", "let r = uniform(20%, 60%)", "(r * (1 - r))", true, 0, ""},
		{"normal", "let p = normal(50%, 40%)", "p", false, tree.Warning, "normal(50%, 40%) is unbounded: 21.1% of its draws fall outside 0 .. 1"},
		// lognormal(P10 0.1, P90 0.9): μ = (ln 0.1 + ln 0.9)/2 = −1.2040,
		// σ = (ln 0.9 − ln 0.1)/(2 · 1.28155) = 0.8573, so P(X > 1) =
		// P(Z > 1.2040/0.8573 = 1.404) = 0.0801 (normal table).
		{"lognormal share", "let p = lognormal(10%, 90%)", "p", false, tree.Warning, "lognormal(10%, 90%) is unbounded: 8.01% of its draws"},
		{"lognormal in a calculation", "let g = lognormal(10%, 30%)", "(g / 2)", false, tree.Warning, `reads "g" = lognormal(10%, 30%), which is unbounded`},
	} {
		t.Run(c.name, func(t *testing.T) {
			src := c.lets + "\ndecision \"D\"\n  \"a\"\n    chance \"M\"\n      \"u\"  " + c.prob + "  gain 1\n      \"d\"  rest\n  \"b\"\n"
			_, ds := lang.Load([]byte(src), lang.Options{})
			if c.none {
				if len(ds) != 0 {
					t.Errorf("want no diagnostics, got %v\n%s", ds, src)
				}
				return
			}
			if len(ds) != 1 || ds[0].Severity != c.sev || !strings.Contains(ds[0].Error(), c.want) {
				t.Errorf("got %v, want one of severity %v with %q\n%s", ds, c.sev, c.want, src)
			}
		})
	}
}

// TestDrawnRest: the probabilities before a `rest`, some drawn, must not
// be able to sum past 1 (the rest would be drawn below 0). The sum's range
// is the sum of the ranges when each drawn input enters once.
func TestDrawnRest(t *testing.T) {
	for _, c := range []struct {
		name, lets, a, b string
		want             string // "" for no diagnostic
	}{
		{"within", "let p = pert(10%, 30%, 50%)", "p", "40%", ""},
		{"at 1 exactly", "let p = uniform(10%, 60%)", "p", "40%", ""},
		{"past 1", "let p = pert(10%, 50%, 90%)", "p", "(uniform(10%, 40%))", `7:7: the other probabilities under "M" can sum to 130% with their draws, leaving "r" (rest) below 0`},
		{"fixed and drawn", "let p = uniform(20%, 70%)", "p", "40%", `can sum to 110% with their draws`},
		// p and 1 - p sum to 1 whatever p is; interval sums cannot see
		// that, so an input entering twice is not judged.
		{"one input twice", "let p = uniform(20%, 70%)", "(p / 2)", "(p / 2)", ""},
	} {
		t.Run(c.name, func(t *testing.T) {
			src := c.lets + "\ndecision \"D\"\n  \"a\"\n    chance \"M\"\n      \"u\"  " + c.a + "  gain 1\n      \"v\"  " + c.b + "\n      \"r\"  rest\n  \"b\"\n"
			_, ds := lang.Load([]byte(src), lang.Options{})
			if c.want == "" {
				if len(ds) != 0 {
					t.Errorf("want no diagnostics, got %v\n%s", ds, src)
				}
				return
			}
			if len(ds) != 1 || !ds.HasErrors() || !strings.Contains(ds[0].Error(), c.want) {
				t.Errorf("got %v, want an error with %q\n%s", ds, c.want, src)
			}
		})
	}
}

// TestDrawnPriorAndLikelihood: the probabilities of a named uncertainty's
// states and of a test's readings are checked like branches'.
func TestDrawnPriorAndLikelihood(t *testing.T) {
	src := `let q = pert(60%, 90%, 105%)
uncertainty oil
  "Wet"  30%
  "Dry"  rest
test seismic on oil cost 10
  "Good"  q if "Wet", 20% if "Dry"
  "Bad"   rest
decision "D"
  "Drill"
    chance oil
      "Wet"  gain 100
      "Dry"  cost 30
  "Test"
    test seismic
      "Good"
      "Bad"
`
	_, ds := lang.Load([]byte(src), lang.Options{})
	if !ds.HasErrors() || !strings.Contains(ds.Errors()[0].Error(), `pert(60%, 90%, 105%) can draw up to 105%, outside 0 .. 1, and "q" is the probability of reading "Good" of test seismic`) {
		t.Errorf("got %v", ds)
	}
}
