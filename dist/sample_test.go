package dist

import (
	"context"
	"math"
	"math/rand/v2"
	"slices"
	"sort"
	"testing"

	"gonum.org/v1/gonum/stat"
)

func mustSample(t *testing.T, x []float64) Sample {
	t.Helper()
	s, err := NewSample(x)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// TestPercentileDefinition: the smallest value whose cumulative proportion
// reaches p, on hand-made data.
func TestPercentileDefinition(t *testing.T) {
	ten := mustSample(t, []float64{7, 3, 10, 1, 9, 2, 8, 4, 6, 5})
	ties := mustSample(t, []float64{3, 1, 2, 2, 5}) // sorted 1 2 2 3 5
	cases := []struct {
		s    Sample
		p    float64
		want float64
		why  string
	}{
		{ten, 0, 1, "p = 0: the smallest value"},
		{ten, 0.1, 1, "1/10 reaches 0.1"},
		{ten, 0.15, 2, "1/10 < 0.15 ≤ 2/10"},
		{ten, 0.5, 5, "5/10 reaches 0.5"},
		{ten, 0.51, 6, "5/10 < 0.51"},
		{ten, 0.9, 9, "9/10 reaches 0.9"},
		{ten, 1, 10, "only 10/10 reaches 1"},
		{ties, 0.4, 2, "2/5 reaches 0.4"},
		{ties, 0.6, 2, "3/5 reaches 0.6 at the second 2"},
		{ties, 0.61, 3, "4/5 is the first to reach 0.61"},
		{ties, 0.8, 3, "4/5 reaches 0.8"},
	}
	for _, c := range cases {
		if got := c.s.Percentile(c.p); got != c.want {
			t.Errorf("P%v = %v, want %v (%s)", 100*c.p, got, c.want, c.why)
		}
	}
	// p·n formed exactly: 0.07 × 100 is 7, so P7 of 1 … 100 is 7.
	hundred := make([]float64, 100)
	for i := range hundred {
		hundred[i] = float64(i + 1)
	}
	h := mustSample(t, hundred)
	for _, c := range []struct{ p, want float64 }{{0.07, 7}, {0.57, 57}, {0.29, 29}, {0.8, 80}} {
		if got := h.Percentile(c.p); got != c.want {
			t.Errorf("P%v of 1…100 = %v, want %v", 100*c.p, got, c.want)
		}
	}
	if !math.IsNaN(h.Percentile(1.2)) || !math.IsNaN(h.Percentile(-0.1)) {
		t.Error("a level outside [0, 1] is not NaN")
	}
}

// TestPercentileAgainstGonum: where p·n is exact in float64 (p a multiple
// of 1/64), gonum's stat.Quantile with stat.Empirical follows the same
// definition and must agree.
func TestPercentileAgainstGonum(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 6))
	for _, n := range []int{1, 2, 7, 64, 100, 1000} {
		x := make([]float64, n)
		for i := range x {
			x[i] = math.Round(r.NormFloat64() * 10) // ties on purpose
		}
		s := mustSample(t, x)
		sorted := s.Sorted()
		for k := 0; k <= 64; k++ {
			p := float64(k) / 64
			if got, want := s.Percentile(p), stat.Quantile(p, stat.Empirical, sorted, nil); got != want {
				t.Errorf("n %d, p %v: %v, gonum %v", n, p, got, want)
			}
		}
	}
}

func TestSampleMoments(t *testing.T) {
	// 2 4 4 4 5 5 7 9: mean 5, Σ(x − x̄)² = 32, sample SD √(32/7) (a
	// textbook example of the standard deviation — recalled from memory).
	s := mustSample(t, []float64{2, 4, 4, 4, 5, 5, 7, 9})
	near(t, "mean", s.Mean(), 5, 1e-12)
	near(t, "SD", s.SD(), math.Sqrt(32.0/7), 1e-12)
	near(t, "standard error", s.StdErr(), math.Sqrt(32.0/7)/math.Sqrt(8), 1e-12)
	near(t, "P(X < 4)", s.ProbBelow(4), 1.0/8, 0)
	near(t, "P(X ≤ 4)", s.ProbAtMost(4), 4.0/8, 0)
	near(t, "P(X > 5)", s.ProbAbove(5), 2.0/8, 0)
	near(t, "P(X ≤ 100)", s.ProbAtMost(100), 1, 0)
	if s.N() != 8 || s.Min() != 2 || s.Max() != 9 {
		t.Errorf("n %d, min %v, max %v", s.N(), s.Min(), s.Max())
	}
	one := mustSample(t, []float64{3})
	if one.Mean() != 3 || one.SD() != 0 || one.StdErr() != 0 {
		t.Errorf("one value: mean %v, SD %v", one.Mean(), one.SD())
	}
	for _, bad := range [][]float64{nil, {1, math.NaN()}, {math.Inf(-1)}} {
		if _, err := NewSample(bad); err == nil {
			t.Errorf("NewSample(%v) accepted", bad)
		}
	}
}

func TestHistogram(t *testing.T) {
	x := make([]float64, 100)
	for i := range x {
		x[i] = float64(i)
	}
	cases := []struct {
		x      []float64
		bins   int
		edges  []float64
		counts []int
	}{
		// 0 … 99 in 10 bins: width 9.9 rounds up to 10.
		{x, 10, []float64{0, 10, 20, 30, 40, 50, 60, 70, 80, 90, 100}, []int{10, 10, 10, 10, 10, 10, 10, 10, 10, 10}},
		// Width 0.1; edges are the float64 nearest 0.1, 0.2, 0.3, 0.4.
		{[]float64{0.1, 0.25, 0.3}, 2, []float64{0.1, 0.2, 0.3, 0.4}, []int{1, 1, 1}},
		// Width 112.5 rounds up to 200 (1, 2, 2.5, 5 steps); 1000 lies on an
		// edge and starts the last bin.
		{[]float64{-350, 0, 1000, 90}, 12, []float64{-400, -200, 0, 200, 400, 600, 800, 1000, 1200}, []int{1, 0, 2, 0, 0, 0, 0, 1}},
		// A single value: one bin a tenth of its size wide.
		{[]float64{5, 5, 5}, 4, []float64{5, 5.5}, []int{3}},
	}
	for _, c := range cases {
		h, err := mustSample(t, c.x).Histogram(c.bins)
		if err != nil {
			t.Fatal(err)
		}
		if !slices.Equal(h.Edges, c.edges) || !slices.Equal(h.Counts, c.counts) {
			t.Errorf("%v in %d bins: edges %v counts %v, want %v %v", c.x, c.bins, h.Edges, h.Counts, c.edges, c.counts)
		}
		total := 0
		for _, n := range h.Counts {
			total += n
		}
		if total != len(c.x) || len(h.Edges) != len(h.Counts)+1 || len(h.Counts) > c.bins+2 {
			t.Errorf("%v: %d counted in %d bins", c.x, total, len(h.Counts))
		}
		if h.Edges[0] > slices.Min(c.x) || h.Edges[len(h.Edges)-1] <= slices.Max(c.x) {
			t.Errorf("%v: edges %v do not cover the values", c.x, h.Edges)
		}
	}
	if _, err := mustSample(t, x).Histogram(0); err == nil {
		t.Error("0 bins accepted")
	}
}

func TestRoundWidth(t *testing.T) {
	for _, c := range []struct{ w, want float64 }{
		{9.9, 10}, {10, 10}, {10.01, 20}, {0.3, 0.5}, {0.0021, 0.0025}, {112.5, 200}, {0.1, 0.1}, {2.4e6, 2.5e6},
	} {
		m, e := roundWidth(c.w)
		if got := scale10(m, e); got != c.want {
			t.Errorf("round width of %v = %v, want %v", c.w, got, c.want)
		}
	}
}

// TestBernoulliSum: a register of independent risks, each costing a fixed
// amount with its probability. The exact distribution of the total comes
// from convolution in the test; the simulated percentiles (the smallest
// total whose cumulative proportion reaches p) must sit where the exact
// CDF crosses p, within sampling error.
func TestBernoulliSum(t *testing.T) {
	risks := []struct{ p, cost float64 }{
		{0.3, 100}, {0.5, 40}, {0.2, 250}, {0.1, 500}, {0.6, 30}, {0.45, 80}, {0.05, 1000}, {0.25, 60},
	}
	// Exact: convolve the two-point laws of the costs (integers).
	exact := map[float64]float64{0: 1}
	emv := 0.0
	for _, r := range risks {
		next := map[float64]float64{}
		for total, p := range exact {
			next[total] += p * (1 - r.p)
			next[total+r.cost] += p * r.p
		}
		exact = next
		emv += r.p * r.cost
	}
	totals := make([]float64, 0, len(exact))
	for v := range exact {
		totals = append(totals, v)
	}
	sort.Float64s(totals)
	cdf := func(x float64) float64 { // exact P(total ≤ x)
		var c float64
		for _, v := range totals {
			if v <= x {
				c += exact[v]
			}
		}
		return c
	}

	events := make([]Event, len(risks))
	for i, r := range risks {
		c, _ := NewDiscrete([]float64{r.cost}, []float64{1})
		events[i], _ = NewEvent(r.p, c)
	}
	const n = 100_000
	sim := make([]float64, n)
	_, err := ForEachRun(context.Background(), NewStreams(13), n, 2, func(_, run int, r *rand.Rand) error {
		for _, e := range events {
			sim[run] += e.Rand(r)
		}
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	s := mustSample(t, sim)
	if math.Abs(s.Mean()-emv) > 4*s.StdErr() {
		t.Errorf("simulated mean %v, exact EMV %v, standard error %v", s.Mean(), emv, s.StdErr())
	}
	for _, p := range []float64{0.5, 0.8, 0.9, 0.95} {
		q := s.Percentile(p)
		i := sort.SearchFloat64s(totals, q)
		if i == len(totals) || totals[i] != q {
			t.Fatalf("simulated P%v = %v is not a possible total", 100*p, q)
		}
		// The exact CDF reaches p at q and is below p just before q, up to
		// 4 binomial standard errors of an empirical proportion.
		tol := 4 * math.Sqrt(p*(1-p)/n)
		below := 0.0
		if i > 0 {
			below = cdf(totals[i-1])
		}
		if cdf(q) < p-tol || below > p+tol {
			t.Errorf("P%v: simulated %v, exact CDF %v there and %v before", 100*p, q, cdf(q), below)
		}
		// The exact percentile, by the same definition.
		want := totals[sort.Search(len(totals), func(i int) bool { return cdf(totals[i]) >= p-1e-12 })]
		t.Logf("P%v: simulated %v, exact %v (exact CDF there %.4f)", 100*p, q, want, cdf(want))
	}
}
