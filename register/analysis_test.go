package register

import (
	"context"
	"math"
	"math/big"
	"sort"
	"testing"

	"github.com/forkcast/forkcast/dist"
	"github.com/shopspring/decimal"
)

func dec(s string) decimal.Decimal { return decimal.RequireFromString(s) }

func fixedRisk(id string, k Kind, p, impact string) Risk {
	return Risk{ID: id, Title: "risk " + id, Kind: k, P: dec(p), Impact: FixedAmount(dec(impact))}
}

func triRisk(t *testing.T, id string, k Kind, p, lo, ml, hi string) Risk {
	t.Helper()
	d, err := dist.NewTriangularExact(dec(lo), dec(ml), dec(hi))
	if err != nil {
		t.Fatal(err)
	}
	return Risk{ID: id, Title: "risk " + id, Kind: k, P: dec(p), Impact: Uncertain(d)}
}

func analyse(t *testing.T, reg *Register, opts Options) *Analysis {
	t.Helper()
	a, err := Analyse(context.Background(), reg, opts)
	if err != nil {
		t.Fatal(err)
	}
	return a
}

func rat(s string) *big.Rat {
	r, ok := new(big.Rat).SetString(s)
	if !ok {
		panic(s)
	}
	return r
}

// exactTotal is the exact distribution of the total of independent risks
// with fixed impacts, by convolution: every combination of risks occurring
// or not, with its probability (a product of p and 1 − p), as big.Rat.
type atom struct {
	value *big.Rat
	prob  *big.Rat
}

func exactTotal(risks []Risk) []atom {
	dist := map[string]atom{"0": {new(big.Rat), big.NewRat(1, 1)}}
	for _, k := range risks {
		p := k.P.Rat()
		q := new(big.Rat).Sub(big.NewRat(1, 1), p)
		x := k.Impact.Fixed.Rat()
		if k.Kind == Opportunity {
			x.Neg(x)
		}
		next := map[string]atom{}
		put := func(v, pr *big.Rat) {
			key := v.RatString()
			if a, ok := next[key]; ok {
				a.prob.Add(a.prob, pr)
				return
			}
			next[key] = atom{new(big.Rat).Set(v), new(big.Rat).Set(pr)}
		}
		for _, a := range dist {
			put(a.value, new(big.Rat).Mul(a.prob, q))
			put(new(big.Rat).Add(a.value, x), new(big.Rat).Mul(a.prob, p))
		}
		dist = next
	}
	out := make([]atom, 0, len(dist))
	for _, a := range dist {
		out = append(out, a)
	}
	sort.Slice(out, func(i, j int) bool { return out[i].value.Cmp(out[j].value) < 0 })
	return out
}

// exactPercentile is the smallest total whose cumulative probability
// reaches p (forkcast's definition of a percentile).
func exactPercentile(atoms []atom, p float64) float64 {
	target := new(big.Rat).SetFloat64(p)
	cum := new(big.Rat)
	for _, a := range atoms {
		cum.Add(cum, a.prob)
		if cum.Cmp(target) >= 0 {
			f, _ := a.value.Float64()
			return f
		}
	}
	f, _ := atoms[len(atoms)-1].value.Float64()
	return f
}

// A register of independent risks with fixed impacts: the EMV total is
// exactly Σ ± p·impact, and the simulated P50, P80 and P90 of 100,000 runs
// agree with the exact distribution of the total (convolution above)
// within sampling error: the simulated percentile at p lies between the
// exact percentiles at p ∓ 4·√(p(1 − p)/n), four standard errors of the
// empirical CDF.
func TestFixedImpactsAgainstConvolution(t *testing.T) {
	risks := []Risk{
		fixedRisk("A", Threat, "0.3", "40000"),
		fixedRisk("B", Threat, "0.15", "120000"),
		fixedRisk("C", Threat, "0.5", "8000"),
		fixedRisk("D", Threat, "0.05", "250000"),
		fixedRisk("E", Opportunity, "0.4", "15000"),
		fixedRisk("F", Threat, "0.25", "30000"),
		fixedRisk("G", Threat, "0.6", "5000"),
		fixedRisk("H", Opportunity, "0.2", "22000"),
		fixedRisk("I", Threat, "0.1", "75000"),
		fixedRisk("J", Threat, "0.35", "18000"),
	}
	reg := &Register{Risks: risks}
	const runs = 100_000
	a := analyse(t, reg, Options{Runs: runs, Seed: 7})

	want := new(big.Rat)
	for _, k := range risks {
		x := new(big.Rat).Mul(k.P.Rat(), k.Impact.Fixed.Rat())
		if k.Kind == Opportunity {
			x.Neg(x)
		}
		want.Add(want, x)
	}
	if a.Total.Rat().Cmp(want) != 0 || !a.Total.Exact() {
		t.Errorf("EMV total %s (exact %v), want %s", a.Total.Fraction(), a.Total.Exact(), want.RatString())
	}
	// Hand check of the same sum: 12000 + 18000 + 4000 + 12500 − 6000 +
	// 7500 + 3000 − 4400 + 7500 + 6300 = 60400.
	if a.Total.String() != "60400" {
		t.Errorf("EMV total %s, want 60400", a.Total)
	}

	atoms := exactTotal(risks)
	for _, p := range []float64{0.5, 0.8, 0.9} {
		got := a.Percentile(p)
		d := 4 * math.Sqrt(p*(1-p)/runs)
		lo, hi := exactPercentile(atoms, p-d), exactPercentile(atoms, p+d)
		if got < lo || got > hi {
			t.Errorf("P%.0f = %v, want within the exact P%.2f .. P%.2f = %v .. %v (exact P%.0f = %v)",
				100*p, got, 100*(p-d), 100*(p+d), lo, hi, 100*p, exactPercentile(atoms, p))
		}
	}
}

// triangularMoments returns the mean and variance of triangular(a, m, b)
// by the formulas derived here, in exact arithmetic, independently of
// package dist.
//
// Write X = a + (b − a)Y, Y on [0, 1] with mode c = (m − a)/(b − a) and
// density 2y/c on [0, c], 2(1 − y)/(1 − c) on [c, 1]. Then
//
//	E[Y]  = ∫₀ᶜ 2y²/c dy + ∫꜀¹ 2y(1 − y)/(1 − c) dy
//	      = 2c²/3 + 2(1/6 − c²/2 + c³/3)/(1 − c)
//	      = 2c²/3 + (1 − c)(1 + 2c)/3 = (1 + c)/3,
//	E[Y²] = c³/2 + 2(1/12 − c³/3 + c⁴/4)/(1 − c)
//	      = c³/2 + (1 − c)(1 + 2c + 3c²)/6 = (1 + c + c²)/6,
//	Var Y = (1 + c + c²)/6 − (1 + c)²/9 = (1 − c + c²)/18,
//
// (using 1/6 − c²/2 + c³/3 = (1 − c)²(1 + 2c)/6 and
// 1/12 − c³/3 + c⁴/4 = (1 − c)²(1 + 2c + 3c²)/12), so
//
//	E[X]   = a + (b − a)(1 + c)/3 = (a + m + b)/3,
//	Var X  = ((b − a)² − (b − a)(m − a) + (m − a)²)/18
//	       = (a² + b² + m² − ab − am − bm)/18.
//
// A risk of probability p with such an impact is X·B, B ~ Bernoulli(p)
// independent of X: E[XB] = pμ and E[(XB)²] = pE[X²] = p(σ² + μ²), so
// Var(XB) = p(σ² + μ²) − p²μ². Independent risks' variances add.
func triangularMoments(a, m, b *big.Rat) (mean, variance *big.Rat) {
	sum := new(big.Rat).Add(a, m)
	sum.Add(sum, b)
	mean = new(big.Rat).Quo(sum, big.NewRat(3, 1))
	mul := func(x, y *big.Rat) *big.Rat { return new(big.Rat).Mul(x, y) }
	v := new(big.Rat).Add(mul(a, a), mul(b, b))
	v.Add(v, mul(m, m))
	v.Sub(v, mul(a, b))
	v.Sub(v, mul(a, m))
	v.Sub(v, mul(b, m))
	variance = v.Quo(v, big.NewRat(18, 1))
	return mean, variance
}

func TestTriangularMomentsAgainstFormulas(t *testing.T) {
	type spec struct {
		kind          Kind
		p, lo, ml, hi string
	}
	specs := []spec{
		{Threat, "0.3", "40000", "60000", "150000"},
		{Threat, "0.15", "80000", "100000", "300000"},
		{Opportunity, "0.4", "10000", "15000", "25000"},
		{Threat, "0.5", "5000", "8000", "9000"},
		{Threat, "0.05", "0", "200000", "500000"},
		{Opportunity, "0.25", "20000", "20000", "60000"},
	}
	var risks []Risk
	mean, variance := new(big.Rat), new(big.Rat)
	for i, s := range specs {
		risks = append(risks, triRisk(t, string(rune('A'+i)), s.kind, s.p, s.lo, s.ml, s.hi))
		mu, sigma2 := triangularMoments(rat(s.lo), rat(s.ml), rat(s.hi))
		p := rat(s.p)
		emv := new(big.Rat).Mul(p, mu)
		second := new(big.Rat).Add(sigma2, new(big.Rat).Mul(mu, mu))
		v := new(big.Rat).Sub(new(big.Rat).Mul(p, second), new(big.Rat).Mul(emv, emv))
		if s.kind == Opportunity {
			emv.Neg(emv)
		}
		mean.Add(mean, emv)
		variance.Add(variance, v)
	}
	const runs = 200_000
	a := analyse(t, &Register{Risks: risks}, Options{Runs: runs, Seed: 3})
	if a.Total.Rat().Cmp(mean) != 0 {
		t.Errorf("EMV total %s, want %s exactly", a.Total.Fraction(), mean.RatString())
	}
	wantVar, _ := variance.Float64()
	if got := a.SD * a.SD; math.Abs(got-wantVar) > 1e-9*wantVar {
		t.Errorf("variance from the formulas %v, want %v", got, wantVar)
	}
	// The simulation against the same: the mean within four standard
	// errors; the variance within five standard errors of a sample
	// variance, √((m₄ − s⁴)/n) with m₄ the sample's fourth central moment.
	wantMean, _ := mean.Float64()
	s := a.AsIs
	if d := math.Abs(s.Mean() - wantMean); d > 4*s.StdErr() {
		t.Errorf("simulated mean %v, exact %v: %v apart, more than 4 s.e. (%v)", s.Mean(), wantMean, d, 4*s.StdErr())
	}
	xs := s.Sorted()
	var m4 float64
	for _, x := range xs {
		d := x - s.Mean()
		m4 += d * d * d * d
	}
	m4 /= float64(len(xs))
	sv := s.SD() * s.SD()
	se := math.Sqrt((m4 - sv*sv) / float64(len(xs)))
	if d := math.Abs(sv - wantVar); d > 5*se {
		t.Errorf("simulated variance %v, exact %v: %v apart, more than 5 s.e. (%v)", sv, wantVar, d, 5*se)
	}
}

// Published worked examples of a contingency reserve by expected monetary
// value: each risk's probability × its cost impact, summed.
func TestPublishedEMVContingency(t *testing.T) {
	cases := []struct {
		source string
		risks  [][2]string // probability, cost impact
		want   string
	}{
		{
			// Tom Mochal, "Create a risk contingency budget using Expected
			// Monetary Value", TechRepublic, 9 May 2006 (also TenStep):
			// six risks A–F, potential impact $118,000, contingency
			// $33,500 (values from the published table, not recalled).
			source: "Mochal 2006",
			risks: [][2]string{{".8", "10000"}, {".3", "30000"}, {".5", "8000"},
				{".10", "40000"}, {".3", "20000"}, {".25", "10000"}},
			want: "33500",
		},
		{
			// "Calculate contingency reserves using the expected value
			// method", thefinancebase.com: four contingencies of $32,000,
			// $48,000, $20,000 and $12,000 at 5%, 5%, 10% and 2%:
			// reserve $6,240 (values from the published text).
			source: "thefinancebase",
			risks:  [][2]string{{"0.05", "32000"}, {"0.05", "48000"}, {"0.10", "20000"}, {"0.02", "12000"}},
			want:   "6240",
		},
	}
	for _, c := range cases {
		var risks []Risk
		for i, r := range c.risks {
			risks = append(risks, fixedRisk(string(rune('A'+i)), Threat, r[0], r[1]))
		}
		a := analyse(t, &Register{Risks: risks}, Options{Runs: 1000, Seed: 1})
		if got := a.Total.String(); got != c.want || !a.Total.Exact() {
			t.Errorf("%s: EMV contingency %s, want %s", c.source, got, c.want)
		}
		if a.Threats.Cmp(a.Total) != 0 || a.Opportunities.Sign() != 0 {
			t.Errorf("%s: threats %s, opportunities %s", c.source, a.Threats, a.Opportunities)
		}
	}
}

// The figures of a seed do not depend on the number of workers.
func TestWorkersDoNotChangeFigures(t *testing.T) {
	reg := &Register{Risks: []Risk{
		triRisk(t, "A", Threat, "0.3", "10", "20", "50"),
		triRisk(t, "B", Opportunity, "0.6", "5", "6", "9"),
		fixedRisk("C", Threat, "0.2", "40"),
	}}
	reg.Risks[0].Response = &Response{Action: "act", Cost: dec("2"), P: dec("0.1"), Impact: FixedAmount(dec("15"))}
	one := analyse(t, reg, Options{Runs: 3000, Seed: 11, Workers: 1})
	two := analyse(t, reg, Options{Runs: 3000, Seed: 11, Workers: 2})
	if !equalFloats(one.AsIs.Sorted(), two.AsIs.Sorted()) || !equalFloats(one.WithPlanned.Sorted(), two.WithPlanned.Sorted()) {
		t.Error("the totals differ between 1 and 2 workers")
	}
	for i := range one.Risks {
		if one.Risks[i].Contribution != two.Risks[i].Contribution || one.Risks[i].Rank != two.Risks[i].Rank {
			t.Errorf("risk %d: contribution %v rank %d with 1 worker, %v %d with 2", i, one.Risks[i].Contribution, one.Risks[i].Rank,
				two.Risks[i].Contribution, two.Risks[i].Rank)
		}
	}
}

func equalFloats(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

// A risk's contribution is the percentile less the percentile of the same
// runs without it; the register with that risk's probability set to 0
// draws every other risk exactly as before (each risk has its own stream),
// so its simulated percentile is the percentile without the risk.
func TestContributionIsPercentileWithoutTheRisk(t *testing.T) {
	risks := []Risk{
		triRisk(t, "A", Threat, "0.3", "10000", "20000", "50000"),
		triRisk(t, "B", Threat, "0.15", "100000", "150000", "400000"),
		triRisk(t, "C", Opportunity, "0.5", "5000", "6000", "9000"),
		fixedRisk("D", Threat, "0.5", "3000"),
	}
	opts := Options{Runs: 20_000, Seed: 5, Confidence: 0.9}
	a := analyse(t, &Register{Risks: risks}, opts)
	for i := range risks {
		alt := append([]Risk(nil), risks...)
		alt[i].P = decimal.Zero
		b := analyse(t, &Register{Risks: alt}, opts)
		if want := a.Reserve - b.Reserve; a.Risks[i].Contribution != want {
			t.Errorf("risk %s: contribution %v, want P90 %v − P90 without it %v = %v", risks[i].ID, a.Risks[i].Contribution, a.Reserve, b.Reserve, want)
		}
	}
	// The large threat B, likelier than 10%, moves the 90th percentile most; the
	// opportunity lowers it.
	if a.Risks[1].Rank != 1 {
		t.Errorf("risk B ranked %d, want 1 (contributions %v %v %v %v)", a.Risks[1].Rank,
			a.Risks[0].Contribution, a.Risks[1].Contribution, a.Risks[2].Contribution, a.Risks[3].Contribution)
	}
	if a.Risks[2].Contribution >= 0 {
		t.Errorf("the opportunity's contribution %v, want negative", a.Risks[2].Contribution)
	}
}

// Responses: the reduction in expected impact against the cost, and the
// best set taken by expected value.
func TestResponseAppraisal(t *testing.T) {
	a1 := fixedRisk("A", Threat, "0.4", "100000")
	a1.Response = &Response{Action: "survey", Cost: dec("10000"), P: dec("0.1"), Impact: FixedAmount(dec("100000"))}
	b := fixedRisk("B", Threat, "0.1", "20000")
	b.Response = &Response{Action: "insure", Cost: dec("5000"), P: dec("0.1"), Impact: FixedAmount(dec("0"))}
	c := fixedRisk("C", Opportunity, "0.2", "50000")
	c.Response = &Response{Action: "enhance", Cost: dec("4000"), P: dec("0.5"), Impact: FixedAmount(dec("50000"))}
	a := analyse(t, &Register{Risks: []Risk{a1, b, c}}, Options{Runs: 2000, Seed: 1})
	cases := []struct {
		i                    int
		emv, after, red, net string
		pays                 bool
	}{
		// 0.4 × 100,000 = 40,000 → 0.1 × 100,000 = 10,000: saves 30,000 for 10,000.
		{0, "40000", "10000", "30000", "20000", true},
		// 0.1 × 20,000 = 2,000 → 0: saves 2,000 for 5,000.
		{1, "2000", "0", "2000", "-3000", false},
		// −0.2 × 50,000 = −10,000 → −25,000: saves 15,000 more for 4,000.
		{2, "-10000", "-25000", "15000", "11000", true},
	}
	for _, c := range cases {
		r := a.Risks[c.i]
		if r.EMV.String() != c.emv || r.EMVAfter.String() != c.after || r.Response.Reduction.String() != c.red ||
			r.Response.Net.String() != c.net || r.Response.Pays() != c.pays || r.Response.Take != c.pays {
			t.Errorf("risk %d: EMV %s after %s reduction %s net %s pays %v take %v; want %s %s %s %s %v",
				c.i, r.EMV, r.EMVAfter, r.Response.Reduction, r.Response.Net, r.Response.Pays(), r.Response.Take,
				c.emv, c.after, c.red, c.net, c.pays)
		}
	}
	// As it stands 40,000 + 2,000 − 10,000 = 32,000; every response
	// 20,000 + 5,000 − 21,000 = 4,000; the best set (A and C) 20,000 +
	// 2,000 − 21,000 = 1,000.
	if a.Total.String() != "32000" || a.Planned.String() != "4000" || a.Best.String() != "1000" {
		t.Errorf("totals %s, planned %s, best %s; want 32000, 4000, 1000", a.Total, a.Planned, a.Best)
	}
	if a.WithBest == nil {
		t.Fatal("no simulation of the best set, which differs from the planned one")
	}
	// Simulated means within four standard errors of the exact ones.
	for _, c := range []struct {
		name string
		s    dist.Sample
		want float64
	}{{"as it stands", a.AsIs, 32000}, {"planned", a.WithPlanned, 4000}, {"best", *a.WithBest, 1000}} {
		if d := math.Abs(c.s.Mean() - c.want); d > 4*c.s.StdErr() {
			t.Errorf("%s: simulated mean %v, exact %v", c.name, c.s.Mean(), c.want)
		}
	}
}

func TestCheckReportsEveryProblem(t *testing.T) {
	good := fixedRisk("A", Threat, "0.5", "10")
	cases := []struct {
		name  string
		risk  func(r *Risk)
		field string
	}{
		{"no id", func(r *Risk) { r.ID = " " }, "id"},
		{"no title", func(r *Risk) { r.Title = "" }, "title"},
		{"probability above 1", func(r *Risk) { r.P = dec("1.5") }, "probability"},
		{"negative probability", func(r *Risk) { r.P = dec("-0.1") }, "probability"},
		{"negative response cost", func(r *Risk) {
			r.Response = &Response{Cost: dec("-1"), P: dec("0.1"), Impact: FixedAmount(dec("1"))}
		}, "response_cost"},
		{"residual probability", func(r *Risk) {
			r.Response = &Response{Cost: dec("1"), P: dec("2"), Impact: FixedAmount(dec("1"))}
		}, "residual_probability"},
	}
	for _, c := range cases {
		r := good
		c.risk(&r)
		ps := (&Register{Risks: []Risk{r}}).Check()
		if len(ps) != 1 || ps[0].Field != c.field || ps[0].Risk != 0 {
			t.Errorf("%s: %v, want one problem in %s", c.name, ps, c.field)
		}
		if _, err := Analyse(context.Background(), &Register{Risks: []Risk{r}}, Options{}); err == nil {
			t.Errorf("%s: analysed without an error", c.name)
		}
	}
	ps := (&Register{Risks: []Risk{good, good}}).Check()
	if len(ps) != 1 || ps[0].Field != "id" || ps[0].Risk != 1 {
		t.Errorf("duplicate id: %v", ps)
	}
}

func TestKth(t *testing.T) {
	cases := [][]float64{
		{3, 1, 2},
		{5, 5, 5, 5, 1, 5, 9, 5},
		{0, 0, 0, 0, 0},
		{-1, 4, 4, -7, 2.5, 100, 0, 0, 3},
	}
	for _, c := range cases {
		sorted := append([]float64(nil), c...)
		sort.Float64s(sorted)
		for k := 1; k <= len(c); k++ {
			a := append([]float64(nil), c...)
			if got := kth(a, k); got != sorted[k-1] {
				t.Errorf("kth(%v, %d) = %v, want %v", c, k, got, sorted[k-1])
			}
		}
	}
}

func TestFigureDecimal(t *testing.T) {
	cases := []struct {
		r      string
		want   string
		finite bool
	}{
		{"215000/3", "71666.66666666666666666666666666667", false},
		{"1/8", "0.125", true},
		{"-43/20", "-2.15", true},
		{"0", "0", true},
	}
	for _, c := range cases {
		f := ratFigure(rat(c.r), true)
		if got := f.String(); got != c.want || f.Finite() != c.finite {
			t.Errorf("%s: %s finite %v, want %s %v", c.r, got, f.Finite(), c.want, c.finite)
		}
	}
}
