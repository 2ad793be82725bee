package dist

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/shopspring/decimal"
)

// checkValid asserts what every validated distribution promises: finite
// moments, no NaN from Quantile, CDF or Rand, draws within Bounds.
func checkValid(t *testing.T, d Distribution) {
	t.Helper()
	if m, v := d.Mean(), d.Variance(); math.IsNaN(m) || math.IsInf(m, 0) || math.IsNaN(v) || math.IsInf(v, 0) || v < 0 {
		t.Fatalf("%v: mean %v, variance %v", d, m, v)
	}
	lo, hi := d.Bounds()
	for _, p := range []float64{0, 1e-9, 0.05, 0.1, 0.5, 0.9, 0.95, 1 - 1e-9, 1} {
		q := d.Quantile(p)
		if math.IsNaN(q) || q < lo || q > hi {
			t.Fatalf("%v: Quantile(%v) = %v outside [%v, %v]", d, p, q, lo, hi)
		}
		if c := d.CDF(q); math.IsNaN(c) || c < 0 || c > 1 {
			t.Fatalf("%v: CDF(%v) = %v", d, q, c)
		}
	}
	src := rand.NewPCG(3, 4)
	for range 20 {
		if x := d.Rand(src); math.IsNaN(x) || x < lo || x > hi {
			t.Fatalf("%v: draw %v outside [%v, %v]", d, x, lo, hi)
		}
	}
	if m, ok := d.MeanExact(); ok {
		f, _ := m.Float64()
		if math.Abs(f-d.Mean()) > 1e-6*math.Max(1, math.Abs(f)) {
			t.Fatalf("%v: exact mean %v, float mean %v", d, f, d.Mean())
		}
	}
}

func FuzzThreePoint(f *testing.F) {
	f.Add(1.0, 2.0, 3.0)
	f.Add(0.0, 0.0, 0.0)
	f.Add(-1e308, 0.0, 1e308)
	f.Add(5.0, 4.0, 6.0)
	f.Add(1e-300, 1e-300, 2e-300)
	f.Add(math.NaN(), 1.0, 2.0)
	f.Fuzz(func(t *testing.T, a, m, b float64) {
		if d, err := NewPERT(a, m, b); err == nil {
			checkValid(t, d)
		}
		if d, err := NewTriangular(a, m, b); err == nil {
			checkValid(t, d)
		}
		if d, err := NewUniform(a, b); err == nil {
			checkValid(t, d)
		}
		if d, err := NewNormal(a, b); err == nil {
			checkValid(t, d)
		}
		if d, err := NewLogNormalMeanSD(a, b); err == nil {
			checkValid(t, d)
		}
		if d, err := NewLogNormalPercentiles(a, m, b, m+1); err == nil {
			checkValid(t, d)
		}
		if d, err := NewLogNormalPercentiles(0.1, a, 0.9, b); err == nil {
			checkValid(t, d)
		}
		if d, err := NewUniform(a, b); err == nil {
			if e, err := NewEvent(m, d); err == nil {
				checkValid(t, e)
			}
		}
	})
}

func FuzzExact(f *testing.F) {
	f.Add("380000", "420000", "610000")
	f.Add("0.1", "0.10000000000000000001", "1")
	f.Add("1e400", "2", "3")
	f.Add("-1e-500", "0", "1")
	f.Add("1", "x", "2")
	f.Fuzz(func(t *testing.T, a, m, b string) {
		da, e1 := decimal.NewFromString(a)
		dm, e2 := decimal.NewFromString(m)
		db, e3 := decimal.NewFromString(b)
		if e1 != nil || e2 != nil || e3 != nil {
			return
		}
		if d, err := NewPERTExact(da, dm, db); err == nil {
			checkValid(t, d)
		}
		if d, err := NewTriangularExact(da, dm, db); err == nil {
			checkValid(t, d)
		}
		if d, err := NewNormalExact(da, db); err == nil {
			checkValid(t, d)
		}
		if d, err := NewLogNormalPercentilesExact(da, dm, db, dm.Add(decimal.NewFromInt(1))); err == nil {
			checkValid(t, d)
		}
		if d, err := NewDiscreteExact([]decimal.Decimal{da, dm}, []decimal.Decimal{db, decimal.NewFromInt(1).Sub(db)}); err == nil {
			checkValid(t, d)
		}
	})
}

func FuzzDiscrete(f *testing.F) {
	f.Add(1.0, 0.5, 2.0, 0.5, 3.0, 0.0)
	f.Add(-1.0, 0.3, -1.0, 0.3, 5.0, 0.4)
	f.Add(1.0, 0.6, 2.0, 0.6, 3.0, -0.2)
	f.Fuzz(func(t *testing.T, v1, p1, v2, p2, v3, p3 float64) {
		if d, err := NewDiscrete([]float64{v1, v2, v3}, []float64{p1, p2, p3}); err == nil {
			checkValid(t, d)
		}
	})
}

func FuzzCorrelation(f *testing.F) {
	f.Add(0.5, -0.3, 0.2, 1.0)
	f.Add(0.9, 0.9, -0.9, 1.0)
	f.Add(1.0, 0.0, 0.0, 1.0)
	f.Add(math.NaN(), 0.0, 0.0, 0.5)
	f.Fuzz(func(t *testing.T, a, b, c, diag float64) {
		m := [][]float64{{1, a, b}, {a, diag, c}, {b, c, 1}}
		target, err := NewCorrelation(nil, m)
		if err != nil {
			return
		}
		u, _ := NewUniform(0, 1)
		cols := make([][]float64, 3)
		src := rand.NewPCG(1, 2)
		for j := range cols {
			cols[j] = make([]float64, 50)
			for i := range cols[j] {
				cols[j][i] = u.Rand(src)
			}
		}
		if err := ImanConover(cols, target, src); err != nil {
			t.Fatalf("valid target %v rejected by ImanConover: %v", m, err)
		}
	})
}

func FuzzSample(f *testing.F) {
	f.Add(1.0, 2.0, 3.0, 0.5, 10)
	f.Add(5.0, 5.0, 5.0, 0.07, 1)
	f.Add(-1e308, 1e308, 0.0, 1.0, 3)
	f.Add(1e308, 1e308, 1e308, 0.5, 3)
	f.Add(1e20, 1e20+16384, 1e20, 0.3, 10_000)
	f.Add(1e-310, 2e-310, 0.0, 0.9, 7)
	f.Fuzz(func(t *testing.T, a, b, c, p float64, bins int) {
		s, err := NewSample([]float64{a, b, c})
		if err != nil {
			return
		}
		if q := s.Percentile(p); validP(p) && (math.IsNaN(q) || q < s.Min() || q > s.Max()) {
			t.Fatalf("Percentile(%v) = %v", p, q)
		}
		if m, sd := s.Mean(), s.SD(); math.IsNaN(m) || math.IsInf(m, 0) || math.IsNaN(sd) || math.IsInf(sd, 0) {
			t.Fatalf("mean %v, SD %v", m, sd)
		}
		h, err := s.Histogram(bins)
		if err != nil {
			return
		}
		total := 0
		for _, n := range h.Counts {
			total += n
		}
		if total != 3 || len(h.Edges) != len(h.Counts)+1 {
			t.Fatalf("histogram %v counts %d values", h, total)
		}
	})
}
