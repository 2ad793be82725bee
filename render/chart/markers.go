package chart

import (
	"image/color"
	"math"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// marker is a point symbol: a regular outline (circle, square, triangle,
// diamond, ...) drawn solid or hollow, or a cross of two strokes. Hollow
// ones are filled with paper so the line under them does not show through.
type marker struct {
	sides  int     // 0 for a circle; -1 for a cross of two strokes
	turn   float64 // rotation of the first vertex, in radians from "up"
	hollow bool
}

// markerShape is the i-th series' marker; seven shapes, solid and hollow
// alternating. None is a diamond: that shape marks where the best option
// changes.
func markerShape(i int) draw.GlyphDrawer {
	shapes := []marker{
		{sides: 0},
		{sides: 4, turn: math.Pi / 4, hollow: true},
		{sides: 3},
		{sides: 0, hollow: true},
		{sides: -1},
		{sides: 3, turn: math.Pi, hollow: true},
		{sides: 4, turn: math.Pi / 4},
	}
	return shapes[i%len(shapes)]
}

// DrawGlyph implements draw.GlyphDrawer.
func (m marker) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	r := sty.Radius
	pen := draw.LineStyle{Color: sty.Color, Width: vg.Points(1)}
	if m.sides < 0 {
		d := r * 0.85
		c.StrokeLine2(pen, pt.X-d, pt.Y-d, pt.X+d, pt.Y+d)
		c.StrokeLine2(pen, pt.X-d, pt.Y+d, pt.X+d, pt.Y-d)
		return
	}
	path := m.outline(pt, r)
	if m.hollow {
		c.SetColor(paper)
		c.Fill(path)
		c.SetLineStyle(pen)
		c.Stroke(path)
		return
	}
	c.SetColor(sty.Color)
	c.Fill(path)
}

func (m marker) outline(pt vg.Point, r vg.Length) vg.Path {
	var p vg.Path
	if m.sides == 0 {
		p.Move(vg.Point{X: pt.X + r, Y: pt.Y})
		p.Arc(pt, r, 0, 2*math.Pi)
		p.Close()
		return p
	}
	// Polygons with few sides look smaller than a circle of the same
	// radius; enlarge them a little.
	r *= 1.2
	for k := 0; k < m.sides; k++ {
		a := m.turn + math.Pi/2 + 2*math.Pi*float64(k)/float64(m.sides)
		q := vg.Point{X: pt.X + r*vg.Length(math.Cos(a)), Y: pt.Y + r*vg.Length(math.Sin(a))}
		if k == 0 {
			p.Move(q)
		} else {
			p.Line(q)
		}
	}
	p.Close()
	return p
}

// switchMark is the symbol for a point where the best option changes: a
// diamond in the accent colour with a dark rim and a paper halo, larger
// than any series marker, so it reads by shape and size in greyscale.
type switchMark struct{}

// DrawGlyph implements draw.GlyphDrawer.
func (switchMark) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	// A paper halo first, so the mark stands out on a dark bar in
	// greyscale too, where the accent is about as dark as the bar.
	c.SetColor(paper)
	c.Fill(marker{sides: 4}.outline(pt, sty.Radius+1.8))
	path := marker{sides: 4}.outline(pt, sty.Radius)
	c.SetColor(accent)
	c.Fill(path)
	c.SetLineStyle(draw.LineStyle{Color: ink, Width: vg.Points(0.9)})
	c.Stroke(path)
}

// switchGlyph is the style switch marks are drawn with.
func switchGlyph() draw.GlyphStyle {
	return draw.GlyphStyle{Color: accent, Radius: vg.Points(4.2), Shape: switchMark{}}
}

// swatch draws a small filled (and possibly hatched) box in a legend.
type swatch struct {
	style fillStyle
	edge  color.Color
}

// Thumbnail implements plot.Thumbnailer.
func (s swatch) Thumbnail(c *draw.Canvas) {
	r := vg.Rectangle{
		Min: vg.Point{X: c.Min.X + 1, Y: c.Min.Y + 1},
		Max: vg.Point{X: c.Max.X - thumbGap, Y: c.Max.Y - 1},
	}
	fillRects(c, s.style, []vg.Rectangle{r})
	if s.edge != nil {
		c.SetLineStyle(draw.LineStyle{Color: s.edge, Width: vg.Points(0.6)})
		c.Stroke(r.Path())
	}
}

// glyphThumb shows a marker alone in a legend.
type glyphThumb struct{ glyph draw.GlyphStyle }

// Thumbnail implements plot.Thumbnailer.
func (g glyphThumb) Thumbnail(c *draw.Canvas) {
	c.DrawGlyphNoClip(g.glyph, vg.Point{X: (c.Min.X + c.Max.X - thumbGap) / 2, Y: c.Center().Y})
}

// thumbGap is the space a legend sample leaves before its text.
const thumbGap = vg.Length(5)

// lineThumb shows a line (and optionally its marker) in a legend.
type lineThumb struct {
	line   draw.LineStyle
	glyph  draw.GlyphStyle
	marker bool
}

// Thumbnail implements plot.Thumbnailer.
func (l lineThumb) Thumbnail(c *draw.Canvas) {
	y := c.Center().Y
	right := c.Max.X - thumbGap
	c.StrokeLine2(l.line, c.Min.X, y, right, y)
	if l.marker {
		c.DrawGlyphNoClip(l.glyph, vg.Point{X: (c.Min.X + right) / 2, Y: y})
	}
}

// fillRects fills rectangles (in canvas coordinates) with a fill style:
// one path for the tone and one for the hatching, so that many cells make
// few drawing elements. Hatch lines belong to one family over the whole
// canvas, so the hatching of neighbouring cells lines up.
func fillRects(c *draw.Canvas, fs fillStyle, rects []vg.Rectangle) {
	if len(rects) == 0 {
		return
	}
	var area vg.Path
	for _, r := range rects {
		area.Move(r.Min)
		area.Line(vg.Point{X: r.Max.X, Y: r.Min.Y})
		area.Line(r.Max)
		area.Line(vg.Point{X: r.Min.X, Y: r.Max.Y})
		area.Close()
	}
	var lines vg.Path
	for _, r := range rects {
		hatchRect(&lines, fs.hatch, r)
	}
	paintFill(c, fs, area, lines)
}

// paintFill paints an area in a fill style's tone and then its hatch
// lines over it: the last step of fillRects and fillPolygons.
func paintFill(c *draw.Canvas, fs fillStyle, area, lines vg.Path) {
	c.SetColor(fs.fill)
	c.Fill(area)
	if len(lines) > 0 {
		c.SetLineStyle(hatchLine)
		c.Stroke(lines)
	}
}

// hatchRect adds to p the segments of a hatch family inside r.
func hatchRect(p *vg.Path, h hatch, r vg.Rectangle) {
	if !(r.Size().X < 1e5 && r.Size().Y < 1e5) {
		return // not a rectangle on any page; nothing to hatch
	}
	seg := func(a, b vg.Point) {
		p.Move(a)
		p.Line(b)
	}
	switch h {
	case hatchLevel:
		for y := ceilTo(r.Min.Y, hatchGap); y < r.Max.Y; y += hatchGap {
			seg(vg.Point{X: r.Min.X, Y: y}, vg.Point{X: r.Max.X, Y: y})
		}
	case hatchUpright:
		for x := ceilTo(r.Min.X, hatchGap); x < r.Max.X; x += hatchGap {
			seg(vg.Point{X: x, Y: r.Min.Y}, vg.Point{X: x, Y: r.Max.Y})
		}
	case hatchRising, hatchFalling, hatchCross:
		if h != hatchFalling {
			diagonals(r, 1, seg)
		}
		if h != hatchRising {
			diagonals(r, -1, seg)
		}
	}
}

// diagonals calls seg for each line y = slope·x + k·gap·√2 that crosses r.
func diagonals(r vg.Rectangle, slope vg.Length, seg func(a, b vg.Point)) {
	gap := hatchGap * math.Sqrt2
	// k ranges over intercepts b = y − slope·x met by the rectangle.
	b0 := math.Min(float64(r.Min.Y-slope*r.Min.X), float64(r.Min.Y-slope*r.Max.X))
	b1 := math.Max(float64(r.Max.Y-slope*r.Min.X), float64(r.Max.Y-slope*r.Max.X))
	for b := ceilTo(vg.Length(b0), gap); float64(b) < b1; b += gap {
		var pts []vg.Point
		// Crossings with the four edges, kept when inside the rectangle.
		for _, x := range []vg.Length{r.Min.X, r.Max.X} {
			if y := slope*x + b; y >= r.Min.Y && y <= r.Max.Y {
				pts = append(pts, vg.Point{X: x, Y: y})
			}
		}
		for _, y := range []vg.Length{r.Min.Y, r.Max.Y} {
			if x := (y - b) / slope; x > r.Min.X && x < r.Max.X {
				pts = append(pts, vg.Point{X: x, Y: y})
			}
		}
		if len(pts) >= 2 {
			a, z := pts[0], pts[1]
			for _, q := range pts[2:] {
				if dist(a, q) > dist(a, z) {
					z = q
				}
			}
			if dist(a, z) > 0.5 {
				seg(a, z)
			}
		}
	}
}

func dist(a, b vg.Point) vg.Length {
	return vg.Length(math.Hypot(float64(a.X-b.X), float64(a.Y-b.Y)))
}

// ceilTo is the smallest multiple of step that is at least v.
func ceilTo(v, step vg.Length) vg.Length {
	return vg.Length(math.Ceil(float64(v/step))) * step
}
