package dist

import (
	"errors"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"gonum.org/v1/gonum/mat"
)

func TestCorrelationErrors(t *testing.T) {
	names := []string{"build", "test", "run"}
	cases := []struct {
		name  string
		names []string
		m     [][]float64
		i, j  int
		msg   string
	}{
		{"not symmetric", names, [][]float64{{1, 0.5, 0}, {0.4, 1, 0}, {0, 0, 1}}, 0, 1,
			"the correlation of build with test is 0.5 but of test with build is 0.4; they must be equal"},
		{"diagonal", nil, [][]float64{{1, 0.5}, {0.5, 0.9}}, 1, 1,
			"the correlation of input 2 with itself is 0.9; it must be 1"},
		{"above 1", names, [][]float64{{1, 0, 1.2}, {0, 1, 0}, {1.2, 0, 1}}, 0, 2,
			"the correlation of build and run is 1.2; a correlation must lie between -1 and 1"},
		{"NaN", names, [][]float64{{1, math.NaN(), 0}, {math.NaN(), 1, 0}, {0, 0, 1}}, 0, 1,
			"the correlation of build and test is NaN; it must be a number between -1 and 1"},
		// 0.9, 0.9 and −0.9 cannot hold together: if build and test move
		// together and build and run move together, test and run cannot
		// move apart (the determinant is negative).
		{"inconsistent", names, [][]float64{{1, 0.9, 0.9}, {0.9, 1, -0.9}, {0.9, -0.9, 1}}, 2, -1,
			"the correlations among build, test and run cannot all hold at once (the matrix is not positive definite); weaken one of those involving run"},
		{"perfect", names, [][]float64{{1, 0, 0}, {0, 1, -1}, {0, -1, 1}}, 1, 2,
			"test and run are perfectly correlated (-1); a correlation must lie strictly between -1 and 1 here (write one input as a formula of the other instead)"},
		{"ragged", nil, [][]float64{{1, 0}, {0}}, 1, 0,
			"row 2 of the correlation matrix has 1 entries; a 2×2 matrix needs 2"},
		{"names", []string{"a"}, [][]float64{{1, 0}, {0, 1}}, 0, 0,
			"1 names for a 2×2 correlation matrix"},
		{"empty", nil, nil, 0, 0, "the correlation matrix is empty"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := NewCorrelation(c.names, c.m)
			var ce *CorrelationError
			if !errors.As(err, &ce) {
				t.Fatalf("error %v is not a *CorrelationError", err)
			}
			if err.Error() != c.msg || ce.I != c.i || ce.J != c.j {
				t.Errorf("got  %q (%d, %d)\nwant %q (%d, %d)", err, ce.I, ce.J, c.msg, c.i, c.j)
			}
		})
	}
}

func TestCorrelationFromPairs(t *testing.T) {
	names := []string{"build", "test", "run"}
	c, err := CorrelationFromPairs(names, []Pair{{0, 1, 0.6}, {2, 1, -0.3}})
	if err != nil {
		t.Fatal(err)
	}
	if c.Dim() != 3 || c.At(1, 0) != 0.6 || c.At(1, 2) != -0.3 || c.At(0, 2) != 0 || c.At(2, 2) != 1 {
		t.Errorf("matrix %v", mat.Formatted(c.m))
	}
	for _, tc := range []struct {
		pairs []Pair
		msg   string
	}{
		{[]Pair{{1, 1, 0.5}}, "test is correlated with itself; name two different inputs"},
		{[]Pair{{0, 1, 0.5}, {1, 0, 0.4}}, "the correlation of test and build is given twice"},
		{[]Pair{{0, 3, 0.5}}, "a correlation between inputs 1 and 4, but there are 3 inputs"},
		{[]Pair{{0, 1, 0.9}, {0, 2, 0.9}, {1, 2, -0.9}}, "the correlations among build, test and run cannot all hold at once (the matrix is not positive definite); weaken one of those involving run"},
	} {
		if _, err := CorrelationFromPairs(names, tc.pairs); err == nil || err.Error() != tc.msg {
			t.Errorf("pairs %v: got %v, want %q", tc.pairs, err, tc.msg)
		}
	}
}

// TestCorrelationPositiveDefinite: random symmetric unit-diagonal matrices
// are accepted exactly when their smallest eigenvalue (gonum's EigenSym,
// an independent reference) is positive.
func TestCorrelationPositiveDefinite(t *testing.T) {
	r := rand.New(rand.NewPCG(7, 8))
	accepted, rejected := 0, 0
	for range 2000 {
		n := 2 + r.IntN(4)
		m := make([][]float64, n)
		sym := mat.NewSymDense(n, nil)
		for i := range m {
			m[i] = make([]float64, n)
		}
		for i := range n {
			m[i][i] = 1
			for j := i + 1; j < n; j++ {
				v := 2*r.Float64() - 1
				m[i][j], m[j][i] = v, v
			}
			for j := i; j < n; j++ {
				sym.SetSym(i, j, m[i][j])
			}
		}
		var eig mat.EigenSym
		if !eig.Factorize(sym, false) {
			t.Fatal("eigen decomposition failed")
		}
		low := slices.Min(eig.Values(nil))
		if math.Abs(low) < 1e-9 {
			continue // too near the boundary to call
		}
		_, err := NewCorrelation(nil, m)
		if (err == nil) != (low > 0) {
			t.Errorf("matrix %v: smallest eigenvalue %v, error %v", m, low, err)
		}
		if err == nil {
			accepted++
		} else {
			rejected++
		}
	}
	if accepted < 100 || rejected < 100 {
		t.Errorf("too few cases of one kind: %d accepted, %d rejected", accepted, rejected)
	}
}

func TestSpearman(t *testing.T) {
	// By hand: ranks of x are 1 2 3 4 5, of y 2 1 4 3 5; Σd² = 4, so
	// ρ = 1 − 6·4/(5·24) = 0.8 (Spearman's formula without ties, common practice).
	near(t, "ρ", Spearman([]float64{1, 2, 3, 4, 5}, []float64{20, 10, 40, 30, 50}), 0.8, 1e-12)
	// Ties share the mean rank: x ranks 1.5 1.5 3, y ranks 1 2 3; the
	// Pearson correlation of those is √3/2.
	near(t, "ρ with ties", Spearman([]float64{7, 7, 9}, []float64{1, 2, 3}), math.Sqrt(3)/2, 1e-12)
	if !math.IsNaN(Spearman([]float64{1}, []float64{1})) || !math.IsNaN(Spearman([]float64{1, 2}, []float64{1})) {
		t.Error("Spearman of too few or unequal values is not NaN")
	}
}
