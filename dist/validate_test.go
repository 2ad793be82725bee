package dist

import (
	"errors"
	"math"
	"testing"

	"github.com/shopspring/decimal"
)

func TestConstructorErrors(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	cases := []struct {
		name string
		make func() error
		arg  int
		msg  string
	}{
		{"pert low above likely", func() error { _, e := NewPERT(500, 400, 600); return e }, 1,
			"pert: LOW (500) is above LIKELY (400); LOW must not exceed LIKELY"},
		{"pert likely above high", func() error { _, e := NewPERT(1, 7, 6); return e }, 2,
			"pert: LIKELY (7) is above HIGH (6); LIKELY must not exceed HIGH"},
		{"pert NaN", func() error { _, e := NewPERT(1, nan, 6); return e }, 1,
			"pert: LIKELY is not a number"},
		{"pert infinite", func() error { _, e := NewPERT(1, 2, inf); return e }, 2,
			"pert: HIGH is +Inf; it must be a finite number"},
		{"pert spread overflows", func() error { _, e := NewPERT(-1e308, 0, 1e308); return e }, 0,
			"pert: the spread of pert(-1e+308, 0, 1e+308) is too large to compute in float64"},
		{"pert exact order beyond float64", func() error {
			_, e := NewPERTExact(dec("0.10000000000000000001"), dec("0.1"), dec("1"))
			return e
		}, 1, "pert: LOW (0.10000000000000000001) is above LIKELY (0.1); LOW must not exceed LIKELY"},
		{"pert exact too large", func() error { _, e := NewPERTExact(dec("1"), dec("2"), decimal.New(3, 999_999_999)); return e }, 2,
			"pert: HIGH 3e999999999 is too large in magnitude to simulate (the limit is about 1.8e308)"},
		{"pert exact too tiny", func() error { _, e := NewPERTExact(decimal.New(-1, -999_999_999), dec("2"), dec("3")); return e }, 0,
			"pert: LOW -1e-999999999 is too close to zero to simulate (below 1e-300 in magnitude); write 0 if it is zero"},
		{"triangular order", func() error { _, e := NewTriangular(3, 2, 1); return e }, 1,
			"triangular: LOW (3) is above LIKELY (2); LOW must not exceed LIKELY"},
		{"uniform order", func() error { _, e := NewUniformExact(dec("10"), dec("5")); return e }, 1,
			"uniform: LOW (10) is above HIGH (5); LOW must not exceed HIGH"},
		{"normal zero SD", func() error { _, e := NewNormal(100, 0); return e }, 1,
			"normal: SD is 0; a standard deviation must be positive"},
		{"normal negative SD", func() error { _, e := NewNormalExact(dec("100"), dec("-2.5")); return e }, 1,
			"normal: SD is -2.5; a standard deviation must be positive"},
		{"lognormal wrong order", func() error { _, e := NewLogNormalPercentiles(0.9, 300, 0.1, 100); return e }, 2,
			"lognormal: percentiles in the wrong order: P90 is given before P10; give the lower percentile first"},
		{"lognormal percentiles reversed", func() error { _, e := NewLogNormalPercentiles(0.1, 300, 0.9, 100); return e }, 3,
			"lognormal: P10 (300) is above P90 (100); a higher percentile cannot be smaller"},
		{"lognormal equal percentiles", func() error { _, e := NewLogNormalPercentiles(0.05, 40, 0.95, 40); return e }, 3,
			"lognormal: P5 and P95 are both 40; a lognormal needs them apart (write the figure itself for a fixed value)"},
		{"lognormal not positive", func() error { _, e := NewLogNormalPercentiles(0.1, -5, 0.9, 10); return e }, 1,
			"lognormal: P10 is -5; a lognormal takes only positive values"},
		{"lognormal level out of range", func() error { _, e := NewLogNormalPercentiles(0.1, 5, 1, 10); return e }, 2,
			"lognormal: the upper level 1 is not a probability strictly between 0 and 1"},
		{"lognormal mean not positive", func() error { _, e := NewLogNormalMeanSD(0, 10); return e }, 0,
			"lognormal: MEAN is 0; a lognormal takes only positive values, so its mean must be positive"},
		{"lognormal SD not positive", func() error { _, e := NewLogNormalMeanSD(10, -1); return e }, 1,
			"lognormal: SD is -1; a standard deviation must be positive"},
		{"discrete sum", func() error { _, e := NewDiscrete([]float64{1, 2}, []float64{0.5, 0.45}); return e }, 1,
			"discrete: the probabilities sum to 0.95, not 1"},
		{"discrete exact sum", func() error {
			_, e := NewDiscreteExact([]decimal.Decimal{dec("1"), dec("2"), dec("3")},
				[]decimal.Decimal{dec("0.3333333333333333"), dec("0.3333333333333333"), dec("0.3333333333333333")})
			return e
		}, 2, "discrete: the probabilities sum to 0.9999999999999999, not 1"},
		{"discrete lengths", func() error { _, e := NewDiscrete([]float64{1, 2, 3}, []float64{0.5, 0.5}); return e }, 2,
			"discrete: 3 values but 2 probabilities; give one probability per value"},
		{"discrete empty", func() error { _, e := NewDiscrete(nil, nil); return e }, 0,
			"discrete: no values given; a discrete distribution needs at least one value and its probability"},
		{"discrete negative probability", func() error { _, e := NewDiscrete([]float64{1, 2}, []float64{1.2, -0.2}); return e }, 0,
			"discrete: the probability of value 1 is 1.2; a probability must lie between 0 and 1"},
		{"event probability", func() error { _, e := NewEventExact(dec("1.01"), Uniform{}); return e }, 0,
			"event: the probability is 1.01; a probability must lie between 0 and 1"},
		{"event without impact", func() error { _, e := NewEvent(0.5, nil); return e }, 1,
			"event: no impact given"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			err := c.make()
			var ae *ArgError
			if !errors.As(err, &ae) {
				t.Fatalf("error %v is not an *ArgError", err)
			}
			if err.Error() != c.msg || ae.Arg != c.arg {
				t.Errorf("got  %q (argument %d)\nwant %q (argument %d)", err, ae.Arg, c.msg, c.arg)
			}
		})
	}
}
