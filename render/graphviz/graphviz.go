// Package graphviz lays out the DOT text of package render with Graphviz
// and writes the picture as SVG or PNG.
//
// Graphviz runs in-process as WebAssembly (github.com/goccy/go-graphviz on
// the wazero runtime: pure Go, no cgo). That build is compiled when the
// program starts, because go-graphviz does it in a package init: about
// 0.8 s the first time, a few tens of milliseconds afterwards, when the
// compiled code comes from the on-disk cache in the user's cache directory
// (os.UserCacheDir()/forkcast/go-graphviz). It is a separate package from
// render so that a program that only formats money or writes DOT does not
// pay that start-up.
package graphviz

import (
	"context"
	"fmt"
	"io"
	"math"
	"strings"

	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/render"
	"github.com/forkcast/forkcast/render/internal/gv"
)

// Format is a picture format a Renderer writes.
type Format string

const (
	// SVG is scalable vector graphics, the format to publish: every
	// element on the optimal policy carries the class "optimal".
	SVG Format = "svg"
	// PNG is a raster image at PNGDPI dots per inch.
	PNG Format = "png"
)

// PNGDPI is the resolution of PNG output: twice the 72 dpi of the layout,
// sharp on high-density screens and in print.
const PNGDPI = 144

// MaxPNGSide is the longest side, in pixels, of a PNG a Renderer draws:
// 32,768, about 5.8 m at PNGDPI.
const MaxPNGSide = gv.MaxPixels

// PNGTooBigError is the refusal of a PNG with a side longer than
// MaxPNGSide (Width and Height are in pixels).
type PNGTooBigError = gv.TooBigError

// PNGSize is the size in pixels of the PNG of a laid-out picture.
func PNGSize(p *render.Picture) (width, height int) {
	return int(math.Ceil(p.Width * PNGDPI / 72)), int(math.Ceil(p.Height * PNGDPI / 72))
}

// CheckPNG returns a *PNGTooBigError when the PNG of the picture would
// have a side longer than MaxPNGSide. It works from the layout's size
// alone: nothing is laid out by Graphviz or painted.
func CheckPNG(p *render.Picture) error {
	if w, h := PNGSize(p); w > MaxPNGSide || h > MaxPNGSide {
		return &PNGTooBigError{Width: w, Height: h}
	}
	return nil
}

// ParseFormat reads a format name, "svg" or "png" (any case).
func ParseFormat(s string) (Format, error) {
	switch f := Format(strings.ToLower(s)); f {
	case SVG, PNG:
		return f, nil
	}
	return "", fmt.Errorf("graphviz: unknown picture format %q (svg or png)", s)
}

// Renderer lays out DOT graphs with Graphviz and writes them as pictures.
// It holds a Graphviz context: make one, use it for every picture and Close
// it when done. Its methods are safe for concurrent use; the calls are
// serialised, since Graphviz runs as one WebAssembly instance per process.
type Renderer struct {
	c *gv.Context
}

// NewRenderer makes a Renderer.
func NewRenderer(ctx context.Context) (*Renderer, error) {
	c, err := gv.New(ctx)
	if err != nil {
		return nil, fmt.Errorf("graphviz: starting Graphviz: %w", err)
	}
	return &Renderer{c: c}, nil
}

// Close frees the Renderer's Graphviz context. A closed Renderer returns
// an error from Render; closing twice does no harm.
func (r *Renderer) Close() error {
	if r == nil || r.c == nil {
		return nil
	}
	return r.c.Close()
}

// Render lays out a graph written in the DOT language (as render.DOT
// makes it) and writes it to w in the format. Nothing is written when it
// fails.
func (r *Renderer) Render(ctx context.Context, dot []byte, format Format, w io.Writer) error {
	if r == nil || r.c == nil {
		return fmt.Errorf("graphviz: the renderer is closed")
	}
	dpi := 0.0
	switch format {
	case SVG:
	case PNG:
		dpi = PNGDPI
	default:
		return fmt.Errorf("graphviz: unknown picture format %q (svg or png)", string(format))
	}
	return r.c.Render(ctx, dot, string(format), dpi, w)
}

// RenderPicture writes a picture laid out by render.Layout in the
// format. A PNG too big to paint is refused from the layout's size (a
// *PNGTooBigError) before Graphviz is called.
func (r *Renderer) RenderPicture(ctx context.Context, p *render.Picture, format Format, w io.Writer) error {
	if format == PNG {
		if err := CheckPNG(p); err != nil {
			return err
		}
	}
	return r.Render(ctx, p.DOT, format, w)
}

// Draw is render.Layout followed by RenderPicture: the solved tree as a
// picture.
func (r *Renderer) Draw(ctx context.Context, sol *eval.Solution, opts render.Options, format Format, w io.Writer) error {
	p, err := render.Layout(sol, opts)
	if err != nil {
		return err
	}
	return r.RenderPicture(ctx, p, format, w)
}
