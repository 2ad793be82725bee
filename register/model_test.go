package register_test

import (
	"context"
	"math"
	"math/big"
	"testing"

	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/lang"
	"github.com/forkcast/forkcast/register"
	"github.com/shopspring/decimal"
)

// routeModel is a build-or-buy choice whose build options carry a site
// works register: as it stands, with its responses taken, and one risk
// alone under the buy option. Invented demo data.
const routeModel = `objective min
let base = 400_000
let p_wet = 50%

decision "Route"
  "Build"                 cost base + works
  "Build, responses"      cost base + works_after
  "Buy"                   cost 470_000 + ground

let works = register site total
let works_after = register site total with responses
let ground = register site risk W1

register site "Site works"
  threat W1 "Ground worse than surveyed"
    probability 30%
    impact pert(40_000, 60_000, 150_000)
    response "Trial pits" cost 5_000
      residual probability 10%
  threat W2 "Wet winter"
    probability p_wet
    impact 20_000
  opportunity W3 "Soil reused"
    probability 40%
    impact triangular(5_000, 10_000, 15_000)
`

// TestTreeTakesRegister: a tree's option that adds a register's figure
// is worth its base plus the register's exact EMV — the same figure the
// register's own analysis gives — and simulation draws the figure with
// that mean.
//
// By hand: W1's mean impact is (40,000 + 4·60,000 + 150,000)/6 =
// 71,666.67 (the PERT mean (a + 4m + b)/6, Malcolm, Roseboom, Clark and
// Fazar 1959), EMV 0.3 × that = 21,500; W2 0.5 × 20,000 = 10,000; W3's
// mean (5,000 + 10,000 + 15,000)/3 = 10,000 (the triangular mean
// (a + m + b)/3), a saving, EMV −0.4 × 10,000 = −4,000. The total is
// 27,500; with W1's response taken, 0.1 × 71,666.67 + 5,000 replaces
// 21,500: 18,166.67 (exactly 54,500/3).
func TestTreeTakesRegister(t *testing.T) {
	c, ds := lang.Load([]byte(routeModel), lang.Options{})
	if ds.HasErrors() {
		t.Fatal(ds)
	}
	sol, err := eval.Solve(c)
	if err != nil {
		t.Fatal(err)
	}
	reg, err := register.FromModel(c, "site")
	if err != nil {
		t.Fatal(err)
	}
	a, err := register.Analyse(context.Background(), reg, register.Options{Runs: 2_000, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	rat := func(s string) *big.Rat { r, _ := new(big.Rat).SetString(s); return r }
	base := rat("400000")
	for _, c := range []struct {
		option int
		plus   register.Figure // from the register's analysis
		hand   *big.Rat        // worked out by hand, above
		extra  *big.Rat
	}{
		{0, a.Total, rat("27500"), base},
		{1, a.Planned, rat("54500/3"), base},
		{2, a.Risks[0].EMV, rat("21500"), rat("470000")},
	} {
		if c.plus.Rat().Cmp(c.hand) != 0 {
			t.Errorf("option %d: the register's figure is %s, by hand %s", c.option, c.plus.Fraction(), c.hand.RatString())
		}
		want := new(big.Rat).Add(c.extra, c.hand)
		got := sol.Root.BranchValue(c.option)
		// A mean such as 54,500/3 is held to DivisionScale places.
		if d := new(big.Rat).Sub(got.Rat(), want); new(big.Rat).Abs(d).Cmp(rat("1/1000000000000000000000000000000000000000")) > 0 {
			t.Errorf("option %d is worth %s, want %s", c.option, got, want.FloatString(10))
		}
	}
	// A changed input reaches the tree through the register: with
	// p_wet at 10%, W2's EMV falls by 0.4 × 20,000 = 8,000.
	set, err := c.Set("p_wet", decimal.RequireFromString("0.1"))
	if err != nil {
		t.Fatal(err)
	}
	c2, err := c.With(set)
	if err != nil {
		t.Fatal(err)
	}
	sol2, err := eval.Solve(c2)
	if err != nil {
		t.Fatal(err)
	}
	if got := sol2.Root.BranchValue(0); !got.Equal(decimal.NewFromInt(419_500)) {
		t.Errorf("with p_wet 10%%, building is worth %s, want 419500", got)
	}
	// Simulation draws the figures: each option's mean within four
	// standard errors of the exact value, its SD near the formulas'
	// (the register's SD, Var = Σ p(σ² + μ²) − p²μ²).
	sim, err := eval.Simulate(context.Background(), c, eval.SimulateOptions{Runs: 40_000, Seed: 7, InputsOnly: true})
	if err != nil {
		t.Fatal(err)
	}
	for j, exact := range []float64{427_500, 400_000 + 54_500.0/3, 491_500} {
		s := sim.Options[j].Sample
		if d := math.Abs(s.Mean() - exact); d > 4*s.StdErr() {
			t.Errorf("option %d: simulated mean %.2f, exact %.2f (%.1f standard errors off)", j, s.Mean(), exact, d/s.StdErr())
		}
	}
	if sd := sim.Options[0].Sample.SD(); math.Abs(sd-a.SD)/a.SD > 0.03 {
		t.Errorf("option 0: simulated SD %.0f, the register's by the formulas %.0f", sd, a.SD)
	}
}

// TestRegisterDrawsShared: in a simulation, the values taken from one
// register see the same risks occur in a run. With fixed impacts of 100
// (W1) and 20 (W2), the total less W2 alone is always 0 or 100; drawn
// apart it would be −20 or 120 in some runs.
func TestRegisterDrawsShared(t *testing.T) {
	src := `decision "D"
  "a" cost all
  "b" cost w2 + 50
let all = register r total
let w2 = register r risk W2
let after = register r total with responses
register r
  threat W1 "One"
    probability 30%
    impact 100
    response "Halve it" cost 1
      residual probability 10%
  threat W2 "Two"
    probability 50%
    impact 20
`
	c, ds := lang.Load([]byte(src), lang.Options{})
	if ds.HasErrors() {
		t.Fatal(ds)
	}
	sim, err := eval.Simulate(context.Background(), c, eval.SimulateOptions{Runs: 5_000, Seed: 3, KeepDraws: true, InputsOnly: true})
	if err != nil {
		t.Fatal(err)
	}
	all, w2, after := sim.Draws[0], sim.Draws[1], sim.Draws[2]
	counts := map[float64]int{}
	for run := range all {
		rest := all[run] - w2[run]
		if rest != 0 && rest != 100 {
			t.Fatalf("run %d: total %v, W2 %v: the register drew W2 twice", run, all[run], w2[run])
		}
		// With the response, W1 occurs only in runs where it occurs
		// without (residual 10% < 30%), and W2 as it was.
		if after[run]-1-w2[run] == 100 && rest != 100 {
			t.Fatalf("run %d: W1 occurs after its response but not before", run)
		}
		counts[rest]++
	}
	// W1 occurs in about 30% of runs (binomial SD √(5000·0.3·0.7) ≈ 32).
	if n := counts[100]; math.Abs(float64(n)-1500) > 4*32.4 {
		t.Errorf("W1 occurred in %d of 5,000 runs, want about 1,500", n)
	}
}

// TestNewTotal: a total's moments and bounds follow from its risks'.
func TestNewTotal(t *testing.T) {
	d := decimal.RequireFromString
	pert, err := register.Written("pert", d("10"), d("20"), d("60"))
	if err != nil {
		t.Fatal(err)
	}
	reg := &register.Register{Name: "r", Risks: []register.Risk{
		{ID: "A", Title: "a", P: d("0.5"), Impact: pert, Response: &register.Response{Cost: d("3"), P: d("0.25"), Impact: pert}},
		{ID: "B", Title: "b", Kind: register.Opportunity, P: d("0.2"), Impact: register.FixedAmount(d("10"))},
	}}
	tot, err := register.NewTotal(reg, register.TotalOptions{Risk: -1})
	if err != nil {
		t.Fatal(err)
	}
	// PERT(10, 20, 60): mean (10 + 80 + 60)/6 = 25, variance
	// (μ − a)(b − μ)/7 = 15·35/7 = 75. A: 0.5·25 = 12.5, variance
	// 0.5(75 + 625) − 0.25·625 = 193.75; B: −0.2·10 = −2, variance
	// 0.2·100 − 0.04·100 = 16.
	if m, ok := tot.MeanExact(); !ok || m.Cmp(big.NewRat(21, 2)) != 0 {
		t.Errorf("mean %v (exact %v), want 10.5", m, ok)
	}
	if v := tot.Variance(); math.Abs(v-209.75) > 1e-9 {
		t.Errorf("variance %v, want 209.75", v)
	}
	if lo, hi := tot.Bounds(); lo != -10 || hi != 60 {
		t.Errorf("bounds %v .. %v, want -10 .. 60", lo, hi)
	}
	after, _ := register.NewTotal(reg, register.TotalOptions{Risk: -1, Responses: true})
	// With A's response: 3 + 0.25·25 − 2 = 7.25.
	if m, _ := after.MeanExact(); m.Cmp(big.NewRat(29, 4)) != 0 {
		t.Errorf("mean with responses %v, want 7.25", m)
	}
	// The estimated quantiles are ordered and within the bounds, and
	// the CDF agrees with them.
	prev := math.Inf(-1)
	for _, p := range []float64{0, 0.1, 0.5, 0.9, 1} {
		q := tot.Quantile(p)
		if q < prev || q < -10 || q > 60 {
			t.Errorf("Quantile(%v) = %v", p, q)
		}
		prev = q
		if p > 0 && p < 1 && tot.CDF(q) < p {
			t.Errorf("CDF(Quantile(%v)) = %v", p, tot.CDF(q))
		}
	}
}
