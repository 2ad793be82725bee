package chart

import (
	"cmp"
	"fmt"
	"io"
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Sweep is the data of a sweep chart: every option's value against one
// input over a grid, the best option's envelope emphasised, and the points
// where the best option changes marked by labelled guides.
type Sweep struct {
	// Title is the chart's heading; empty for none.
	Title string
	// Input is the horizontal axis: the input swept.
	Input Axis
	// Value is the vertical axis: the options' values.
	Value Axis
	// Minimise says the best option is the one of lowest value (objective
	// min); otherwise it is the highest.
	Minimise bool
	// X are the input's values, strictly ascending; at least two.
	X []float64
	// Options are the lines, one per option: Values[k] is the option's
	// value at X[k].
	Options []Curve
	// Switches are input values where the best option changes; each gets
	// a vertical guide with its label above the chart (the value itself
	// when Label is empty).
	Switches []Mark
}

// Curve is one line of values over a shared grid.
type Curve struct {
	// Label names the line (an option).
	Label string
	// Values are the line's values, one per grid point.
	Values []float64
}

// WriteSweep draws a sweep chart.
func WriteSweep(w io.Writer, s Sweep, opt Options) error {
	if err := s.check(); err != nil {
		return err
	}
	p := newPlot(s.Input, s.Value)
	ylo, yhi := math.Inf(1), math.Inf(-1)
	for _, o := range s.Options {
		for _, v := range o.Values {
			ylo, yhi = min(ylo, v), max(yhi, v)
		}
	}
	p.X.Min, p.X.Max = s.X[0], s.X[len(s.X)-1]
	p.Y.Min, p.Y.Max = padRange(ylo, yhi, 0.05)

	band := draw.LineStyle{Color: accentTint, Width: vg.Points(8)}
	ex, ey := envelope(s.X, s.Options, s.Minimise)
	p.Add(gridLines(true, true), &polyline{xs: ex, ys: ey, line: band})

	var legend []legendItem
	for i, o := range s.Options {
		st := series(i)
		p.Add(&polyline{xs: s.X, ys: o.Values, line: st.line, glyph: st.marker, marks: markerIndexes(len(s.X), i)})
		legend = append(legend, legendItem{o.Label, []plot.Thumbnailer{lineThumb{line: st.line, glyph: st.marker, marker: true}}})
	}
	legend = append(legend, legendItem{"Best option", []plot.Thumbnailer{lineThumb{line: band}}})

	fig := &figure{title: s.Title, legend: legend}
	pn := panel{plot: p}
	if len(s.Switches) > 0 {
		g := &guides{line: switchLine(), style: guideStyle()}
		for _, m := range s.Switches {
			g.items = append(g.items, guide{at: m.At, label: cmp.Or(m.Label, formatValue(m.At, s.Input.Percent))})
		}
		p.Add(g)
		pn.aware = append(pn.aware, g)
		fig.legend = append(fig.legend, legendItem{"Best option changes", []plot.Thumbnailer{lineThumb{line: switchLine()}}})
	}
	fig.panels = []panel{pn}
	return fig.write(w, opt, 560, 360)
}

// switchLine is the pen of a guide where the best option changes: the
// accent colour, dashed, so it differs from grid and reference lines in
// greyscale too.
func switchLine() draw.LineStyle {
	return draw.LineStyle{Color: accent, Width: vg.Points(1.2), Dashes: []vg.Length{vg.Points(4), vg.Points(2)}}
}

func (s Sweep) check() error {
	switch {
	case len(s.X) < 2:
		return fmt.Errorf("chart: sweep: %d input values; a sweep needs at least 2", len(s.X))
	case len(s.X) > MaxPoints:
		return fmt.Errorf("chart: sweep: %d input values, more than the limit of %d", len(s.X), MaxPoints)
	case len(s.Options) == 0:
		return fmt.Errorf("chart: sweep: no options to draw")
	case len(s.Options) > MaxSeries:
		return fmt.Errorf("chart: sweep: %d options, more than the limit of %d", len(s.Options), MaxSeries)
	case len(s.Switches) > MaxMarks:
		return fmt.Errorf("chart: sweep: %d switches, more than the limit of %d", len(s.Switches), MaxMarks)
	}
	if err := checkGrid("sweep", "input value", s.X); err != nil {
		return err
	}
	for i, o := range s.Options {
		switch {
		case o.Label == "":
			return fmt.Errorf("chart: sweep: option %d has no label", i+1)
		case len(o.Values) != len(s.X):
			return fmt.Errorf("chart: sweep: option %q has %d values for %d input values", o.Label, len(o.Values), len(s.X))
		case !drawable(o.Values...):
			return fmt.Errorf("chart: sweep: option %q has a value that is not a drawable number", o.Label)
		}
	}
	for _, m := range s.Switches {
		if !drawable(m.At) {
			return fmt.Errorf("chart: sweep: a switch at %v, not a drawable number", m.At)
		}
	}
	return nil
}

// checkGrid checks that grid values are finite and strictly ascending.
func checkGrid(chart, what string, xs []float64) error {
	for k, x := range xs {
		if !drawable(x) {
			return fmt.Errorf("chart: %s: %s %d is %v, not a drawable number", chart, what, k+1, x)
		}
		if k > 0 && !(x > xs[k-1]) {
			return fmt.Errorf("chart: %s: %s %d (%v) is not above the one before (%v); they must ascend", chart, what, k+1, x, xs[k-1])
		}
	}
	return nil
}

// envelope is the best of the options' lines at every point of the input:
// the grid points, and where the best line changes between two of them
// the exact crossing of the straight segments, so that the envelope does
// not cut a corner.
func envelope(xs []float64, opts []Curve, minimise bool) (ex, ey []float64) {
	sign := 1.0
	if minimise {
		sign = -1
	}
	val := func(i, k int) float64 { return sign * opts[i].Values[k] }
	for k := 0; k+1 < len(xs); k++ {
		// Within [xs[k], xs[k+1]] each option is a + b·t, t in [0, 1].
		// Walk the upper envelope of these lines from t = 0.
		cur := -1
		for i := range opts {
			if cur < 0 || val(i, k) > val(cur, k) ||
				(val(i, k) == val(cur, k) && val(i, k+1) > val(cur, k+1)) {
				cur = i
			}
		}
		t := 0.0
		for {
			ex = append(ex, xs[k]+t*(xs[k+1]-xs[k]))
			ey = append(ey, sign*(val(cur, k)+t*(val(cur, k+1)-val(cur, k))))
			// The next line to overtake: the earliest crossing, and of
			// lines crossing at the same point the steepest.
			next, nextT, nextS := -1, 1.0, 0.0
			sc := val(cur, k+1) - val(cur, k)
			for i := range opts {
				si := val(i, k+1) - val(i, k)
				if si <= sc {
					continue
				}
				// a_i + s_i·t = a_c + s_c·t
				ti := (val(cur, k) - val(i, k)) / (si - sc)
				if ti > t && (ti < nextT || (ti == nextT && si > nextS)) {
					next, nextT, nextS = i, ti, si
				}
			}
			if next < 0 {
				break
			}
			cur, t = next, nextT
		}
	}
	last := len(xs) - 1
	best := math.Inf(-1)
	for i := range opts {
		best = max(best, val(i, last))
	}
	return append(ex, xs[last]), append(ey, sign*best)
}
