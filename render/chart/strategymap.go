package chart

import (
	"cmp"
	"fmt"
	"io"
	"slices"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// StrategyMap is the data of a two-way strategy map: over a grid of two
// inputs, which option is best in each cell, drawn as filled regions, each
// labelled with its option.
type StrategyMap struct {
	// Title is the chart's heading; empty for none.
	Title string
	// X and Y are the two inputs' axes.
	X, Y Axis
	// XValues and YValues are the grid's values of the two inputs,
	// strictly ascending; at least two each.
	XValues, YValues []float64
	// Options are the options' names; Best refers to them by index.
	Options []string
	// Best[j][i] is the index of the best option at (XValues[i],
	// YValues[j]), or -1 where there is none (a tie, or no answer). One row
	// per Y value, one entry per X value.
	Best [][]int
	// Boundaries are exact lines between regions, where the analysis
	// knows them (for example where values are linear in both inputs).
	// Without them the edges of the cells between regions are drawn.
	Boundaries []Segment
}

// Segment is a straight line from one point to another.
type Segment struct{ From, To Point }

// Limits of a strategy map.
const (
	// MaxGrid is the most grid values of either input of a strategy map.
	MaxGrid = 1_000
)

// WriteStrategyMap draws a two-way strategy map. A cell spans from
// halfway to its neighbour on each side, and the map ends at the first and
// last grid values, so it covers exactly the ranges swept.
func WriteStrategyMap(w io.Writer, m StrategyMap, opt Options) error {
	if err := m.check(); err != nil {
		return err
	}
	cells := &cellMap{xe: cellEdges(m.XValues), ye: cellEdges(m.YValues), best: m.Best, options: len(m.Options)}
	p := newPlot(m.X, m.Y)
	p.X.Min, p.X.Max = m.XValues[0], m.XValues[len(m.XValues)-1]
	p.Y.Min, p.Y.Max = m.YValues[0], m.YValues[len(m.YValues)-1]
	p.X.Padding, p.Y.Padding = 0, 0
	if len(m.Boundaries) > 0 {
		p.Add(&splitCells{xs: m.XValues, ys: m.YValues, best: m.Best, options: len(m.Options), boundaries: m.Boundaries})
		p.Add(segments{list: m.Boundaries, line: draw.LineStyle{Color: ink, Width: vg.Points(1.4)}})
	} else {
		p.Add(cells)
		cells.edges = true
	}
	labels := &regionLabels{style: textStyle(legendSize, true, ink)}
	labels.style.XAlign, labels.style.YAlign = draw.XCenter, draw.YCenter
	for _, r := range regions(m.Best) {
		i, j := r.labelCell(cells)
		labels.items = append(labels.items, regionLabel{
			x: (cells.xe[i] + cells.xe[i+1]) / 2, y: (cells.ye[j] + cells.ye[j+1]) / 2,
			text: m.Options[r.option], cells: len(r.cells),
		})
	}
	p.Add(labels)

	used := make([]bool, len(m.Options))
	none := false
	for _, row := range m.Best {
		for _, k := range row {
			if k < 0 {
				none = true
			} else {
				used[k] = true
			}
		}
	}
	var legend []legendItem
	for k, name := range m.Options {
		if used[k] {
			legend = append(legend, legendItem{name, []plot.Thumbnailer{swatch{fills(k), ink}}})
		}
	}
	if none {
		legend = append(legend, legendItem{"No single best option", []plot.Thumbnailer{swatch{fillStyle{fill: paper}, ink}}})
	}
	if len(m.Boundaries) > 0 {
		legend = append(legend, legendItem{"Boundary", []plot.Thumbnailer{lineThumb{line: draw.LineStyle{Color: ink, Width: vg.Points(1.4)}}}})
	}
	fig := &figure{title: m.Title, panels: []panel{{plot: p}}, legend: legend}
	return fig.write(w, opt, 560, 420)
}

func (m StrategyMap) check() error {
	switch {
	case len(m.XValues) < 2 || len(m.YValues) < 2:
		return fmt.Errorf("chart: strategy map: a grid of %d × %d values; each input needs at least 2", len(m.XValues), len(m.YValues))
	case len(m.XValues) > MaxGrid || len(m.YValues) > MaxGrid:
		return fmt.Errorf("chart: strategy map: a grid of %d × %d values, more than the limit of %d a side", len(m.XValues), len(m.YValues), MaxGrid)
	case len(m.Options) == 0:
		return fmt.Errorf("chart: strategy map: no options")
	case len(m.Options) > MaxSeries:
		return fmt.Errorf("chart: strategy map: %d options, more than the limit of %d", len(m.Options), MaxSeries)
	case len(m.Boundaries) > MaxPoints:
		return fmt.Errorf("chart: strategy map: %d boundary segments, more than the limit of %d", len(m.Boundaries), MaxPoints)
	case len(m.Best) != len(m.YValues):
		return fmt.Errorf("chart: strategy map: %d rows of best options for %d values of the vertical input", len(m.Best), len(m.YValues))
	}
	if err := checkGrid("strategy map", "horizontal input value", m.XValues); err != nil {
		return err
	}
	if err := checkGrid("strategy map", "vertical input value", m.YValues); err != nil {
		return err
	}
	for k, name := range m.Options {
		if name == "" {
			return fmt.Errorf("chart: strategy map: option %d has no name", k+1)
		}
	}
	for j, row := range m.Best {
		if len(row) != len(m.XValues) {
			return fmt.Errorf("chart: strategy map: row %d has %d cells for %d values of the horizontal input", j+1, len(row), len(m.XValues))
		}
		for i, k := range row {
			if k < -1 || k >= len(m.Options) {
				return fmt.Errorf("chart: strategy map: cell (%d, %d) names option %d; options are 0 to %d, or -1 for none", i+1, j+1, k, len(m.Options)-1)
			}
		}
	}
	for _, s := range m.Boundaries {
		if !drawable(s.From.X, s.From.Y, s.To.X, s.To.Y) {
			return fmt.Errorf("chart: strategy map: a boundary from (%v, %v) to (%v, %v) is not made of drawable numbers", s.From.X, s.From.Y, s.To.X, s.To.Y)
		}
	}
	return nil
}

// cellEdges are the edges of the cells around grid values: halfway
// between neighbours, and the first and last values themselves.
func cellEdges(vs []float64) []float64 {
	e := make([]float64, len(vs)+1)
	e[0], e[len(vs)] = vs[0], vs[len(vs)-1]
	for i := 1; i < len(vs); i++ {
		e[i] = (vs[i-1] + vs[i]) / 2
	}
	return e
}

// region is a set of cells with the same best option, connected through
// their sides.
type region struct {
	option int
	cells  [][2]int // (i, j)
}

// regions finds the connected regions of a grid of options, in the order
// of their first cell (row by row from the bottom, left to right).
func regions(best [][]int) []region {
	seen := make([][]bool, len(best))
	for j := range best {
		seen[j] = make([]bool, len(best[j]))
	}
	var out []region
	for j := range best {
		for i := range best[j] {
			if seen[j][i] || best[j][i] < 0 {
				continue
			}
			r := region{option: best[j][i]}
			stack := [][2]int{{i, j}}
			seen[j][i] = true
			for len(stack) > 0 {
				c := stack[len(stack)-1]
				stack = stack[:len(stack)-1]
				r.cells = append(r.cells, c)
				for _, d := range [][2]int{{1, 0}, {-1, 0}, {0, 1}, {0, -1}} {
					x, y := c[0]+d[0], c[1]+d[1]
					if y >= 0 && y < len(best) && x >= 0 && x < len(best[y]) && !seen[y][x] && best[y][x] == r.option {
						seen[y][x] = true
						stack = append(stack, [2]int{x, y})
					}
				}
			}
			out = append(out, r)
		}
	}
	return out
}

// labelCell is the region's cell whose centre is nearest the region's
// centroid (area-weighted, in data units scaled to the map's extent, so
// both inputs count alike), first in row order on a tie.
func (r region) labelCell(m *cellMap) (int, int) {
	w := m.xe[len(m.xe)-1] - m.xe[0]
	h := m.ye[len(m.ye)-1] - m.ye[0]
	centre := func(c [2]int) (x, y, a float64) {
		x0, x1 := (m.xe[c[0]]-m.xe[0])/w, (m.xe[c[0]+1]-m.xe[0])/w
		y0, y1 := (m.ye[c[1]]-m.ye[0])/h, (m.ye[c[1]+1]-m.ye[0])/h
		return (x0 + x1) / 2, (y0 + y1) / 2, (x1 - x0) * (y1 - y0)
	}
	var sx, sy, sa float64
	for _, c := range r.cells {
		x, y, a := centre(c)
		sx, sy, sa = sx+a*x, sy+a*y, sa+a
	}
	gx, gy := sx/sa, sy/sa
	if sa == 0 {
		gx, gy = 0, 0
	}
	cells := slices.Clone(r.cells)
	slices.SortFunc(cells, func(a, b [2]int) int { return cmp.Or(cmp.Compare(a[1], b[1]), cmp.Compare(a[0], b[0])) })
	bestC, bestD := cells[0], -1.0
	for _, c := range cells {
		x, y, _ := centre(c)
		d := (x-gx)*(x-gx) + (y-gy)*(y-gy)
		if bestD < 0 || d < bestD {
			bestC, bestD = c, d
		}
	}
	return bestC[0], bestC[1]
}

// cellMap draws the cells of a strategy map: per option one filled path
// of the runs of its cells along each row, hatched by the option's fill
// style, and optionally the cell edges between different options.
type cellMap struct {
	xe, ye  []float64
	best    [][]int
	options int
	edges   bool
}

// Plot implements plot.Plotter.
func (m *cellMap) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	rects := make([][]vg.Rectangle, m.options)
	for j, row := range m.best {
		for i := 0; i < len(row); {
			k, end := row[i], i+1
			for end < len(row) && row[end] == k {
				end++
			}
			if k >= 0 {
				rects[k] = append(rects[k], vg.Rectangle{
					Min: vg.Point{X: trX(m.xe[i]), Y: trY(m.ye[j])},
					Max: vg.Point{X: trX(m.xe[end]), Y: trY(m.ye[j+1])},
				})
			}
			i = end
		}
	}
	for k, rs := range rects {
		fillRects(&c, fills(k), rs)
	}
	if !m.edges {
		return
	}
	var path vg.Path
	for j, row := range m.best {
		for i := range row {
			if i+1 < len(row) && row[i+1] != row[i] {
				x := trX(m.xe[i+1])
				path.Move(vg.Point{X: x, Y: trY(m.ye[j])})
				path.Line(vg.Point{X: x, Y: trY(m.ye[j+1])})
			}
			if j+1 < len(m.best) && m.best[j+1][i] != row[i] {
				y := trY(m.ye[j+1])
				path.Move(vg.Point{X: trX(m.xe[i]), Y: y})
				path.Line(vg.Point{X: trX(m.xe[i+1]), Y: y})
			}
		}
	}
	if len(path) > 0 {
		c.SetLineStyle(draw.LineStyle{Color: ink, Width: vg.Points(1)})
		c.Stroke(path)
	}
}

// segments draws straight lines given in data coordinates, clipped to the
// data area.
type segments struct {
	list []Segment
	line draw.LineStyle
}

// Plot implements plot.Plotter.
func (s segments) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	for _, seg := range s.list {
		pts := []vg.Point{{X: trX(seg.From.X), Y: trY(seg.From.Y)}, {X: trX(seg.To.X), Y: trY(seg.To.Y)}}
		c.StrokeLines(s.line, c.ClipLinesXY(pts)...)
	}
}

// regionLabel is an option's name placed in one of its regions.
type regionLabel struct {
	x, y  float64
	text  string
	cells int
}

// regionLabels writes region names on a paper ground, kept inside the data
// area. Larger regions are labelled first; a label that would overlap one
// already written is left out (its option is still in the legend).
type regionLabels struct {
	items []regionLabel
	style text.Style
}

// Plot implements plot.Plotter.
func (rl *regionLabels) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	order := slices.Clone(rl.items)
	slices.SortStableFunc(order, func(a, b regionLabel) int { return cmp.Compare(b.cells, a.cells) })
	var placed []vg.Rectangle
	const pad = 2
	for _, it := range order {
		pt := vg.Point{X: trX(it.x), Y: trY(it.y)}
		box := rl.style.Rectangle(it.text).Add(pt)
		box.Min.X, box.Min.Y, box.Max.X, box.Max.Y = box.Min.X-pad, box.Min.Y-pad/2, box.Max.X+pad, box.Max.Y+pad/2
		// Shift the label inside the data area.
		if d := c.Min.X - box.Min.X; d > 0 {
			box, pt = shift(box, pt, d, 0)
		}
		if d := box.Max.X - c.Max.X; d > 0 {
			box, pt = shift(box, pt, -d, 0)
		}
		if d := c.Min.Y - box.Min.Y; d > 0 {
			box, pt = shift(box, pt, 0, d)
		}
		if d := box.Max.Y - c.Max.Y; d > 0 {
			box, pt = shift(box, pt, 0, -d)
		}
		clash := false
		for _, q := range placed {
			if box.Min.X < q.Max.X && q.Min.X < box.Max.X && box.Min.Y < q.Max.Y && q.Min.Y < box.Max.Y {
				clash = true
				break
			}
		}
		if clash {
			continue
		}
		placed = append(placed, box)
		c.SetColor(paper)
		c.Fill(box.Path())
		c.SetLineStyle(draw.LineStyle{Color: greyDark, Width: vg.Points(0.5)})
		c.Stroke(box.Path())
		c.FillText(rl.style, pt, it.text)
	}
}

func shift(r vg.Rectangle, pt vg.Point, dx, dy vg.Length) (vg.Rectangle, vg.Point) {
	d := vg.Point{X: dx, Y: dy}
	return r.Add(d), pt.Add(d)
}
