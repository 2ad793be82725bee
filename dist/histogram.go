package dist

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/stat"
)

// Histogram counts values in bins with round edges. Bin i holds the values
// x with Edges[i] ≤ x < Edges[i+1].
type Histogram struct {
	Edges  []float64 // ascending, one more than Counts
	Counts []int
}

// maxBins bounds the bins asked for, so a bad argument cannot allocate
// without limit.
const maxBins = 10_000

// Histogram bins the sample into about bins bins (at most bins + 2) whose
// edges are consecutive multiples of a round width (1, 2, 2.5 or 5 × a
// power of ten) from [NiceEdges]. The edges depend only on the smallest and
// largest values and bins. Counting is by gonum's stat.Histogram.
func (s Sample) Histogram(bins int) (Histogram, error) {
	if len(s.sorted) == 0 {
		return Histogram{}, fmt.Errorf("no values to bin")
	}
	edges, err := NiceEdges(s.Min(), s.Max(), bins)
	if err != nil {
		return Histogram{}, err
	}
	counts := stat.Histogram(nil, edges, s.sorted, nil)
	h := Histogram{Edges: edges, Counts: make([]int, len(counts))}
	for i, c := range counts {
		h.Counts[i] = int(c)
	}
	return h, nil
}

// NiceEdges returns ascending bin edges covering [lo, hi] with
// edges[0] ≤ lo and hi < edges[len−1], spaced by the round width
// (1, 2, 2.5 or 5 × 10^e) nearest above (hi − lo)/bins. Each edge is
// computed as an integer times the width's mantissa scaled by a power of
// ten, so edges are the nearest float64 to round decimals (0.3, not
// 0.30000000000000004). When lo = hi the single bin's width is a round
// tenth of |lo| (or 1 at 0).
func NiceEdges(lo, hi float64, bins int) ([]float64, error) {
	switch {
	case bins < 1 || bins > maxBins:
		return nil, fmt.Errorf("%d bins; ask for between 1 and %d", bins, maxBins)
	case math.IsNaN(lo) || math.IsNaN(hi) || math.IsInf(lo, 0) || math.IsInf(hi, 0):
		return nil, fmt.Errorf("the range %s to %s is not finite", formatFloat(lo), formatFloat(hi))
	case lo > hi:
		return nil, fmt.Errorf("the range %s to %s is reversed", formatFloat(lo), formatFloat(hi))
	}
	width := hi/float64(bins) - lo/float64(bins)
	if width == 0 {
		width = math.Abs(lo) / 10
		if width == 0 {
			width = 1
		}
	}
	mant, exp := roundWidth(width)
	edge := func(k float64) float64 { return scale10(k*mant, exp) }
	k0 := math.Floor(lo / scale10(mant, exp))
	if k0-1 == k0 || k0+1 == k0 {
		// The width is below the spacing of float64 near lo.
		return nil, fmt.Errorf("the range %s to %s is too narrow for its magnitude to bin", formatFloat(lo), formatFloat(hi))
	}
	for range 2 {
		if edge(k0) > lo {
			k0--
		}
	}
	edges := []float64{edge(k0)}
	for k := k0 + 1; ; k++ {
		e := edge(k)
		if math.IsInf(e, 0) || len(edges) > bins+2 || edges[0] > lo {
			return nil, fmt.Errorf("the range %s to %s cannot be binned in float64", formatFloat(lo), formatFloat(hi))
		}
		edges = append(edges, e)
		if e > hi {
			return edges, nil
		}
	}
}

// roundWidth returns the smallest round width ≥ w as mant × 10^exp with
// mant in {10, 20, 25, 50}.
func roundWidth(w float64) (mant float64, exp int) {
	exp = int(math.Floor(math.Log10(w))) - 1
	for {
		for _, m := range []float64{10, 20, 25, 50} {
			if scale10(m, exp) >= w {
				return m, exp
			}
		}
		exp++
	}
}

// scale10 returns x × 10^e, dividing for negative e so that a decimal such
// as 3 × 10⁻¹ comes out as the float64 nearest 0.3.
func scale10(x float64, e int) float64 {
	if e >= 0 {
		return x * math.Pow10(e)
	}
	return x / math.Pow10(-e)
}
