package dist

import (
	"fmt"
	"math"
	"strings"

	"gonum.org/v1/gonum/mat"
)

// Correlation is a checked target matrix of rank correlations between k
// inputs: symmetric, with a unit diagonal, entries in [−1, 1] and positive
// definite (so that some joint distribution has exactly these
// correlations). Build it with [NewCorrelation] or [CorrelationFromPairs].
type Correlation struct {
	names []string
	m     *mat.SymDense
	l     *mat.TriDense // lower Cholesky factor of the score correlations (see scoreCorrelation)
}

// Pair sets the correlation between inputs A and B (indices from 0).
type Pair struct {
	A, B int
	Rho  float64
}

// CorrelationError reports what makes a correlation matrix invalid. I and J
// index the entry to blame; J is −1 when no single entry is wrong but the
// correlations among inputs 0…I cannot hold together.
type CorrelationError struct {
	I, J int
	Msg  string
}

// Error returns the message.
func (e *CorrelationError) Error() string { return e.Msg }

func corrErr(i, j int, format string, a ...any) error {
	return &CorrelationError{I: i, J: j, Msg: fmt.Sprintf(format, a...)}
}

// nameOf returns the name of input i for messages.
func nameOf(names []string, i int) string {
	if i < len(names) && names[i] != "" {
		return names[i]
	}
	return fmt.Sprintf("input %d", i+1)
}

// NewCorrelation checks the square matrix m and returns it as a target.
// names name the inputs in messages (nil: "input 1", "input 2", …); when
// given there must be one per row. The entries are rank correlations;
// [ImanConover] imposes 2·sin(πρ/6) on its normal scores so that the ranks
// come out at ρ (see scoreCorrelation).
func NewCorrelation(names []string, m [][]float64) (Correlation, error) {
	n := len(m)
	if n == 0 {
		return Correlation{}, corrErr(0, 0, "the correlation matrix is empty")
	}
	if names != nil && len(names) != n {
		return Correlation{}, corrErr(0, 0, "%d names for a %d×%d correlation matrix", len(names), n, n)
	}
	for i, row := range m {
		if len(row) != n {
			return Correlation{}, corrErr(i, 0, "row %d of the correlation matrix has %d entries; a %d×%d matrix needs %d", i+1, len(row), n, n, n)
		}
	}
	name := func(i int) string { return nameOf(names, i) }
	for i := range n {
		for j := range n {
			if x := m[i][j]; math.IsNaN(x) || math.IsInf(x, 0) {
				return Correlation{}, corrErr(i, j, "the correlation of %s and %s is %s; it must be a number between -1 and 1", name(i), name(j), formatFloat(x))
			}
		}
	}
	for i := range n {
		if m[i][i] != 1 {
			return Correlation{}, corrErr(i, i, "the correlation of %s with itself is %s; it must be 1", name(i), formatFloat(m[i][i]))
		}
	}
	for i := range n {
		for j := i + 1; j < n; j++ {
			if m[i][j] != m[j][i] {
				return Correlation{}, corrErr(i, j, "the correlation of %s with %s is %s but of %s with %s is %s; they must be equal",
					name(i), name(j), formatFloat(m[i][j]), name(j), name(i), formatFloat(m[j][i]))
			}
			if math.Abs(m[i][j]) > 1 {
				return Correlation{}, corrErr(i, j, "the correlation of %s and %s is %s; a correlation must lie between -1 and 1", name(i), name(j), formatFloat(m[i][j]))
			}
		}
	}
	sym := mat.NewSymDense(n, nil)
	for i := range n {
		for j := i; j < n; j++ {
			sym.SetSym(i, j, m[i][j])
		}
	}
	var chol mat.Cholesky
	if !chol.Factorize(sym) {
		return Correlation{}, notPositiveDefinite(names, m)
	}
	if scores := scoreCorrelation(sym); !chol.Factorize(scores) {
		chol.Factorize(sym) // keep the target itself; see scoreCorrelation
	}
	l := mat.NewTriDense(n, mat.Lower, nil)
	chol.LTo(l)
	return Correlation{names: append([]string(nil), names...), m: sym, l: l}, nil
}

// scoreCorrelation returns the correlations to impose on normal scores so
// that their rank correlations are the target's. For a bivariate normal of
// correlation r the rank correlation is (6/π)·arcsin(r/2) (Kruskal, 1958,
// "Ordinal measures of association", Journal of the American Statistical
// Association 53 — recalled from memory), so each target ρ becomes
// r = 2·sin(πρ/6). The change is small (0.6 becomes 0.618) and keeps 0, ±1
// and signs; in the rare case where the changed matrix is not positive
// definite the target itself is imposed.
func scoreCorrelation(target *mat.SymDense) *mat.SymDense {
	n := target.SymmetricDim()
	out := mat.NewSymDense(n, nil)
	for i := range n {
		out.SetSym(i, i, 1)
		for j := i + 1; j < n; j++ {
			out.SetSym(i, j, 2*math.Sin(math.Pi*target.At(i, j)/6))
		}
	}
	return out
}

// notPositiveDefinite finds the smallest leading block of m that is not
// positive definite and says which inputs' correlations conflict.
func notPositiveDefinite(names []string, m [][]float64) error {
	n := len(m)
	for k := 2; k <= n; k++ {
		sym := mat.NewSymDense(k, nil)
		for i := range k {
			for j := i; j < k; j++ {
				sym.SetSym(i, j, m[i][j])
			}
		}
		var chol mat.Cholesky
		if chol.Factorize(sym) {
			continue
		}
		last := k - 1
		for j := range last {
			if math.Abs(m[j][last]) == 1 {
				return corrErr(j, last, "%s and %s are perfectly correlated (%s); a correlation must lie strictly between -1 and 1 here (write one input as a formula of the other instead)",
					nameOf(names, j), nameOf(names, last), formatFloat(m[j][last]))
			}
		}
		all := make([]string, k)
		for i := range k {
			all[i] = nameOf(names, i)
		}
		return corrErr(last, -1, "the correlations among %s cannot all hold at once (the matrix is not positive definite); weaken one of those involving %s",
			joinAnd(all), nameOf(names, last))
	}
	return corrErr(n-1, -1, "the correlation matrix is not positive definite")
}

// joinAnd writes "a, b and c".
func joinAnd(s []string) string {
	if len(s) < 2 {
		return strings.Join(s, "")
	}
	return strings.Join(s[:len(s)-1], ", ") + " and " + s[len(s)-1]
}

// CorrelationFromPairs returns the target over len(names) inputs in which
// each pair has its given correlation and all other pairs are uncorrelated.
func CorrelationFromPairs(names []string, pairs []Pair) (Correlation, error) {
	n := len(names)
	m := make([][]float64, n)
	set := make([][]bool, n)
	for i := range m {
		m[i], set[i] = make([]float64, n), make([]bool, n)
		m[i][i] = 1
	}
	for _, p := range pairs {
		switch {
		case p.A < 0 || p.A >= n || p.B < 0 || p.B >= n:
			return Correlation{}, corrErr(p.A, p.B, "a correlation between inputs %d and %d, but there are %d inputs", p.A+1, p.B+1, n)
		case p.A == p.B:
			return Correlation{}, corrErr(p.A, p.B, "%s is correlated with itself; name two different inputs", nameOf(names, p.A))
		case set[p.A][p.B]:
			return Correlation{}, corrErr(p.A, p.B, "the correlation of %s and %s is given twice", nameOf(names, p.A), nameOf(names, p.B))
		}
		m[p.A][p.B], m[p.B][p.A] = p.Rho, p.Rho
		set[p.A][p.B], set[p.B][p.A] = true, true
	}
	if n == 0 {
		return Correlation{}, corrErr(0, 0, "no inputs to correlate")
	}
	return NewCorrelation(names, m)
}

// Dim returns the number of inputs.
func (c Correlation) Dim() int {
	if c.m == nil {
		return 0
	}
	return c.m.SymmetricDim()
}

// At returns the target correlation of inputs i and j.
func (c Correlation) At(i, j int) float64 { return c.m.At(i, j) }

// Name returns the name of input i as used in messages.
func (c Correlation) Name(i int) string { return nameOf(c.names, i) }
