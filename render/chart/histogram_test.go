package chart

import (
	"io"
	"math"
	"slices"
	"strings"
	"testing"
)

func TestBinned(t *testing.T) {
	s := Simulated{Bins: 3, Series: []SampleSet{
		{Label: "a", Samples: []float64{3, 1, 2, 2, 3, 3, 10}},
		{Label: "b", Bins: []Bin{{0, 1, 4}}},
	}}
	got := s.binned()
	// By hand: 3 bins from 1 to 10, each 3 wide: [1, 4) holds 1, 2, 2, 3,
	// 3, 3; [4, 7) none; [7, 10] holds 10. Given bins are kept as they are.
	want := [][]Bin{{{1, 4, 6}, {4, 7, 0}, {7, 10, 1}}, {{0, 1, 4}}}
	for i := range want {
		if !slices.Equal(got[i], want[i]) {
			t.Errorf("series %d: bins %v, want %v", i, got[i], want[i])
		}
	}
	// With no count asked for: 2·∛n for n = 1,000 is 20 bins.
	var many []float64
	for k := 0; k < 1000; k++ {
		many = append(many, float64(k))
	}
	if n := len((Simulated{Series: []SampleSet{{Label: "m", Samples: many}}}).binned()[0]); n != 20 {
		t.Errorf("%d bins for 1,000 samples, want 20", n)
	}
}

func TestCumulative(t *testing.T) {
	// Exact steps: sorted 1, 2, 2, 3 climb by 1/4, 2/4, 1/4.
	xs, ys := cumulative(SampleSet{Samples: []float64{3, 1, 2, 2}})
	if wx, wy := []float64{1, 1, 2, 2, 3, 3}, []float64{0, 0.25, 0.25, 0.75, 0.75, 1}; !slices.Equal(xs, wx) || !slices.Equal(ys, wy) {
		t.Errorf("steps (%v, %v), want (%v, %v)", xs, ys, wx, wy)
	}
	// From bins: the counts joined at the bins' upper ends, level across a
	// gap between bins.
	xs, ys = cumulative(SampleSet{Bins: []Bin{{0, 1, 1}, {1, 2, 2}, {3, 4, 1}}})
	if wx, wy := []float64{0, 1, 2, 3, 4}, []float64{0, 0.25, 0.75, 0.75, 1}; !slices.Equal(xs, wx) || !slices.Equal(ys, wy) {
		t.Errorf("joined (%v, %v), want (%v, %v)", xs, ys, wx, wy)
	}
	// Many samples: 501 quantiles. The one at 80% is the smallest sample
	// whose cumulative share reaches 0.8 (the percentile forkcast reports
	// everywhere; common practice): for 0 .. 9,999 that is 7,999.
	var v []float64
	for k := 9999; k >= 0; k-- {
		v = append(v, float64(k))
	}
	xs, ys = cumulative(SampleSet{Samples: v})
	if len(xs) != 501 || xs[400] != 7999 || ys[400] != 0.8 || xs[500] != 9999 || ys[500] != 1 || xs[0] != 0 {
		t.Errorf("quantile line: %d points, at 80%% (%v, %v), last (%v, %v)", len(xs), xs[400], ys[400], xs[500], ys[500])
	}
	if !slices.IsSorted(xs) || !slices.IsSorted(ys) {
		t.Errorf("the quantile line goes back")
	}
}

func TestHistogramDrawsOnePanelPerSeries(t *testing.T) {
	data := Simulated{
		Value: Axis{Label: "Total cost (EUR)"}, Bins: 3,
		Markers: []Mark{{At: 8, Label: "Budget 8"}},
		Series: []SampleSet{
			{Label: "Before", Samples: []float64{3, 1, 2, 2, 3, 3, 10}, Markers: []Mark{{At: 4, Label: "Mean 4"}}},
			{Label: "After", Bins: []Bin{{1, 2, 1}, {2, 3, 3}}},
		},
	}
	doc := checkCommon(t, func(w io.Writer, o Options) error { return WriteHistogram(w, data, o) })
	for _, s := range []string{"Before", "After", "Mean 4", "Total cost (EUR)"} {
		if doc.count(s) != 1 {
			t.Errorf("%q written %d times, want once", s, doc.count(s))
		}
	}
	if doc.count("Budget 8") != 2 {
		t.Errorf("the shared marker is labelled %d times, want once per panel", doc.count("Budget 8"))
	}
	// Bars: each series' outline is one path, a subpath per non-empty bin:
	// 2 for Before (6 and 1 of 7), 2 for After (1 and 3 of 4). The tallest
	// bars are 6/7 and 3/4 of a run; panels share one scale.
	var outlines []svgPath
	for _, p := range doc.paths {
		if p.style["fill"] == "none" && p.style["stroke"] == colour(ink) && p.style["stroke-width"] == "0.6" {
			outlines = append(outlines, p)
		}
	}
	if len(outlines) != 2 {
		t.Fatalf("%d bar outlines, want 2", len(outlines))
	}
	for i, p := range outlines {
		if n := strings.Count(p.d, "M"); n != 2 {
			t.Errorf("panel %d: %d bars, want 2", i+1, n)
		}
	}
	_, b0, _, t0 := outlines[0].bounds()
	_, b1, _, t1 := outlines[1].bounds()
	if r := (t1 - b1) / (t0 - b0); math.Abs(r-(3.0/4)/(6.0/7)) > 0.01 {
		t.Errorf("tallest bars in ratio %.4f, want %.4f", r, (3.0/4)/(6.0/7))
	}
}

func TestCumulativeDrawsOneLinePerSeries(t *testing.T) {
	data := demoSimulated(5000)
	doc := checkCommon(t, func(w io.Writer, o Options) error { return WriteCumulative(w, data, o) })
	pens := map[string]bool{}
	for _, p := range doc.paths {
		if p.style["fill"] == "none" && p.points() == 501 {
			pens[p.strokeKey()] = true
		}
	}
	if len(pens) != len(data.Series) {
		t.Errorf("%d distinct lines of 501 points, want %d", len(pens), len(data.Series))
	}
	for _, s := range []string{"Before responses", "After responses", "Budget 150,000", "Mean 75,300", "P80 82,000"} {
		if doc.count(s) != 1 {
			t.Errorf("%q written %d times, want once", s, doc.count(s))
		}
	}
}

func TestSimulatedRefusesBadData(t *testing.T) {
	for _, c := range []struct {
		name string
		data Simulated
		want string
	}{
		{"none", Simulated{}, "no series"},
		{"no label", Simulated{Series: []SampleSet{{Samples: []float64{1}}}}, "series 1 has no label"},
		{"empty", Simulated{Series: []SampleSet{{Label: "a"}}}, "neither samples nor bins"},
		{"both", Simulated{Series: []SampleSet{{Label: "a", Samples: []float64{1}, Bins: []Bin{{0, 1, 1}}}}}, "both samples and bins"},
		{"NaN", Simulated{Series: []SampleSet{{Label: "a", Samples: []float64{1, math.Inf(1)}}}}, "not a drawable number"},
		{"bin ends", Simulated{Series: []SampleSet{{Label: "a", Bins: []Bin{{2, 1, 1}}}}}, "bin 1 runs from 2 to 1"},
		{"overlap", Simulated{Series: []SampleSet{{Label: "a", Bins: []Bin{{0, 2, 1}, {1, 3, 1}}}}}, "bin 2 starts at 1, before bin 1 ends (2)"},
		{"count", Simulated{Series: []SampleSet{{Label: "a", Bins: []Bin{{0, 1, -1}}}}}, "count of -1"},
		{"all empty", Simulated{Series: []SampleSet{{Label: "a", Bins: []Bin{{0, 1, 0}}}}}, "every bin is empty"},
		{"bins", Simulated{Bins: -1, Series: []SampleSet{{Label: "a", Samples: []float64{1}}}}, "-1 bins"},
		{"marker", Simulated{Markers: []Mark{{At: nan()}}, Series: []SampleSet{{Label: "a", Samples: []float64{1}}}}, "marker at NaN"},
	} {
		t.Run(c.name, func(t *testing.T) {
			for _, f := range []func(io.Writer, Simulated, Options) error{WriteHistogram, WriteCumulative} {
				err := f(io.Discard, c.data, Options{})
				if err == nil || !strings.Contains(err.Error(), c.want) {
					t.Errorf("error %v, want one containing %q", err, c.want)
				}
			}
		})
	}
}

// One value repeated: the histogram still has a width to draw.
func TestHistogramOfOneValue(t *testing.T) {
	data := Simulated{Series: []SampleSet{{Label: "flat", Samples: []float64{5, 5, 5}}}}
	doc := parseSVG(t, drawn(t, func(w io.Writer, o Options) error { return WriteHistogram(w, data, o) }, Options{}))
	if doc.count("flat") != 1 {
		t.Errorf("heading missing: %q", doc.strings())
	}
}
