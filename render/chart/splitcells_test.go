package chart

import (
	"math"
	"testing"
)

// area is the area of a polygon (shoelace formula).
func area(ring []Point) float64 {
	a := 0.0
	for i, p := range ring {
		q := ring[(i+1)%len(ring)]
		a += p.X*q.Y - q.X*p.Y
	}
	return math.Abs(a) / 2
}

// The pieces each option fills add up to its region, worked by hand.
func TestSplitCellsAreas(t *testing.T) {
	for _, c := range []struct {
		name string
		m    splitCells
		want []float64
	}{
		{
			// Option 1 where x + y > 2.5 on [0, 2]²: the triangle with
			// legs 1.5 has area 1.125, option 0 the rest, 2.875.
			name: "a straight boundary across cells",
			m: splitCells{xs: []float64{0, 1, 2}, ys: []float64{0, 1, 2}, options: 2,
				best:       [][]int{{0, 0, 0}, {0, 0, 1}, {0, 1, 1}},
				boundaries: []Segment{{Point{0.5, 2}, Point{2, 0.5}}}},
			want: []float64{2.875, 1.125},
		},
		{
			// One cell [0, 2]², three options meeting at (1, 1): A bottom
			// left, B bottom right, C along the top. A and B are 1 × 1
			// squares, C the top half (2).
			name: "three options meeting inside a cell",
			m: splitCells{xs: []float64{0, 2}, ys: []float64{0, 2}, options: 3,
				best:       [][]int{{0, 1}, {2, 2}},
				boundaries: []Segment{{Point{1, 1}, Point{1, 0}}, {Point{1, 1}, Point{2, 1}}, {Point{1, 1}, Point{0, 1}}}},
			want: []float64{1, 1, 2},
		},
		{
			// A blank corner: a quarter of the cell per corner, none for
			// the blank one.
			name: "a cell with a blank corner",
			m: splitCells{xs: []float64{0, 2}, ys: []float64{0, 2}, options: 2,
				best:       [][]int{{0, 0}, {1, -1}},
				boundaries: []Segment{{Point{0, 1.5}, Point{1, 1.5}}}},
			want: []float64{2, 1},
		},
	} {
		got := make([]float64, c.m.options)
		for k, ps := range c.m.pieces() {
			for _, ring := range ps {
				got[k] += area(ring)
			}
		}
		for k := range c.want {
			if math.Abs(got[k]-c.want[k]) > 1e-12 {
				t.Errorf("%s: option %d fills %v, want %v", c.name, k, got[k], c.want[k])
			}
		}
	}
}
