package dist

import (
	"fmt"
	"math"
	"math/big"
	"math/rand/v2"
	"strconv"

	"github.com/shopspring/decimal"
)

// Distribution is what every distribution in this package provides.
type Distribution interface {
	// Mean returns the expected value.
	Mean() float64
	// Variance returns the variance.
	Variance() float64
	// Quantile returns the smallest x with CDF(x) ≥ p for p in (0, 1];
	// Quantile(0) is the lower end of the support (−Inf, and +Inf at 1,
	// for an unbounded distribution). It returns NaN for p outside [0, 1]
	// or NaN. Quantile(u) of a uniform u is a draw from the distribution.
	Quantile(p float64) float64
	// CDF returns P(X ≤ x).
	CDF(x float64) float64
	// Rand returns one draw using src.
	Rand(src rand.Source) float64
	// MeanExact returns the mean as an exact rational when the
	// distribution was built from exact decimals and its mean is rational;
	// ok is false otherwise. The caller owns the returned value.
	MeanExact() (mean *big.Rat, ok bool)
	// Bounds returns the smallest and largest values a draw can take
	// (−Inf or +Inf where unbounded).
	Bounds() (lo, hi float64)
	// String returns the distribution as a function call, such as
	// "pert(10, 12, 20)".
	String() string
}

// ArgError reports a bad argument of a distribution's constructor.
type ArgError struct {
	Func string // the distribution, as in String: "pert", "normal", …
	Arg  int    // index of the argument to blame, from 0
	Msg  string // what is wrong, in plain words
}

// Error returns "FUNC: MSG".
func (e *ArgError) Error() string { return e.Func + ": " + e.Msg }

// arg is one constructor argument: its float64 value, its name in messages
// and, when the caller gave one, its exact decimal.
type arg struct {
	name    string
	f       float64
	d       decimal.Decimal
	exact   bool
	tooTiny bool // exact, nonzero and below 1e-300 in magnitude
}

func floatArg(name string, f float64) arg { return arg{name: name, f: f} }

// minMagnitude is the smallest nonzero magnitude accepted of an exact
// argument. Comparing decimals whose exponents lie far apart costs time and
// memory in proportion to the gap, so arguments outside about 1e-300 …
// 1.8e308 are refused before anything compares them.
const minMagnitude = -300

func decimalArg(name string, d decimal.Decimal) arg {
	f, _ := d.Float64() // ±Inf beyond float64's range, without expanding d
	a := arg{name: name, f: f, d: d, exact: true}
	if !d.IsZero() && int64(d.NumDigits())+int64(d.Exponent()) < minMagnitude {
		a.tooTiny = true
	}
	return a
}

// String shows the argument as the caller wrote it (in scientific form
// when it is out of range, so a huge exponent is not written out).
func (a arg) String() string {
	switch {
	case a.exact && (a.tooTiny || math.IsInf(a.f, 0)):
		return a.d.Coefficient().String() + "e" + strconv.Itoa(int(a.d.Exponent()))
	case a.exact:
		return a.d.String()
	}
	return formatFloat(a.f)
}

// problem says what makes a unusable as a number, or "" when it is usable.
func (a arg) problem() string {
	switch {
	case math.IsNaN(a.f):
		return "is not a number"
	case math.IsInf(a.f, 0) && a.exact:
		return a.String() + " is too large in magnitude to simulate (the limit is about 1.8e308)"
	case math.IsInf(a.f, 0):
		return "is " + a.String() + "; it must be a finite number"
	case a.tooTiny:
		return a.String() + " is too close to zero to simulate (below 1e-300 in magnitude); write 0 if it is zero"
	}
	return ""
}

// formatFloat writes x without an exponent where that stays short, so that
// money reads as money (1500000, not 1.5e+06).
func formatFloat(x float64) string {
	if ax := math.Abs(x); x == 0 || (ax >= 1e-6 && ax < 1e21) {
		return strconv.FormatFloat(x, 'f', -1, 64)
	}
	return strconv.FormatFloat(x, 'g', -1, 64)
}

// checker collects the first problem found in a constructor's arguments.
type checker struct {
	fn  string
	err *ArgError
}

func (c *checker) fail(i int, format string, a ...any) {
	if c.err == nil {
		c.err = &ArgError{Func: c.fn, Arg: i, Msg: fmt.Sprintf(format, a...)}
	}
}

// finite checks that each argument is a number float64 can hold.
func (c *checker) finite(args ...arg) {
	for i, a := range args {
		if p := a.problem(); p != "" {
			c.fail(i, "%s %s", a.name, p)
		}
	}
}

// cmp compares two arguments exactly when both are exact.
func cmp(a, b arg) int {
	if a.exact && b.exact {
		return a.d.Cmp(b.d)
	}
	switch {
	case a.f < b.f:
		return -1
	case a.f > b.f:
		return 1
	}
	return 0
}

// notAbove checks args[i] ≤ args[j], unless a problem was found already
// (an out-of-range decimal must not be compared: see minMagnitude).
func (c *checker) notAbove(args []arg, i, j int) {
	if c.err == nil && cmp(args[i], args[j]) > 0 {
		c.fail(j, "%s (%s) is above %s (%s); %s must not exceed %s",
			args[i].name, args[i], args[j].name, args[j], args[i].name, args[j].name)
	}
}

// moments checks that the mean and variance a distribution reports are
// finite, so that no infinity or NaN leaks from a validated distribution.
func (c *checker) moments(d Distribution) {
	if m, v := d.Mean(), d.Variance(); math.IsNaN(m) || math.IsInf(m, 0) || math.IsNaN(v) || math.IsInf(v, 0) {
		c.fail(0, "the spread of %s is too large to compute in float64", d)
	}
}

// result returns the collected error as an error value (nil when none).
func (c *checker) result() error {
	if c.err == nil {
		return nil
	}
	return c.err
}

// exactArgs returns the exact decimals of args, or nil when any is not exact.
func exactArgs(args ...arg) []decimal.Decimal {
	out := make([]decimal.Decimal, len(args))
	for i, a := range args {
		if !a.exact {
			return nil
		}
		out[i] = a.d
	}
	return out
}

// validP reports whether p is a probability level Quantile accepts.
func validP(p float64) bool { return p >= 0 && p <= 1 }

// clamp keeps x within [lo, hi]: a quantile or draw scaled from [0, 1]
// must not step outside the range by a rounding error.
func clamp(x, lo, hi float64) float64 {
	if x < lo {
		return lo
	}
	if x > hi {
		return hi
	}
	return x
}

// callString writes a distribution as a function call of its arguments.
func callString(fn string, args ...string) string {
	s := fn + "("
	for i, a := range args {
		if i > 0 {
			s += ", "
		}
		s += a
	}
	return s + ")"
}

// shown returns the argument strings: the exact decimals when kept,
// otherwise the float64 values.
func shown(exact []decimal.Decimal, fs ...float64) []string {
	out := make([]string, len(fs))
	for i, f := range fs {
		if exact != nil {
			out[i] = exact[i].String()
		} else {
			out[i] = formatFloat(f)
		}
	}
	return out
}

func nan() float64 { return math.NaN() }

// step is the CDF of a point at v.
func step(x, v float64) float64 {
	if x < v {
		return 0
	}
	return 1
}
