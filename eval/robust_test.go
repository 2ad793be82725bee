package eval_test

import (
	"context"
	"errors"
	"fmt"
	"strings"
	"testing"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/lang"
)

func loadText(t *testing.T, src string) *compiled.Model {
	t.Helper()
	c, ds := lang.Load([]byte(src), lang.Options{})
	if ds.HasErrors() {
		t.Fatalf("%v", ds)
	}
	return c
}

// TestRoundingIsNotAChoice: three branches of (1/3) worth 6 each against a
// sure 6. The fractions are rounded at 50 places, so their sum misses 1 by
// 1e-50; the options are equal in truth, and must tie, not be chosen by
// rounding noise.
func TestRoundingIsNotAChoice(t *testing.T) {
	c := loadText(t, `decision "Pick"
  "Gamble"
    chance "Three ways"
      "a"  (1/3)  gain 6
      "b"  (1/3)  gain 6
      "c"  (1/3)  gain 6
  "Sure"  gain 6
`)
	sol, _ := eval.Solve(c)
	if !sol.Root.Tied() || len(sol.Root.Best()) != 2 || sol.Root.Chosen() != 0 {
		t.Errorf("tied %v, best %v, chosen %d: want a tie of both, the first taken", sol.Root.Tied(), sol.Root.Best(), sol.Root.Chosen())
	}
	if c.Exact() {
		t.Error("a model with (1/3) says it is exact")
	}
}

// TestWorthlessTestIsWorthNothing: a free test whose readings never change
// the decision is worth exactly 0 (rollback on joint probabilities: no
// rounded posterior), even with priors and likelihoods that are no finite
// decimal; it is not recommended.
func TestWorthlessTestIsWorthNothing(t *testing.T) {
	// By hand: P(Hi) = 1/7; "Go" is worth 100·P(Hi) − 1·P(Lo) > 0 before
	// and after either reading (after "No", P(Hi) = 3/51), so testing
	// changes nothing.
	c := loadText(t, `uncertainty u
  "Hi"  (1/7)
  "Lo"  rest
test t on u
  "Yes"  (2/3) if "Hi", (1/9) if "Lo"
  "No"   rest
subtree act
  decision "Act"
    "Go"
      chance u
        "Hi"  gain 100
        "Lo"  cost 1
    "Stop"
decision "Test?"
  "Decide now"
    use act
  "Test first"
    test t
      "Yes"
        use act
      "No"
        use act
`)
	sol, _ := eval.Solve(c)
	tv, err := eval.EVSI(context.Background(), sol, "t")
	if err != nil {
		t.Fatal(err)
	}
	s := tv.Sites[0]
	if !s.EVSI.IsZero() || !s.NetGain.IsZero() || s.Advice == eval.RunTest {
		t.Errorf("EVSI %s, net gain %s, advice %v: want exactly 0 and no test", s.EVSI, s.NetGain, s.Advice)
	}
}

// TestRunawayFigure: a number squared again and again is an error at the
// line where it passes the limit, at once.
func TestRunawayFigure(t *testing.T) {
	var b strings.Builder
	b.WriteString("let a0 = 10\n")
	for i := 1; i < 40; i++ {
		fmt.Fprintf(&b, "let a%d = a%d * a%d\n", i, i-1, i-1)
	}
	b.WriteString("decision \"D\"\n  \"x\"  gain a39\n  \"y\"\n")
	_, ds := lang.Load([]byte(b.String()), lang.Options{})
	if !ds.HasErrors() || !strings.Contains(ds.Errors()[0].Summary, "significant digits") {
		t.Fatalf("got %v", ds)
	}
	// 10^(2^k) has more than 200 digits from k = 8: line 9 (let a8).
	if got := ds.Errors()[0].Pos.Line; got != 9 {
		t.Errorf("at line %d, want 9", got)
	}
}

// TestManyTiedOptions: a decision with thousands of tied options solves,
// lists every tie, and takes the first.
func TestManyTiedOptions(t *testing.T) {
	var b strings.Builder
	b.WriteString("decision \"D\"\n")
	for i := 0; i < 4000; i++ {
		fmt.Fprintf(&b, "  \"o%d\"  gain 5\n", i)
	}
	sol, _ := eval.Solve(loadText(t, b.String()))
	if len(sol.Root.Best()) != 4000 || sol.Root.Chosen() != 0 || !sol.Root.IsBest(3999) {
		t.Errorf("%d best, chosen %d", len(sol.Root.Best()), sol.Root.Chosen())
	}
}

// TestBreakevenStuckInput: an input used as the probability of a state of
// an uncertainty with no `rest` cannot move without the states leaving a
// sum of 1; breakeven says so and what to do, instead of narrowing the
// range to a point.
func TestBreakevenStuckInput(t *testing.T) {
	c := loadText(t, `let p_fail = 20%  in 5% .. 50%
uncertainty outcome
  "Failed"  p_fail
  "Worked"  80%
decision "Launch?"
  "Launch"
    chance outcome
      "Failed"  cost 100
      "Worked"  gain 40
  "Wait"
`)
	v, _ := eval.ParseVary("p_fail")
	_, err := eval.FindBreakeven(context.Background(), c, eval.BreakevenOptions{Vary: v})
	var re *eval.RequestError
	if !errors.As(err, &re) || !strings.Contains(err.Error(), "would no longer sum to 1") || !strings.Contains(err.Error(), "`rest`") || !strings.Contains(err.Error(), "outcome:Failed") {
		t.Fatalf("got %v", err)
	}
}

// TestSolveNothing: solving no model is an error, not a panic; a model
// can only be solved once compiled, which checks it.
func TestSolveNothing(t *testing.T) {
	if _, err := eval.Solve(nil); !errors.Is(err, eval.ErrNoModel) {
		t.Fatalf("got %v", err)
	}
	if _, err := eval.Follow(nil, nil); !errors.Is(err, eval.ErrNoModel) {
		t.Fatalf("got %v", err)
	}
}
