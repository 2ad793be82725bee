package chart

import (
	"io"
	"slices"
	"strings"
	"testing"
)

func TestStrategyMapLabelsEveryRegion(t *testing.T) {
	data := demoMap(31, 21)
	doc := checkCommon(t, func(w io.Writer, o Options) error { return WriteStrategyMap(w, data, o) })
	// Three regions, one per option: each name once in its region and once
	// in the legend.
	for _, name := range data.Options {
		if n := doc.count(name); n != 2 {
			t.Errorf("%q written %d times, want 2 (region and legend)", name, n)
		}
	}
	// The three exact boundaries and the legend's sample, in the boundary pen.
	n := 0
	for _, p := range doc.paths {
		if p.style["stroke"] == colour(ink) && p.style["stroke-width"] == "1.4" {
			n++
		}
	}
	if n != 4 {
		t.Errorf("%d boundary paths, want 4 (3 boundaries, 1 legend sample)", n)
	}
	// Each label sits in a cell of its own option: the demo's regions are
	// build (upper left), buy (bottom) and lease (upper right).
	build, buy, lease := doc.last(t, "Build in house"), doc.last(t, "Buy a licence"), doc.last(t, "Lease per depot")
	if !(build.x < lease.x && buy.y > build.y && buy.y > lease.y) {
		t.Errorf("labels misplaced: build (%v, %v), buy (%v, %v), lease (%v, %v)", build.x, build.y, buy.x, buy.y, lease.x, lease.y)
	}
}

// An option with two separate regions is labelled twice.
func TestStrategyMapDisconnectedRegions(t *testing.T) {
	data := StrategyMap{
		X: Axis{Label: "First input"}, Y: Axis{Label: "Second input"},
		XValues: []float64{0, 1, 2, 3}, YValues: []float64{0, 1, 2},
		Options: []string{"Alpha", "Beta"},
		Best:    [][]int{{0, 1, 1, 0}, {0, 1, 1, 0}, {0, 1, -1, 0}},
	}
	doc := checkCommon(t, func(w io.Writer, o Options) error { return WriteStrategyMap(w, data, o) })
	if a, b := doc.count("Alpha"), doc.count("Beta"); a != 3 || b != 2 {
		t.Errorf("Alpha written %d times (want 2 regions + legend), Beta %d (want 1 region + legend)", a, b)
	}
	if doc.count("No single best option") != 1 {
		t.Errorf("the cell with no best option is not in the legend: %q", doc.strings())
	}
}

func TestRegions(t *testing.T) {
	best := [][]int{
		{0, 0, 1, 1},
		{2, 0, 1, 0},
		{2, 2, -1, 0},
	}
	type summary struct{ option, cells int }
	var got []summary
	for _, r := range regions(best) {
		got = append(got, summary{r.option, len(r.cells)})
	}
	// By hand: 0 at (0,0),(1,0),(1,1) joined; 1 at (2,0),(3,0),(2,1); 2 at
	// (0,1),(0,2),(1,2); 0 at (3,1),(3,2) apart from the first 0.
	want := []summary{{0, 3}, {1, 3}, {2, 3}, {0, 2}}
	if !slices.Equal(got, want) {
		t.Errorf("regions %v, want %v", got, want)
	}
}

func TestCellEdges(t *testing.T) {
	if got, want := cellEdges([]float64{0, 1, 3}), []float64{0, 0.5, 2, 3}; !slices.Equal(got, want) {
		t.Errorf("cellEdges = %v, want %v", got, want)
	}
}

func TestStrategyMapRefusesBadData(t *testing.T) {
	good := func() StrategyMap {
		return StrategyMap{XValues: []float64{0, 1}, YValues: []float64{0, 1}, Options: []string{"a", "b"}, Best: [][]int{{0, 1}, {1, 0}}}
	}
	for _, c := range []struct {
		name   string
		change func(*StrategyMap)
		want   string
	}{
		{"small grid", func(m *StrategyMap) { m.XValues = m.XValues[:1] }, "a grid of 1 × 2 values"},
		{"no options", func(m *StrategyMap) { m.Options = nil }, "no options"},
		{"rows", func(m *StrategyMap) { m.Best = m.Best[:1] }, "1 rows of best options for 2 values"},
		{"cells", func(m *StrategyMap) { m.Best[1] = []int{0} }, "row 2 has 1 cells for 2 values"},
		{"index", func(m *StrategyMap) { m.Best[0][1] = 2 }, "cell (2, 1) names option 2; options are 0 to 1, or -1 for none"},
		{"negative", func(m *StrategyMap) { m.Best[0][0] = -2 }, "names option -2"},
		{"descending", func(m *StrategyMap) { m.YValues = []float64{1, 0} }, "vertical input value 2 (0) is not above"},
		{"no name", func(m *StrategyMap) { m.Options[1] = "" }, "option 2 has no name"},
		{"boundary", func(m *StrategyMap) { m.Boundaries = []Segment{{To: Point{X: nan()}}} }, "not made of drawable numbers"},
	} {
		t.Run(c.name, func(t *testing.T) {
			m := good()
			c.change(&m)
			err := WriteStrategyMap(io.Discard, m, Options{})
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %v, want one containing %q", err, c.want)
			}
		})
	}
}
