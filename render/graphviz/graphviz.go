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

// Draw is render.DOT followed by Render: the solved tree as a picture.
func (r *Renderer) Draw(ctx context.Context, sol *eval.Solution, opts render.Options, format Format, w io.Writer) error {
	dot, err := render.DOT(sol, opts)
	if err != nil {
		return err
	}
	return r.Render(ctx, dot, format, w)
}
