package chart

import (
	"math"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// The plotters here draw through gonum's canvas what its own plotters do
// not: labels on a paper ground, labelled guide lines above the data,
// reference lines across the data area.

// note is a piece of text placed at a point of the data, shifted by an
// offset in points.
type note struct {
	x, y   float64
	dx, dy vg.Length
	text   string
	style  text.Style
	// ground puts a paper-coloured box behind the text so it reads over
	// lines and fills.
	ground bool
}

// notes draws a list of notes and tells the plot how far they reach, so
// that none is cut off at the edge.
type notes []note

// Plot implements plot.Plotter.
func (ns notes) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	for _, n := range ns {
		pt := vg.Point{X: trX(n.x) + n.dx, Y: trY(n.y) + n.dy}
		if n.ground {
			r := n.style.Rectangle(n.text).Add(pt)
			pad := vg.Length(1.5)
			r.Min.X -= pad
			r.Min.Y -= pad / 2
			r.Max.X += pad
			r.Max.Y += pad / 2
			c.SetColor(paper)
			c.Fill(r.Path())
		}
		c.FillText(n.style, pt, n.text)
	}
}

// GlyphBoxes implements plot.GlyphBoxer.
func (ns notes) GlyphBoxes(p *plot.Plot) []plot.GlyphBox {
	boxes := make([]plot.GlyphBox, len(ns))
	for i, n := range ns {
		boxes[i] = plot.GlyphBox{
			X:         p.X.Norm(n.x),
			Y:         p.Y.Norm(n.y),
			Rectangle: n.style.Rectangle(n.text).Add(vg.Point{X: n.dx, Y: n.dy}),
		}
	}
	return boxes
}

// refLine is a line across the whole data area at a value of one axis.
type refLine struct {
	vertical bool
	at       float64
	style    draw.LineStyle
}

// Plot implements plot.Plotter.
func (r refLine) Plot(c draw.Canvas, p *plot.Plot) {
	if r.vertical {
		x := c.X(p.X.Norm(r.at))
		if c.ContainsX(x) {
			c.StrokeLine2(r.style, x, c.Min.Y, x, c.Max.Y)
		}
		return
	}
	y := c.Y(p.Y.Norm(r.at))
	if c.ContainsY(y) {
		c.StrokeLine2(r.style, c.Min.X, y, c.Max.X, y)
	}
}

// guide is a vertical line at a value of the x axis with a label above the
// data area.
type guide struct {
	at    float64
	label string
	// line, when it has a width, is this guide's own pen instead of the
	// shared one.
	line draw.LineStyle
}

// guides draws vertical guide lines and places their labels in rows above
// the data area: each label goes in the lowest row where it does not
// overlap a label already placed, so close guides never print over each
// other. The rows need the data area's width, which the figure supplies
// before drawing (setDataWidth).
type guides struct {
	items []guide
	line  draw.LineStyle
	style text.Style
	width vg.Length
	// silent draws the lines and leaves the labels' room empty.
	silent bool
	// minRows is the fewest rows of labels to leave room for.
	minRows int
}

// rowCount is the number of rows the labels take.
func (g *guides) rowCount(p *plot.Plot) int {
	row, _ := g.rows(p)
	n := 0
	for _, r := range row {
		n = max(n, r+1)
	}
	return n
}

// widthAware is a plotter whose glyphs depend on the data area's width.
type widthAware interface{ setDataWidth(vg.Length) }

func (g *guides) setDataWidth(w vg.Length) { g.width = w }

// guideRowGap is the space between rows of guide labels, and guideLift
// the space between the data area and the first row.
const (
	guideRowGap = vg.Length(2)
	guideLift   = vg.Length(4)
)

// rows places each label: its row (0 nearest the data) and its box
// relative to the guide's foot at the top of the data area.
func (g *guides) rows(p *plot.Plot) (row []int, box []vg.Rectangle) {
	width := g.width
	if width <= 0 {
		width = 400 // before the figure has measured the data area
	}
	type span struct{ lo, hi vg.Length }
	var taken [][]span
	h := g.style.Height("Xg")
	row = make([]int, len(g.items))
	box = make([]vg.Rectangle, len(g.items))
	for i, it := range g.items {
		x := width * vg.Length(p.X.Norm(it.at))
		r := g.style.Rectangle(it.label)
		lo, hi := x+r.Min.X-3, x+r.Max.X+3
		k := 0
		for ; k < len(taken); k++ {
			free := true
			for _, s := range taken[k] {
				if lo < s.hi && s.lo < hi {
					free = false
					break
				}
			}
			if free {
				break
			}
		}
		if k == len(taken) {
			taken = append(taken, nil)
		}
		taken[k] = append(taken[k], span{lo, hi})
		row[i] = k
		lift := guideLift + vg.Length(k)*(h+guideRowGap)
		box[i] = r.Add(vg.Point{Y: lift})
	}
	return row, box
}

// Plot implements plot.Plotter.
func (g *guides) Plot(c draw.Canvas, p *plot.Plot) {
	_, boxes := g.rows(p)
	leader := draw.LineStyle{Color: greyLight, Width: vg.Points(0.5)}
	for i, it := range g.items {
		x := c.X(p.X.Norm(it.at))
		if !c.ContainsX(x) {
			continue
		}
		pen := g.line
		if it.line.Width > 0 {
			pen = it.line
		}
		c.StrokeLine2(pen, x, c.Min.Y, x, c.Max.Y)
		// A thin leader joins a label lifted to a higher row to its line.
		if b := boxes[i]; b.Min.Y > guideLift && !g.silent {
			c.StrokeLine2(leader, x, c.Max.Y, x, c.Max.Y+b.Min.Y)
		}
	}
	if g.silent {
		return
	}
	// Labels last, each on a paper ground that hides any leader behind it.
	for i, it := range g.items {
		x := c.X(p.X.Norm(it.at))
		if !c.ContainsX(x) {
			continue
		}
		b := boxes[i].Add(vg.Point{X: x, Y: c.Max.Y})
		c.SetColor(paper)
		c.Fill(b.Path())
		c.FillText(g.style, vg.Point{X: x, Y: b.Min.Y - g.style.Rectangle(it.label).Min.Y}, it.label)
	}
}

// GlyphBoxes implements plot.GlyphBoxer: the labels sit above the top of
// the data area (Y = 1), so the plot leaves room for them.
func (g *guides) GlyphBoxes(p *plot.Plot) []plot.GlyphBox {
	_, boxes := g.rows(p)
	out := make([]plot.GlyphBox, len(boxes))
	for i, b := range boxes {
		out[i] = plot.GlyphBox{X: p.X.Norm(g.items[i].at), Y: 1, Rectangle: b}
	}
	if used := g.rowCount(p); used < g.minRows {
		// An empty box as high as a label in the top row would reach.
		h := g.style.Height("Xg")
		top := guideLift + vg.Length(g.minRows-1)*(h+guideRowGap) + g.style.Rectangle("Xg").Max.Y
		out = append(out, plot.GlyphBox{X: 0.5, Y: 1, Rectangle: vg.Rectangle{Max: vg.Point{Y: top}}})
	}
	return out
}

// guideStyle is the text style of guide labels: small, centred on the line.
func guideStyle() text.Style {
	s := textStyle(noteSize, false, ink)
	s.XAlign, s.YAlign = draw.XCenter, draw.YBottom
	return s
}

// interpolate is the value at x of the polyline through xs, ys (xs
// ascending), or NaN outside it.
func interpolate(xs, ys []float64, x float64) float64 {
	for i := 1; i < len(xs); i++ {
		if x >= xs[i-1] && x <= xs[i] {
			if xs[i] == xs[i-1] {
				return ys[i]
			}
			t := (x - xs[i-1]) / (xs[i] - xs[i-1])
			return ys[i-1] + t*(ys[i]-ys[i-1])
		}
	}
	return math.NaN()
}
