package dist

import (
	"math/big"
	"testing"

	"github.com/shopspring/decimal"
)

func TestDiscrete(t *testing.T) {
	d, err := NewDiscrete([]float64{30, 10, 20, 10}, []float64{0.2, 0.1, 0.5, 0.2})
	if err != nil {
		t.Fatal(err)
	}
	// By hand: 10 has probability 0.3, 20 has 0.5, 30 has 0.2.
	// Mean 3 + 10 + 6 = 19; variance 0.3·81 + 0.5·1 + 0.2·121 = 49.
	near(t, "mean", d.Mean(), 19, 1e-12)
	near(t, "variance", d.Variance(), 49, 1e-12)
	// Quantile: the smallest value whose cumulative probability reaches p
	// (cumulative 0.3, 0.8, 1).
	for _, c := range []struct{ p, want float64 }{
		{0, 10}, {0.1, 10}, {0.3, 10}, {0.31, 20}, {0.8, 20}, {0.81, 30}, {1, 30},
	} {
		if got := d.Quantile(c.p); got != c.want {
			t.Errorf("Q(%v) = %v, want %v", c.p, got, c.want)
		}
	}
	for _, c := range []struct{ x, want float64 }{{9, 0}, {10, 0.3}, {19.9, 0.3}, {20, 0.8}, {30, 1}, {99, 1}} {
		near(t, "CDF", d.CDF(c.x), c.want, 1e-12)
	}
	if lo, hi := d.Bounds(); lo != 10 || hi != 30 {
		t.Errorf("bounds %v, %v", lo, hi)
	}

	// A value of probability 0 is never drawn and is not the lowest quantile.
	z, _ := NewDiscrete([]float64{-5, 1, 2}, []float64{0, 0.5, 0.5})
	if z.Quantile(0) != 1 {
		t.Errorf("Q(0) = %v, want 1 (the smallest value with positive probability)", z.Quantile(0))
	}
}

func TestDiscreteMeanExact(t *testing.T) {
	vals := []string{"1000", "-250.5", "0.01"}
	probs := []string{"0.125", "0.675", "0.2"}
	var vs, ps []decimal.Decimal
	ref := new(big.Rat)
	for i := range vals {
		vs, ps = append(vs, dec(vals[i])), append(ps, dec(probs[i]))
		// Reference: Σ pᵢvᵢ in math/big.Rat.
		ref.Add(ref, new(big.Rat).Mul(rat(vals[i]), rat(probs[i])))
	}
	d, err := NewDiscreteExact(vs, ps)
	if err != nil {
		t.Fatal(err)
	}
	got, ok := d.MeanExact()
	if !ok || got.Cmp(ref) != 0 {
		t.Errorf("exact mean %v, want %v", got, ref)
	}
	f, _ := ref.Float64()
	near(t, "mean", d.Mean(), f, 1e-12)
}

func TestEvent(t *testing.T) {
	imp, _ := NewUniform(10, 20)
	e, err := NewEvent(0.3, imp)
	if err != nil {
		t.Fatal(err)
	}
	// E = pμ = 0.3 × 15; Var = p(σ² + μ²) − p²μ² (derived in Event's comment)
	// = 0.3(100/12 + 225) − 0.09·225.
	near(t, "mean", e.Mean(), 4.5, 1e-12)
	near(t, "variance", e.Variance(), 0.3*(100.0/12+225)-0.09*225, 1e-12)
	// CDF (1 − p)[x ≥ 0] + pF(x): 0.7 at 0, 0.85 at 15.
	near(t, "CDF(0)", e.CDF(0), 0.7, 1e-12)
	near(t, "CDF(15)", e.CDF(15), 0.85, 1e-12)
	near(t, "Q(0.5)", e.Quantile(0.5), 0, 0)
	near(t, "Q(0.85)", e.Quantile(0.85), 15, 1e-12) // 10 + (0.15/0.3)·10

	// An opportunity (negative impact): weight below 0 first.
	neg, _ := NewUniform(-20, -10)
	o, _ := NewEvent(0.3, neg)
	near(t, "Q(0.15) of an opportunity", o.Quantile(0.15), -15, 1e-12)
	near(t, "Q(0.5) of an opportunity", o.Quantile(0.5), 0, 0)
	near(t, "CDF(-15) of an opportunity", o.CDF(-15), 0.15, 1e-12)

	// A fixed impact c: Bernoulli × c, variance p(1 − p)c² (common practice).
	c, _ := NewDiscrete([]float64{250}, []float64{1})
	b, _ := NewEvent(0.2, c)
	near(t, "Bernoulli variance", b.Variance(), 0.2*0.8*250*250, 1e-12)

	p, _ := NewPERTExact(dec("10"), dec("20"), dec("60"))
	ex, _ := NewEventExact(dec("0.35"), p)
	got, ok := ex.MeanExact()
	// 0.35 × (10 + 80 + 60)/6 = 0.35 × 25 = 8.75, in math/big.Rat.
	if !ok || got.Cmp(rat("8.75")) != 0 {
		t.Errorf("exact event mean %v, %v", got, ok)
	}
	if lo, hi := ex.Bounds(); lo != 0 || hi != 60 {
		t.Errorf("event bounds %v, %v; want 0, 60", lo, hi)
	}
}
