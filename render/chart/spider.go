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

// Spider is the data of a spider diagram: the output against each input's
// change from its base value, one line per input, all lines meeting at the
// base case.
type Spider struct {
	// Title is the chart's heading; empty for none.
	Title string
	// Value is the vertical axis: the output.
	Value Axis
	// Base is the output with every input at its base value; a light
	// line across the chart marks it.
	Base float64
	// Change says how the horizontal axis measures an input's change.
	Change Change
	// Lines are the inputs, drawn and listed in this order.
	Lines []SpiderLine
}

// Change is how a spider diagram measures an input's change from base.
type Change int

const (
	// PercentOfBase is (value − base) / |base|: +20% is a fifth above base.
	// An input whose base is 0 cannot be drawn this way.
	PercentOfBase Change = iota
	// PercentOfRange is (value − base) / (high − low): every input's
	// range is 100 points wide, whatever its units.
	PercentOfRange
)

// SpiderLine is one input of a spider diagram.
type SpiderLine struct {
	// Label names the input.
	Label string
	// Base, Low and High are the input's base value and the ends of its
	// range (Low and High are needed for PercentOfRange only).
	Base, Low, High float64
	// Points are the output (Y) at values of the input (X), in any order;
	// at least two.
	Points []Point
	// Switches are values of the input where the best option changes; each
	// is marked on the line.
	Switches []float64
}

// Point is a point of a line: X along the horizontal axis, Y up.
type Point struct{ X, Y float64 }

// WriteSpider draws a spider diagram.
func WriteSpider(w io.Writer, s Spider, opt Options) error {
	if err := s.check(); err != nil {
		return err
	}
	xAxis := Axis{Label: "Change in the input from its base value (% of base)", Percent: true}
	if s.Change == PercentOfRange {
		xAxis.Label = "Change in the input from its base value (% of its range)"
	}
	p := newPlot(xAxis, s.Value)
	p.Add(gridLines(true, true),
		refLine{at: s.Base, style: draw.LineStyle{Color: greyMid, Width: vg.Points(0.8)}},
		refLine{vertical: true, at: 0, style: draw.LineStyle{Color: greyMid, Width: vg.Points(0.8)}})

	xlo, xhi, ylo, yhi := 0.0, 0.0, s.Base, s.Base
	var legend []legendItem
	var switches markGlyphs
	for i, l := range s.Lines {
		pts := slices.Clone(l.Points)
		slices.SortStableFunc(pts, func(a, b Point) int { return cmp.Compare(a.X, b.X) })
		xs, ys := make([]float64, len(pts)), make([]float64, len(pts))
		for j, pt := range pts {
			xs[j], ys[j] = s.change(l, pt.X), pt.Y
			xlo, xhi = min(xlo, xs[j]), max(xhi, xs[j])
			ylo, yhi = min(ylo, ys[j]), max(yhi, ys[j])
		}
		st := series(i)
		p.Add(&polyline{xs: xs, ys: ys, line: st.line, glyph: st.marker, marks: markerIndexes(len(xs), i)})
		for _, sw := range l.Switches {
			x := s.change(l, sw)
			y := interpolate(xs, ys, x)
			if math.IsNaN(y) {
				continue // outside the points given: nowhere on the line to mark
			}
			switches = append(switches, markAt{x: x, y: y})
		}
		legend = append(legend, legendItem{l.Label, []plot.Thumbnailer{lineThumb{line: st.line, glyph: st.marker, marker: true}}})
	}
	p.Add(switches)
	if len(switches) > 0 {
		legend = append(legend, legendItem{"Best option changes", []plot.Thumbnailer{glyphThumb{switchGlyph()}}})
	}
	p.X.Min, p.X.Max = padRange(xlo, xhi, 0.03)
	p.Y.Min, p.Y.Max = padRange(ylo, yhi, 0.05)
	fig := &figure{title: s.Title, panels: []panel{{plot: p}}, legend: legend}
	return fig.write(w, opt, 560, 360)
}

// change is where input value v of line l sits on the horizontal axis.
func (s Spider) change(l SpiderLine, v float64) float64 {
	if s.Change == PercentOfRange {
		return (v - l.Base) / (l.High - l.Low)
	}
	return (v - l.Base) / math.Abs(l.Base)
}

func (s Spider) check() error {
	switch {
	case len(s.Lines) == 0:
		return fmt.Errorf("chart: spider: no lines to draw")
	case len(s.Lines) > MaxSeries:
		return fmt.Errorf("chart: spider: %d lines, more than the limit of %d", len(s.Lines), MaxSeries)
	case s.Change != PercentOfBase && s.Change != PercentOfRange:
		return fmt.Errorf("chart: spider: unknown way of measuring change (%d)", int(s.Change))
	case !drawable(s.Base):
		return fmt.Errorf("chart: spider: the base value is %v, not a drawable number", s.Base)
	}
	marks := 0
	for i, l := range s.Lines {
		name := fmt.Sprintf("line %q", l.Label)
		if l.Label == "" {
			return fmt.Errorf("chart: spider: line %d has no label", i+1)
		}
		if err := checkPoints("spider", name, l.Points); err != nil {
			return err
		}
		if !drawable(l.Base, l.Low, l.High) || !drawable(l.Switches...) {
			return fmt.Errorf("chart: spider: %s has a base, range or switch that is not a drawable number", name)
		}
		switch {
		case s.Change == PercentOfBase && l.Base == 0:
			return fmt.Errorf("chart: spider: %s has a base value of 0, so its change cannot be measured in %% of base; measure it in %% of its range", name)
		case s.Change == PercentOfRange && !(l.High > l.Low):
			return fmt.Errorf("chart: spider: %s has the range %v .. %v; its change in %% of range needs high above low", name, l.Low, l.High)
		}
		marks += len(l.Switches)
	}
	if marks > MaxMarks {
		return fmt.Errorf("chart: spider: %d switch marks, more than the limit of %d", marks, MaxMarks)
	}
	return nil
}

// checkPoints checks a line's points: at least two, at most MaxPoints, all
// finite.
func checkPoints(chart, name string, pts []Point) error {
	switch {
	case len(pts) < 2:
		return fmt.Errorf("chart: %s: %s has %d points; a line needs at least 2", chart, name, len(pts))
	case len(pts) > MaxPoints:
		return fmt.Errorf("chart: %s: %s has %d points, more than the limit of %d", chart, name, len(pts), MaxPoints)
	}
	for _, pt := range pts {
		if !drawable(pt.X, pt.Y) {
			return fmt.Errorf("chart: %s: %s has the point (%v, %v), not a pair of drawable numbers", chart, name, pt.X, pt.Y)
		}
	}
	return nil
}

// markerIndexes picks the points of an n-point line that carry its marker:
// all of them for short lines, else about six spread along it, shifted by
// the series number so that markers of different lines do not sit on
// top of each other where the lines meet.
func markerIndexes(n, seriesNo int) []int {
	if n <= 7 {
		out := make([]int, n)
		for i := range out {
			out[i] = i
		}
		return out
	}
	step := (n + 5) / 6
	var out []int
	for j := (seriesNo * (step/3 + 1)) % step; j < n; j += step {
		out = append(out, j)
	}
	return out
}

// polyline draws a line through points with markers at some of them.
type polyline struct {
	xs, ys []float64
	line   draw.LineStyle
	glyph  draw.GlyphStyle
	marks  []int
}

// Plot implements plot.Plotter.
func (l *polyline) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	pts := make([]vg.Point, len(l.xs))
	for i := range l.xs {
		pts[i] = vg.Point{X: trX(l.xs[i]), Y: trY(l.ys[i])}
	}
	c.StrokeLines(l.line, c.ClipLinesXY(pts)...)
	for _, i := range l.marks {
		if c.Contains(pts[i]) {
			c.DrawGlyph(l.glyph, pts[i])
		}
	}
}
