package compiled

import (
	"fmt"
	"sort"
	"strings"

	"github.com/forkcast/forkcast/dist"
	"github.com/shopspring/decimal"
)

// The functions of the language are the published distributions under
// their usual names. A distribution written in a model is a random input:
// every exact analysis uses its mean (exact where the mean is rational, as
// it is for PERT, triangular, uniform, normal and discrete), and
// simulation draws it.

// function is one distribution the language knows.
type function struct {
	usage string // how it is written, for messages
	min   int    // fewest arguments
	max   int    // most arguments (-1: any number)
	// make builds the distribution from exact arguments.
	make func(args []decimal.Decimal) (dist.Distribution, error)
}

var functions = map[string]function{
	"pert": {"pert(LOW, LIKELY, HIGH)", 3, 3, func(a []decimal.Decimal) (dist.Distribution, error) {
		return dist.NewPERTExact(a[0], a[1], a[2])
	}},
	"triangular": {"triangular(LOW, LIKELY, HIGH)", 3, 3, func(a []decimal.Decimal) (dist.Distribution, error) {
		return dist.NewTriangularExact(a[0], a[1], a[2])
	}},
	"uniform": {"uniform(LOW, HIGH)", 2, 2, func(a []decimal.Decimal) (dist.Distribution, error) {
		return dist.NewUniformExact(a[0], a[1])
	}},
	"normal": {"normal(MEAN, SD)", 2, 2, func(a []decimal.Decimal) (dist.Distribution, error) {
		return dist.NewNormalExact(a[0], a[1])
	}},
	"lognormal": {"lognormal(P10, P90)", 2, 2, func(a []decimal.Decimal) (dist.Distribution, error) {
		d, err := dist.NewLogNormalPercentilesExact(decimal.New(1, -1), a[0], decimal.New(9, -1), a[1])
		if ae, ok := err.(*dist.ArgError); ok {
			// The constructor takes (0.1, P10, 0.9, P90): point at the
			// percentile as written.
			ae.Arg = max(ae.Arg-1, 0) / 2
		}
		return d, err
	}},
	"discrete": {"discrete(VALUE, PROBABILITY, VALUE, PROBABILITY, ...)", 2, -1, func(a []decimal.Decimal) (dist.Distribution, error) {
		if len(a)%2 != 0 {
			return nil, &dist.ArgError{Func: "discrete", Arg: len(a) - 1, Msg: "the last value has no probability: give values and probabilities in pairs"}
		}
		var vs, ps []decimal.Decimal
		for i := 0; i < len(a); i += 2 {
			vs, ps = append(vs, a[i]), append(ps, a[i+1])
		}
		d, err := dist.NewDiscreteExact(vs, ps)
		if err != nil && roundedToOne(ps) {
			// Probabilities written as fractions ((1/3) three times)
			// went through a rounded division and miss 1 by about
			// 10^−DivisionScale: they count as 1, as under a chance
			// node, and the mean is then not exact.
			fv, fp := make([]float64, len(vs)), make([]float64, len(ps))
			for i := range vs {
				fv[i], fp[i] = vs[i].InexactFloat64(), ps[i].InexactFloat64()
			}
			d, err = dist.NewDiscrete(fv, fp)
		}
		if ae, ok := err.(*dist.ArgError); ok {
			// The constructor blames an outcome; point at its value.
			ae.Arg *= 2
		}
		return d, err
	}},
}

// roundedToOne reports whether ps, each in [0, 1], sum to 1 but for the
// rounding of divisions at DivisionScale places (sumTolerance, as for a
// chance node's branches), without summing to exactly 1.
func roundedToOne(ps []decimal.Decimal) bool {
	sum := decimal.Zero
	for _, p := range ps {
		if p.Sign() < 0 || p.GreaterThan(decimal.NewFromInt(1)) {
			return false
		}
		sum = sum.Add(p)
	}
	diff := sum.Sub(decimal.NewFromInt(1)).Abs()
	return !diff.IsZero() && diff.LessThanOrEqual(decimal.New(1, -(DivisionScale-5)))
}

// functionNames lists the functions, for messages.
func functionNames() string {
	var names []string
	for n := range functions {
		names = append(names, n)
	}
	sort.Strings(names)
	return strings.Join(names, ", ")
}

// meanOf builds the distribution and returns its mean as a decimal, exact
// when it is a rational with a finite decimal expansion; otherwise rounded
// at DivisionScale places and exact is false.
func meanOf(fn function, args []decimal.Decimal) (d dist.Distribution, mean decimal.Decimal, exact bool, err error) {
	d, err = fn.make(args)
	if err != nil {
		return nil, decimal.Zero, false, err
	}
	if r, ok := d.MeanExact(); ok {
		m := decimal.NewFromBigRat(r, DivisionScale)
		return d, m, m.Rat().Cmp(r) == 0, nil
	}
	return d, decimal.NewFromFloat(d.Mean()), false, nil
}

// spreadOf is the range a distribution written as args gives an input
// whose `let` has no `in LOW .. HIGH`: LOW and HIGH as written for pert,
// triangular and uniform; the smallest and largest value of discrete; P10
// and P90 for lognormal (as written) and normal (MEAN ∓ 1.2816 SD, from
// its quantile function, so not exact).
func spreadOf(name string, args []decimal.Decimal, d dist.Distribution) (lo, hi decimal.Decimal) {
	switch name {
	case "pert", "triangular":
		return args[0], args[2]
	case "uniform", "lognormal":
		return args[0], args[1]
	case "discrete":
		lo, hi = args[0], args[0]
		for i := 0; i < len(args); i += 2 {
			lo, hi = decimal.Min(lo, args[i]), decimal.Max(hi, args[i])
		}
		return lo, hi
	}
	return decimal.NewFromFloat(d.Quantile(0.1)), decimal.NewFromFloat(d.Quantile(0.9))
}

func argError(name string, fn function, n int) string {
	want := fmt.Sprint(fn.min)
	switch {
	case fn.max < 0:
		want = fmt.Sprintf("at least %d", fn.min)
	case fn.max != fn.min:
		want = fmt.Sprintf("%d to %d", fn.min, fn.max)
	}
	return fmt.Sprintf("%s takes %s arguments, not %d: write %s", name, want, n, fn.usage)
}

// Distribution builds the distribution the language writes as
// name(args...) — pert, triangular, uniform, normal, lognormal or discrete
// — from exact arguments, checked as in a model. It serves readers of
// other formats (a register read from a spreadsheet) that write the same
// distributions.
func Distribution(name string, args []decimal.Decimal) (dist.Distribution, error) {
	fn, ok := functions[name]
	if !ok {
		return nil, fmt.Errorf("unknown distribution %q: the distributions are %s", name, functionNames())
	}
	if n := len(args); n < fn.min || (fn.max >= 0 && n > fn.max) {
		return nil, fmt.Errorf("%s", argError(name, fn, n))
	}
	return fn.make(args)
}

// DistributionUsage is how the distribution called name is written, such
// as "pert(LOW, LIKELY, HIGH)", or "" when there is none of that name.
func DistributionUsage(name string) string { return functions[name].usage }
