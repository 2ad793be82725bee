package chart

import (
	"io"
	"math"
	"slices"
	"strings"
	"testing"
)

func TestTornadoDrawsOneBarPerItemWidestOnTop(t *testing.T) {
	data := demoTornado()
	doc := checkCommon(t, func(w io.Writer, o Options) error { return WriteTornado(w, data, o) })

	// Swings of the demo data, worked by hand: licence |352,000 − 446,000|
	// = 94,000; lease rate |470,000 − 402,500| = 67,500; development
	// |371,000 − 430,000| = 59,000; slip |383,000 − 438,000| = 55,000;
	// rework |409,000 − 395,000| = 14,000.
	want := []string{"Licence fee", "Lease rate per depot", "Development cost", "Chance of a slip", "Rework payoff"}
	var labels []string
	for _, b := range data.Bars {
		labels = append(labels, b.Label)
		if n := doc.count(b.Label); n != 1 {
			t.Errorf("label %q written %d times, want once", b.Label, n)
		}
		for _, s := range []string{b.StartLabel, b.EndLabel} {
			if doc.count(s) < 1 {
				t.Errorf("end label %q of %q not written", s, b.Label)
			}
		}
	}
	if got := sortedBy(t, doc, labels); !slices.Equal(got, want) {
		t.Errorf("labels top to bottom: %q, want %q", got, want)
	}

	// The bars themselves: paths in the two bar tones left of the legend,
	// grouped by row. One row per item, and the rows' widths, top to
	// bottom, must not grow.
	legendX := doc.text(t, "Input at its low value").x
	rows := map[float64]float64{} // centre y (up is larger) → total width
	for _, tone := range []string{colour(startTone), colour(endTone)} {
		for _, p := range doc.filled(tone) {
			x0, y0, x1, y1 := p.bounds()
			if x1 > legendX-float64(legendThumb)-1 {
				continue // a legend swatch
			}
			rows[math.Round((y0+y1)/2*10)/10] += x1 - x0
		}
	}
	if len(rows) != len(data.Bars) {
		t.Fatalf("%d rows of bars drawn, want %d", len(rows), len(data.Bars))
	}
	var ys []float64
	for y := range rows {
		ys = append(ys, y)
	}
	slices.Sort(ys)
	slices.Reverse(ys)
	for i := 1; i < len(ys); i++ {
		if rows[ys[i]] > rows[ys[i-1]]+1e-6 {
			t.Errorf("row %d is wider (%.2f) than the row above it (%.2f)", i+1, rows[ys[i]], rows[ys[i-1]])
		}
	}
	// Widths are proportional to the swings: the top bar is 94,000 wide and
	// the bottom one 14,000.
	if r := rows[ys[0]] / rows[ys[len(ys)-1]]; math.Abs(r-94.0/14) > 0.02 {
		t.Errorf("top/bottom bar widths %.3f, want %.3f", r, 94.0/14)
	}

	// Two switch marks on the bars and one in the legend, each its own
	// accent diamond; their labels are written.
	if n := len(doc.filled(colour(accent))); n != 3 {
		t.Errorf("%d accent marks, want 3 (2 on bars, 1 in the legend)", n)
	}
	for _, s := range []string{"Buy ↔ Build", "Buy → Lease", "Base 402,500", "Best option changes"} {
		if doc.count(s) != 1 {
			t.Errorf("%q written %d times, want once", s, doc.count(s))
		}
	}
}

func TestTornadoKeepOrder(t *testing.T) {
	data := demoTornado()
	data.KeepOrder = true
	doc := parseSVG(t, drawn(t, func(w io.Writer, o Options) error { return WriteTornado(w, data, o) }, Options{}))
	var labels []string
	for _, b := range data.Bars {
		labels = append(labels, b.Label)
	}
	if got := sortedBy(t, doc, labels); !slices.Equal(got, labels) {
		t.Errorf("labels top to bottom: %q, want the order given %q", got, labels)
	}
}

// A risk ranking: bars from 0 to each risk's contribution, one tone only;
// the legend shows only the tone drawn, under the caller's name.
func TestTornadoRanking(t *testing.T) {
	data := Tornado{
		Value:   Axis{Label: "Drop in P80 when removed (EUR)"},
		EndName: "Contribution to P80",
		Bars: []Bar{
			{Label: "R1 Late permits", End: 12_000},
			{Label: "R2 Crane failure", End: 31_000},
			{Label: "R3 Steel price", End: 8_500},
		},
	}
	doc := parseSVG(t, drawn(t, func(w io.Writer, o Options) error { return WriteTornado(w, data, o) }, Options{}))
	if got, want := sortedBy(t, doc, []string{"R1 Late permits", "R2 Crane failure", "R3 Steel price"}),
		[]string{"R2 Crane failure", "R1 Late permits", "R3 Steel price"}; !slices.Equal(got, want) {
		t.Errorf("order %q, want %q", got, want)
	}
	if doc.count("Contribution to P80") != 1 || doc.count("Input at its low value") != 0 {
		t.Errorf("legend: %q", doc.strings())
	}
}

func TestTornadoRefusesBadData(t *testing.T) {
	ok := Bar{Label: "a", Start: 1, End: 2}
	for _, c := range []struct {
		name string
		data Tornado
		want string
	}{
		{"no bars", Tornado{}, "no bars"},
		{"no label", Tornado{Bars: []Bar{ok, {Start: 1, End: 2}}}, "bar 2 has no label"},
		{"NaN end", Tornado{Bars: []Bar{{Label: "x", Start: math.NaN()}}}, `bar "x" has an end that is not a drawable number`},
		{"beyond any page", Tornado{Bars: []Bar{{Label: "y", End: 1e301}}}, `bar "y" has an end that is not a drawable number`},
		{"infinite base", Tornado{Base: math.Inf(1), Bars: []Bar{ok}}, "base value is +Inf"},
		{"bad mark", Tornado{Bars: []Bar{{Label: "m", Marks: []Mark{{At: math.Inf(-1)}}}}}, `bar "m" has a mark at -Inf`},
		{"too many", Tornado{Bars: make([]Bar, MaxBars+1)}, "more than the limit"},
	} {
		t.Run(c.name, func(t *testing.T) {
			err := WriteTornado(io.Discard, c.data, Options{})
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %v, want one containing %q", err, c.want)
			}
		})
	}
}

// A switch mark at a bar's end pushes that end's label out past the mark
// (it would sit on it); a mark inside the bar leaves the label where it
// is. The bar: 100 at its start, 200 at its end, around a base of 150.
func TestTornadoLabelClearsMarkAtEnd(t *testing.T) {
	// gap is how far the low end's label starts left of the bar's pale
	// part (the label is the same width in both charts).
	gap := func(markAt float64) float64 {
		data := Tornado{Value: Axis{Label: "Value"}, Base: 150, Bars: []Bar{
			{Label: "x", Start: 100, End: 200, StartLabel: "low end", EndLabel: "high end", Marks: []Mark{{At: markAt}}},
		}}
		doc := parseSVG(t, drawn(t, func(w io.Writer, o Options) error { return WriteTornado(w, data, o) }, Options{}))
		legendX := doc.text(t, "Input at its low value").x
		barX := math.Inf(1)
		for _, p := range doc.filled(colour(startTone)) {
			if x0, _, _, _ := p.bounds(); x0 < legendX-float64(legendThumb)-1 {
				barX = math.Min(barX, x0)
			}
		}
		return barX - doc.text(t, "low end").x
	}
	inside, atEnd := gap(130), gap(100)
	// The mark is 4.2 points either way of its centre; the label moves
	// out by at least that.
	if atEnd < inside+4 {
		t.Errorf("the low end's label starts %.1f left of the bar with a mark at the end, %.1f with the mark inside the bar: want it moved out past the mark", atEnd, inside)
	}
}
