package chart

import (
	"cmp"
	"fmt"
	"io"
	"math"
	"slices"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Simulated is the data of the charts of simulated values: for each
// series (an option, or a register's total), its values as drawn, or
// already counted into bins. WriteHistogram draws their histograms,
// WriteCumulative their cumulative distributions.
type Simulated struct {
	// Title is the chart's heading; empty for none.
	Title string
	// Value is the horizontal axis: what was simulated.
	Value Axis
	// Series are the simulated quantities, drawn in this order.
	Series []SampleSet
	// Markers are vertical lines shared by every series, labelled above
	// the chart: a budget, a threshold.
	Markers []Mark
	// Bins is the number of equal bins the histogram of samples has;
	// zero picks 2·∛n (at least 8, at most 60) for the largest series.
	// All series given as samples share the same bins.
	Bins int
}

// SampleSet is one simulated quantity: either its samples or its counts
// in bins.
type SampleSet struct {
	// Label names the series.
	Label string
	// Samples are the simulated values, in any order (ascending is
	// cheapest).
	Samples []float64
	// Bins are counts already made, used when Samples is empty: ascending,
	// not overlapping.
	Bins []Bin
	// Markers are this series' own vertical lines: its mean, a percentile.
	Markers []Mark
}

// Bin is a count of values from Low up to High.
type Bin struct {
	Low, High float64
	Count     int
}

// Limits of simulated data.
const (
	// MaxSamples is the most samples of one series.
	MaxSamples = 50_000_000
	// MaxBins is the most bins of one histogram.
	MaxBins = 10_000
)

// WriteHistogram draws the histogram of each series, in panels one above
// the other on a shared scale, the height of a bar being the share of the
// series' runs in it. Markers are labelled above the panel they belong to
// (shared ones above every panel).
func WriteHistogram(w io.Writer, s Simulated, opt Options) error {
	if err := s.check(); err != nil {
		return err
	}
	binned := s.binned()
	lo, hi := math.Inf(1), math.Inf(-1)
	top := 0.0
	for i, bins := range binned {
		total := 0
		for _, b := range bins {
			total += b.Count
			lo, hi = min(lo, b.Low), max(hi, b.High)
		}
		for _, b := range bins {
			top = max(top, float64(b.Count)/float64(total))
		}
		for _, m := range s.Series[i].Markers {
			lo, hi = min(lo, m.At), max(hi, m.At)
		}
	}
	for _, m := range s.Markers {
		lo, hi = min(lo, m.At), max(hi, m.At)
	}
	xlo, xhi := padRange(lo, hi, 0.03)
	fig := &figure{title: s.Title}
	for i, bins := range binned {
		ax := s.Value
		last := i == len(binned)-1
		if !last {
			ax.Label = ""
		}
		p := newPlot(ax, Axis{Label: "Share of runs", Percent: true})
		p.X.Min, p.X.Max = xlo, xhi
		p.Y.Min, p.Y.Max = 0, top*1.08
		p.Y.Padding = 0
		p.Add(gridLines(false, true), &histBars{bins: bins, fill: fills(i)})
		heading := s.Series[i].Label
		if len(binned) == 1 && s.Title != "" {
			heading = "" // the title says it
		}
		pn := panel{heading: heading, plot: p}
		if last {
			pn.extra = p.X.Label.TextStyle.Height(ax.Label) + p.X.Label.Padding
		}
		if g := referenceGuides(append(slices.Clone(s.Markers), s.Series[i].Markers...), s.Value.Percent); g != nil {
			p.Add(g)
			pn.aware = append(pn.aware, g)
		}
		fig.panels = append(fig.panels, pn)
	}
	return fig.write(w, opt, 560, 90+170*float64(len(binned)))
}

// WriteCumulative draws the cumulative distribution of each series on one
// chart: the share of runs at or below each value. From samples it is the
// empirical distribution (exact steps up to 1,000 samples, else 501 of its
// quantiles joined); from bins it joins the counts at the bins' upper
// ends. Every marker is drawn and labelled above the chart; a series' own
// markers in a thin version of its line's pen.
func WriteCumulative(w io.Writer, s Simulated, opt Options) error {
	if err := s.check(); err != nil {
		return err
	}
	p := newPlot(s.Value, Axis{Label: "Share of runs at or below this value", Percent: true})
	p.Y.Min, p.Y.Max = 0, 1
	p.Y.Padding = vg.Points(6)
	p.Add(gridLines(true, true))
	lo, hi := math.Inf(1), math.Inf(-1)
	var markers []guide
	for _, m := range s.Markers {
		markers = append(markers, guide{at: m.At, label: cmp.Or(m.Label, formatValue(m.At, s.Value.Percent))})
	}
	var legend []legendItem
	for i, set := range s.Series {
		xs, ys := cumulative(set)
		lo, hi = min(lo, xs[0]), max(hi, xs[len(xs)-1])
		st := series(i)
		p.Add(&polyline{xs: xs, ys: ys, line: st.line, glyph: st.marker, marks: markerIndexes(len(xs), i)})
		legend = append(legend, legendItem{set.Label, []plot.Thumbnailer{lineThumb{line: st.line, glyph: st.marker, marker: true}}})
		// A series' own markers are drawn in a thin version of its pen,
		// so that each reads as belonging to its line.
		pen := st.line
		pen.Width = vg.Points(0.9)
		for _, m := range set.Markers {
			markers = append(markers, guide{at: m.At, label: cmp.Or(m.Label, formatValue(m.At, s.Value.Percent)), line: pen})
		}
	}
	for _, m := range markers {
		lo, hi = min(lo, m.at), max(hi, m.at)
	}
	p.X.Min, p.X.Max = padRange(lo, hi, 0.03)
	pn := panel{plot: p}
	if len(markers) > 0 {
		g := &guides{items: markers, line: referenceLine(), style: guideStyle()}
		p.Add(g)
		pn.aware = append(pn.aware, g)
	}
	fig := &figure{title: s.Title, panels: []panel{pn}, legend: legend}
	return fig.write(w, opt, 560, 360)
}

// cumulative is the line of a series' cumulative distribution.
func cumulative(set SampleSet) (xs, ys []float64) {
	if len(set.Samples) == 0 {
		total := 0
		for _, b := range set.Bins {
			total += b.Count
		}
		xs, ys = []float64{set.Bins[0].Low}, []float64{0}
		cum := 0
		for _, b := range set.Bins {
			cum += b.Count
			if b.Low > xs[len(xs)-1] {
				// A gap between bins holds nothing: the line stays level.
				xs, ys = append(xs, b.Low), append(ys, ys[len(ys)-1])
			}
			xs, ys = append(xs, b.High), append(ys, float64(cum)/float64(total))
		}
		return xs, ys
	}
	v := set.Samples
	if !slices.IsSorted(v) {
		v = slices.Clone(v)
		slices.Sort(v)
	}
	n := len(v)
	if n <= 1000 {
		for i := 0; i < n; i++ {
			if i+1 < n && v[i+1] == v[i] {
				continue // a run of equal values is one step
			}
			prev := 0.0
			if len(ys) > 0 {
				prev = ys[len(ys)-1]
			}
			xs = append(xs, v[i], v[i])
			ys = append(ys, prev, float64(i+1)/float64(n))
		}
		return xs, ys
	}
	const m = 500
	for j := 0; j <= m; j++ {
		// The smallest sample whose cumulative share reaches j/m.
		k := max(int(math.Ceil(float64(j)*float64(n)/m))-1, 0)
		xs = append(xs, v[k])
		ys = append(ys, float64(k+1)/float64(n))
	}
	return xs, ys
}

// binned is each series' bins: given ones as they are, samples counted
// into bins shared by every series given as samples.
func (s Simulated) binned() [][]Bin {
	lo, hi, most := math.Inf(1), math.Inf(-1), 0
	for _, set := range s.Series {
		for _, v := range set.Samples {
			lo, hi = min(lo, v), max(hi, v)
		}
		most = max(most, len(set.Samples))
	}
	k := s.Bins
	if k == 0 {
		k = min(max(int(math.Ceil(2*math.Cbrt(float64(most)))), 8), 60)
	}
	if lo == hi {
		lo, hi = padRange(lo, hi, 0)
	}
	out := make([][]Bin, len(s.Series))
	for i, set := range s.Series {
		if len(set.Samples) == 0 {
			out[i] = set.Bins
			continue
		}
		bins := make([]Bin, k)
		width := (hi - lo) / float64(k)
		for j := range bins {
			bins[j].Low, bins[j].High = lo+float64(j)*width, lo+float64(j+1)*width
		}
		bins[k-1].High = hi
		for _, v := range set.Samples {
			j := min(int((v-lo)/width), k-1)
			bins[j].Count++
		}
		out[i] = bins
	}
	return out
}

func (s Simulated) check() error {
	switch {
	case len(s.Series) == 0:
		return fmt.Errorf("chart: simulation: no series to draw")
	case len(s.Series) > MaxSeries:
		return fmt.Errorf("chart: simulation: %d series, more than the limit of %d", len(s.Series), MaxSeries)
	case s.Bins < 0 || s.Bins > MaxBins:
		return fmt.Errorf("chart: simulation: %d bins; ask for 1 to %d, or 0 to let the chart choose", s.Bins, MaxBins)
	}
	markers := len(s.Markers)
	for _, m := range s.Markers {
		if !drawable(m.At) {
			return fmt.Errorf("chart: simulation: a marker at %v, not a drawable number", m.At)
		}
	}
	for i, set := range s.Series {
		name := fmt.Sprintf("series %q", set.Label)
		switch {
		case set.Label == "":
			return fmt.Errorf("chart: simulation: series %d has no label", i+1)
		case len(set.Samples) > MaxSamples:
			return fmt.Errorf("chart: simulation: %s has %d samples, more than the limit of %d", name, len(set.Samples), MaxSamples)
		case len(set.Samples) == 0 && len(set.Bins) == 0:
			return fmt.Errorf("chart: simulation: %s has neither samples nor bins", name)
		case len(set.Samples) > 0 && len(set.Bins) > 0:
			return fmt.Errorf("chart: simulation: %s has both samples and bins; give one", name)
		case len(set.Bins) > MaxBins:
			return fmt.Errorf("chart: simulation: %s has %d bins, more than the limit of %d", name, len(set.Bins), MaxBins)
		case !drawable(set.Samples...):
			return fmt.Errorf("chart: simulation: %s has a sample that is not a drawable number", name)
		}
		total := 0
		for j, b := range set.Bins {
			switch {
			case !drawable(b.Low, b.High) || !(b.High > b.Low):
				return fmt.Errorf("chart: simulation: %s: bin %d runs from %v to %v; a bin needs drawable ends, low below high", name, j+1, b.Low, b.High)
			case j > 0 && b.Low < set.Bins[j-1].High:
				return fmt.Errorf("chart: simulation: %s: bin %d starts at %v, before bin %d ends (%v); bins must ascend without overlapping", name, j+1, b.Low, j, set.Bins[j-1].High)
			case b.Count < 0:
				return fmt.Errorf("chart: simulation: %s: bin %d has a count of %d", name, j+1, b.Count)
			case total > math.MaxInt-b.Count:
				return fmt.Errorf("chart: simulation: %s: the counts overflow", name)
			}
			total += b.Count
		}
		if len(set.Bins) > 0 && total == 0 {
			return fmt.Errorf("chart: simulation: %s: every bin is empty", name)
		}
		for _, m := range set.Markers {
			if !drawable(m.At) {
				return fmt.Errorf("chart: simulation: %s has a marker at %v, not a drawable number", name, m.At)
			}
		}
		markers += len(set.Markers)
	}
	if markers > MaxMarks {
		return fmt.Errorf("chart: simulation: %d markers, more than the limit of %d", markers, MaxMarks)
	}
	return nil
}

// histBars draws a histogram: one outlined bar per non-empty bin, its
// height the bin's share of the count.
type histBars struct {
	bins []Bin
	fill fillStyle
}

// Plot implements plot.Plotter.
func (h *histBars) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	total := 0
	for _, b := range h.bins {
		total += b.Count
	}
	var rects []vg.Rectangle
	for _, b := range h.bins {
		if b.Count == 0 {
			continue
		}
		rects = append(rects, vg.Rectangle{
			Min: vg.Point{X: trX(b.Low), Y: trY(0)},
			Max: vg.Point{X: trX(b.High), Y: trY(float64(b.Count) / float64(total))},
		})
	}
	fillRects(&c, h.fill, rects)
	var outline vg.Path
	for _, r := range rects {
		outline.Move(r.Min)
		outline.Line(vg.Point{X: r.Min.X, Y: r.Max.Y})
		outline.Line(r.Max)
		outline.Line(vg.Point{X: r.Max.X, Y: r.Min.Y})
	}
	if len(outline) > 0 {
		c.SetLineStyle(draw.LineStyle{Color: ink, Width: vg.Points(0.6)})
		c.Stroke(outline)
	}
}
