package eval

import (
	"context"
	"errors"
	"math"
	"math/rand"
	"strings"
	"testing"

	"github.com/forkcast/forkcast/tree"
	"github.com/shopspring/decimal"
	"gonum.org/v1/gonum/floats"
)

func riskAverse(t *testing.T, m *tree.Model, r string) *RiskSolution {
	t.Helper()
	rs, err := SolveRiskAverse(mustSolve(t, m), dec(r))
	if err != nil {
		t.Fatal(err)
	}
	return rs
}

// relClose reports whether got is within rel of want, relatively (or
// absolutely when want is 0).
func relClose(got, want, rel float64) bool {
	return math.Abs(got-want) <= rel*math.Max(math.Abs(want), 1e-300) || got == want
}

// Certainty equivalents of 50-50 gambles against the exponential
// utility's formula CE = −R ln Σ p·exp(−x/R) (Howard 1988, "Decision
// analysis: practice and promise", Management Science 34(6); Clemen &
// Reilly, Making Hard Decisions, chapter on risk attitudes — recalled from
// memory), the expected values computed with 40-digit arithmetic (mpmath).
func TestCertaintyEquivalentWorkedValues(t *testing.T) {
	cases := []struct {
		name string
		r    string
		a, b []string // the two options' outcomes
		// want is the CE of option a.
		want string
	}{
		// The assessment gamble: +R or −R/2 at even chances is worth about
		// nothing to a decision maker with risk tolerance R (Howard 1988;
		// recalled): CE = −R ln(e^−1/2 + e^0.5/2) = −0.0082660974228071 R.
		{"+R / −R/2 at R = 1000", "1000", []string{"1000:0.5", "-500:0.5"}, []string{"0"}, "-8.2660974228071"},
		// 0 or 1e12 at even chances, R = 1000: CE = 1000 ln 2 — the large
		// payoff counts for nothing beyond its chance.
		{"1e12 against R = 1e3", "1000", []string{"0:0.5", "1000000000000:0.5"}, []string{"0"}, "693.147180559945"},
		// 1e12 or 1e12 + 1000: CE = 1e12 − 1000 ln(0.5 + 0.5/e) = 1e12 +
		// 379.885493041722 (the delta property on a large base).
		{"1e12 base, R = 1e3", "1000", []string{"1000000000000:0.5", "1000000001000:0.5"}, []string{"0"}, "1000000000379.89"},
		// −1e12 or +1e12: the loss dominates; CE = −1e12 + 1000 ln 2.
		{"±1e12 against R = 1e3", "1000", []string{"-1000000000000:0.5", "1000000000000:0.5"}, []string{"0"}, "-999999999306.853"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			m := &tree.Model{Root: tree.Decision("Pick",
				lotteryOption("A", tree.Gain, c.a...), lotteryOption("B", tree.Gain, c.b...))}
			rs := riskAverse(t, m, c.r)
			got := rs.BranchValue(0, 0)
			want := dec(c.want)
			if !relClose(got.InexactFloat64(), want.InexactFloat64(), 1e-14) {
				t.Errorf("CE = %s, want %s", got, want)
			}
			if f := got.InexactFloat64(); math.IsNaN(f) || math.IsInf(f, 0) {
				t.Errorf("CE = %v", f)
			}
		})
	}
}

// For a small gamble the certainty equivalent is close to μ − σ²/(2R)
// (Pratt 1964, "Risk aversion in the small and in the large",
// Econometrica 32(1–2): the risk premium is about half the variance times
// the absolute risk aversion 1/R — recalled from memory); the error is of
// the order of the third moment over R².
func TestCertaintyEquivalentSmallRisk(t *testing.T) {
	m := &tree.Model{Root: tree.Decision("Pick",
		lotteryOption("A", tree.Gain, "90:0.25", "100:0.5", "110:0.25"), lotteryOption("B", tree.Gain, "0"))}
	for _, r := range []float64{1e3, 1e4, 1e5, 1e6} {
		rs := riskAverse(t, m, decimal.NewFromFloat(r).String())
		got := rs.BranchValue(0, 0).InexactFloat64()
		want := 100 - 50/(2*r) // σ² = 50
		if math.Abs(got-want) > 1e3/(r*r) {
			t.Errorf("R = %g: CE %.12g, μ − σ²/2R = %.12g", r, got, want)
		}
	}
}

// shiftEnds returns a copy of the tree with c added to every end's payoff
// (a branch with nothing under it gets an end of value c).
func shiftEnds(n *tree.Node, c decimal.Decimal) *tree.Node {
	if n == nil {
		return tree.Terminal(tree.Num(c))
	}
	if n.Kind == tree.KindEnd {
		return tree.Terminal(tree.Num(ratDecimal(ratExpr(n.Payoff)).Add(c)))
	}
	cp := *n
	cp.Branches = make([]*tree.Branch, len(n.Branches))
	for j, b := range n.Branches {
		bc := *b
		bc.Node = shiftEnds(b.Node, c)
		cp.Branches[j] = &bc
	}
	return &cp
}

func ratDecimal(r interface{ FloatString(int) string }) decimal.Decimal {
	return decimal.RequireFromString(r.FloatString(4))
}

// On random trees: the root's certainty equivalent is that of the
// distribution of the risk-averse policy's payoffs (the exponential's
// delta property lets a tree be rolled back node by node), computed here
// from the exact risk profile with gonum's LogSumExp; adding a constant to
// every payoff adds it to the certainty equivalent (the delta property;
// Howard 1988, recalled) to 12 significant digits; the certainty
// equivalent never exceeds the expected value for R > 0 (Jensen's
// inequality; common practice) and tends to it as R grows.
func TestCertaintyEquivalentRandomTrees(t *testing.T) {
	rng := rand.New(rand.NewSource(7))
	trees := 600
	if testing.Short() {
		trees = 100
	}
	for i := 0; i < trees; i++ {
		m := objectiveModel(rng, i, 2+rng.Intn(80))
		sol := mustSolve(t, m)
		r := math.Pow(10, 2+4*rng.Float64())
		R := decimal.NewFromFloat(r)
		rs, err := SolveRiskAverse(sol, R)
		if err != nil {
			t.Fatal(err)
		}
		// Against the distribution of the whole tree under the same policy.
		whole := wholeProfile(t, rs.Averse)
		sign := 1.0
		if m.Objective == tree.Min {
			sign = -1 // the utility is of net value, the negated cost
		}
		terms := make([]float64, len(whole.Outcomes))
		for k, o := range whole.Outcomes {
			terms[k] = -sign*o.Value.InexactFloat64()/r + math.Log(o.Probability.InexactFloat64())
		}
		want := sign * (-r * floats.LogSumExp(terms))
		got := rs.CE().InexactFloat64()
		scale := math.Max(math.Abs(want), math.Abs(whole.Max.InexactFloat64())+math.Abs(whole.Min.InexactFloat64()))
		if math.Abs(got-want) > 1e-12*scale {
			t.Fatalf("tree %d, R %g: CE %.15g, from the distribution %.15g", i, r, got, want)
		}
		// CE ≤ EMV (as costs: the certain cost is at least the expected
		// one), allowing for the float64 rounding of the EMV's figures.
		emv := sol.Value().InexactFloat64()
		if sign*(got-emv) > 1e-14*scale {
			t.Fatalf("tree %d: CE %.15g beyond the EMV %.15g", i, got, emv)
		}
		// The delta property.
		c := decimal.New(rng.Int63n(2_000_001)-1_000_000, 0)
		shifted := &tree.Model{Objective: m.Objective, Root: shiftEnds(m.Root, c)}
		rs2, err := SolveRiskAverse(mustSolve(t, shifted), R)
		if err != nil {
			t.Fatal(err)
		}
		got2 := rs2.CE().InexactFloat64()
		if math.Abs(got2-(got+sign*c.InexactFloat64())) > 1e-12*(scale+math.Abs(c.InexactFloat64())) {
			t.Fatalf("tree %d: CE %.15g, shifted by %s: %.15g", i, got, c, got2)
		}
		// CE → EMV as R grows: the gap never widens, and it is at most
		// (b − a)²/(8R) for payoffs within [a, b] (Hoeffding's lemma,
		// Hoeffding 1963, Journal of the American Statistical Association
		// 58(301): ln E exp(−(X − μ)/R) ≤ (b − a)²/(8R²) — recalled from
		// memory), a and b the lowest and highest payoff of any path.
		rg := sol.Ranges()[0]
		width := rg.Hi.Sub(rg.Lo).InexactFloat64()
		prev := math.Inf(1)
		for _, big := range []float64{1e8, 1e10, 1e12} {
			rsb, err := SolveRiskAverse(sol, decimal.NewFromFloat(big))
			if err != nil {
				t.Fatal(err)
			}
			gap := math.Abs(rsb.CE().InexactFloat64() - emv)
			if gap > prev+1e-12*scale || gap > 1e-14*scale+width*width/(8*big) {
				t.Fatalf("tree %d: R %g, CE %v, EMV %v: gap %g (before %g)", i, big, rsb.CE(), emv, gap, prev)
			}
			prev = gap
		}
	}
}

// wholeProfile is the distribution of the whole tree's payoff under the
// solution's policy.
func wholeProfile(t *testing.T, sol *Solution) Profile {
	t.Helper()
	c := sol.Compiled
	w := &lotteryWalk{c: c, max: DefaultMaxOutcomes, policy: func(i int) int { return sol.r.Best(i) }}
	l, _, err := w.lottery(0)
	if err != nil {
		t.Fatal(err)
	}
	ps := &Profiles{Objective: c.Objective(), Exact: true}
	return ps.profile(c, "", -1, l, c.Mass(0))
}

// The risk-averse policy can differ from the expected-value one: a sure
// 40 against 0 or 100 at even chances (EMV 50). With R = 50 the CE of the
// gamble is −50 ln((1 + e^−2)/2) = 28.3 < 40, so the sure thing is taken,
// at a cost of 10 in expected value; with R = 1000 the gamble is kept
// (CE ≈ 48.8).
func TestRiskAversePolicy(t *testing.T) {
	m := &tree.Model{Root: tree.Decision("Pick",
		lotteryOption("Gamble", tree.Gain, "0:0.5", "100:0.5"), lotteryOption("Sure", tree.Gain, "40"))}
	rs := riskAverse(t, m, "50")
	if rs.Chosen(0) != 1 || len(rs.Differences()) != 1 {
		t.Fatalf("R = 50: chosen %d, differences %d", rs.Chosen(0), len(rs.Differences()))
	}
	wantDec(t, "cost of caution", rs.Cost(), "10")
	// −50 ln((1 + e^−2)/2), with 40-digit arithmetic (mpmath): 28.31...
	if got := rs.BranchValue(0, 0).InexactFloat64(); !relClose(got, 28.3109584758486, 1e-14) {
		t.Errorf("CE of the gamble = %v", got)
	}
	if got := rs.Premium(0, 0).InexactFloat64(); !relClose(got, 50-28.3109584758486, 1e-13) {
		t.Errorf("premium of the gamble = %v", got)
	}
	if !rs.Premium(0, 1).IsZero() {
		t.Errorf("premium of a sure thing = %s", rs.Premium(0, 1))
	}
	rs = riskAverse(t, m, "1000")
	if rs.Chosen(0) != 0 || len(rs.Differences()) != 0 || !rs.Cost().IsZero() {
		t.Fatalf("R = 1000: chosen %d, differences %d, cost %s", rs.Chosen(0), len(rs.Differences()), rs.Cost())
	}
	// Costs: a sure cost of 60 against 0 or 100 at even chances (expected
	// cost 50). With R = 50 the gamble's certain-cost equivalent is
	// 50 ln((1 + e^2)/2) = 71.7 > 60: the sure cost is taken.
	mc := &tree.Model{Objective: tree.Min, Root: tree.Decision("Pick",
		lotteryOption("Gamble", tree.Cost, "0:0.5", "100:0.5"), lotteryOption("Sure", tree.Cost, "60"))}
	rs = riskAverse(t, mc, "50")
	if rs.Chosen(0) != 1 {
		t.Fatalf("costs, R = 50: chosen %d", rs.Chosen(0))
	}
	if got := rs.BranchValue(0, 0).InexactFloat64(); !relClose(got, 100-28.3109584758486, 1e-14) {
		t.Errorf("certain-cost equivalent of the gamble = %v", got)
	}
	wantDec(t, "cost of caution, costs", rs.Cost(), "10")
	for _, bad := range []string{"0", "-5", "1e400"} {
		_, err := SolveRiskAverse(mustSolve(t, m), dec(bad))
		var re *RequestError
		if !errors.As(err, &re) {
			t.Errorf("R = %s: err %v, want a RequestError", bad, err)
		}
	}
}

// The tolerance at which a sure 40 and 0-or-100 at even chances are worth
// the same: −R ln((1 + e^(−100/R))/2) = 40 at R = 121.630347633149…
// (solved with 30-digit arithmetic, mpmath's findroot). Below it the sure
// thing is taken, above it the gamble (the expected-value choice).
func TestToleranceBreakeven(t *testing.T) {
	m := &tree.Model{Root: tree.Decision("Pick",
		lotteryOption("Gamble", tree.Gain, "0:0.5", "100:0.5"), lotteryOption("Sure", tree.Gain, "40"))}
	sol := mustSolve(t, m)
	tb, err := FindToleranceBreakeven(context.Background(), sol, ToleranceOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if len(tb.Switches) != 1 || tb.Neutral != 0 {
		t.Fatalf("switches %+v, neutral %d", tb.Switches, tb.Neutral)
	}
	sw := tb.Switches[0]
	if sw.Below != 1 || sw.Above != 0 || !relClose(sw.At.InexactFloat64(), 121.630347633149, 1e-11) {
		t.Errorf("switch %+v", sw)
	}
	if !relClose(sw.CE[0].InexactFloat64(), 40, 1e-10) || !sw.CE[1].Equal(dec("40")) {
		t.Errorf("CEs at the switch %v", sw.CE)
	}
	// The default range: the payoffs span 100, so 0.1 .. 100,000.
	if !tb.Low.Equal(dec("0.1")) || !tb.High.Equal(dec("100000")) || len(tb.Segments) != 2 {
		t.Errorf("range %s..%s, segments %+v", tb.Low, tb.High, tb.Segments)
	}
	// A range with no switch in it.
	lo, hi := dec("200"), dec("1000")
	tb, err = FindToleranceBreakeven(context.Background(), sol, ToleranceOptions{Low: &lo, High: &hi})
	if err != nil || len(tb.Switches) != 0 || tb.Segments[0].Best != 0 {
		t.Fatalf("200..1000: %+v, %v", tb, err)
	}
	// Bad requests and the budget.
	zero := dec("0")
	for _, o := range []ToleranceOptions{{Low: &zero, High: &hi}, {Low: &hi, High: &lo}, {At: "Nowhere"}} {
		var re *RequestError
		if _, err := FindToleranceBreakeven(context.Background(), sol, o); !errors.As(err, &re) {
			t.Errorf("%+v: err %v, want a RequestError", o, err)
		}
	}
	var be *BudgetError
	if _, err := FindToleranceBreakeven(context.Background(), sol, ToleranceOptions{MaxSamples: 10}); !errors.As(err, &be) {
		t.Errorf("err %v, want a BudgetError", err)
	}
	certain := &tree.Model{Root: tree.Decision("Pick", lotteryOption("A", tree.Gain, "1"), lotteryOption("B", tree.Gain, "2"))}
	var re *RequestError
	if _, err := FindToleranceBreakeven(context.Background(), mustSolve(t, certain), ToleranceOptions{}); !errors.As(err, &re) {
		t.Errorf("certain options: err %v, want a RequestError", err)
	}
}

// A risk premium is the difference of an exact expected value and a
// rounded certainty equivalent; when both are far larger than the premium,
// every digit it is shown with must still be right. 1e12 − 10,000 or 1e12
// at even chances, R = 1000: EMV = 1e12 − 5000, CE = 1e12 − 10,000 +
// 1000 (ln 2 − ln(1 + e^−10)) from the formula CE = −R ln Σ p·exp(−x/R)
// (Howard 1988, recalled from memory), so the premium is
// 5000 − 1000 (ln 2 − ln(1 + e^−10)) ≈ 4306.8982183, computed here with
// small numbers only.
func TestRiskPremiumDigitsAgainstLargePayoffs(t *testing.T) {
	m := &tree.Model{Root: tree.Decision("Pick",
		lotteryOption("A", tree.Gain, "999999990000:0.5", "1000000000000:0.5"), lotteryOption("B", tree.Gain, "0"))}
	rs := riskAverse(t, m, "1000")
	want := 5000 - 1000*(math.Ln2-math.Log1p(math.Exp(-10)))
	for name, got := range map[string]decimal.Decimal{"Premium": rs.Premium(0, 0), "RootPremium": rs.RootPremium()} {
		// Half a unit in the last place shown, and a little for want's own
		// rounding.
		tol := 0.5*math.Pow(10, float64(got.Exponent())) + 1e-9
		if d := math.Abs(got.InexactFloat64() - want); d > tol {
			t.Errorf("%s = %s, want %.10f: off by %.3g, more than its last digit allows", name, got, want, d)
		}
		if got.Exponent() > -2 {
			t.Errorf("%s = %s: the CE is known to 1e-3 here (15 digits of 1e12), so the premium should keep at least two decimals", name, got)
		}
	}
}

// Two options with the same expected value: the wider one is first, so
// it is the expected-value choice (ties go to the first), but at every
// finite tolerance the narrower one has the larger certainty equivalent
// (CE ≈ μ − σ²/2R for a small risk; Pratt 1964, recalled from memory).
// The choice never becomes the expected-value one, and the notes must not
// say it will.
func TestToleranceBreakevenTiedExpectedValue(t *testing.T) {
	m := &tree.Model{Root: tree.Decision("Pick",
		lotteryOption("Wide", tree.Gain, "-100:0.5", "100:0.5"),
		lotteryOption("Narrow", tree.Gain, "-10:0.5", "10:0.5"))}
	sol := mustSolve(t, m)
	tb, err := FindToleranceBreakeven(context.Background(), sol, ToleranceOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if tb.Neutral != 0 || len(tb.Switches) != 0 || tb.Segments[0].Best != 1 {
		t.Fatalf("neutral %d, switches %+v, segments %+v", tb.Neutral, tb.Switches, tb.Segments)
	}
	notes := strings.Join(tb.Notes, "\n")
	if strings.Contains(notes, "becomes the expected-value choice") {
		t.Errorf("the notes promise a switch that never comes:\n%s", notes)
	}
	if !strings.Contains(notes, "same expected value") {
		t.Errorf("the notes do not say the options tie by expected value:\n%s", notes)
	}
}
