package graphviz

import (
	"bytes"
	"context"
	"encoding/xml"
	"io"
	"testing"
	"time"

	"github.com/forkcast/forkcast/compiled"
	"github.com/forkcast/forkcast/eval"
	"github.com/forkcast/forkcast/internal/fuzzkit"
	"github.com/forkcast/forkcast/render"
)

// FuzzSVG draws small trees whose labels (title, nodes, branches,
// currency) are anything at all: the SVG must always be well-formed XML
// holding no character a picture or terminal must not get. Each input
// runs under a budget of its own.
func FuzzSVG(f *testing.F) {
	label := func(s string) []byte { return append([]byte{byte(len(s))}, s...) }
	for _, h := range hostile {
		var b []byte
		b = append(b, label(h.label)...)
		b = append(b, label("EU\x1bR")...)
		b = append(b, 1) // objective min
		b = append(b, label(h.label)...)
		b = append(b, 2, 2) // a chance node of 3 outcomes
		for range 3 {
			b = append(b, label(h.label)...) // repeated: numbered
			b = append(b, 0x7f, 0xff, 3, 0)
		}
		f.Add(b, byte(0))
		f.Add(b, byte(0x81))
	}
	r := renderer(f)
	f.Fuzz(func(t *testing.T, data []byte, ob byte) {
		m := fuzzkit.FromBytes(data)
		c, ds := compiled.Compile(m)
		if ds.HasErrors() {
			t.Skipf("does not compile: %v", ds)
		}
		opts := render.Options{PolicyOnly: ob&1 != 0, MaxDepth: int(ob>>1) % 4}
		if ob&0x80 != 0 {
			opts.WrapWidth = 1 + int(ob>>3)%16
		}
		var svg bytes.Buffer
		var err error
		fuzzkit.Check(t, 20*time.Second, 512<<20, func() {
			sol, serr := eval.Solve(c)
			if serr != nil {
				err = serr
				return
			}
			err = r.Draw(context.Background(), sol, opts, SVG, &svg)
		})
		if err != nil {
			t.Fatalf("Draw: %v", err)
		}
		if r, bad := unsafe(svg.String()); bad {
			t.Fatalf("the SVG holds %U", r)
		}
		d := xml.NewDecoder(&svg)
		for {
			_, err := d.Token()
			if err == io.EOF {
				break
			}
			if err != nil {
				t.Fatalf("the SVG is not well-formed XML: %v", err)
			}
		}
	})
}
