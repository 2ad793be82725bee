// Package gv is the one door to go-graphviz: it serialises every call into
// its WebAssembly instance and turns its panics into errors.
//
// go-graphviz runs a single WebAssembly instance of Graphviz per process
// (created in its package init) and its calls are not safe for concurrent
// use: two goroutines calling it at once crash the process, even through
// separate graphviz.Graphviz values. The lock below guards that process-wide
// instance; it is the only package-level state.
package gv

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"sync"

	"github.com/forkcast/forkcast/render/internal/gvcache"
	graphviz "github.com/goccy/go-graphviz"
)

func init() {
	// go-graphviz has initialised by now (this package imports it): give
	// the process its temporary directory back.
	gvcache.Restore()
}

// mu guards go-graphviz's process-wide WebAssembly instance.
var mu sync.Mutex

// engine reports whether a graph may ask for a layout engine.
func engine(name string) bool {
	switch name {
	case "dot", "neato", "fdp", "sfdp", "circo", "twopi", "osage", "patchwork", "nop", "nop1", "nop2":
		return true
	}
	return false
}

// Context is one Graphviz context (a GVC_t). Its methods are safe for
// concurrent use.
type Context struct {
	g   *graphviz.Graphviz
	png *pngEngine
}

// New makes a context.
func New(ctx context.Context) (c *Context, err error) {
	mu.Lock()
	defer mu.Unlock()
	defer recoverInto(&err)
	ps, png, err := plugins(ctx)
	if err != nil {
		return nil, err
	}
	g, err := graphviz.NewWithPlugins(ctx, ps...)
	if err != nil {
		return nil, err
	}
	return &Context{g: g, png: png}, nil
}

// Close frees the context. go-graphviz reports from it the last message
// Graphviz gave on any earlier call (gvFreeContext returns the count of
// errors ever reported), which says nothing about the freeing: that is
// dropped, and only a failure of the call itself is returned.
func (c *Context) Close() (err error) {
	mu.Lock()
	defer mu.Unlock()
	defer recoverInto(&err)
	if c.g == nil {
		return nil
	}
	g := c.g
	c.g = nil
	_ = g.Close()
	return nil
}

// Render lays out a graph in the DOT language with the dot engine and
// writes it in format ("svg", "png"). dpi, when positive, sets the
// resolution of raster formats.
func (c *Context) Render(ctx context.Context, dot []byte, format string, dpi float64, w io.Writer) (err error) {
	if err := ctx.Err(); err != nil {
		return err
	}
	var buf bytes.Buffer
	if err := c.render(ctx, dot, format, dpi, &buf); err != nil {
		return err
	}
	_, err = w.Write(buf.Bytes())
	return err
}

func (c *Context) render(ctx context.Context, dot []byte, format string, dpi float64, buf *bytes.Buffer) (err error) {
	mu.Lock()
	defer mu.Unlock()
	defer recoverInto(&err)
	if c.g == nil {
		return fmt.Errorf("graphviz: the renderer is closed")
	}
	graph, err := graphviz.ParseBytes(dot)
	if err != nil {
		return fmt.Errorf("graphviz: %w", err)
	}
	if graph == nil {
		return fmt.Errorf("graphviz: no graph in the input")
	}
	defer func() {
		if cerr := graph.Close(); cerr != nil && err == nil {
			err = cerr
		}
	}()
	if dpi > 0 {
		graph.SetDPI(dpi)
	}
	// go-graphviz passes the layout engine to gvLayout itself, which does
	// not look at the graph's own layout attribute: honour it here.
	layout := graphviz.DOT
	if l := graph.GetStr("layout"); l != "" {
		if !engine(l) {
			return fmt.Errorf("graphviz: unknown layout %q", l)
		}
		layout = graphviz.Layout(l)
	}
	c.g.SetLayout(layout)
	c.png.err = nil
	if err := c.g.Render(ctx, graph, graphviz.Format(format), buf); err != nil {
		return fmt.Errorf("graphviz: %w", err)
	}
	if format == "png" && c.png.err != nil {
		buf.Reset()
		return c.png.err
	}
	// go-graphviz drops the status of the render call: a failure shows
	// only as missing output.
	if buf.Len() == 0 || (format == "svg" && !bytes.Contains(buf.Bytes(), []byte("</svg>"))) {
		return fmt.Errorf("graphviz could not draw the graph (it gave no %s output)", format)
	}
	return nil
}

// PNGPages is how many pages the PNG painter has begun in this context.
func (c *Context) PNGPages() int {
	mu.Lock()
	defer mu.Unlock()
	return c.png.pages
}

func recoverInto(err *error) {
	if r := recover(); r != nil {
		*err = fmt.Errorf("graphviz failed: %v", r)
	}
}
