package chart

import (
	"bytes"
	"fmt"
	"io"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgsvg"
)

// figure is the page every chart is laid out on: a title at the top left,
// one or more panels of plots stacked top to bottom, and a legend beside
// them (or under them when it is too wide), never over the data.
type figure struct {
	title  string
	panels []panel
	legend []legendItem
}

// panel is one plot of a figure, with an optional heading above it.
type panel struct {
	heading string
	plot    *plot.Plot
	// aware are the panel's plotters that need the data area's width
	// before they are drawn.
	aware []widthAware
	// extra is height the panel needs beyond an equal share (for an axis
	// label the others lack), so that all panels' data areas match.
	extra vg.Length
}

// legendItem is one line of a legend: a sample of the style and its name.
type legendItem struct {
	label  string
	thumbs []plot.Thumbnailer
}

// Spacing of the page, in points.
const (
	margin        = vg.Length(10)
	titleGap      = vg.Length(8)
	headingGap    = vg.Length(3)
	panelGap      = vg.Length(10)
	legendGap     = vg.Length(14)
	legendThumb   = vg.Length(30)
	legendLeading = vg.Length(4)
)

// draw lays the figure out on c.
func (f *figure) draw(c draw.Canvas) {
	c.SetColor(paper)
	c.Fill(c.Rectangle.Path())
	area := draw.Crop(c, margin, -margin, margin, -margin)

	if f.title != "" {
		sty := textStyle(titleSize, true, ink)
		sty.XAlign, sty.YAlign = draw.XLeft, draw.YTop
		area.FillText(sty, vg.Point{X: area.Min.X, Y: area.Max.Y}, f.title)
		area.Max.Y -= sty.Height(f.title) + titleGap
	}

	if len(f.legend) > 0 {
		lg := f.newLegend()
		w, h := f.legendSize(lg)
		if w <= 0.34*area.Size().X {
			// Beside the plots, top-aligned with the data.
			box := area
			box.Min.X = area.Max.X - w
			area.Max.X = box.Min.X - legendGap
			lg.Draw(box)
		} else {
			box := area
			box.Max.Y = area.Min.Y + h
			area.Min.Y = box.Max.Y + legendGap
			lg.Draw(box)
		}
	}

	n := vg.Length(len(f.panels))
	free := area.Size().Y - panelGap*(n-1)
	for _, p := range f.panels {
		free -= p.extra
	}
	each := free / n
	top := area.Max.Y
	areas := make([]draw.Canvas, len(f.panels))
	rows := 0
	for i, p := range f.panels {
		pc := area
		pc.Max.Y = top
		pc.Min.Y = top - each - p.extra
		top = pc.Min.Y - panelGap
		if p.heading != "" {
			sty := textStyle(headSize, true, ink)
			sty.XAlign, sty.YAlign = draw.XLeft, draw.YTop
			pc.FillText(sty, vg.Point{X: pc.Min.X, Y: pc.Max.Y}, p.heading)
			pc.Max.Y -= sty.Height(p.heading) + headingGap
		}
		areas[i] = pc
		if len(p.aware) > 0 {
			data := p.plot.DataCanvas(pc)
			for _, a := range p.aware {
				a.setDataWidth(data.Size().X)
				if g, ok := a.(*guides); ok {
					rows = max(rows, g.rowCount(p.plot))
				}
			}
		}
	}
	// Every panel keeps room for as many rows of guide labels as the
	// fullest one, so that all panels' data areas are the same height.
	for _, p := range f.panels {
		for _, a := range p.aware {
			if g, ok := a.(*guides); ok {
				g.minRows = rows
			}
		}
	}
	for i, p := range f.panels {
		p.plot.Draw(areas[i])
	}
}

// newLegend builds a gonum legend in the chart style, entries top-down.
func (f *figure) newLegend() plot.Legend {
	lg := plot.NewLegend()
	lg.TextStyle = textStyle(legendSize, false, ink)
	lg.Top, lg.Left = true, true
	lg.ThumbnailWidth = legendThumb
	lg.Padding = legendLeading
	lg.YPosition = draw.PosCenter
	for _, it := range f.legend {
		lg.Add(it.label, it.thumbs...)
	}
	return lg
}

// legendSize is the width and height the legend takes.
func (f *figure) legendSize(lg plot.Legend) (w, h vg.Length) {
	r := lg.Rectangle(draw.Canvas{})
	return r.Size().X, r.Size().Y
}

// write draws the figure at the size and in the format the options ask
// for, or the chart's default size, and writes it to w.
func (f *figure) write(w io.Writer, opt Options, defW, defH float64) (err error) {
	width, height, dpi, err := opt.size(defW, defH)
	if err != nil {
		return err
	}
	// The data has been checked before it gets here; a panic in the
	// plotting library still must not reach the caller.
	defer func() {
		if r := recover(); r != nil {
			err = fmt.Errorf("chart: drawing failed: %v", r)
		}
	}()
	wl, hl := vg.Points(width), vg.Points(height)
	switch opt.Format {
	case PNG:
		c := vgimg.NewWith(vgimg.UseWH(wl, hl), vgimg.UseDPI(dpi), vgimg.UseBackgroundColor(paper))
		f.draw(draw.New(c))
		_, err = vgimg.PngCanvas{Canvas: c}.WriteTo(w)
		return err
	default:
		c := vgsvg.NewWith(vgsvg.UseWH(wl, hl), vgsvg.EmbedFonts(opt.EmbedFonts))
		f.draw(draw.New(c))
		var buf bytes.Buffer
		if _, err := c.WriteTo(&buf); err != nil {
			return err
		}
		_, err = w.Write(portableFonts(buf.Bytes()))
		return err
	}
}

// portableFonts gives the SVG's text a list of fallback families. The
// plotting library names only the face it measured text with; a viewer
// without that face would fall back to its default, often a serif, and
// the text would no longer fit where it was placed. The fallbacks are
// metric-compatible sans-serif faces.
func portableFonts(svg []byte) []byte {
	return bytes.ReplaceAll(svg,
		[]byte("font-family:Liberation Sans;"),
		[]byte("font-family:'Liberation Sans',Arimo,Arial,Helvetica,sans-serif;"))
}
