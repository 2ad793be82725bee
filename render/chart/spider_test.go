package chart

import (
	"io"
	"math"
	"strings"
	"testing"
)

func TestSpiderDrawsOneLinePerInput(t *testing.T) {
	for _, change := range []Change{PercentOfBase, PercentOfRange} {
		data := demoSpider()
		data.Change = change
		doc := checkCommon(t, func(w io.Writer, o Options) error { return WriteSpider(w, data, o) })
		// Each input is named once, in the legend, and drawn as a line of
		// its own pen through its 5 points.
		pens := map[string]bool{}
		for _, p := range doc.paths {
			if p.style["fill"] == "none" && p.points() == 5 {
				pens[p.strokeKey()] = true
			}
		}
		if len(pens) != len(data.Lines) {
			t.Errorf("%d distinct lines of 5 points, want %d: %v", len(pens), len(data.Lines), pens)
		}
		for _, l := range data.Lines {
			if doc.count(l.Label) != 1 {
				t.Errorf("%q written %d times, want once", l.Label, doc.count(l.Label))
			}
		}
		// Two switches on lines and one in the legend.
		if n := len(doc.filled(colour(accent))); n != 3 {
			t.Errorf("%d accent marks, want 3", n)
		}
		axis := map[Change]string{PercentOfBase: "(% of base)", PercentOfRange: "(% of its range)"}[change]
		if doc.count("Change in the input from its base value "+axis) != 1 {
			t.Errorf("axis label for %v missing: %q", change, doc.strings())
		}
	}
}

// Where a line's point sits along the horizontal axis, worked by hand.
func TestSpiderChange(t *testing.T) {
	l := SpiderLine{Base: 240_000, Low: 200_000, High: 300_000}
	for _, c := range []struct {
		change Change
		v      float64
		want   float64
	}{
		{PercentOfBase, 300_000, 0.25},     // 60,000 / 240,000
		{PercentOfBase, 200_000, -1.0 / 6}, // −40,000 / 240,000
		{PercentOfRange, 300_000, 0.6},     // 60,000 / 100,000
		{PercentOfRange, 200_000, -0.4},    // −40,000 / 100,000
	} {
		if got := (Spider{Change: c.change}).change(l, c.v); math.Abs(got-c.want) > 1e-12 {
			t.Errorf("change %v of %v: %v, want %v", c.change, c.v, got, c.want)
		}
	}
}

func TestSpiderRefusesBadData(t *testing.T) {
	pts := []Point{{1, 1}, {2, 2}}
	for _, c := range []struct {
		name string
		data Spider
		want string
	}{
		{"no lines", Spider{}, "no lines"},
		{"no label", Spider{Lines: []SpiderLine{{Base: 1, Points: pts}}}, "line 1 has no label"},
		{"one point", Spider{Lines: []SpiderLine{{Label: "a", Base: 1, Points: pts[:1]}}}, `line "a" has 1 points`},
		{"NaN point", Spider{Lines: []SpiderLine{{Label: "a", Base: 1, Points: []Point{{1, 1}, {math.NaN(), 2}}}}}, "not a pair of drawable numbers"},
		{"zero base", Spider{Lines: []SpiderLine{{Label: "a", Points: pts}}}, "base value of 0"},
		{"empty range", Spider{Change: PercentOfRange, Lines: []SpiderLine{{Label: "a", Low: 2, High: 2, Points: pts}}}, "needs high above low"},
		{"bad change", Spider{Change: 7, Lines: []SpiderLine{{Label: "a", Points: pts}}}, "unknown way"},
	} {
		t.Run(c.name, func(t *testing.T) {
			err := WriteSpider(io.Discard, c.data, Options{})
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %v, want one containing %q", err, c.want)
			}
		})
	}
}
