package render

import (
	"context"
	"fmt"
	"io"
	"strings"

	"github.com/forkcast/forkcast/eval"
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
	return "", fmt.Errorf("render: unknown picture format %q (svg or png)", s)
}

// Renderer lays out DOT graphs with Graphviz and writes them as pictures.
// It holds a Graphviz context; make one, use it for every picture and Close
// it when done. Its methods are safe for concurrent use (the calls are
// serialised: Graphviz runs as one WebAssembly instance per process).
//
// The WebAssembly build of Graphviz is compiled once per process, when the
// program starts, and the compiled code is cached on disk in the user's
// cache directory (os.UserCacheDir()/forkcast/go-graphviz), so that later
// runs start in a few tens of milliseconds instead of most of a second.
type Renderer struct {
	c *gv.Context
}

// NewRenderer makes a Renderer.
func NewRenderer(ctx context.Context) (*Renderer, error) {
	c, err := gv.New(ctx)
	if err != nil {
		return nil, fmt.Errorf("render: starting Graphviz: %w", err)
	}
	return &Renderer{c: c}, nil
}

// Close frees the Renderer's Graphviz context. A closed Renderer returns
// an error from Render.
func (r *Renderer) Close() error {
	if r == nil || r.c == nil {
		return nil
	}
	return r.c.Close()
}

// Render lays out a graph written in the DOT language (as DOT makes it)
// left to right and writes it to w in the format. Nothing is written when
// it fails.
func (r *Renderer) Render(ctx context.Context, dot []byte, format Format, w io.Writer) error {
	if r == nil || r.c == nil {
		return fmt.Errorf("render: the renderer is closed")
	}
	dpi := 0.0
	switch format {
	case SVG:
	case PNG:
		dpi = PNGDPI
	default:
		return fmt.Errorf("render: unknown picture format %q (svg or png)", string(format))
	}
	return r.c.Render(ctx, dot, string(format), dpi, w)
}

// Draw is DOT followed by Render: the solved tree as a picture.
func (r *Renderer) Draw(ctx context.Context, sol *eval.Solution, opts Options, format Format, w io.Writer) error {
	dot, err := DOT(sol, opts)
	if err != nil {
		return err
	}
	return r.Render(ctx, dot, format, w)
}
