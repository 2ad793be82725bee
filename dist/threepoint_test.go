package dist

import (
	"math"
	"testing"

	"github.com/shopspring/decimal"
)

func TestDiscretiseNormal(t *testing.T) {
	n, _ := NewNormal(0, 1)
	cases := []struct {
		m       ThreePointMethod
		z       float64 // upper level's z: table value, recalled from memory
		level   float64
		weights [3]string
		varTol  float64
	}{
		// Keefer & Bodily (1983), Management Science 29(5): extended
		// Swanson–Megill 0.3/0.4/0.3 on P10/P50/P90.
		{SwansonMegill, 1.2815515655446004, 0.9, [3]string{"0.3", "0.4", "0.3"}, 0.02},
		// Keefer & Bodily (1983): extended Pearson–Tukey 0.185/0.63/0.185
		// on P5/P50/P95.
		{PearsonTukey, 1.6448536269514722, 0.95, [3]string{"0.185", "0.63", "0.185"}, 0.002},
	}
	for _, c := range cases {
		tp, err := Discretise(n, c.m)
		if err != nil {
			t.Fatal(err)
		}
		near(t, "upper value", tp.Values[2], c.z, 1e-9)
		near(t, "upper value against math.Erfinv", tp.Values[2], normalQuantile(c.level), 1e-9)
		near(t, "lower value", tp.Values[0], -c.z, 1e-9)
		near(t, "middle value", tp.Values[1], 0, 1e-12)
		sum := decimal.Zero
		for i, w := range tp.Weights {
			if !w.Equal(dec(c.weights[i])) {
				t.Errorf("%v weight %d = %v, want %s", c.m, i, w, c.weights[i])
			}
			sum = sum.Add(w)
		}
		if !sum.Equal(decimal.NewFromInt(1)) {
			t.Errorf("%v weights sum to %v", c.m, sum)
		}
		// A symmetric law keeps its mean; the variance is 2·w·z².
		near(t, "mean", tp.Mean(), 0, 1e-12)
		w := dec(c.weights[0]).InexactFloat64()
		near(t, "variance", tp.Variance(), 2*w*c.z*c.z, 1e-12)
		// Keefer & Bodily report both rules close to a normal's variance,
		// Pearson–Tukey the closer (recalled from memory): 1.0010 and 0.9854.
		if math.Abs(tp.Variance()-1) > c.varTol {
			t.Errorf("%v variance %v, want within %v of 1", c.m, tp.Variance(), c.varTol)
		}
	}
}

func TestDiscretiseOthers(t *testing.T) {
	d, _ := NewDiscrete([]float64{1, 2, 3}, []float64{0.2, 0.5, 0.3})
	tp, _ := Discretise(d, PearsonTukey)
	// Smallest value whose cumulative probability reaches 0.05, 0.5, 0.95.
	if tp.Values != [3]float64{1, 2, 3} {
		t.Errorf("discrete P5/P50/P95 = %v, want 1 2 3", tp.Values)
	}
	p, _ := NewPERT(380_000, 420_000, 610_000)
	tp, _ = Discretise(p, SwansonMegill)
	for i, l := range []float64{0.1, 0.5, 0.9} {
		near(t, "PERT percentile", tp.Values[i], p.Quantile(l), 0)
		near(t, "level", tp.Levels[i], l, 0)
	}
	if _, err := Discretise(p, ThreePointMethod(7)); err == nil || err.Error() != "unknown three-point method 7; use SwansonMegill or PearsonTukey" {
		t.Errorf("unknown method: %v", err)
	}
	if _, err := Discretise(nil, SwansonMegill); err == nil {
		t.Error("nil distribution accepted")
	}
}
