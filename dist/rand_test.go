package dist

import (
	"math"
	"math/rand/v2"
	"testing"
)

// testDistributions is one of each kind, for the checks all must pass.
func testDistributions(t testing.TB) []Distribution {
	t.Helper()
	var out []Distribution
	add := func(d Distribution, err error) {
		if err != nil {
			t.Fatal(err)
		}
		out = append(out, d)
	}
	add(NewPERT(380_000, 420_000, 610_000))
	add(NewPERT(0, 0, 1))
	add(NewTriangular(10, 12, 20))
	add(NewUniform(-2, 6))
	add(NewNormal(100, 15))
	add(NewLogNormalPercentiles(0.1, 100, 0.9, 300))
	add(NewLogNormalMeanSD(50, 20))
	add(NewDiscrete([]float64{10, 20, 30}, []float64{0.3, 0.5, 0.2}))
	imp, _ := NewTriangular(100, 150, 400)
	add(NewEvent(0.35, imp))
	return out
}

// TestRandAgreesWithCDF draws from each distribution and checks the sample
// mean and the proportions below a few quantiles against Mean and CDF: the
// sampler (gonum's) and the quantile function describe the same law.
func TestRandAgreesWithCDF(t *testing.T) {
	const n = 40_000
	for _, d := range testDistributions(t) {
		t.Run(d.String(), func(t *testing.T) {
			src := rand.NewPCG(1, 2)
			x := make([]float64, n)
			var sum float64
			lo, hi := d.Bounds()
			for i := range x {
				x[i] = d.Rand(src)
				if math.IsNaN(x[i]) || x[i] < lo || x[i] > hi {
					t.Fatalf("draw %v outside [%v, %v]", x[i], lo, hi)
				}
				sum += x[i]
			}
			// The sample mean lies within 5 standard errors of the mean.
			se := math.Sqrt(d.Variance() / n)
			if m := sum / n; math.Abs(m-d.Mean()) > 5*se {
				t.Errorf("sample mean %v, mean %v, standard error %v", m, d.Mean(), se)
			}
			for _, p := range []float64{0.1, 0.5, 0.9} {
				q := d.Quantile(p)
				below := 0
				for _, v := range x {
					if v <= q {
						below++
					}
				}
				// P(X ≤ Q(p)) = CDF(Q(p)) ≥ p; the proportion of draws
				// has binomial sampling error.
				want := d.CDF(q)
				if got := float64(below) / n; math.Abs(got-want) > 5*math.Sqrt(want*(1-want)/n)+1e-12 {
					t.Errorf("proportion ≤ Q(%v) = %v: %v, want %v", p, q, got, want)
				}
				if want < p-1e-9 {
					t.Errorf("CDF(Q(%v)) = %v is below %v", p, want, p)
				}
			}
		})
	}
}

// TestQuantileOutOfRange: a level outside [0, 1] gives NaN, never a panic.
func TestQuantileOutOfRange(t *testing.T) {
	for _, d := range testDistributions(t) {
		for _, p := range []float64{-0.1, 1.5, math.NaN()} {
			if q := d.Quantile(p); !math.IsNaN(q) {
				t.Errorf("%v: Quantile(%v) = %v, want NaN", d, p, q)
			}
		}
	}
}

func TestString(t *testing.T) {
	p, _ := NewPERTExact(dec("380000"), dec("420000"), dec("610000.50"))
	l, _ := NewLogNormalPercentiles(0.1, 100, 0.9, 300)
	m, _ := NewLogNormalMeanSDExact(dec("50"), dec("20"))
	d, _ := NewDiscrete([]float64{1, 2}, []float64{0.25, 0.75})
	e, _ := NewEvent(0.3, d)
	for _, c := range []struct {
		d    Distribution
		want string
	}{
		{p, "pert(380000, 420000, 610000.5)"},
		{l, "lognormal(P10=100, P90=300)"},
		{m, "lognormal(mean=50, sd=20)"},
		{d, "discrete(1: 0.25, 2: 0.75)"},
		{e, "event(0.3, discrete(1: 0.25, 2: 0.75))"},
	} {
		if got := c.d.String(); got != c.want {
			t.Errorf("String() = %q, want %q", got, c.want)
		}
	}
}
