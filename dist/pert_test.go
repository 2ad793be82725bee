package dist

import (
	"math"
	"math/big"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

// pertCases are three-point estimates; where the shape parameters are
// integers the beta CDF has a closed form to test quantiles against.
var pertCases = []struct {
	a, m, b     float64
	alpha, beta int // 0 when not integers
	name        string
}{
	{0, 0, 1, 1, 5, "likely at the low end"},
	{0, 25, 100, 2, 4, "likely a quarter of the way"},
	{10, 15, 20, 3, 3, "symmetric"},
	{0, 75, 100, 4, 2, "likely three quarters of the way"},
	{380_000, 420_000, 610_000, 0, 0, "project cost"},
	{-5, 3, 4, 0, 0, "negative low"},
}

func TestPERTMoments(t *testing.T) {
	for _, c := range pertCases {
		t.Run(c.name, func(t *testing.T) {
			d, err := NewPERT(c.a, c.m, c.b)
			if err != nil {
				t.Fatal(err)
			}
			// Malcolm, Roseboom, Clark & Fazar (1959): mean (a + 4m + b)/6.
			mean := (c.a + 4*c.m + c.b) / 6
			near(t, "mean", d.Mean(), mean, 1e-12)
			// Variance (μ − a)(b − μ)/7, derived in PERT.Variance's comment.
			near(t, "variance", d.Variance(), (mean-c.a)*(c.b-mean)/7, 1e-12)

			// Reference: gonum's beta with α = 1 + 4(m − a)/(b − a),
			// β = 1 + 4(b − m)/(b − a) (Malcolm et al. 1959), scaled to [a, b].
			w := c.b - c.a
			ref := distuv.Beta{Alpha: 1 + 4*(c.m-c.a)/w, Beta: 1 + 4*(c.b-c.m)/w}
			near(t, "mean against gonum's beta", d.Mean(), c.a+w*ref.Mean(), 1e-9)
			near(t, "variance against gonum's beta", d.Variance(), w*w*ref.Variance(), 1e-9)
			alpha, beta := d.Shape()
			near(t, "α + β", alpha+beta, 6, 1e-12) // 2 + 4(b − a)/(b − a)

			if c.alpha == 0 {
				return
			}
			// Integer shapes: the CDF is the binomial sum (A&S 26.5.24).
			near(t, "α", alpha, float64(c.alpha), 1e-12)
			near(t, "β", beta, float64(c.beta), 1e-12)
			refCDF := func(x float64) float64 { return incBetaInteger((x-c.a)/w, c.alpha, c.beta) }
			for _, p := range []float64{0.05, 0.1, 0.5, 0.8, 0.9, 0.95} {
				want := invert(refCDF, p, c.a, c.b)
				near(t, "quantile", d.Quantile(p), want, 1e-9)
				near(t, "CDF", d.CDF(want), p, 1e-9)
			}
		})
	}
}

// TestPERTClosedForms checks two quantiles with closed forms.
func TestPERTClosedForms(t *testing.T) {
	// m = a gives α = 1, β = 5: CDF 1 − (1 − y)⁵, so Q(p) = 1 − (1 − p)^(1/5)
	// on [0, 1] (inverting the binomial sum with a = 1, b = 5).
	d, _ := NewPERT(0, 0, 1)
	for _, p := range []float64{0.1, 0.5, 0.9} {
		near(t, "Q(p) of pert(0, 0, 1)", d.Quantile(p), 1-math.Pow(1-p, 0.2), 1e-9)
	}
	// A symmetric estimate has its median at the middle (α = β).
	s, _ := NewPERT(10, 15, 20)
	near(t, "median of pert(10, 15, 20)", s.Quantile(0.5), 15, 1e-9)
}

func TestPERTMeanExact(t *testing.T) {
	cases := []struct{ a, m, b, want string }{
		// (a + 4m + b)/6 worked by hand.
		{"380000", "420000", "610000", "445000"}, // 2_670_000/6
		{"0.1", "0.2", "0.7", "4/15"},            // 1.6/6
		{"5", "5", "5", "5"},
		{"-1.5", "0", "2.25", "1/8"}, // 0.75/6
	}
	for _, c := range cases {
		d, err := NewPERTExact(dec(c.a), dec(c.m), dec(c.b))
		if err != nil {
			t.Fatal(err)
		}
		got, ok := d.MeanExact()
		// Reference: the formula in math/big.Rat.
		ref := new(big.Rat).Add(rat(c.a), new(big.Rat).Mul(big.NewRat(4, 1), rat(c.m)))
		ref.Add(ref, rat(c.b)).Quo(ref, big.NewRat(6, 1))
		if !ok || got.Cmp(ref) != 0 || got.Cmp(rat(c.want)) != 0 {
			t.Errorf("pert(%s, %s, %s) exact mean = %v, %v; want %s", c.a, c.m, c.b, got, ok, c.want)
		}
		f, _ := got.Float64()
		near(t, "float mean against exact", d.Mean(), f, 1e-12)
	}
	if _, ok := mustPERT(t, 1, 2, 3).MeanExact(); ok {
		t.Error("a PERT built from float64 reports an exact mean")
	}
}

func mustPERT(t *testing.T, a, m, b float64) PERT {
	t.Helper()
	d, err := NewPERT(a, m, b)
	if err != nil {
		t.Fatal(err)
	}
	return d
}

// A three-point estimate with three equal figures is a point (the
// package's documented choice).
func TestPERTPoint(t *testing.T) {
	for _, d := range []PERT{mustPERT(t, 7, 7, 7), {}} {
		v := d.Likely()
		if d.Mean() != v || d.Variance() != 0 || d.Quantile(0) != v || d.Quantile(0.3) != v || d.Quantile(1) != v {
			t.Errorf("%v: mean %v, variance %v, quantiles %v %v", d, d.Mean(), d.Variance(), d.Quantile(0), d.Quantile(1))
		}
		if d.CDF(v-0.5) != 0 || d.CDF(v) != 1 || d.Rand(nil) != v {
			t.Errorf("%v: CDF below %v, at %v, draw %v", d, d.CDF(v-0.5), d.CDF(v), d.Rand(nil))
		}
	}
}
