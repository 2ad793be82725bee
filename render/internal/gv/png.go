package gv

import (
	"bytes"
	"context"
	"fmt"
	"image/color"
	"math"
	"os"

	"github.com/flopp/go-findfont"
	"github.com/fogleman/gg"
	"github.com/goccy/go-graphviz/gvc"
	"github.com/golang/freetype/truetype"
	"golang.org/x/image/font"
	"golang.org/x/image/font/gofont/gobold"
	"golang.org/x/image/font/gofont/goregular"
)

// pngEngine draws PNG pictures for Graphviz with the gg 2D library.
//
// go-graphviz ships a PNG renderer, but it does not follow Graphviz's
// drawing model: it fills curves instead of stroking them (a straight edge
// comes out as nothing, a curved one as a wedge), never strokes a filled
// shape's outline, ignores "no pen", and sizes text by zoom rather than
// scale. This one does what Graphviz's own renderers do: fill when asked,
// then stroke unless the pen is off, with the pen's width and dashes.
type pngEngine struct {
	*gvc.DefaultRenderEngine
	gc    *gg.Context
	fonts *fontSet
	// err is why the last page was not drawn. An error returned from a
	// callback into Go leaves go-graphviz's WebAssembly in a bad state, so
	// the engine draws nothing instead and Render reports err.
	err error
	// pages counts the pages begun, for tests that check a refusal came
	// before any painting.
	pages int
}

func newPNGEngine() *pngEngine {
	return &pngEngine{DefaultRenderEngine: &gvc.DefaultRenderEngine{}}
}

// plugins are the Graphviz plugins a Context is made with: PNG through
// the engine returned (SVG and the layouts are built in).
func plugins(ctx context.Context) ([]gvc.Plugin, *pngEngine, error) {
	engine := newPNGEngine()
	render, err := gvc.NewRenderPlugin(ctx, "png", engine)
	if err != nil {
		return nil, nil, err
	}
	device, err := gvc.PNGDevicePlugin(ctx)
	if err != nil {
		return nil, nil, err
	}
	return []gvc.Plugin{render, device}, engine, nil
}

// MaxPixels is the longest side of a PNG drawn.
const MaxPixels = 1 << 15

// TooBigError is the refusal of a PNG with a side longer than MaxPixels.
type TooBigError struct {
	Width, Height int // pixels
}

func (e *TooBigError) Error() string {
	return fmt.Sprintf("a PNG of %d × %d pixels is too big (at most %d a side); draw SVG, or less of the tree", e.Width, e.Height, MaxPixels)
}

func (e *pngEngine) x(job *gvc.Job, v float64) float64 { return job.Scale().X() * v }
func (e *pngEngine) y(job *gvc.Job, v float64) float64 { return job.Scale().Y() * -v }

// BeginPage starts a white page of the job's size.
func (e *pngEngine) BeginPage(_ context.Context, job *gvc.Job) error {
	w, h := int(job.Width()), int(job.Height())
	e.err = nil
	e.pages++
	if w <= 0 || h <= 0 || w > MaxPixels || h > MaxPixels {
		// A last line of defence for DOT from elsewhere: a picture laid
		// out by package render is refused before Graphviz is called.
		e.err = &TooBigError{Width: w, Height: h}
		w, h = 1, 1
	}
	e.gc = gg.NewContext(w, h)
	e.gc.SetColor(color.White)
	e.gc.Clear()
	t := job.Translation()
	e.gc.Translate(e.x(job, t.X()), e.y(job, t.Y()))
	e.gc.SetLineCapButt()
	e.gc.SetLineJoinRound()
	if e.fonts == nil {
		e.fonts = loadFonts()
	}
	return nil
}

// EndPage hands the encoded picture to Graphviz.
func (e *pngEngine) EndPage(_ context.Context, job *gvc.Job) error {
	var buf bytes.Buffer
	if err := e.gc.EncodePNG(&buf); err != nil {
		return err
	}
	job.SetOutputData(buf.Bytes())
	job.SetOutputDataPosition(uint(buf.Len()))
	e.gc = nil
	return nil
}

func rgba(c *gvc.Color) (color.NRGBA, bool) {
	v := c.RGBAUint()
	return color.NRGBA{R: uint8(v[0]), G: uint8(v[1]), B: uint8(v[2]), A: uint8(v[3])}, v[3] > 0
}

// paint fills the current path (if filled) and strokes it (unless the pen
// is off), then clears it.
func (e *pngEngine) paint(job *gvc.Job, filled bool) {
	if e.err != nil {
		e.gc.ClearPath()
		return
	}
	o := job.Object()
	if filled {
		if c, ok := rgba(o.FillColor()); ok {
			e.gc.SetColor(c)
			e.gc.FillPreserve()
		}
	}
	if c, ok := rgba(o.PenColor()); ok && o.Pen() != gvc.PenNone {
		s := job.Scale().X()
		e.gc.SetColor(c)
		e.gc.SetLineWidth(math.Max(o.PenWidth(), 0.01) * s)
		switch o.Pen() {
		case gvc.PenDashed:
			e.gc.SetDash(5*s, 2*s)
		case gvc.PenDotted:
			e.gc.SetDash(1*s, 5*s)
		default:
			e.gc.SetDash()
		}
		e.gc.StrokePreserve()
	}
	e.gc.ClearPath()
}

// Ellipse: points[0] is the centre, points[1] a corner of the bounding box.
func (e *pngEngine) Ellipse(_ context.Context, job *gvc.Job, p []*gvc.PointFloat, filled bool) error {
	if len(p) < 2 {
		return nil
	}
	rx := math.Abs(e.x(job, p[1].X()-p[0].X()))
	ry := math.Abs(e.x(job, p[1].Y()-p[0].Y()))
	e.gc.DrawEllipse(e.x(job, p[0].X()), e.y(job, p[0].Y()), rx, ry)
	e.paint(job, filled)
	return nil
}

// Polygon draws a closed polygon.
func (e *pngEngine) Polygon(_ context.Context, job *gvc.Job, p []*gvc.PointFloat, filled bool) error {
	if len(p) == 0 {
		return nil
	}
	e.gc.MoveTo(e.x(job, p[0].X()), e.y(job, p[0].Y()))
	for _, q := range p[1:] {
		e.gc.LineTo(e.x(job, q.X()), e.y(job, q.Y()))
	}
	e.gc.ClosePath()
	e.paint(job, filled)
	return nil
}

// BezierCurve draws a cubic B-spline: a start point, then three points a
// segment. An edge's curve is never filled (go-graphviz hands edges over
// with filled set).
func (e *pngEngine) BezierCurve(_ context.Context, job *gvc.Job, p []*gvc.PointFloat, filled bool) error {
	if len(p) == 0 {
		return nil
	}
	if job.Object().Type() == gvc.EdgeObjectType {
		filled = false
	}
	e.gc.MoveTo(e.x(job, p[0].X()), e.y(job, p[0].Y()))
	for i := 1; i+2 < len(p); i += 3 {
		e.gc.CubicTo(e.x(job, p[i].X()), e.y(job, p[i].Y()),
			e.x(job, p[i+1].X()), e.y(job, p[i+1].Y()),
			e.x(job, p[i+2].X()), e.y(job, p[i+2].Y()))
	}
	e.paint(job, filled)
	return nil
}

// Polyline draws an open polyline.
func (e *pngEngine) Polyline(_ context.Context, job *gvc.Job, p []*gvc.PointFloat) error {
	if len(p) == 0 {
		return nil
	}
	e.gc.MoveTo(e.x(job, p[0].X()), e.y(job, p[0].Y()))
	for _, q := range p[1:] {
		e.gc.LineTo(e.x(job, q.X()), e.y(job, q.Y()))
	}
	e.paint(job, false)
	return nil
}

// htmlBold is Graphviz's flag for <B> in an HTML-like label (HTML_BF).
const htmlBold = 1

// TextSpan draws one span of text: p is on its baseline, at its left end,
// centre or right end as the span is justified.
func (e *pngEngine) TextSpan(_ context.Context, job *gvc.Job, p *gvc.PointFloat, span *gvc.TextSpan) error {
	if e.err != nil {
		return nil
	}
	c, ok := rgba(job.Object().PenColor())
	if !ok {
		return nil
	}
	f := span.Font()
	runs := e.fonts.runs(span.Text(), f.Flags()&htmlBold != 0, f.Size()*job.Scale().X())
	w := 0.0
	for i := range runs {
		e.gc.SetFontFace(runs[i].face)
		runs[i].w, _ = e.gc.MeasureString(runs[i].text)
		w += runs[i].w
	}
	x := e.x(job, p.X())
	switch span.Just() {
	case 'r':
		x -= w
	case 'l':
	default:
		x -= w / 2
	}
	y := e.y(job, p.Y()+span.YOffsetCenterLine())
	e.gc.SetColor(c)
	for _, r := range runs {
		e.gc.SetFontFace(r.face)
		e.gc.DrawString(r.text, x, y)
		x += r.w
	}
	return nil
}

// run is text drawn in one face.
type run struct {
	text string
	face font.Face
	w    float64
}

// fontSet is the faces text is drawn in, at any size: regular and bold,
// and a fallback for characters they lack (such as ‖ in Liberation Sans).
type fontSet struct {
	regular, bold, fallback *truetype.Font
	faces                   map[faceKey]font.Face
}

type faceKey struct {
	f    *truetype.Font
	size float64
}

// loadFonts finds a Helvetica-like sans-serif on the system (the faces
// the layout measured text for), else uses the Go fonts built in.
func loadFonts() *fontSet {
	fs := &fontSet{faces: map[faceKey]font.Face{}}
	fs.regular = findFont([]string{"LiberationSans-Regular.ttf", "Arial.ttf", "arial.ttf", "Helvetica.ttf", "FreeSans.ttf"}, goregular.TTF)
	fs.bold = findFont([]string{"LiberationSans-Bold.ttf", "Arial Bold.ttf", "arialbd.ttf", "Helvetica-Bold.ttf", "FreeSansBold.ttf"}, gobold.TTF)
	fs.fallback = findFont([]string{"DejaVuSans.ttf", "NotoSans-Regular.ttf", "FreeSans.ttf"}, goregular.TTF)
	return fs
}

func findFont(names []string, fallback []byte) *truetype.Font {
	for _, n := range names {
		path, err := findfont.Find(n)
		if err != nil {
			continue
		}
		if f, err := truetype.Parse(readFile(path)); err == nil {
			return f
		}
	}
	f, _ := truetype.Parse(fallback)
	return f
}

// runs splits text into runs of one face each: the main face where it has
// the glyph, the fallback where not.
func (fs *fontSet) runs(text string, bold bool, size float64) []run {
	main := fs.regular
	if bold {
		main = fs.bold
	}
	var out []run
	var cur []rune
	var curFont *truetype.Font
	flush := func() {
		if len(cur) > 0 {
			out = append(out, run{text: string(cur), face: fs.face(curFont, size)})
			cur = cur[:0]
		}
	}
	for _, r := range text {
		f := main
		if main.Index(r) == 0 && fs.fallback.Index(r) != 0 {
			f = fs.fallback
		}
		if f != curFont {
			flush()
			curFont = f
		}
		cur = append(cur, r)
	}
	flush()
	return out
}

func (fs *fontSet) face(f *truetype.Font, size float64) font.Face {
	k := faceKey{f, size}
	if face, ok := fs.faces[k]; ok {
		return face
	}
	face := truetype.NewFace(f, &truetype.Options{Size: size, DPI: 72, Hinting: font.HintingNone})
	fs.faces[k] = face
	return face
}

func readFile(path string) []byte {
	b, err := os.ReadFile(path)
	if err != nil {
		return nil
	}
	return b
}
