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

// Tornado is the data of a tornado diagram: one horizontal bar per item,
// from the value at its start to the value at its end, around a vertical
// line at the base value, the widest bar on top.
//
// For one-way sensitivity, an item is an input, Start is the output with
// the input at its low value and End with it at its high value; for a risk
// register's ranking, an item is a risk and its bar spans what it
// contributes to the spread (Start and End with and without it, or 0 and
// its contribution around a Base of 0).
type Tornado struct {
	// Title is the chart's heading; empty for none.
	Title string
	// Value is the horizontal axis: what Start, End and Base measure.
	Value Axis
	// Base is where the vertical reference line stands: the output with
	// every input at its base value.
	Base float64
	// BaseLabel is written above the reference line; empty means "Base"
	// and the value.
	BaseLabel string
	// Bars are the items, in any order.
	Bars []Bar
	// StartName and EndName name, in the legend, the two tones that show
	// which part of a bar reaches its Start and which its End. Empty means
	// "Input at its low value" and "Input at its high value".
	StartName, EndName string
	// KeepOrder draws the bars top to bottom in the order given instead of
	// by swing (|End − Start|), largest on top.
	KeepOrder bool
}

// Bar is one item of a tornado diagram.
type Bar struct {
	// Label names the item; it is written beside the bar.
	Label string
	// Start and End are the values of the output at the bar's two ends.
	// Either may be the larger.
	Start, End float64
	// StartLabel and EndLabel are written just outside the bar's ends,
	// each beside its own end: for sensitivity, the input's low and high
	// values. Empty for none.
	StartLabel, EndLabel string
	// Marks are points along the bar, in the output's terms, where
	// something happens: for sensitivity, where the best option changes.
	Marks []Mark
}

// Mark is a labelled position on a value axis.
type Mark struct {
	// At is the position, in the axis's terms.
	At float64
	// Label is written beside the mark; empty for none (a guide line then
	// shows its value).
	Label string
}

// Sizes of data a chart accepts; more is an error, not a picture nobody
// can read.
const (
	// MaxBars is the most bars of a tornado diagram.
	MaxBars = 200
	// MaxSeries is the most lines (or options) one chart shows.
	MaxSeries = 60
	// MaxPoints is the most points of one line.
	MaxPoints = 100_000
	// MaxMarks is the most marks or guides one chart shows.
	MaxMarks = 200
)

// Layout of a tornado row, in data units (one row is one unit tall).
const (
	barHalf = 0.24
)

// WriteTornado draws a tornado diagram.
func WriteTornado(w io.Writer, t Tornado, opt Options) error {
	if err := t.check(); err != nil {
		return err
	}
	bars := slices.Clone(t.Bars)
	if !t.KeepOrder {
		slices.SortStableFunc(bars, func(a, b Bar) int {
			return cmp.Compare(math.Abs(b.End-b.Start), math.Abs(a.End-a.Start))
		})
	}
	startName, endName := cmp.Or(t.StartName, "Input at its low value"), cmp.Or(t.EndName, "Input at its high value")

	p := newPlot(t.Value, Axis{})
	n := len(bars)
	lo, hi := t.Base, t.Base
	for _, b := range bars {
		lo, hi = min(lo, b.Start, b.End), max(hi, b.Start, b.End)
		for _, m := range b.Marks {
			lo, hi = min(lo, m.At), max(hi, m.At)
		}
	}
	p.X.Min, p.X.Max = padRange(lo, hi, 0.03)
	p.Y.Min, p.Y.Max = -0.55, float64(n)-0.45
	// The input names are the vertical axis's labels; no axis line.
	ticks := make(plot.ConstantTicks, n)
	for i, b := range bars {
		ticks[i] = plot.Tick{Value: rowY(i, n), Label: b.Label}
	}
	p.Y.Tick.Marker = ticks
	p.Y.Tick.Label = textStyle(labelSize, false, ink)
	p.Y.Tick.Label.XAlign, p.Y.Tick.Label.YAlign = draw.XRight, draw.YCenter
	p.Y.LineStyle.Width = 0
	p.Y.Tick.Length = 0
	p.Y.Padding = vg.Points(8) // between the names and the end labels

	hb := &hbars{base: t.Base, bars: bars}
	p.Add(gridLines(true, false), hb)

	var ends notes
	sty := textStyle(noteSize, false, greyDark)
	left, right := sty, sty
	left.XAlign, left.YAlign = draw.XRight, draw.YCenter
	right.XAlign, right.YAlign = draw.XLeft, draw.YCenter
	var marks notes
	markSty := textStyle(noteSize, false, ink)
	markSty.XAlign, markSty.YAlign = draw.XCenter, draw.YBottom
	var glyphs []markAt
	for i, b := range bars {
		y := rowY(i, n)
		lowLabel, highLabel := b.StartLabel, b.EndLabel
		lowX, highX := b.Start, b.End
		if b.End < b.Start {
			lowLabel, highLabel = highLabel, lowLabel
			lowX, highX = highX, lowX
		}
		// A switch mark at a bar's end (the best option changes just
		// where the value stops moving) would sit on the end's label:
		// the label moves out past the mark.
		gap := func(x float64) vg.Length {
			for _, m := range b.Marks {
				if math.Abs(m.At-x) <= markNear*(p.X.Max-p.X.Min) {
					return 4 + switchGlyph().Radius + 3
				}
			}
			return 4
		}
		if lowLabel != "" {
			ends = append(ends, note{x: lowX, y: y, dx: -gap(lowX), text: lowLabel, style: left})
		}
		if highLabel != "" {
			ends = append(ends, note{x: highX, y: y, dx: gap(highX), text: highLabel, style: right})
		}
		for _, m := range b.Marks {
			glyphs = append(glyphs, markAt{x: m.At, y: y})
			if m.Label != "" {
				marks = append(marks, note{x: m.At, y: y + barHalf, dy: 2, text: m.Label, style: markSty, ground: true})
			}
		}
	}
	baseLabel := cmp.Or(t.BaseLabel, "Base "+formatValue(t.Base, t.Value.Percent))
	base := &guides{
		items: []guide{{at: t.Base, label: baseLabel}},
		line:  draw.LineStyle{Color: ink, Width: vg.Points(1.2)},
		style: guideStyle(),
	}
	p.Add(base, ends, markGlyphs(glyphs), marks)

	fig := &figure{title: t.Title, panels: []panel{{plot: p, aware: []widthAware{base}}}}
	if hb.drawsStart() {
		fig.legend = append(fig.legend, legendItem{startName, []plot.Thumbnailer{swatch{fillStyle{fill: startTone}, ink}}})
	}
	if hb.drawsEnd() {
		fig.legend = append(fig.legend, legendItem{endName, []plot.Thumbnailer{swatch{fillStyle{fill: endTone}, ink}}})
	}
	if len(glyphs) > 0 {
		fig.legend = append(fig.legend, legendItem{"Best option changes", []plot.Thumbnailer{glyphThumb{switchGlyph()}}})
	}
	rowH := 26.0
	if len(marks) > 0 {
		rowH = 34
	}
	return fig.write(w, opt, 560, 120+rowH*float64(n))
}

// The two tones of tornado bars: pale for the part that reaches Start,
// dark for the part that reaches End.
var (
	startTone = greyLight
	endTone   = greyDark
)

// markNear is how close to a bar's end, as a share of the value axis, a
// switch mark pushes the end's label out of its way (about the mark's
// width on a chart of the usual size).
const markNear = 0.02

// rowY is the vertical position of the i-th of n rows, the first on top.
func rowY(i, n int) float64 { return float64(n - 1 - i) }

func (t Tornado) check() error {
	switch {
	case len(t.Bars) == 0:
		return fmt.Errorf("chart: tornado: no bars to draw")
	case len(t.Bars) > MaxBars:
		return fmt.Errorf("chart: tornado: %d bars, more than the limit of %d", len(t.Bars), MaxBars)
	case !drawable(t.Base):
		return fmt.Errorf("chart: tornado: the base value is %v, not a drawable number", t.Base)
	}
	marks := 0
	for i, b := range t.Bars {
		if b.Label == "" {
			return fmt.Errorf("chart: tornado: bar %d has no label", i+1)
		}
		if !drawable(b.Start, b.End) {
			return fmt.Errorf("chart: tornado: bar %q has an end that is not a drawable number (%v, %v)", b.Label, b.Start, b.End)
		}
		for _, m := range b.Marks {
			if !drawable(m.At) {
				return fmt.Errorf("chart: tornado: bar %q has a mark at %v, not a drawable number", b.Label, m.At)
			}
		}
		marks += len(b.Marks)
	}
	if marks > MaxMarks {
		return fmt.Errorf("chart: tornado: %d marks, more than the limit of %d", marks, MaxMarks)
	}
	return nil
}

// maxMagnitude is the largest size of a value a chart draws: far beyond
// any amount of money, and small enough that spans and paddings of such
// values stay finite.
const maxMagnitude = 1e300

// drawable reports whether every value is a number a chart can place:
// finite, and at most maxMagnitude in size. Errors call any other value
// "not a drawable number".
func drawable(vs ...float64) bool {
	for _, v := range vs {
		if math.IsNaN(v) || math.Abs(v) > maxMagnitude {
			return false
		}
	}
	return true
}

// hbars draws the bars of a tornado diagram. A bar that crosses the base
// is split there: the part towards its Start in the start tone, the part
// towards its End in the end tone. A bar that lies on one side of the base
// takes the tone of the end farther from it.
type hbars struct {
	base float64
	bars []Bar
}

// segments are the pieces of bar b: [from, to] with which tone.
func (h *hbars) segments(b Bar) (out []struct {
	from, to float64
	start    bool
}) {
	add := func(from, to float64, start bool) {
		out = append(out, struct {
			from, to float64
			start    bool
		}{min(from, to), max(from, to), start})
	}
	lo, hi := min(b.Start, b.End), max(b.Start, b.End)
	if lo < h.base && h.base < hi {
		add(h.base, b.Start, true)
		add(h.base, b.End, false)
		return out
	}
	add(lo, hi, math.Abs(b.Start-h.base) > math.Abs(b.End-h.base))
	return out
}

func (h *hbars) drawsStart() bool { return h.draws(true) }
func (h *hbars) drawsEnd() bool   { return h.draws(false) }

func (h *hbars) draws(start bool) bool {
	for _, b := range h.bars {
		for _, s := range h.segments(b) {
			if s.start == start {
				return true
			}
		}
	}
	return false
}

// Plot implements plot.Plotter.
func (h *hbars) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	edge := draw.LineStyle{Color: ink, Width: vg.Points(0.6)}
	n := len(h.bars)
	for i, b := range h.bars {
		y := rowY(i, n)
		y0, y1 := trY(y-barHalf), trY(y+barHalf)
		for _, s := range h.segments(b) {
			x0, x1 := trX(s.from), trX(s.to)
			if x1-x0 < 1 {
				// A bar of no width still shows as a hairline.
				x0, x1 = (x0+x1)/2-0.5, (x0+x1)/2+0.5
			}
			r := vg.Rectangle{Min: vg.Point{X: x0, Y: y0}, Max: vg.Point{X: x1, Y: y1}}
			tone := endTone
			if s.start {
				tone = startTone
			}
			c.SetColor(tone)
			c.Fill(r.Path())
			c.SetLineStyle(edge)
			c.Stroke(r.Path())
		}
	}
}

// markAt is where a switch mark is drawn, in data coordinates.
type markAt struct{ x, y float64 }

// markGlyphs draws switch marks.
type markGlyphs []markAt

// Plot implements plot.Plotter.
func (ms markGlyphs) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	g := switchGlyph()
	for _, m := range ms {
		c.DrawGlyphNoClip(g, vg.Point{X: trX(m.x), Y: trY(m.y)})
	}
}

// GlyphBoxes implements plot.GlyphBoxer.
func (ms markGlyphs) GlyphBoxes(p *plot.Plot) []plot.GlyphBox {
	g := switchGlyph()
	out := make([]plot.GlyphBox, len(ms))
	for i, m := range ms {
		out[i] = plot.GlyphBox{X: p.X.Norm(m.x), Y: p.Y.Norm(m.y), Rectangle: g.Rectangle()}
	}
	return out
}
