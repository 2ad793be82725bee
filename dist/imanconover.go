package dist

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/stat"
	"gonum.org/v1/gonum/stat/distuv"
)

// ImanConover rearranges the values within each column of cols (cols[j][i]
// is run i's draw of input j, drawn independently) so that the columns'
// rank correlations approach the target, by the method of Iman & Conover
// (1982, "A distribution-free approach to inducing rank correlation among
// input variables", Communications in Statistics B 11(3)). Each column
// keeps exactly its values; only their order changes. src drives the
// random pairing of scores, so the result depends only on cols, target and
// src.
//
// The method: fill an n×k score matrix S with van der Waerden scores
// Φ⁻¹(i/(n + 1)), each column in an independent random order; factor S's
// sample correlation E = F·Fᵀ and the target C = P·Pᵀ (Cholesky); then
// S* = S·(P·F⁻¹)ᵀ has sample correlation exactly C. Each column of cols is
// reordered so that its ranks match the ranks of the same column of S*.
// C is the target rank correlation carried over to normal scores
// (2·sin(πρ/6) for each ρ; see [NewCorrelation]), so the achieved rank
// correlation is close to the target, not exactly it.
func ImanConover(cols [][]float64, target Correlation, src rand.Source) error {
	k := len(cols)
	if k != target.Dim() {
		return fmt.Errorf("%d columns of draws for a %d×%d correlation target", k, target.Dim(), target.Dim())
	}
	if k < 2 {
		return nil
	}
	n := len(cols[0])
	for j, col := range cols {
		if len(col) != n {
			return fmt.Errorf("column %d (%s) has %d draws and column 1 has %d; every column needs the same number", j+1, target.Name(j), len(col), n)
		}
		for i, x := range col {
			if math.IsNaN(x) {
				return fmt.Errorf("draw %d of %s is not a number", i+1, target.Name(j))
			}
		}
	}
	if n <= k {
		return fmt.Errorf("%d runs are too few to correlate %d inputs; use more runs than inputs", n, k)
	}

	scores := make([]float64, n)
	for i := range scores {
		scores[i] = distuv.UnitNormal.Quantile(float64(i+1) / float64(n+1))
	}
	r := rand.New(src)
	s := mat.NewDense(n, k, nil)
	for j := range k {
		for i, p := range r.Perm(n) {
			s.Set(i, j, scores[p])
		}
	}

	var e mat.SymDense
	stat.CorrelationMatrix(&e, s, nil)
	var chol mat.Cholesky
	if !chol.Factorize(&e) {
		return fmt.Errorf("the random scores for %d runs happen to be linearly dependent; use more runs", n)
	}
	var f, fInv mat.TriDense
	chol.LTo(&f)
	if err := fInv.InverseTri(&f); err != nil {
		return fmt.Errorf("the random scores for %d runs are too close to dependent; use more runs", n)
	}
	var a mat.Dense
	a.Mul(target.l, &fInv) // P·F⁻¹
	var t mat.Dense
	t.Mul(s, a.T()) // S·(P·F⁻¹)ᵀ

	order := make([]int, n)
	sorted := make([]float64, n)
	for j := range k {
		for i := range order {
			order[i] = i
		}
		// Rank the rows by the transformed score; ties keep row order so the
		// result is deterministic.
		slices.SortStableFunc(order, func(x, y int) int {
			return cmpFloat(t.At(x, j), t.At(y, j))
		})
		copy(sorted, cols[j])
		slices.Sort(sorted)
		for rank, row := range order {
			cols[j][row] = sorted[rank]
		}
	}
	return nil
}

func cmpFloat(a, b float64) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}

// Spearman returns the rank correlation of x and y: the Pearson
// correlation (gonum's stat.Correlation) of their ranks, tied values
// sharing the mean of the ranks they span. It is NaN unless x and y have
// the same length, at least 2, and neither is constant.
func Spearman(x, y []float64) float64 {
	if len(x) != len(y) || len(x) < 2 {
		return math.NaN()
	}
	return stat.Correlation(ranks(x), ranks(y), nil)
}

// ranks returns the rank of each value (1 = smallest), ties given the
// mean of their ranks.
func ranks(x []float64) []float64 {
	order := make([]int, len(x))
	for i := range order {
		order[i] = i
	}
	slices.SortStableFunc(order, func(a, b int) int { return cmpFloat(x[a], x[b]) })
	r := make([]float64, len(x))
	for i := 0; i < len(order); {
		j := i
		for j+1 < len(order) && x[order[j+1]] == x[order[i]] {
			j++
		}
		mean := float64(i+j)/2 + 1
		for t := i; t <= j; t++ {
			r[order[t]] = mean
		}
		i = j + 1
	}
	return r
}
