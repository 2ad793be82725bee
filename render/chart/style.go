package chart

import (
	"image/color"
	"math"

	xfont "golang.org/x/image/font"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// The chart style: one sans-serif face, a scale of greys, one accent colour
// (and a pale tint of it), and dash patterns, weights and marker shapes so
// that every series can be told apart without colour. Everything here is a
// function or a constant so no chart can change another's look.

// Greys, darkest first. Series greys stay at or below greyMid so that lines
// remain visible when printed; fills use the paler ones.
var (
	ink       = color.Gray{Y: 0x1a}
	greyDark  = color.Gray{Y: 0x50}
	greyMid   = color.Gray{Y: 0x80}
	greyLight = color.Gray{Y: 0xb4}
	greyPale  = color.Gray{Y: 0xde}
	gridGrey  = color.Gray{Y: 0xea}
	paper     = color.White
)

// accent marks what the reader should look at first: where the best option
// changes, and the best option's envelope. Its luminance sits between the
// dark and mid greys, so it still shows in greyscale, and it never carries
// meaning alone: marks that use it also have their own shape or label.
var (
	accent     = color.RGBA{R: 0xb8, G: 0x4a, B: 0x16, A: 0xff}
	accentTint = color.RGBA{R: 0xf1, G: 0xcf, B: 0xbd, A: 0xff}
)

// Type sizes in points.
const (
	titleSize  = 12
	headSize   = 10
	labelSize  = 10
	tickSize   = 9
	noteSize   = 8.5
	legendSize = 9
)

// face is the one typeface of every chart.
func face(size float64, bold bool) font.Font {
	f := font.Font{Typeface: "Liberation", Variant: "Sans", Size: font.Length(size)}
	if bold {
		f.Weight = xfont.WeightBold
	}
	return f
}

// textStyle is a plain-text style (no markup is interpreted in labels).
func textStyle(size float64, bold bool, c color.Color) text.Style {
	return text.Style{
		Color:   c,
		Font:    face(size, bold),
		Handler: text.Plain{Fonts: font.DefaultCache},
	}
}

// seriesStyle is how one line of a chart is drawn.
type seriesStyle struct {
	line   draw.LineStyle
	marker draw.GlyphStyle
}

// Dash patterns in points, in the order series take them. Solid first.
func dashPattern(i int) []vg.Length {
	patterns := [][]vg.Length{
		nil,
		{vg.Points(7), vg.Points(3)},
		{vg.Points(1.5), vg.Points(2.5)},
		{vg.Points(9), vg.Points(3), vg.Points(2), vg.Points(3)},
		{vg.Points(4), vg.Points(2)},
	}
	return patterns[i%len(patterns)]
}

// series is the style of the i-th line of a chart. Greys, weights, dashes
// and markers cycle with lengths 3, 2, 5 and 7, so the first 210 series
// differ in at least one of them and neighbours differ in all of dash,
// marker and grey.
func series(i int) seriesStyle {
	greys := []color.Color{ink, greyDark, greyMid}
	widths := []float64{1.8, 1.2}
	c := greys[i%len(greys)]
	return seriesStyle{
		line: draw.LineStyle{
			Color:  c,
			Width:  vg.Points(widths[i%len(widths)]),
			Dashes: dashPattern(i),
		},
		marker: draw.GlyphStyle{Color: c, Radius: vg.Points(3.2), Shape: markerShape(i)},
	}
}

// fillStyle is how one area of a chart is filled: a grey, with hatching
// on some so that neighbouring areas differ in texture as well as tone.
type fillStyle struct {
	fill  color.Color
	hatch hatch
}

// hatch is a family of parallel lines drawn over a fill.
type hatch int

const (
	hatchNone hatch = iota
	hatchRising
	hatchFalling
	hatchLevel
	hatchUpright
	hatchCross
)

// fills is the i-th area style. Tones and textures cycle with lengths 4 and
// 6, so the first 12 differ; areas 0–5 all have distinct textures.
func fills(i int) fillStyle {
	tones := []color.Color{color.Gray{Y: 0xe6}, color.Gray{Y: 0xc4}, paper, color.Gray{Y: 0xa2}}
	textures := []hatch{hatchNone, hatchRising, hatchLevel, hatchNone, hatchFalling, hatchCross}
	return fillStyle{fill: tones[i%len(tones)], hatch: textures[i%len(textures)]}
}

// hatchLine is the pen hatching is drawn with, and hatchGap the distance
// between its lines.
var hatchLine = draw.LineStyle{Color: greyDark, Width: vg.Points(0.6)}

const hatchGap = vg.Length(5)

// newPlot is an empty plot in the chart style: the given axis labels, our
// number ticks, light grid lines drawn by the caller where they help.
func newPlot(x, y Axis) *plot.Plot {
	p := plot.New()
	p.BackgroundColor = nil
	p.Title.Text = ""
	for _, ax := range []*plot.Axis{&p.X, &p.Y} {
		ax.Label.TextStyle = textStyle(labelSize, false, ink)
		ax.Label.TextStyle.XAlign = draw.XCenter
		ax.Label.TextStyle.YAlign = draw.YBottom
		ax.Label.Padding = vg.Points(4)
		ax.Tick.Label = textStyle(tickSize, false, greyDark)
		ax.LineStyle = draw.LineStyle{Color: greyDark, Width: vg.Points(0.6)}
		ax.Tick.LineStyle = draw.LineStyle{Color: greyDark, Width: vg.Points(0.6)}
		ax.Tick.Length = vg.Points(3)
		ax.Padding = vg.Points(2)
	}
	p.X.Tick.Label.XAlign, p.X.Tick.Label.YAlign = draw.XCenter, draw.YTop
	p.Y.Tick.Label.XAlign, p.Y.Tick.Label.YAlign = draw.XRight, draw.YCenter
	p.X.Label.Text = x.Label
	p.Y.Label.Text = y.Label
	p.X.Tick.Marker = numberTicks{percent: x.Percent, target: 6}
	p.Y.Tick.Marker = numberTicks{percent: y.Percent, target: 5}
	return p
}

// gridLines are light lines across the data area at the major ticks of the
// axes asked for.
func gridLines(vertical, horizontal bool) plot.Plotter {
	g := &gridPlotter{vertical: vertical, horizontal: horizontal}
	return g
}

type gridPlotter struct{ vertical, horizontal bool }

func (g *gridPlotter) Plot(c draw.Canvas, p *plot.Plot) {
	sty := draw.LineStyle{Color: gridGrey, Width: vg.Points(0.6)}
	if g.vertical {
		for _, t := range p.X.Tick.Marker.Ticks(p.X.Min, p.X.Max) {
			if t.IsMinor() {
				continue
			}
			x := c.X(p.X.Norm(t.Value))
			c.StrokeLine2(sty, x, c.Min.Y, x, c.Max.Y)
		}
	}
	if g.horizontal {
		for _, t := range p.Y.Tick.Marker.Ticks(p.Y.Min, p.Y.Max) {
			if t.IsMinor() {
				continue
			}
			y := c.Y(p.Y.Norm(t.Value))
			c.StrokeLine2(sty, c.Min.X, y, c.Max.X, y)
		}
	}
}

// padRange widens [lo, hi] by frac of its span on each side (or by one unit
// when it is a point), so that data never sits on the frame.
func padRange(lo, hi, frac float64) (float64, float64) {
	span := hi - lo
	if span <= 0 {
		d := math.Max(math.Abs(lo)*0.1, 1)
		return lo - d, hi + d
	}
	return lo - frac*span, hi + frac*span
}
