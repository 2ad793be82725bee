package graphviz

import (
	"bytes"
	"context"
	"fmt"
	"testing"

	"github.com/forkcast/forkcast/render"
	"github.com/forkcast/forkcast/render/internal/fixtures"
)

// BenchmarkDraw measures the two halves of drawing a generated tree:
// writing the DOT text (ours) and laying it out and writing SVG
// (Graphviz, in WebAssembly). The WebAssembly compilation happens once per
// process, before the benchmark starts.
func BenchmarkDraw(b *testing.B) {
	for _, n := range []int{200, 1000} {
		sol := fixtures.Solve(b, fixtures.Generated(n))
		b.Run(fmt.Sprintf("DOT/%d", n), func(b *testing.B) {
			for b.Loop() {
				if _, err := render.DOT(sol, render.Options{}); err != nil {
					b.Fatal(err)
				}
			}
		})
		dot, err := render.DOT(sol, render.Options{})
		if err != nil {
			b.Fatal(err)
		}
		r := renderer(b)
		b.Run(fmt.Sprintf("SVG/%d", n), func(b *testing.B) {
			var buf bytes.Buffer
			for b.Loop() {
				buf.Reset()
				if err := r.Render(context.Background(), dot, SVG, &buf); err != nil {
					b.Fatal(err)
				}
			}
			b.SetBytes(int64(buf.Len()))
		})
	}
}
