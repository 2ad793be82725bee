package eval

import (
	"context"
	"fmt"
	"math"
	"math/big"
	"math/rand"
	"reflect"
	"sort"
	"strings"
	"testing"

	"github.com/forkcast/forkcast/compiled"
	pdist "github.com/forkcast/forkcast/dist"
	"github.com/forkcast/forkcast/lang"
)

func loadText(t testing.TB, src string) *compiled.Model {
	t.Helper()
	c, ds := lang.Load([]byte(src), lang.Options{})
	if ds.HasErrors() {
		var b strings.Builder
		ds.Print(&b, "t.fork", []byte(src))
		t.Fatalf("%s\n%s", b.String(), src)
	}
	return c
}

// randomModel writes a random tree in the language: a decision at the
// root, chance and decision levels below, cash on branches as linear
// expressions of inputs written as distributions (each kind the language
// has), and some chance nodes whose probability is itself a distribution.
// Each probability input feeds one chance node only, and cash inputs never
// feed a probability, so every path's payoff is a sum of products of
// independent factors, each linear in one input: its expectation is the
// same expression at the inputs' means (linearity of expectation and
// independence), which is what the exact rollback computes.
func randomModel(rng *rand.Rand) string {
	var b strings.Builder
	kinds := []func(i int) string{
		func(i int) string {
			lo := rng.Intn(100)
			return fmt.Sprintf("pert(%d, %d, %d)", lo, lo+rng.Intn(50), lo+50+rng.Intn(100))
		},
		func(i int) string {
			lo := rng.Intn(100) - 50
			return fmt.Sprintf("triangular(%d, %d, %d)", lo, lo+rng.Intn(30), lo+30+rng.Intn(60))
		},
		func(i int) string { lo := rng.Intn(80); return fmt.Sprintf("uniform(%d, %d)", lo, lo+1+rng.Intn(80)) },
		func(i int) string { return fmt.Sprintf("normal(%d, %d)", rng.Intn(200)-100, 1+rng.Intn(40)) },
		func(i int) string { return fmt.Sprintf("lognormal(%d, %d)", 10+rng.Intn(20), 40+rng.Intn(60)) },
		func(i int) string {
			return fmt.Sprintf("discrete(%d, 25%%, %d, 50%%, %d, 25%%)", rng.Intn(50), rng.Intn(100), 100+rng.Intn(100))
		},
	}
	ncash := 3 + rng.Intn(4)
	for i := range ncash {
		fmt.Fprintf(&b, "let x%d = %s\n", i, kinds[rng.Intn(len(kinds))](i))
	}
	nprob := 0
	var node func(depth int, indent string)
	cash := func() string {
		switch rng.Intn(4) {
		case 0:
			return ""
		case 1:
			return fmt.Sprintf("  gain %d", rng.Intn(100))
		case 2:
			return fmt.Sprintf("  gain x%d", rng.Intn(ncash))
		}
		return fmt.Sprintf("  cost %d * x%d + %d", 1+rng.Intn(3), rng.Intn(ncash), rng.Intn(20))
	}
	node = func(depth int, indent string) {
		if depth%2 == 0 {
			fmt.Fprintf(&b, "%sdecision \"d%d\"\n", indent, depth)
			for j := range 2 + rng.Intn(2) {
				fmt.Fprintf(&b, "%s  \"o%d\"%s\n", indent, j, cash())
				if depth < 3 && rng.Intn(3) > 0 {
					node(depth+1, indent+"    ")
				}
			}
			return
		}
		fmt.Fprintf(&b, "%schance \"c%d\"\n", indent, depth)
		n := 2 + rng.Intn(2)
		for j := range n {
			p := "rest"
			if j < n-1 {
				p = fmt.Sprintf("%d%%", 10+rng.Intn(20))
				if j == 0 && rng.Intn(2) == 0 {
					// A probability drawn from a distribution of its own.
					p = fmt.Sprintf("p%d", nprob)
					nprob++
				}
			}
			fmt.Fprintf(&b, "%s  \"s%d\"  %s%s\n", indent, j, p, cash())
			if depth < 3 && rng.Intn(2) == 0 {
				node(depth+1, indent+"    ")
			}
		}
	}
	var tb strings.Builder
	b, tb = tb, b // write the tree apart, then the probability inputs before it
	node(0, "")
	tr := b.String()
	b = tb
	for i := range nprob {
		fmt.Fprintf(&b, "let p%d = uniform(%d%%, %d%%)\n", i, 5+rng.Intn(10), 20+rng.Intn(20))
	}
	// Every input is used somewhere, or the model warns; a warning is fine.
	return b.String() + tr
}

// TestSimulateMeanMatchesExact: on random trees with distributions on
// their inputs, each option's simulated mean lies within 4 standard errors
// of its exact expected value at the means (which equals the expected
// value over the inputs for these models: see randomModel), for several
// seeds, both when paths are walked and when only inputs are drawn. A
// normal mean lies within 4 standard errors with probability 0.99994
// (standard normal table), so a failure is a bug, not bad luck.
func TestSimulateMeanMatchesExact(t *testing.T) {
	rng := rand.New(rand.NewSource(12))
	trees := 12
	if testing.Short() {
		trees = 4
	}
	for tr := range trees {
		src := randomModel(rng)
		c := loadText(t, src)
		for _, seed := range []uint64{1, 2, 99} {
			for _, inputsOnly := range []bool{false, true} {
				s, err := Simulate(context.Background(), c, SimulateOptions{Runs: 4000, Seed: seed, InputsOnly: inputsOnly})
				if err != nil {
					t.Fatalf("tree %d: %v\n%s", tr, err, src)
				}
				for _, o := range s.Options {
					want, _ := o.AtMeans.Float64()
					se := o.Sample.StdErr()
					if diff := math.Abs(o.Sample.Mean() - want); diff > 4*se+1e-9*math.Abs(want) {
						t.Errorf("tree %d seed %d inputs-only %v option %q: mean %v, exact %v (%.1f standard errors of %v)\n%s",
							tr, seed, inputsOnly, o.Label, o.Sample.Mean(), want, diff/se, se, src)
					}
				}
			}
		}
	}
}

// exactSum is the exact distribution of Σ cᵢ·Bᵢ for independent Bernoulli
// Bᵢ with P(Bᵢ = 1) = pᵢ, by convolution over rationals (math/big.Rat):
// values ascending with their probabilities.
func exactSum(cs []int64, ps []*big.Rat) (xs []int64, probs []*big.Rat) {
	dist := map[int64]*big.Rat{0: big.NewRat(1, 1)}
	for i, c := range cs {
		next := map[int64]*big.Rat{}
		q := new(big.Rat).Sub(big.NewRat(1, 1), ps[i])
		add := func(x int64, p *big.Rat) {
			if next[x] == nil {
				next[x] = new(big.Rat)
			}
			next[x].Add(next[x], p)
		}
		for x, p := range dist {
			add(x, new(big.Rat).Mul(p, q))
			add(x+c, new(big.Rat).Mul(p, ps[i]))
		}
		dist = next
	}
	for x := range dist {
		xs = append(xs, x)
	}
	sort.Slice(xs, func(a, b int) bool { return xs[a] < xs[b] })
	for _, x := range xs {
		probs = append(probs, dist[x])
	}
	return xs, probs
}

// quantile is the smallest value whose cumulative probability reaches p.
func quantile(xs []int64, probs []*big.Rat, p float64) int64 {
	cum := 0.0
	for i, x := range xs {
		f, _ := probs[i].Float64()
		if cum += f; cum >= p-1e-12 {
			return x
		}
	}
	return xs[len(xs)-1]
}

// TestSimulateRiskSum: a project's cost is the sum of independent risks,
// each a cost that occurs with some probability. The simulated percentiles
// are checked against the exact distribution of the sum, computed here by
// convolution: each simulated P_p must lie between the exact quantiles at
// p ∓ 4·√(p(1−p)/n), the sampling spread of an empirical quantile's level
// (the binomial standard error, common practice). The risks are written
// both as discrete inputs (drawn as inputs) and as chance nodes (drawn as
// outcomes along a walked path).
func TestSimulateRiskSum(t *testing.T) {
	cs := []int64{40_000, 25_000, 60_000, 10_000, 35_000, 80_000}
	pp := []int64{30, 20, 10, 45, 25, 5} // percent
	ps := make([]*big.Rat, len(pp))
	for i, p := range pp {
		ps[i] = big.NewRat(p, 100)
	}
	xs, probs := exactSum(cs, ps)
	var inputs, sum strings.Builder
	for i := range cs {
		fmt.Fprintf(&inputs, "let r%d = discrete(0, %d%%, %d, %d%%)\n", i, 100-pp[i], cs[i], pp[i])
		if i > 0 {
			sum.WriteString(" + ")
		}
		fmt.Fprintf(&sum, "r%d", i)
	}
	asInputs := "objective min\n" + inputs.String() + "decision \"Plan\"\n  \"Go\"  cost 100_000 + " + sum.String() + "\n  \"Stop\"  cost 300_000\n"
	// The same risks as chance nodes: risk i is a subtree that uses risk
	// i+1 under both of its outcomes, so every path meets every risk.
	var subs strings.Builder
	subs.WriteString("objective min\n")
	for i := range cs {
		fmt.Fprintf(&subs, "subtree risk%d\n  chance \"Risk %d\"\n", i, i)
		fmt.Fprintf(&subs, "    \"Occurs\"  %d%%  cost %d\n", pp[i], cs[i])
		if i+1 < len(cs) {
			fmt.Fprintf(&subs, "      use risk%d\n", i+1)
		}
		subs.WriteString("    \"Not\"  rest\n")
		if i+1 < len(cs) {
			fmt.Fprintf(&subs, "      use risk%d\n", i+1)
		}
	}
	subs.WriteString("decision \"Plan\"\n  \"Go\"  cost 100_000\n    use risk0\n  \"Stop\"  cost 300_000\n")
	const runs = 20_000
	for _, m := range []struct {
		name       string
		src        string
		inputsOnly bool
	}{{"inputs", asInputs, true}, {"chance nodes", subs.String(), false}} {
		c := loadText(t, m.src)
		s, err := Simulate(context.Background(), c, SimulateOptions{Runs: runs, Seed: 7, InputsOnly: m.inputsOnly})
		if err != nil {
			t.Fatal(err)
		}
		var goOpt *SimOption
		for i := range s.Options {
			if s.Options[i].Label == "Go" {
				goOpt = &s.Options[i]
			}
		}
		for _, level := range Percentiles {
			p := float64(level) / 100
			m4 := 4 * math.Sqrt(p*(1-p)/runs)
			lo := 100_000 + quantile(xs, probs, p-m4)
			hi := 100_000 + quantile(xs, probs, p+m4)
			got := goOpt.Sample.Percentile(p)
			if got < float64(lo) || got > float64(hi) {
				t.Errorf("%s: P%d = %v, exact between %d and %d", m.name, level, got, lo, hi)
			}
		}
		// The Stop option has no risk at all.
		for _, o := range s.Options {
			if o.Label == "Stop" && (o.Sample.SD() != 0 || o.Sample.Mean() != 300_000) {
				t.Errorf("%s: Stop varies: mean %v SD %v", m.name, o.Sample.Mean(), o.Sample.SD())
			}
		}
	}
}

// TestSimulateWorkersAgree: the same seed gives identical results with 1,
// 2 and 4 workers, in both modes.
func TestSimulateWorkersAgree(t *testing.T) {
	c := loadText(t, randomModel(rand.New(rand.NewSource(5))))
	for _, inputsOnly := range []bool{false, true} {
		var first *Simulation
		for _, w := range []int{1, 2, 4} {
			s, err := Simulate(context.Background(), c, SimulateOptions{Runs: 3000, Seed: 42, Workers: w, InputsOnly: inputsOnly, KeepDraws: true})
			if err != nil {
				t.Fatal(err)
			}
			if first == nil {
				first = s
				continue
			}
			if !reflect.DeepEqual(first, s) {
				t.Errorf("inputs-only %v: %d workers differ from 1", inputsOnly, w)
			}
		}
	}
}

// TestSimulateCorrelated: correlations written in the model are carried by
// the draws. Over 10,000 runs the achieved rank correlation of each pair
// is within 0.05 of its target (Iman & Conover, 1982, Communications in
// Statistics B 11(3), report achieved rank correlations this close for
// samples of this size), an uncorrelated pair stays near 0, and every
// input keeps its own distribution: its draws are the same values as
// without the correlations, only paired differently.
func TestSimulateCorrelated(t *testing.T) {
	src := `let build  = pert(380_000, 420_000, 610_000)
let labour = triangular(90_000, 110_000, 170_000)
let kit    = uniform(20_000, 30_000)
let delay  = lognormal(2, 9)
correlate build labour 0.6
correlate labour delay -0.4
decision "Route"
  "In house"  cost build + labour + kit + delay * 1_000
  "Contract"  cost 650_000
`
	c := loadText(t, src)
	const runs = 10_000
	for _, seed := range []uint64{1, 5} {
		s, err := Simulate(context.Background(), c, SimulateOptions{Runs: runs, Seed: seed, KeepDraws: true, InputsOnly: true})
		if err != nil {
			t.Fatal(err)
		}
		col := map[string][]float64{}
		for j, in := range s.Inputs {
			col[in.Name] = s.Draws[j]
		}
		for _, p := range []struct {
			a, b string
			rho  float64
		}{{"build", "labour", 0.6}, {"labour", "delay", -0.4}, {"build", "delay", 0}, {"kit", "build", 0}} {
			got := pdist.Spearman(col[p.a], col[p.b])
			tol := 0.05
			if p.rho == 0 && (p.a == "kit" || p.b == "kit") {
				tol = 0.04 // independent: about 4 standard errors of 1/√n
			}
			if p.rho == 0 && p.a == "build" && p.b == "delay" {
				// Implied by the other two through labour, not set: the
				// method leaves it near 0 only as the matrix does.
				continue
			}
			if math.Abs(got-p.rho) > tol {
				t.Errorf("seed %d: rank correlation of %s and %s %.3f, target %.2f", seed, p.a, p.b, got, p.rho)
			}
		}
		// The same draws as without the correlation, as multisets.
		plain := loadText(t, strings.NewReplacer("correlate build labour 0.6\n", "", "correlate labour delay -0.4\n", "").Replace(src))
		u, err := Simulate(context.Background(), plain, SimulateOptions{Runs: runs, Seed: seed, KeepDraws: true, InputsOnly: true})
		if err != nil {
			t.Fatal(err)
		}
		for j := range s.Inputs {
			a, b := append([]float64{}, s.Draws[j]...), append([]float64{}, u.Draws[j]...)
			sort.Float64s(a)
			sort.Float64s(b)
			if !reflect.DeepEqual(a, b) {
				t.Errorf("seed %d: %s draws other values when correlated", seed, s.Inputs[j].Name)
			}
		}
	}
}

// TestSimulateSplit: below a three-point split the input stands at the
// branch's value in every run, inputs computed from it included, while
// other distributions are still drawn there; the simulated mean is then
// within 4 standard errors of the exact expected value (the model is
// linear in the drawn input), and with only the split's input uncertain
// every run gives the exact value.
func TestSimulateSplit(t *testing.T) {
	for _, c := range []struct {
		noise string
		sd0   bool
	}{{"0", true}, {"normal(0, 4_000)", false}} {
		src := `let labour = pert(90_000, 110_000, 170_000)
let noise  = ` + c.noise + `
let total  = labour + noise
decision "Bid"
  "Bid"  gain 300_000
    chance labour by swanson
      decision "Overtime?"
        "Pay overtime"  cost total + 5_000
        "Accept delay"  cost 150_000
  "Pass"  gain 10
`
		m := loadText(t, src)
		for _, inputsOnly := range []bool{true, false} {
			s, err := Simulate(context.Background(), m, SimulateOptions{Runs: 4000, Seed: 3, InputsOnly: inputsOnly})
			if err != nil {
				t.Fatal(err)
			}
			o := s.Options[0]
			want, _ := o.AtMeans.Float64()
			if diff := math.Abs(o.Sample.Mean() - want); diff > 4*o.Sample.StdErr()+1e-6 {
				t.Errorf("noise %s inputs-only %v: mean %v, exact %v", c.noise, inputsOnly, o.Sample.Mean(), want)
			}
			if c.sd0 && inputsOnly && o.Sample.SD() > 1e-6 {
				t.Errorf("only the split's input is uncertain, yet the runs vary: SD %v", o.Sample.SD())
			}
			// The noise reaches the split's branches through total: overtime
			// is paid at all three points (the P90 of labour is about
			// 141,700, and 141,700 + 5,000 < 150,000), so the option's SD
			// is the noise's, 4,000.
			if !c.sd0 && inputsOnly && math.Abs(o.Sample.SD()-4000) > 200 {
				t.Errorf("SD %v, want about 4,000: the drawn noise does not reach below the split", o.Sample.SD())
			}
		}
	}
}

// TestSimulateRunsPrefix: without correlations a longer simulation of a
// seed starts with the runs of a shorter one; correlated inputs are paired
// by rank over all the runs asked for, so there the first runs differ,
// the result says so, and a simulation stopped early does not offer a
// shorter one as its repeat.
func TestSimulateRunsPrefix(t *testing.T) {
	plain := loadText(t, randomModel(rand.New(rand.NewSource(9))))
	short, err := Simulate(context.Background(), plain, SimulateOptions{Runs: 700, Seed: 3, KeepDraws: true})
	if err != nil {
		t.Fatal(err)
	}
	long, err := Simulate(context.Background(), plain, SimulateOptions{Runs: 1500, Seed: 3, KeepDraws: true})
	if err != nil {
		t.Fatal(err)
	}
	if short.Correlated || long.Correlated {
		t.Error("a model without correlate lines is marked correlated")
	}
	for j := range short.Values {
		if !reflect.DeepEqual(short.Values[j], long.Values[j][:700]) {
			t.Errorf("option %d: the first 700 of 1500 runs differ from a 700-run simulation", j)
		}
	}

	corr := loadText(t, `let a = uniform(0, 100)
let b = triangular(0, 20, 100)
correlate a b 0.7
decision "D"
  "x"  cost a + b
  "y"  cost 90
`)
	short, err = Simulate(context.Background(), corr, SimulateOptions{Runs: 700, Seed: 3, KeepDraws: true})
	if err != nil {
		t.Fatal(err)
	}
	long, err = Simulate(context.Background(), corr, SimulateOptions{Runs: 1500, Seed: 3, KeepDraws: true})
	if err != nil {
		t.Fatal(err)
	}
	if !short.Correlated || !long.Correlated {
		t.Error("a model with a correlate line is not marked correlated")
	}
	if reflect.DeepEqual(short.Draws[1], long.Draws[1][:700]) {
		t.Error("the correlated input's first 700 draws are the same for 700 and 1500 runs: then Correlated need not be set")
	}

	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	stopped, err := Simulate(ctx, corr, SimulateOptions{Runs: 200_000, Seed: 3, Workers: 1, Progress: func(int) { cancel() }})
	if err != nil {
		t.Fatal(err)
	}
	if !stopped.Stopped || stopped.Runs >= 200_000 {
		t.Fatalf("not stopped: %d runs", stopped.Runs)
	}
	if !strings.Contains(strings.Join(stopped.Notes, "\n"), "paired over all 200000 runs") {
		t.Errorf("a stopped correlated simulation does not say its runs cannot be repeated by a shorter one: %q", stopped.Notes)
	}
}

// wholeTreeSrc is a project's cost with chance events and three-point
// estimates but no decision: simulate gives one distribution, of the whole
// tree's cost.
const wholeTreeSrc = `title "Depot refit as planned"
currency EUR
objective min
let strip   = pert(40_000, 50_000, 90_000)
let fit     = triangular(200_000, 230_000, 300_000)
let p_asb   = pert(10%, 20%, 40%)
let removal = uniform(15_000, 35_000)
chance "Asbestos found"
  "Found"  p_asb  cost strip + fit + removal
    chance "Inspection"
      "Passed"  80%
      "Failed"  rest  cost 12_000
  "Clear"  rest   cost strip + fit
`

// TestSimulateWholeTree: a tree with no decision simulates as one
// distribution whose mean lies within 4 standard errors of the exact
// expected value, for several seeds and both modes, with no P(best) and no
// value of knowing the inputs.
func TestSimulateWholeTree(t *testing.T) {
	c := loadText(t, wholeTreeSrc)
	// The expected cost by hand: E[strip] + E[fit] + E[p_asb]·(E[removal]
	// + 20% · 12,000), the inputs independent. PERT mean (a + 4m + b)/6
	// (Malcolm, Roseboom, Clark & Fazar 1959): 55,000 and 13/60; the
	// triangular mean (a + m + b)/3 (common practice): 730,000/3; the
	// uniform mean (a + b)/2: 25,000.
	want := new(big.Rat).SetInt64(55_000)
	want.Add(want, big.NewRat(730_000, 3))
	want.Add(want, new(big.Rat).Mul(big.NewRat(13, 60), big.NewRat(25_000+2_400, 1)))
	wantF, _ := want.Float64() // 304,270
	sol, err := Solve(c)
	if err != nil {
		t.Fatal(err)
	}
	// 13/60 has no finite decimal: the engine holds it to many places.
	if diff := new(big.Rat).Sub(sol.Value().Rat(), want); diff.Abs(diff).Cmp(big.NewRat(1, 1_000_000)) > 0 {
		got := sol.Value().Rat()
		t.Fatalf("exact expected cost %v, want %v", got.FloatString(6), want.FloatString(6))
	}
	for _, seed := range []uint64{1, 2, 99} {
		for _, inputsOnly := range []bool{false, true} {
			s, err := Simulate(context.Background(), c, SimulateOptions{Runs: 5000, Seed: seed, InputsOnly: inputsOnly})
			if err != nil {
				t.Fatalf("seed %d inputs-only %v: %v", seed, inputsOnly, err)
			}
			if s.Decision != nil || len(s.Options) != 1 {
				t.Fatalf("seed %d: decision %v, %d options; want the whole tree alone", seed, s.Decision, len(s.Options))
			}
			o := s.Options[0]
			if o.Label != "" || o.PBest != 0 || s.KnowInputs != (Estimate{}) {
				t.Errorf("seed %d: label %q, P(best) %v, value of knowing %+v; want none", seed, o.Label, o.PBest, s.KnowInputs)
			}
			if at, _ := o.AtMeans.Float64(); math.Abs(at-wantF) > 1e-6 {
				t.Errorf("seed %d: at the means %v, want %v", seed, at, wantF)
			}
			se := o.Sample.StdErr()
			if diff := math.Abs(o.Sample.Mean() - wantF); se <= 0 || diff > 4*se {
				t.Errorf("seed %d inputs-only %v: mean %v, exact %v (%.1f standard errors of %v)",
					seed, inputsOnly, o.Sample.Mean(), wantF, diff/se, se)
			}
		}
	}
}
